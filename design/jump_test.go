package design

import (
	"math"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// bisectSlack locates the sign change of the slack of r between xp (met)
// and xf (not met) by bisection on spec.Check alone, to rel relative.
func bisectSlack(t *testing.T, v Variable, r spec.Requirement, xp, xf, rel float64) float64 {
	t.Helper()
	met := func(x float64) bool {
		l, err := v.LoopAt(x)
		if err != nil {
			t.Fatal(err)
		}
		return spec.Check(l, spec.Requirements{r}).Passed()
	}
	if !met(xp) || met(xf) {
		t.Fatalf("%s: no sign change between %v and %v", r, xp, xf)
	}
	for math.Abs(xf-xp) > rel*math.Abs(xp) {
		m := xp + (xf-xp)/2
		if met(m) {
			xp = m
		} else {
			xf = m
		}
	}
	return xp + (xf-xp)/2
}

// TestDirectEnds checks the ends located without bracketing on the step
// metrics (settling time by its excess over the band, overshoot and rise
// time from exact response values) against plain bisection on spec.Check,
// and that these constructions, not the fallback, produced them on the
// benchmark loop (a silent fallback would be correct but slow).
func TestDirectEnds(t *testing.T) {
	for _, c := range ratioLoops {
		t.Run(c.name, func(t *testing.T) { checkDirectEnds(t, c.loop, c.req) })
	}
}

func checkDirectEnds(t *testing.T, loop string, reqs spec.Requirements) {
	v, err := Gain(tf.MustParse(loop))
	if err != nil {
		t.Fatal(err)
	}
	res, err := Solve(v, reqs, nil)
	if err != nil {
		t.Fatal(err)
	}
	p, err := newProblem(v, nil)
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for _, rs := range res.Requirements {
		if rs.Method != "bracketing" {
			continue
		}
		req := spec.Requirements{rs.Requirement}
		p.generic = req
		slack := func(x float64) float64 { return Slack(p.eval(x, "generic", req).Results[0]) }
		for _, iv := range rs.Intervals {
			for side, x := range []float64{iv.Lo, iv.Hi} {
				label := []string{iv.LoBinding, iv.HiBinding}[side]
				if label == "end of the range" || strings.HasPrefix(label, "stability") {
					continue
				}
				// A bracket as the samples give it: 3 % on either side.
				xp, xf := x*1.03, x*0.97
				if side == 1 {
					xp, xf = x*0.97, x*1.03
				}
				want := bisectSlack(t, v, rs.Requirement, xp, xf, 1e-8)
				var got float64
				var ok bool
				if rs.Key == keySettling || rs.Key == keyRiseTime {
					got, _, ok = p.windowEnd(req, 0, slack, xp, xf)
				} else {
					got, _, ok = p.directEnd(req, 0, slack, xp, xf)
				}
				if !ok {
					t.Errorf("%s: the end %v was not located directly", rs.Name, x)
					continue
				}
				checked++
				// Bisection locates to 1e-8; a jump is confirmed to
				// jumpConfirm, a continuous end polished to 1e-11.
				tol := 2e-8
				if strings.Contains(label, "jumps") {
					tol = jumpConfirm + 1e-8
				}
				if d := math.Abs(got-want) / math.Abs(want); d > tol {
					t.Errorf("%s: direct end %.12g, bisection %.12g (relative %.2g > %.2g)", rs.Name, got, want, d, tol)
				}
				if d := math.Abs(got-x) / math.Abs(x); d > tol {
					t.Errorf("%s: Solve's end %.12g, direct %.12g", rs.Name, x, got)
				}
			}
		}
	}
	// Overshoot (upper end), rise time (lower: continuous for the order-10
	// loop, a jump for the order-6 loop), settling time (both: continuous
	// below, a jump above).
	if checked != 4 {
		t.Errorf("%d ends checked, want 4", checked)
	}
}
