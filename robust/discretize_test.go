package robust

import (
	"errors"
	"math"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// The Tustin map sends the open left half plane onto the open unit disc
// (it is a Möbius map with s = c(z − 1)/(z + 1), c > 0), so a loop
// discretized by it is stable exactly where the loop in s is: the verdicts
// over the box must agree, and a counterexample must have closed-loop roots
// with |z| ≥ 1 (checked again here from the discretized loop itself).
//
// Loop 9·g/(s²(m s + 1))·(0.4 + 0.3 s) of the pick-and-place tests: by
// Routh–Hurwitz on m s³ + s² + 2.7 g s + 3.6 g (all coefficients positive),
// stable iff 2.7 g > 3.6 g·m, i.e. m < 0.75 — stable for m ∈ [0.05, 0.08],
// unstable for m ∈ [0.7, 0.8] (m > 0.75 in part of the box).
func TestTustinBoxMatchesContinuous(t *testing.T) {
	expr := []string{"9*g/(s^2 (m s + 1))", "(0.4 + 0.3*s)"}
	for _, test := range []struct {
		name   string
		m      [2]float64
		want   Verdict
		warp   float64
		sample float64
	}{
		{"stable", [2]float64{0.05, 0.08}, StableForBox, 0, 0.01},
		{"stable prewarped", [2]float64{0.05, 0.08}, StableForBox, 20, 0.01},
		{"stable slow sampling", [2]float64{0.05, 0.08}, StableForBox, 0, 0.5},
		{"unstable", [2]float64{0.7, 0.8}, UnstableAtPoint, 0, 0.01},
	} {
		t.Run(test.name, func(t *testing.T) {
			params := []Param{{Name: "g", Min: 0.8, Max: 1.2}, {Name: "m", Min: test.m[0], Max: test.m[1]}}
			cont := mustLoop(t, Description{Expressions: expr, Params: params})
			disc := mustLoop(t, Description{Expressions: expr, Params: params,
				Discretize: &Discretization{SampleTimeSec: test.sample, Method: tf.Tustin, PrewarpRadPerSec: test.warp}})
			if disc.Class() != cont.Class() {
				t.Errorf("class %v after Tustin, %v before", disc.Class(), cont.Class())
			}
			if !disc.Nominal().IsDiscrete() || disc.Nominal().SampleTimeSec() != test.sample {
				t.Fatalf("nominal %v is not the loop in z", disc.Nominal())
			}
			rc := checkVerdict(t, cont, test.want, nil)
			rd := checkVerdict(t, disc, test.want, nil)
			if rd.Verdict != rc.Verdict {
				t.Fatalf("Tustin verdict %v, continuous %v", rd.Verdict, rc.Verdict)
			}
			if ce := rd.Counterexample; ce != nil {
				if m := ce.Values[1]; m <= 0.75 {
					t.Errorf("counterexample m = %v, but m ≤ 0.75 is stable by Routh–Hurwitz", m)
				}
				for _, z := range ce.UnstableRoots {
					if math.Hypot(real(z), imag(z)) < 1 {
						t.Errorf("counterexample root %v inside the unit circle", z)
					}
				}
			}
		})
	}
}

// The holds and the matched map are refused with the reason; so is a
// loop in z given a Discretize as well, and dead time.
func TestDiscretizeRefused(t *testing.T) {
	p := []Param{{Name: "g", Min: 0.8, Max: 1.2}}
	for _, test := range []struct {
		name string
		d    Description
		want error
	}{
		{"zoh", Description{Expressions: []string{"g/(s+1)"}, Params: p, Discretize: &Discretization{SampleTimeSec: 0.1, Method: tf.ZeroOrderHold}}, ErrUnsupported},
		{"matched", Description{Expressions: []string{"g/(s+1)"}, Params: p, Discretize: &Discretization{SampleTimeSec: 0.1, Method: tf.MatchedPoleZero}}, ErrUnsupported},
		{"in z", Description{Expressions: []string{"g/(z-0.5)"}, Params: p, SampleTimeSec: 0.1, Discretize: &Discretization{SampleTimeSec: 0.1, Method: tf.Tustin}}, ErrSettings},
		{"no period", Description{Expressions: []string{"g/(s+1)"}, Params: p, Discretize: &Discretization{Method: tf.Tustin}}, ErrSettings},
		{"prewarp beyond Nyquist", Description{Expressions: []string{"g/(s+1)"}, Params: p, Discretize: &Discretization{SampleTimeSec: 0.1, Method: tf.Tustin, PrewarpRadPerSec: 40}}, ErrSettings},
		{"dead time", Description{Expressions: []string{"g*exp(-0.2*s)/(s+1)"}, Params: p, Discretize: &Discretization{SampleTimeSec: 0.1, Method: tf.Tustin}}, ErrUnsupported},
	} {
		t.Run(test.name, func(t *testing.T) {
			_, err := NewLoop(test.d)
			if !errors.Is(err, test.want) {
				t.Fatalf("error %v, want %v", err, test.want)
			}
			t.Log(err)
		})
	}
}

// A box across a degree drop of the discretized loop: the Tustin image of
// the characteristic polynomial P has leading coefficient P(c), c = 2/T,
// which vanishes when a closed-loop pole in s sits at c (mapped to z = ∞).
// For L = k/(s − 1) (P = s − 1 + k) and T = 0.5 (c = 4) that is k = −3; the
// box k ∈ [−4, −2.5] crosses it, and every k < 1 is unstable in s, so the
// verdict must be a verified counterexample, never "stable".
func TestDiscretizeDegreeDrop(t *testing.T) {
	l := mustLoop(t, Description{Expressions: []string{"k/(s - 1)"}, Params: []Param{{Name: "k", Min: -4, Max: -2.5}},
		Discretize: &Discretization{SampleTimeSec: 0.5, Method: tf.Tustin}})
	r := checkVerdict(t, l, UnstableAtPoint, nil)
	if k := r.Counterexample.Values[0]; k >= 1 {
		t.Fatalf("counterexample k = %v is stable", k)
	}
}
