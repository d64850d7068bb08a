package response

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"strconv"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

type delayStepCase struct {
	Name     string
	Num, Den []float64
	DelaySec float64
	TimeSec  []float64
	Output   []string
}

func loadDelayStep(t *testing.T) []delayStepCase {
	t.Helper()
	b, err := os.ReadFile("testdata/delay_step.json")
	if err != nil {
		t.Fatal(err)
	}
	var f struct{ Cases []delayStepCase }
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatal(err)
	}
	return f.Cases
}

func delayLoop(t testing.TB, num, den []float64, tau float64) tf.TF {
	g, err := tf.New(num, den)
	if err != nil {
		t.Fatal(err)
	}
	if g, err = g.WithDelay(tau); err != nil {
		t.Fatal(err)
	}
	return g
}

// TestClosedLoopStepMethodOfSteps compares with the closed forms of the
// method of steps at 50 digits (testdata/delay_step.py; Bellman & Cooke
// 1963). Tolerance 1e-12 of the peak: the collocation's interpolation error
// is below 1e-14 and rounding grows slowly with the number of intervals.
func TestClosedLoopStepMethodOfSteps(t *testing.T) {
	for _, c := range loadDelayStep(t) {
		t.Run(c.Name, func(t *testing.T) {
			loop := delayLoop(t, c.Num, c.Den, c.DelaySec)
			want := make([]float64, len(c.Output))
			peak := 0.0
			for i, s := range c.Output {
				v, err := strconv.ParseFloat(s, 64)
				if err != nil {
					t.Fatal(err)
				}
				want[i] = v
				peak = math.Max(peak, math.Abs(v))
			}
			dt := c.TimeSec[1] - c.TimeSec[0]
			r, err := ClosedLoopStep(loop, &ClosedLoopSettings{HorizonSec: c.TimeSec[len(c.TimeSec)-1], StepSec: dt})
			if err != nil {
				t.Fatal(err)
			}
			worst := 0.0
			for i, w := range want {
				worst = math.Max(worst, math.Abs(r.Output[i]-w))
			}
			t.Logf("max error %.3g of peak %.3g; estimate %.3g; interval %v s", worst/peak, peak, r.ErrorEstimate, r.IntervalSec)
			if worst > 1e-12*peak {
				t.Errorf("max error %.3g relative to the peak", worst/peak)
			}
		})
	}
}

// TestClosedLoopStepDisturbances: the output-disturbance response is
// 1 − (reference response) (S = 1 − T), and with L = K·P·e^(−sτ) the
// response to a step through F = P is the reference response divided by K.
func TestClosedLoopStepDisturbances(t *testing.T) {
	loop := delayLoop(t, []float64{2}, []float64{1, 4, 3}, 0.3)
	set := &ClosedLoopSettings{HorizonSec: 8, StepSec: 0.01}
	ref, err := ClosedLoopStep(loop, set)
	if err != nil {
		t.Fatal(err)
	}
	set.Input = OutputDisturbance
	out, err := ClosedLoopStep(loop, set)
	if err != nil {
		t.Fatal(err)
	}
	set.Input = FilteredDisturbance
	set.Filter = tf.MustNew([]float64{1}, []float64{1, 4, 3})
	fil, err := ClosedLoopStep(loop, set)
	if err != nil {
		t.Fatal(err)
	}
	for i := range ref.Output {
		if d := math.Abs(out.Output[i] - (1 - ref.Output[i])); d > 1e-13 {
			t.Fatalf("t = %v: output disturbance %v, 1 − reference %v", ref.TimeSec[i], out.Output[i], 1-ref.Output[i])
		}
		if d := math.Abs(fil.Output[i] - ref.Output[i]/2); d > 1e-13 {
			t.Fatalf("t = %v: filtered %v, reference/2 %v", ref.TimeSec[i], fil.Output[i], ref.Output[i]/2)
		}
	}
}

func TestClosedLoopStepBadInput(t *testing.T) {
	loop := delayLoop(t, []float64{1}, []float64{1, 1}, 0.5)
	for _, tc := range []struct {
		name string
		loop tf.TF
		set  *ClosedLoopSettings
		want error
	}{
		{"no delay", tf.MustNew([]float64{1}, []float64{1, 1}), nil, ErrDelay},
		{"improper", delayLoop(t, []float64{1, 0, 0}, []float64{1, 1}, 0.5), nil, ErrImproper},
		{"negative horizon", loop, &ClosedLoopSettings{HorizonSec: -1}, ErrSettings},
		{"NaN step", loop, &ClosedLoopSettings{StepSec: math.NaN()}, ErrNotFinite},
		{"bad input", loop, &ClosedLoopSettings{Input: 9}, ErrSettings},
		{"filter with delay", loop, &ClosedLoopSettings{Input: FilteredDisturbance, Filter: delayLoop(t, []float64{1}, []float64{1, 1}, 1)}, ErrDelay},
	} {
		if _, err := ClosedLoopStep(tc.loop, tc.set); !errors.Is(err, tc.want) {
			t.Errorf("%s: %v, want %v", tc.name, err, tc.want)
		}
	}
}
