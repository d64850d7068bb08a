package locus

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/internal/testutil"
	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

var ogata61 = tf.MustNew([]float64{1}, []float64{1, 3, 2, 0}) // K/(s(s+1)(s+2))

func TestValueAt(t *testing.T) {
	// Ogata, Modern Control Engineering, 5th ed., Example 6-1 (from
	// memory): the locus crosses the imaginary axis at ±j√2 for K = 6;
	// closed form: s³ + 3s² + 2s + 6 = (s + 3)(s² + 2).
	k, poles, err := ValueAt(ogata61, complex(0, math.Sqrt2), nil)
	if err != nil {
		t.Fatal(err)
	}
	if !testutil.Close(k, 6, 1e-14, 0) { // exact arithmetic up to a few roundings
		t.Errorf("K = %v, want 6", k)
	}
	want := []complex128{-3, complex(0, math.Sqrt2), complex(0, -math.Sqrt2)}
	if d, ok := testutil.MatchMultiset(poles, want); !ok || d[0] > 1e-12 || d[1] > 1e-12 || d[2] > 1e-12 {
		t.Errorf("poles %v, want %v", poles, want)
	}
	if _, _, err := ValueAt(ogata61, 1+1i, nil); !errors.Is(err, ErrNotOnLocus) {
		t.Errorf("1+1i: err = %v, want ErrNotOnLocus", err)
	}
	// s = 0.5 is on the complementary locus, K = −(0.125 + 0.75 + 1).
	if _, _, err := ValueAt(ogata61, 0.5, nil); !errors.Is(err, ErrNotOnLocus) {
		t.Errorf("0.5 for K > 0: err = %v", err)
	}
	k, _, err = ValueAt(ogata61, 0.5, &Settings{Range: Range{Min: math.Inf(-1), Max: 0}})
	if err != nil || !testutil.Close(k, -1.875, 1e-15, 0) {
		t.Errorf("0.5 for K < 0: %v, %v; want −1.875", k, err)
	}
	// A pole gives 0, a zero is off the locus.
	if k, _, err := ValueAt(ogata61, -1, nil); err != nil || k != 0 {
		t.Errorf("at a pole: %v %v", k, err)
	}
	a02 := tf.MustNew([]float64{1, 2}, []float64{1, 2, 3})
	if _, _, err := ValueAt(a02, -2, nil); !errors.Is(err, ErrNotOnLocus) {
		t.Errorf("at a zero: %v", err)
	}
	if _, _, err := ValueAt(ogata61, cmplx.NaN(), nil); !errors.Is(err, ErrNotFinite) {
		t.Errorf("NaN point: %v", err)
	}
	// A loose tolerance accepts a point read off a plot.
	if _, _, err := ValueAt(ogata61, complex(0.001, 1.414), &Settings{PointTolerance: 1e-2}); err != nil {
		t.Errorf("near-locus point with tolerance 1e-2: %v", err)
	}
}

