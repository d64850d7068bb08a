package response

import (
	"math"
	"testing"

	"github.com/loopwise/loopwise/internal/refcases"
	"github.com/loopwise/loopwise/tf"
)

// closedLoopOf returns T = K·L/(1 + K·L) of a reference case's loop.
func closedLoopOf(t *testing.T, c refcases.Case, k float64) tf.TF {
	t.Helper()
	num := append([]float64(nil), c.Loop.Num...)
	for i := range num {
		num[i] *= k
	}
	l, err := tf.NewDiscrete(num, c.Loop.Den, c.Loop.SampleTime)
	if err != nil {
		t.Fatal(err)
	}
	cl, err := l.ClosedLoop()
	if err != nil {
		t.Fatal(err)
	}
	return cl
}

func num(v float64) refcases.Number {
	if math.IsNaN(v) {
		return refcases.Number{Null: true, V: math.NaN()}
	}
	return refcases.Number{V: v}
}

func TestRefcasesStepMetrics(t *testing.T) {
	// Expected values and tolerances (rel 1e-8, abs 1e-10) from the shared
	// reference cases (mpmath partial fractions, 50 digits; README
	// Conventions). Cases: D01 D03 D05 D06.
	cases, err := refcases.ByType("step_metrics")
	if err != nil {
		t.Fatal(err)
	}
	if len(cases) < 4 {
		t.Fatalf("only %d step_metrics cases", len(cases))
	}
	for _, c := range cases {
		t.Run(c.ID, func(t *testing.T) {
			var q struct{ K float64 }
			if err := c.DecodeQuery(&q); err != nil {
				t.Fatal(err)
			}
			var want struct {
				FinalValue       refcases.Number  `json:"final_value"`
				T10              refcases.Number  `json:"t10"`
				T90              refcases.Number  `json:"t90"`
				RiseTime         refcases.Number  `json:"rise_time_10_90"`
				PeakValue        refcases.Number  `json:"peak_value"`
				PeakTime         refcases.Number  `json:"peak_time"`
				OvershootPct     refcases.Number  `json:"overshoot_pct"`
				UndershootPct    refcases.Number  `json:"undershoot_pct"`
				UndershootTime   refcases.Number  `json:"undershoot_time"`
				Settling         refcases.Number  `json:"settling_time_2pct"`
				FormulaOvershoot *refcases.Number `json:"formula_overshoot_pct"`
				FormulaPeakTime  *refcases.Number `json:"formula_peak_time"`
			}
			if err := c.Decode(&want); err != nil {
				t.Fatal(err)
			}
			m, err := StepMetrics(closedLoopOf(t, c, q.K), nil)
			if err != nil {
				t.Fatal(err)
			}
			tol := c.Tolerance
			for _, f := range []struct {
				name string
				got  float64
				want refcases.Number
			}{
				{"final value", m.FinalValue, want.FinalValue},
				{"t10", m.RiseStartSec, want.T10},
				{"t90", m.RiseEndSec, want.T90},
				{"rise time", m.RiseTimeSec, want.RiseTime},
				{"peak value", m.PeakValue, want.PeakValue},
				{"peak time", m.PeakTimeSec, want.PeakTime},
				{"overshoot", m.OvershootPct, want.OvershootPct},
				{"undershoot", m.UndershootPct, want.UndershootPct},
				{"undershoot time", m.UndershootTimeSec, want.UndershootTime},
				{"settling time", m.SettlingTimeSec, want.Settling},
			} {
				if !tol.Within(num(f.got), f.want) {
					t.Errorf("%s = %.17g, want %.17g (null %v)", f.name, f.got, f.want.V, f.want.Null)
				}
			}
			if want.FormulaOvershoot != nil && !tol.Within(num(m.OvershootPct), *want.FormulaOvershoot) {
				t.Errorf("overshoot %v vs formula %v", m.OvershootPct, want.FormulaOvershoot.V)
			}
			if want.FormulaPeakTime != nil && !tol.Within(num(m.PeakTimeSec), *want.FormulaPeakTime) {
				t.Errorf("peak time %v vs formula %v", m.PeakTimeSec, want.FormulaPeakTime.V)
			}
		})
	}
}

