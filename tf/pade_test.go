package tf

import (
	"errors"
	"math"
	"math/big"
	"math/cmplx"
	"testing"

	"github.com/loopwise/loopwise/internal/testutil"
)

// padeCoeffBig returns cₖ = (2n − k)!·n!/((2n)!·k!·(n − k)!) exactly with
// math/big, the closed form of Padé (1892) (also Baker & Graves-Morris,
// Padé Approximants, 2nd ed., 1996, §1.2, the [n/n] approximant of eˣ;
// from memory), as an independent reference for the recurrence in pade.go.
func padeCoeffBig(n, k int) float64 {
	f := func(m int) *big.Int { return new(big.Int).MulRange(1, int64(m)) }
	num := new(big.Int).Mul(f(2*n-k), f(n))
	den := new(big.Int).Mul(f(2*n), f(k))
	den.Mul(den, f(n-k))
	r, _ := new(big.Rat).SetFrac(num, den).Float64()
	return r
}

func TestPadeDelayClosedForm(t *testing.T) {
	// Low orders written out (Padé 1892; the [1/1] form (1 − sT/2)/(1 + sT/2)
	// is the one every control text quotes).
	T := 0.4
	p1, err := PadeDelay(T, 1)
	if err != nil {
		t.Fatal(err)
	}
	if want := MustNew([]float64{-T / 2, 1}, []float64{T / 2, 1}); !p1.EqualApprox(want, 1e-15) {
		t.Errorf("order 1: %v, want %v", p1, want)
	}
	p2, _ := PadeDelay(T, 2)
	if want := MustNew([]float64{T * T / 12, -T / 2, 1}, []float64{T * T / 12, T / 2, 1}); !p2.EqualApprox(want, 1e-15) {
		t.Errorf("order 2: %v, want %v", p2, want)
	}
	for n := 1; n <= MaxPadeOrder; n++ {
		p, err := PadeDelay(T, n)
		if err != nil {
			t.Fatal(err)
		}
		num, den := p.Num(), p.Den()
		for k := 0; k <= n; k++ {
			want := padeCoeffBig(n, k) * math.Pow(T, float64(k))
			// The recurrence multiplies k rationals: k roundings.
			tol := 4 * float64(k+1) * 0x1p-53
			if !testutil.Close(den.Coef(k), want, tol, 0) {
				t.Errorf("n = %d: denominator coefficient of s^%d = %.17g, want %.17g", n, k, den.Coef(k), want)
			}
			if k%2 == 1 {
				want = -want
			}
			if !testutil.Close(num.Coef(k), want, tol, 0) {
				t.Errorf("n = %d: numerator coefficient of s^%d = %.17g, want %.17g", n, k, num.Coef(k), want)
			}
		}
	}
}

// TestPadeDelayProperties checks the properties that follow from the closed
// form: all-pass on the imaginary axis, poles in the open left half plane
// (for the orders here), and agreement with e^{−jωT} to order 2n at low
// frequency: the error is ≈ (n!)²/((2n)!(2n+1)!)·(ωT)^{2n+1} (Padé 1892).
func TestPadeDelayProperties(t *testing.T) {
	const T = 0.5
	for n := 1; n <= 10; n++ {
		p, err := PadeDelay(T, n)
		if err != nil {
			t.Fatal(err)
		}
		for _, w := range []float64{0.01, 0.3, 2, 40} {
			v := p.Eval(complex(0, w))
			if math.Abs(cmplx.Abs(v)-1) > 1e-13 {
				t.Errorf("n = %d: |P(j%v)| = %v, want 1", n, w, cmplx.Abs(v))
			}
		}
		poles, err := p.Poles()
		if err != nil {
			t.Fatal(err)
		}
		for _, q := range poles {
			if real(q) >= 0 {
				t.Errorf("n = %d: pole %v not in the left half plane", n, q)
			}
		}
		w := 0.2
		x := w * T
		fn := 1.0
		for i := 2; i <= n; i++ {
			fn *= float64(i)
		}
		f2n := 1.0
		for i := 2; i <= 2*n; i++ {
			f2n *= float64(i)
		}
		f2n1 := f2n * float64(2*n+1)
		bound := fn * fn / (f2n * f2n1) * math.Pow(x, float64(2*n+1))
		errAbs := cmplx.Abs(p.Eval(complex(0, w)) - cmplx.Exp(complex(0, -x)))
		// Within a factor 2 of the leading error term, plus rounding.
		if errAbs > 2*bound+1e-15 {
			t.Errorf("n = %d: |P(jω) − e^{−jωT}| = %.3g above 2× the leading term %.3g", n, errAbs, bound)
		}
		if bound > 1e-13 && errAbs < 0.5*bound {
			t.Errorf("n = %d: error %.3g below half the leading term %.3g (wrong order?)", n, errAbs, bound)
		}
	}
}

func TestPadeOfTransferFunction(t *testing.T) {
	g, _ := MustParse("2/(s+1)").WithDelay(0.3)
	r, err := g.Pade(3)
	if err != nil {
		t.Fatal(err)
	}
	if r.DelaySec() != 0 {
		t.Errorf("delay kept: %v", r.DelaySec())
	}
	p, _ := PadeDelay(0.3, 3)
	want, _ := MustParse("2/(s+1)").Series(p)
	if !r.EqualApprox(want, 1e-15) {
		t.Errorf("got %v, want %v", r, want)
	}
	// No dead time: unchanged.
	h := MustParse("(s+2)/(s^2+s+1)")
	if r, err := h.Pade(4); err != nil || !r.EqualApprox(h, 0) {
		t.Errorf("no delay: %v, %v", r, err)
	}
	// Discrete: whole periods are exact poles at z = 0.
	gd, _ := NewDiscrete([]float64{1}, []float64{1, -0.5}, 0.1)
	gd, _ = gd.WithDelay(0.2)
	r, err = gd.Pade(2)
	if err != nil {
		t.Fatal(err)
	}
	if want, _ := NewDiscrete([]float64{1}, []float64{1, -0.5, 0, 0}, 0.1); !r.EqualApprox(want, 0) {
		t.Errorf("discrete: got %v, want %v", r, want)
	}
	gd, _ = gd.WithDelay(0.15)
	if _, err := gd.Pade(2); !errors.Is(err, ErrFractionalDelay) {
		t.Errorf("discrete fractional: got %v", err)
	}
}

func TestPadeErrors(t *testing.T) {
	for _, test := range []struct {
		delay float64
		order int
		want  error
	}{
		{0.1, 0, ErrOrder},
		{0.1, MaxPadeOrder + 1, ErrOrder},
		{math.NaN(), 2, ErrNotFinite},
		{math.Inf(1), 2, ErrNotFinite},
		{-1, 2, ErrNegativeDelay},
		{1e300, 5, ErrNotFinite}, // T⁵ overflows
	} {
		if _, err := PadeDelay(test.delay, test.order); !errors.Is(err, test.want) {
			t.Errorf("PadeDelay(%v, %d): got %v, want %v", test.delay, test.order, err, test.want)
		}
	}
	if p, err := PadeDelay(0, 3); err != nil || !p.EqualApprox(MustNew([]float64{1}, []float64{1}), 0) {
		t.Errorf("zero delay: %v, %v", p, err)
	}
	g, _ := MustParse("1/(s+1e300)").WithDelay(1e300)
	if _, err := g.Pade(1); !errors.Is(err, ErrNotFinite) {
		t.Errorf("Pade with overflowing product: %v", err)
	}
	if _, err := g.Pade(-1); !errors.Is(err, ErrOrder) {
		t.Errorf("Pade(-1): got %v", err)
	}
}
