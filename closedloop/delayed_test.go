package closedloop

import (
	"encoding/json"
	"math"
	"os"
	"strconv"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// TestDeadTimeMethodOfSteps checks the exact delayed responses (delayed.go)
// against the method-of-steps closed forms of testdata/gen_deadtime.py
// (mpmath at 60 digits):
//
//   - lag plus dead time e^(−0.5s)/(s + 1) under C = 2: the load-disturbance
//     peak, its time, the recovery time (2 % of the peak), the offset 1/3,
//     and the control signal after a reference step (u(0+) = K = 2 is its
//     peak);
//   - integrator plus dead time e^(−s)/s under C = 0.8: IAE, ISE and ITAE of
//     the reference error.
//
// Tolerances: values 1e-11 relative, times 1e-9 relative (the bar
// for located times; the interpolant's error is about 1e-14 of the
// response, see delayed.go), integrals 1e-10 relative and within their
// stated bounds. A Padé approximation of order 8 misses these by far more
// (logged for comparison).
func TestDeadTimeMethodOfSteps(t *testing.T) {
	raw, err := os.ReadFile("testdata/deadtime.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref map[string]map[string]any
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	num := func(loop, key string) float64 {
		v, err := strconv.ParseFloat(ref[loop][key].(string), 64)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	type check struct {
		name      string
		got, want float64
		tol       float64
	}
	run := func(checks []check) {
		for _, c := range checks {
			if math.Abs(c.got-c.want) > c.tol*math.Max(math.Abs(c.want), 1e-300) || math.IsNaN(c.got) {
				t.Errorf("%s = %.15g, want %.15g (rel. error %.2g)", c.name, c.got, c.want, rel(c.got, c.want))
			} else {
				t.Logf("%s = %.15g, reference %.15g (rel. error %.2g)", c.name, c.got, c.want, rel(c.got, c.want))
			}
		}
	}

	lag, _ := tf.MustNew([]float64{1}, []float64{1, 1}).WithDelay(0.5)
	fs, err := Of(Loop{Plant: lag, Controller: tf.MustNew([]float64{2}, []float64{1})}, nil)
	if err != nil {
		t.Fatal(err)
	}
	d, err := fs.StepDeviation(LoadDisturbance, ProcessOutput, nil)
	if err != nil {
		t.Fatal(err)
	}
	ce, err := fs.ControlEffort(Reference)
	if err != nil {
		t.Fatal(err)
	}
	cl, err := fs.ControlEffort(LoadDisturbance)
	if err != nil {
		t.Fatal(err)
	}
	const L = "lag_K2_tau0.5"
	run([]check{
		{"lag: load peak", d.PeakDeviation, num(L, "load_peak"), 1e-11},
		{"lag: load peak time", d.PeakTimeSec, num(L, "load_peak_time"), 1e-9},
		{"lag: recovery time", d.RecoveryTimeSec, num(L, "load_recovery_time"), 1e-9},
		{"lag: offset", d.FinalValue, num(L, "load_final"), 1e-14},
		{"lag: reference u(0+)", ce.InitialValue, 2, 1e-15},
		{"lag: reference u peak", ce.PeakValue, num(L, "reference_control_peak"), 1e-12},
		{"lag: reference u final", ce.FinalValue, 2.0 / 3, 1e-14},
		// u = −K·y_d after a load step.
		{"lag: load u peak", cl.PeakValue, -2 * num(L, "load_peak"), 1e-11},
		{"lag: load u peak time", cl.PeakTimeSec, num(L, "load_peak_time"), 1e-9},
	})
	if ce.PeakTimeSec != 0 {
		t.Errorf("reference u peak time %v, want 0 (the kick)", ce.PeakTimeSec)
	}
	if !math.IsInf(d.IntegratedAbsoluteError, 1) {
		t.Errorf("IAE with an offset: %v, want +Inf", d.IntegratedAbsoluteError)
	}

	// For comparison: the same metrics on the rational loop with the dead
	// time replaced by its Padé approximant of order 8 (the former method).
	pade, err := lag.Pade(8)
	if err != nil {
		t.Fatal(err)
	}
	fp, err := Of(Loop{Plant: pade, Controller: tf.MustNew([]float64{2}, []float64{1})}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if dp, err := fp.StepDeviation(LoadDisturbance, ProcessOutput, nil); err == nil {
		t.Logf("Padé 8 for comparison: load peak rel. error %.2g, peak time %.2g, recovery time %.2g",
			rel(dp.PeakDeviation, num(L, "load_peak")), rel(dp.PeakTimeSec, num(L, "load_peak_time")), rel(dp.RecoveryTimeSec, num(L, "load_recovery_time")))
	}

	integ, _ := tf.MustNew([]float64{1}, []float64{1, 0}).WithDelay(1)
	fi, err := Of(Loop{Plant: integ, Controller: tf.MustNew([]float64{0.8}, []float64{1})}, nil)
	if err != nil {
		t.Fatal(err)
	}
	ic, err := fi.ErrorIntegrals(Reference)
	if err != nil {
		t.Fatal(err)
	}
	const I = "integrator_K0.8_tau1"
	run([]check{
		{"integrator: IAE", ic.IntegratedAbsoluteError, num(I, "iae"), 1e-10},
		{"integrator: ISE", ic.IntegratedSquaredError, num(I, "ise"), 1e-10},
		{"integrator: ITAE", ic.IntegratedTimeAbsoluteError, num(I, "itae"), 1e-10},
	})
	if e := math.Abs(ic.IntegratedAbsoluteError - num(I, "iae")); e > ic.AbsoluteErrorBound {
		t.Errorf("IAE error %.3g beyond its bound %.3g", e, ic.AbsoluteErrorBound)
	}
	if e := math.Abs(ic.IntegratedTimeAbsoluteError - num(I, "itae")); e > ic.TimeAbsoluteErrorBound {
		t.Errorf("ITAE error %.3g beyond its bound %.3g", e, ic.TimeAbsoluteErrorBound)
	}
	t.Logf("bounds: IAE %.3g, ITAE %.3g", ic.AbsoluteErrorBound, ic.TimeAbsoluteErrorBound)
}
