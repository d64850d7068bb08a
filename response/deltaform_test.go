package response

import (
	"math"
	"slices"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// TestShiftToW checks the exact Taylor shift p(z) → p(1 + w) on closed
// forms: (z − 1)³ = w³, z³ = (1 + w)³ = w³ + 3w² + 3w + 1, and a
// polynomial whose value at z = 1 cancels to one ulp of its terms.
func TestShiftToW(t *testing.T) {
	for _, c := range []struct {
		p, want []float64
	}{
		{[]float64{1, -3, 3, -1}, []float64{1, 0, 0, 0}},
		{[]float64{1, 0, 0, 0}, []float64{1, 3, 3, 1}},
		{[]float64{2, 5}, []float64{2, 7}},
		// z² − (2 − ε)z + (1 − ε), ε = 2^−52: p(1 + w) = w² + ε·w, the
		// terms cancelling at z = 1 to exactly 0.
		{[]float64{1, -(2 - 0x1p-52), 1 - 0x1p-52}, []float64{1, 0x1p-52, 0}},
	} {
		got := shiftToW(c.p, len(c.p)-1)
		if !slices.Equal(got, c.want) {
			t.Errorf("shiftToW(%v) = %v, want %v", c.p, got, c.want)
		}
	}
}

// TestDeltaFormMatchesShiftForm runs a well-conditioned discrete system
// (poles 0.5 ± 0.3i and −0.2, a zero at 0.4) both ways: the δ form must
// give the shift form's samples to rounding.
func TestDeltaFormMatchesShiftForm(t *testing.T) {
	sys, err := tf.NewDiscrete([]float64{0.3, -0.12}, []float64{1, -0.8, 0.14, 0.068}, 0.1)
	if err != nil {
		t.Fatal(err)
	}
	s, err := prepare(sys, "test")
	if err != nil {
		t.Fatal(err)
	}
	if needsDelta(sys.Den().Coeffs()) {
		t.Fatal("a well-conditioned system was sent to the δ form")
	}
	u := make([]float64, 200)
	for i := range u {
		u[i] = math.Sin(0.3 * float64(i))
	}
	want := make([]float64, len(u))
	s.newSequence().run(u, want)
	dm, err := s.deltaModel()
	if err != nil {
		t.Fatal(err)
	}
	q := &sequence{s: s, a: newTransition(flat(dm.A), s.n), b: dm.B, c: dm.C, x: make([]float64, s.n), nx: make([]float64, s.n)}
	q.a.delta = true
	got := make([]float64, len(u))
	q.run(u, got)
	for k := range got {
		if math.Abs(got[k]-want[k]) > 1e-14 {
			t.Fatalf("sample %d: δ form %.17g, shift form %.17g", k, got[k], want[k])
		}
	}
}
