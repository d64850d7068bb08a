package closedloop

import (
	"errors"
	"math"
	"math/cmplx"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// TestStabilityExactWithDeadTime: internal stability of a continuous loop
// with dead time is decided on the quasi-polynomial, not on the Padé
// polynomial. A first-order Padé approximant (Settings.PadeOrder 1) moves
// the stability limits far enough to tell the two apart:
//
//   - a·e^(−s)/s, i.e. ẋ(t) = −a·x(t − 1): stable iff a < π/2 (Hayes 1950,
//     "Roots of the transcendental equation associated with a certain
//     difference-differential equation", J. London Math. Soc. 25; from
//     memory), while with e^(−s) ≈ (1 − s/2)/(1 + s/2) the characteristic
//     polynomial s²/2 + (1 − a/2)s + a is Hurwitz iff a < 2 (closed form);
//   - K·e^(−s)/(s + 1): stable iff K < √(1 + ω²) with ω = −tan ω in
//     (π/2, π) (the textbook condition ωT = −tan(ωτ); ω = 2.028757838…,
//     K = 2.261826…), while the Padé(1) polynomial
//     s²/2 + (3 − K)s/2 + 1 + K is Hurwitz iff K < 3.
//
// Between the two limits the Padé verdict is wrong; the exact one must not
// be. Just inside each exact limit (0.999×) both agree on "stable".
func TestStabilityExactWithDeadTime(t *testing.T) {
	set := &Settings{PadeOrder: 1}
	integrator := tf.MustNew([]float64{1}, []float64{1, 0})
	lag := tf.MustNew([]float64{1}, []float64{1, 1})
	one := tf.MustNew([]float64{1}, []float64{1})
	const kLag = 2.2618262 // √(1 + ω²), ω the root of ω = −tan ω in (π/2, π), to 8 digits
	tests := []struct {
		name   string
		plant  tf.TF
		gain   float64
		stable bool
	}{
		{"integrator a = 0.999·π/2", integrator, 0.999 * math.Pi / 2, true},
		{"integrator a = 1.8 (Padé(1) stable)", integrator, 1.8, false},
		{"integrator a = 1.01·π/2", integrator, 1.01 * math.Pi / 2, false},
		{"lag K = 0.999·Kc", lag, 0.999 * kLag, true},
		{"lag K = 2.8 (Padé(1) stable)", lag, 2.8, false},
		{"lag K = 1.001·Kc", lag, 1.001 * kLag, false},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			g, err := test.plant.WithDelay(1)
			if err != nil {
				t.Fatal(err)
			}
			fs, err := Of(Loop{Plant: g, Controller: one, Gain: test.gain}, set)
			if err != nil {
				t.Fatal(err)
			}
			if !fs.StabilityExact {
				t.Fatalf("StabilityExact false")
			}
			if fs.InternallyStable != test.stable {
				t.Fatalf("InternallyStable %v, want %v (unstable %v)", fs.InternallyStable, test.stable, fs.UnstablePoles)
			}
			if test.stable {
				return
			}
			// The listed roots are exact: the quasi-polynomial
			// s·D(s) + gain·e^(−s) vanishes there to rounding.
			if len(fs.UnstablePoles) == 0 {
				t.Fatalf("unstable with no roots listed")
			}
			for _, s := range fs.UnstablePoles {
				if real(s) < 0 {
					t.Errorf("listed root %v has Re s < 0", s)
				}
				d, e := g.Den().EvalComplex(s), complex(test.gain, 0)*cmplx.Exp(-s)
				if r := cmplx.Abs(d+e) / (cmplx.Abs(d) + cmplx.Abs(e)); r > 1e-12 {
					t.Errorf("root %v: relative residual %.3g", s, r)
				}
			}
			if _, err := fs.StepDeviation(LoadDisturbance, ProcessOutput, nil); !errors.Is(err, ErrInternallyUnstable) {
				t.Errorf("StepDeviation of an unstable loop: %v, want ErrInternallyUnstable", err)
			}
		})
	}
}

// TestStabilityDelayIndependent: 1/(s + 1) with a dead time of 10⁶ s
// (|L(jω)| < 1 for every ω > 0: stable for every dead time — the small-gain
// form of delay-independent stability, Hale & Verduyn Lunel 1993, from
// memory) has too many roots near the axis to count, and the Padé(8) roots
// lie within rounding of the axis; the verdict is still exact: stable.
func TestStabilityDelayIndependent(t *testing.T) {
	g, err := tf.MustNew([]float64{1}, []float64{1, 1}).WithDelay(1e6)
	if err != nil {
		t.Fatal(err)
	}
	fs, err := Of(Loop{Plant: g, Controller: tf.MustNew([]float64{1}, []float64{1}), Gain: 1}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !fs.StabilityExact || !fs.InternallyStable || len(fs.UnstablePoles) != 0 || len(fs.HiddenModes) != 0 {
		t.Fatalf("StabilityExact %v, InternallyStable %v, unstable %v, hidden %v; want exact and stable",
			fs.StabilityExact, fs.InternallyStable, fs.UnstablePoles, fs.HiddenModes)
	}
}
