package closedloop

import (
	"errors"
	"math"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

func rel(a, b float64) float64 { return math.Abs(a-b) / math.Max(math.Abs(b), 1e-300) }

// piLoop is G = 1/(s + 1) with C = Kp + Ki/s: load → output is
// s/(s² + (1 + Kp)·s + Ki), a second-order system whose unit-step
// response is y(t) = e^(−a·t)·sin(b·t)/b, a = (1 + Kp)/2, b² = Ki − a².
func piLoop(kp, ki float64) Loop {
	return Loop{Plant: tf.MustNew([]float64{1}, []float64{1, 1}), Controller: tf.MustNew([]float64{kp, ki}, []float64{1, 0})}
}

// TestSecondOrderLoadClosedForms checks the load-disturbance metrics of
// piLoop against closed forms derived by hand:
//
//	peak at t_p = atan2(b, a)/b, y(t_p) = e^(−a·t_p)·sin(b·t_p)/b
//	ISE = 1/(4·a·ω²), ω² = a² + b² (the quadratic-integral table entry
//	      I₂ = (b₀²·a₂ + b₁²·a₀)/(2·a₀·a₁·a₂) for (b₀s + b₁)/(a₀s² + a₁s + a₂),
//	      K. J. Åström, Introduction to Stochastic Control Theory, 1970,
//	      ch. 5, table of Iₙ, from memory)
//	IAE = coth(a·π/(2b))/ω² (sum over half periods of a geometric series)
//	recovery: the last time |y| = 0.02·|y(t_p)|, the root of |y| − level on
//	      the last half period that reaches the level.
func TestSecondOrderLoadClosedForms(t *testing.T) {
	for _, c := range []struct{ kp, ki float64 }{{1, 4}, {0.4, 2}, {3, 20}} {
		fs, err := Of(piLoop(c.kp, c.ki), nil)
		if err != nil {
			t.Fatal(err)
		}
		d, err := fs.StepDeviation(LoadDisturbance, ProcessOutput, nil)
		if err != nil {
			t.Fatal(err)
		}
		a := (1 + c.kp) / 2
		w2 := c.ki
		b := math.Sqrt(w2 - a*a)
		tp := math.Atan2(b, a) / b
		yp := math.Exp(-a*tp) * math.Sin(b*tp) / b
		ise := 1 / (4 * a * w2)
		iae := 1 / math.Tanh(a*math.Pi/(2*b)) / w2
		y := func(t float64) float64 { return math.Exp(-a*t) * math.Sin(b*t) / b }
		// Recovery: scan half periods [kπ/b, (k+1)π/b]; the extremum of
		// each is at tp + kπ/b with |y| = yp·e^(−a·kπ/b).
		level := 0.02 * yp
		k := math.Floor(math.Log(yp/level) / (a * math.Pi / b))
		lo, hi := tp+k*math.Pi/b, (k+1)*math.Pi/b
		sign := math.Copysign(1, y(lo))
		for range 200 {
			mid := (lo + hi) / 2
			if sign*y(mid) > level {
				lo = mid
			} else {
				hi = mid
			}
		}
		for _, q := range []struct {
			name      string
			got, want float64
			tol       float64
		}{
			{"peak deviation", d.PeakDeviation, yp, 1e-12},
			{"peak time", d.PeakTimeSec, tp, 1e-9},
			{"final value", d.FinalValue, 0, 0},
			{"recovery time", d.RecoveryTimeSec, lo, 1e-9},
			{"ISE", d.IntegratedSquaredError, ise, 1e-10},
			{"IAE", d.IntegratedAbsoluteError, iae, 1e-10},
		} {
			if (q.want == 0 && q.got != 0) || (q.want != 0 && rel(q.got, q.want) > q.tol) {
				t.Errorf("kp=%v ki=%v %s = %.15g, want %.15g", c.kp, c.ki, q.name, q.got, q.want)
			}
		}
	}
}

// TestHiddenUnstableCancellation: the plant 1/(s − 1) with the controller
// 10·(s − 1)/(s·(s + 5)) cancels the unstable plant pole; the loop is
// internally unstable (the pole s = 1 stays in the characteristic
// polynomial) and every function must say so.
func TestHiddenUnstableCancellation(t *testing.T) {
	l := Loop{Plant: tf.MustNew([]float64{1}, []float64{1, -1}), Controller: tf.MustNew([]float64{10, -10}, []float64{1, 5, 0})}
	fs, err := Of(l, nil)
	if err != nil {
		t.Fatal(err)
	}
	if fs.InternallyStable {
		t.Fatal("loop reported internally stable")
	}
	if len(fs.HiddenModes) != 1 || math.Abs(real(fs.HiddenModes[0])-1) > 1e-8 {
		t.Fatalf("hidden modes %v, want [1]", fs.HiddenModes)
	}
	hidden := 0
	for in := range numInputs {
		for out := range numOutputs {
			f := fs.Function(in, out)
			if f.InternallyStable {
				t.Errorf("%v → %v reported internally stable", in, out)
			}
			hidden += len(f.HiddenModes)
		}
	}
	// r → y = 10/(s² + 5s + 10) cancels s − 1; d → y = s(s + 5)/((s − 1)(s² + 5s + 10)) does not.
	if len(fs.Function(Reference, ProcessOutput).HiddenModes) != 1 || len(fs.Function(LoadDisturbance, ProcessOutput).HiddenModes) != 0 {
		t.Errorf("hidden modes per function wrong: r→y %v, d→y %v", fs.Function(Reference, ProcessOutput).HiddenModes, fs.Function(LoadDisturbance, ProcessOutput).HiddenModes)
	}
	if hidden == 0 {
		t.Error("no function lists the hidden mode")
	}
	if _, err := fs.Analyze(nil); !errors.Is(err, ErrInternallyUnstable) {
		t.Errorf("Analyze: %v, want ErrInternallyUnstable", err)
	}
	for _, f := range []func() error{
		func() error { _, err := fs.ControlEffort(Reference); return err },
		func() error { _, err := fs.ErrorIntegrals(Reference); return err },
		func() error { _, err := fs.NoiseGains(); return err },
		func() error { _, err := fs.Peak(Reference, ProcessOutput); return err },
		func() error { _, err := fs.StepDeviation(LoadDisturbance, ProcessOutput, nil); return err },
	} {
		if err := f(); !errors.Is(err, ErrInternallyUnstable) {
			t.Errorf("got %v, want ErrInternallyUnstable", err)
		}
	}
}
