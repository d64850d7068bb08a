package response

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"strconv"
	"testing"
)

// TestClosedLoopStepMetricsReference compares with 50-digit metrics of the
// method-of-steps closed form (testdata/delay_metrics.py). Tolerance 1e-9
// relative (the target); peak time 1e-7, as a flat maximum is
// determined only to about √eps of its curvature scale (see Metrics).
func TestClosedLoopStepMetricsReference(t *testing.T) {
	b, err := os.ReadFile("testdata/delay_metrics.json")
	if err != nil {
		t.Fatal(err)
	}
	var f struct {
		Cases []map[string]any
	}
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatal(err)
	}
	num := func(c map[string]any, k string) float64 {
		v, err := strconv.ParseFloat(c[k].(string), 64)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	for _, c := range f.Cases {
		K, T, tau := c["K"].(float64), c["T"].(float64), c["tau"].(float64)
		loop := delayLoop(t, []float64{K}, []float64{T, 1}, tau)
		m, err := ClosedLoopStepMetrics(loop, nil, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, q := range []struct {
			name string
			got  float64
			tol  float64
		}{
			{"finalValue", m.FinalValue, 1e-15},
			{"riseStartSec", m.RiseStartSec, 1e-9},
			{"riseEndSec", m.RiseEndSec, 1e-9},
			{"settlingTimeSec", m.SettlingTimeSec, 1e-9},
			{"peakValue", m.PeakValue, 1e-12},
			{"overshootPct", m.OvershootPct, 1e-10},
			{"peakTimeSec", m.PeakTimeSec, 1e-7},
		} {
			want := num(c, q.name)
			if math.Abs(q.got-want) > q.tol*math.Abs(want) {
				t.Errorf("K=%v T=%v τ=%v %s = %.15g, want %.15g (rel %.2g)", K, T, tau, q.name, q.got, want, math.Abs(q.got-want)/math.Abs(want))
			}
		}
	}
}

func TestClosedLoopStepMetricsUnstable(t *testing.T) {
	// K·e^(−0.5s)/(s + 1) is unstable above K* = 3.8069 (ωT = −tan ωτ).
	loop := delayLoop(t, []float64{4}, []float64{1, 1}, 0.5)
	if _, err := ClosedLoopStepMetrics(loop, nil, nil); !errors.Is(err, ErrUnstable) {
		t.Errorf("K = 4: %v, want ErrUnstable", err)
	}
	bip := delayLoop(t, []float64{0.5, 1}, []float64{1, 1}, 0.5)
	if _, err := ClosedLoopStepMetrics(bip, nil, nil); !errors.Is(err, ErrDelay) {
		t.Errorf("biproper: %v, want ErrDelay", err)
	}
}