func TestDampingCrossings(t *testing.T) {
	// Ogata, 5th ed., Example 6-1 (from memory): for ζ = 0.5 the dominant
	// poles are about −0.3337 ± j0.5780 with K ≈ 1.0383, read graphically.
	// Exactly (Vieta on s³ + 3s² + 2s + K with roots −1/3 ± j/√3 and
	// −7/3, a hand derivation): K = 28/27 = 1.037037…; the book's values
	// agree to 2e-3, the exact ones are checked to 1e-13.
	dp, err := DampingCrossings(ogata61, 0.5, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(dp) != 1 {
		t.Fatalf("got %+v", dp)
	}
	d := dp[0]
	if !testutil.Close(d.Value, 28.0/27, 1e-13, 0) || !testutil.CloseComplex(d.Point, complex(-1.0/3, 1/math.Sqrt(3)), 1e-13, 0) {
		t.Errorf("ζ = 0.5: %+v", d)
	}
	if !testutil.Close(d.Value, 1.0383, 2e-3, 0) {
		t.Errorf("ζ = 0.5: %v disagrees with the book's 1.0383", d.Value)
	}
	// Exactly on the line and on the locus (double-precision exact).
	if zeta := -real(d.Point) / cmplx.Abs(d.Point); math.Abs(zeta-0.5) > 1e-14 {
		t.Errorf("damping of the point %v", zeta)
	}
	if len(d.Poles) != 3 {
		t.Errorf("poles %v", d.Poles)
	}
	// ζ = 0 is the imaginary axis: the crossings of A05 (refcase values).
	a05 := tf.MustNew([]float64{1, 1}, []float64{1, 3, 12, -16, 0})
	dp, err = DampingCrossings(a05, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(dp) != 2 || !testutil.Close(dp[0].Value, 23.315341561573508, 1e-10, 0) || !testutil.Close(dp[1].Value, 35.68465843842649, 1e-10, 0) {
		t.Errorf("ζ = 0: %+v", dp)
	}
	if _, err := DampingCrossings(ogata61, 1, nil); !errors.Is(err, ErrInvalidSettings) {
		t.Errorf("ζ = 1: %v", err)
	}
	if _, err := DampingCrossings(mustDiscrete([]float64{1}, []float64{1, -0.5}, 0.1), 0.5, nil); !errors.Is(err, ErrUnsupported) {
		t.Errorf("discrete: %v", err)
	}
}

func TestPoleSensitivities(t *testing.T) {
	// Against a central difference of ClosedLoopPoles: step 1e-5 gives an
	// O(h²) ≈ 1e-10 truncation error and 1e-16/1e-5 rounding, so 1e-8.
	for _, k := range []float64{0.2, 3, 40} {
		ps, err := PoleSensitivities(ogata61, k)
		if err != nil {
			t.Fatal(err)
		}
		h := 1e-5
		up, _ := ClosedLoopPoles(ogata61, k+h)
		dn, _ := ClosedLoopPoles(ogata61, k-h)
		for _, q := range ps {
			iu, id := nearest(up, q.Pole), nearest(dn, q.Pole)
			fd := (up[iu] - dn[id]) / complex(2*h, 0)
			if cmplx.Abs(fd-q.DsDValue) > 1e-8*math.Max(1, cmplx.Abs(fd)) {
				t.Errorf("k = %v pole %v: ds/dk %v, difference %v", k, q.Pole, q.DsDValue, fd)
			}
		}
	}
	// At the break point the derivative is infinite.
	ps, err := PoleSensitivities(tf.MustNew([]float64{1}, []float64{1, 2, 0}), 1) // (s+1)² at K = 1
	if err != nil {
		t.Fatal(err)
	}
	if !cmplx.IsInf(ps[0].DsDValue) {
		t.Errorf("double pole: %+v", ps)
	}
}

func nearest(xs []complex128, x complex128) int {
	best, bd := 0, math.Inf(1)
	for i, y := range xs {
		if d := cmplx.Abs(x - y); d < bd {
			best, bd = i, d
		}
	}
	return best
}

func TestBadInput(t *testing.T) {
	loop := ogata61
	tests := []struct {
		name string
		run  func() error
		want error
	}{
		{"zero loop", func() error { _, err := Analyze(tf.TF{}, nil); return err }, ErrZeroNumerator},
		{"start ≥ end", func() error { _, err := Analyze(loop, &Settings{Range: Range{5, 1}}); return err }, ErrInvalidRange},
		{"equal ends", func() error { _, err := Trace(loop, &Settings{Range: Range{2, 2}}); return err }, ErrInvalidRange},
		{"NaN range", func() error { _, err := Analyze(loop, &Settings{Range: Range{math.NaN(), 1}}); return err }, ErrInvalidRange},
		{"Padé order", func() error { _, err := Analyze(loop, &Settings{PadeOrder: 99}); return err }, ErrInvalidSettings},
		{"chord", func() error { _, err := Trace(loop, &Settings{ChordTolerance: -1}); return err }, ErrInvalidSettings},
		{"angle", func() error { _, err := Trace(loop, &Settings{AngleToleranceDeg: 200}); return err }, ErrInvalidSettings},
		{"extent", func() error { _, err := Trace(loop, &Settings{ExtentRadius: math.Inf(1)}); return err }, ErrInvalidSettings},
		{"NaN value", func() error { _, err := ClosedLoopPoles(loop, math.NaN()); return err }, ErrNotFinite},
		{"Inf value", func() error { _, err := PoleSensitivities(loop, math.Inf(1)); return err }, ErrNotFinite},
		{"vanishing", func() error {
			_, err := ClosedLoopPoles(tf.MustNew([]float64{1, 1}, []float64{1, 1}), -1)
			return err
		}, ErrDegenerate},
		{"fractional discrete delay", func() error {
			l, _ := mustDiscrete([]float64{1}, []float64{1, -0.5}, 0.1).WithDelay(0.15)
			_, err := Analyze(l, nil)
			return err
		}, ErrUnsupported},
		{"zero numerator parameter", func() error {
			_, err := FromParameter("p", func(float64) (tf.TF, error) { return tf.New([]float64{0}, []float64{1, 1}) })
			return err
		}, ErrZeroNumerator},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			err := tt.run()
			if !errors.Is(err, tt.want) {
				t.Errorf("err = %v, want %v", err, tt.want)
			}
		})
	}
}

func TestDeadTimeNote(t *testing.T) {
	l, _ := ogata61.WithDelay(0.2)
	an, err := Analyze(l, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(an.Notes) == 0 || !strings.Contains(an.Notes[0], "Padé approximation of order 6") {
		t.Errorf("notes %v", an.Notes)
	}
	if len(an.Poles) != 3+6 {
		t.Errorf("%d poles with a 6th-order Padé, want 9", len(an.Poles))
	}
	// Whole-sample delay in discrete time is exact: one more pole at z = 0.
	d, _ := mustDiscrete([]float64{1}, []float64{1, -0.5}, 0.1).WithDelay(0.2)
	an, err = Analyze(d, nil)
	if err != nil {
		t.Fatal(err)
	}
	if an.Branches != 3 || an.Poles[0].Value != 0 || an.Poles[0].Multiplicity != 2 {
		t.Errorf("discrete delay: %+v", an.Poles)
	}
}

// TestRouthAgainstRoots compares the Routh test with the roots of random
// polynomials (fixed seed): both must agree whenever the Routh array is
// trusted and no root lies within 1e-6 of the axis.
func TestRouthAgainstRoots(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	agree := 0
	for range 2000 {
		n := 1 + rng.IntN(9)
		c := make([]float64, n+1)
		c[0] = 1
		for i := 1; i <= n; i++ {
			c[i] = rng.Float64()*4 - 0.5
		}
		q := poly.MustNew(c...)
		rs, err := q.Roots()
		if err != nil {
			t.Fatal(err)
		}
		want, near := true, false
		for _, r := range rs {
			want = want && real(r) < 0
			near = near || math.Abs(real(r)) < 1e-6
		}
		got, ok := routhStable(q)
		if !ok || near {
			continue
		}
		agree++
		if got != want {
			t.Errorf("%v: Routh %v, roots %v (%v)", q, got, want, rs)
		}
	}
	if agree < 1900 {
		t.Errorf("only %d of 2000 decided", agree)
	}
}