func TestRefcasesTimeSamples(t *testing.T) {
	// D08: impulse and step values of a closed loop at given times, from
	// exact partial fractions (tolerance rel 1e-10, abs 1e-12 from the case).
	// The grid is chosen so that every query time is a sample: 0.1 s step.
	cases, err := refcases.ByType("time_samples")
	if err != nil {
		t.Fatal(err)
	}
	if len(cases) == 0 {
		t.Fatal("no time_samples cases")
	}
	for _, c := range cases {
		t.Run(c.ID, func(t *testing.T) {
			var q struct {
				K     float64
				Times []float64
			}
			if err := c.DecodeQuery(&q); err != nil {
				t.Fatal(err)
			}
			var want struct {
				Impulse []refcases.Number
				Step    []refcases.Number
			}
			if err := c.Decode(&want); err != nil {
				t.Fatal(err)
			}
			sys := closedLoopOf(t, c, q.K)
			// Simulate at exactly the query times (uneven spacing) and also
			// read them off a uniform Step grid.
			u := make([]float64, len(q.Times)+1)
			times := append([]float64{0}, q.Times...)
			for i := range u {
				u[i] = 1
			}
			sim, err := Simulate(sys, times, u, nil)
			if err != nil {
				t.Fatal(err)
			}
			step, err := Step(sys, &Settings{HorizonSec: 10, StepSec: 0.1})
			if err != nil {
				t.Fatal(err)
			}
			imp, err := Impulse(sys, &Settings{HorizonSec: 10, StepSec: 0.1})
			if err != nil {
				t.Fatal(err)
			}
			for i, tq := range q.Times {
				k := int(math.Round(tq / 0.1))
				if math.Abs(step.TimeSec[k]-tq) > 1e-12 {
					t.Fatalf("grid time %v ≠ %v", step.TimeSec[k], tq)
				}
				if !c.Tolerance.Within(num(step.Output[k]), want.Step[i]) {
					t.Errorf("step(%v) = %.17g, want %.17g", tq, step.Output[k], want.Step[i].V)
				}
				if !c.Tolerance.Within(num(sim.Output[i+1]), want.Step[i]) {
					t.Errorf("simulated step(%v) = %.17g, want %.17g", tq, sim.Output[i+1], want.Step[i].V)
				}
				if !c.Tolerance.Within(num(imp.Output[k]), want.Impulse[i]) {
					t.Errorf("impulse(%v) = %.17g, want %.17g", tq, imp.Output[k], want.Impulse[i].V)
				}
			}
		})
	}
}

func TestRefcasesSteadyState(t *testing.T) {
	// D09 (type 0), D11 (type 2): exact rational values, tolerance rel
	// 1e-12 from the case.
	cases, err := refcases.ByType("steady_state_errors")
	if err != nil {
		t.Fatal(err)
	}
	if len(cases) < 2 {
		t.Fatalf("only %d steady_state_errors cases", len(cases))
	}
	for _, c := range cases {
		t.Run(c.ID, func(t *testing.T) {
			var q struct{ K float64 }
			if err := c.DecodeQuery(&q); err != nil {
				t.Fatal(err)
			}
			var want struct {
				Type      int             `json:"system_type"`
				Kp        refcases.Number `json:"Kp"`
				Kv        refcases.Number `json:"Kv"`
				Ka        refcases.Number `json:"Ka"`
				EStep     refcases.Number `json:"e_step"`
				ERamp     refcases.Number `json:"e_ramp"`
				EParabola refcases.Number `json:"e_parabola"`
			}
			if err := c.Decode(&want); err != nil {
				t.Fatal(err)
			}
			numc := append([]float64(nil), c.Loop.Num...)
			for i := range numc {
				numc[i] *= q.K
			}
			l, err := tf.NewDiscrete(numc, c.Loop.Den, c.Loop.SampleTime)
			if err != nil {
				t.Fatal(err)
			}
			e, err := SteadyState(l)
			if err != nil {
				t.Fatal(err)
			}
			if e.SystemType != want.Type {
				t.Errorf("type %d, want %d", e.SystemType, want.Type)
			}
			for _, f := range []struct {
				name string
				got  float64
				want refcases.Number
			}{
				{"Kp", e.PositionConstant, want.Kp}, {"Kv", e.VelocityConstant, want.Kv}, {"Ka", e.AccelerationConstant, want.Ka},
				{"step error", e.StepError, want.EStep}, {"ramp error", e.RampError, want.ERamp}, {"parabola error", e.ParabolaError, want.EParabola},
			} {
				if !c.Tolerance.Within(num(f.got), f.want) {
					t.Errorf("%s = %v, want %v", f.name, f.got, f.want.V)
				}
			}
		})
	}
}
