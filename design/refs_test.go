package design

import (
	"encoding/json"
	"math"
	"os"
	"strconv"
	"testing"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// TestMarginBoundariesMpmath compares the interval ends of margin
// requirements with 50-digit references computed independently by
// testdata/gen_refs.py (mpmath: the frequency condition solved by
// findroot, then the gain from the magnitude; Ms by maximising over ω and
// solving Ms(k) = m). Every end of the requirement's own set that is not a
// range end or a stability boundary must be one of the reference gains to
// 1e-9 relative, and at least one must be found.
func TestMarginBoundariesMpmath(t *testing.T) {
	raw, err := os.ReadFile("testdata/refs.json")
	if err != nil {
		t.Fatal(err)
	}
	var cases []struct {
		Name          string    `json:"name"`
		Num           []float64 `json:"num"`
		Den           []float64 `json:"den"`
		SampleTimeSec float64   `json:"sample_time_sec"`
		Key           string    `json:"key"`
		Limit         float64   `json:"limit"`
		Gains         []string  `json:"gains"`
	}
	if err := json.Unmarshal(raw, &cases); err != nil {
		t.Fatal(err)
	}
	for _, c := range cases {
		t.Run(c.Name, func(t *testing.T) {
			l, err := tf.FromPolys(poly.MustNew(c.Num...), poly.MustNew(c.Den...), c.SampleTimeSec)
			if err != nil {
				t.Fatal(err)
			}
			v, _ := Gain(l)
			r, err := spec.ByKey(c.Key, c.Limit)
			if err != nil {
				t.Fatal(err)
			}
			res, err := Solve(v, spec.Requirements{r}, nil)
			if err != nil {
				t.Fatal(err)
			}
			var refs []float64
			for _, g := range c.Gains {
				x, _ := strconv.ParseFloat(g, 64)
				refs = append(refs, x)
			}
			found := 0
			for _, iv := range res.Requirements[0].Intervals {
				for j, x := range []float64{iv.Lo, iv.Hi} {
					label := []string{iv.LoBinding, iv.HiBinding}[j]
					if label == "end of the range" || len(label) > 9 && label[:9] == "stability" || math.IsInf(x, 0) {
						continue
					}
					best := math.Inf(1)
					for _, g := range refs {
						best = math.Min(best, math.Abs(x-g)/g)
					}
					if best > 1e-9 {
						t.Errorf("end %.17g (%s) is %.2g from the nearest reference %v", x, label, best, refs)
					}
					found++
				}
			}
			if found == 0 {
				t.Errorf("no end compared: %+v", res.Requirements[0].Intervals)
			}
		})
	}
}
