package statespace

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/internal/testutil"
	"gonum.org/v1/gonum/mat"
)

// simulate runs x[k+1] = Φx[k] + Γ1·u[k] + Γ2·(u[k+1] − u[k]) from x = 0
// and returns y[k] = C·x[k] + D·u[k] for k = 0..len(u)−1.
func simulate(m Model, phi *mat.Dense, g1, g2 []float64, u []float64) []float64 {
	n := m.Order()
	x := make([]float64, n)
	nx := make([]float64, n)
	y := make([]float64, len(u))
	for k := range u {
		y[k] = m.D * u[k]
		for i := 0; i < n; i++ {
			y[k] += m.C[i] * x[i]
		}
		if k+1 == len(u) {
			break
		}
		for i := 0; i < n; i++ {
			v := g1[i] * u[k]
			if g2 != nil {
				v += g2[i] * (u[k+1] - u[k])
			}
			for j := 0; j < n; j++ {
				v += phi.At(i, j) * x[j]
			}
			nx[i] = v
		}
		x, nx = nx, x
	}
	return y
}

func TestZeroOrderHoldFirstOrder(t *testing.T) {
	// G(s) = 3/(s + 2). Closed form (Franklin, Powell & Workman, 3rd ed.,
	// Sec. 6.3.1, from memory; re-derived): Φ = e^(−2T),
	// C·Γ = 3(1 − e^(−2T))/2. Both are invariant under the diagonal
	// scaling, so they are compared directly. Tolerance 1e-14 relative:
	// a handful of roundings in a 2×2 exponential.
	m, err := FromTransferFunction([]float64{3}, []float64{1, 2})
	if err != nil {
		t.Fatal(err)
	}
	for _, T := range []float64{1e-3, 0.1, 1, 7} {
		phi, g, err := m.ZeroOrderHold(T)
		if err != nil {
			t.Fatal(err)
		}
		if want := math.Exp(-2 * T); !testutil.Close(phi.At(0, 0), want, 1e-14, 0) {
			t.Errorf("T=%v: Φ = %v, want %v", T, phi.At(0, 0), want)
		}
		if got, want := m.C[0]*g[0], 3*(-math.Expm1(-2*T))/2; !testutil.Close(got, want, 1e-14, 0) {
			t.Errorf("T=%v: CΓ = %v, want %v", T, got, want)
		}
	}
}

func TestZeroOrderHoldSecondOrderStep(t *testing.T) {
	// Standard second order ωn²/(s² + 2ζωn s + ωn²), unit step:
	// y(t) = 1 − e^(−ζωn t)/√(1−ζ²)·sin(ωd t + acos ζ) (Ogata, Modern Control
	// Engineering, 5th ed., Sec. 5-3, from memory; checked here against
	// mpmath quadrature of the ramp). The ZOH recursion is exact for a
	// step, so samples must agree to rounding: 1e-13 absolute over 200
	// steps (error grows at most linearly with the step count, ~1e-16 each).
	for _, c := range []struct{ zeta, wn float64 }{{0.3, 2}, {0.7, 5}, {0.05, 40}} {
		m, err := FromTransferFunction([]float64{c.wn * c.wn}, []float64{1, 2 * c.zeta * c.wn, c.wn * c.wn})
		if err != nil {
			t.Fatal(err)
		}
		T := 0.02
		phi, g, err := m.ZeroOrderHold(T)
		if err != nil {
			t.Fatal(err)
		}
		u := make([]float64, 200)
		for i := range u {
			u[i] = 1
		}
		y := simulate(m, phi, g, nil, u)
		wd := c.wn * math.Sqrt(1-c.zeta*c.zeta)
		for k, got := range y {
			tk := float64(k) * T
			want := 1 - math.Exp(-c.zeta*c.wn*tk)/math.Sqrt(1-c.zeta*c.zeta)*math.Sin(wd*tk+math.Acos(c.zeta))
			if math.Abs(got-want) > 1e-13 {
				t.Fatalf("ζ=%v ωn=%v k=%d: y = %.17g, want %.17g", c.zeta, c.wn, k, got, want)
			}
		}
	}
}

func TestFirstOrderHoldRamp(t *testing.T) {
	// The triangle hold is exact for inputs linear between samples, so a
	// ramp u = t must reproduce the continuous ramp response at the samples.
	// First order 1/(s + a): y = t/a − (1 − e^(−at))/a² (partial fractions).
	// Second order ωn²/(s² + 2ζωn s + ωn²):
	// y = t − 2ζ/ωn + e^(−ζωn t)/ωd·sin(ωd t + 2·acos ζ) (Ogata, 5th ed.,
	// Sec. 5-3, from memory; checked here with mpmath as the integral of
	// the step response). Tolerance 1e-12 absolute on values up to 10.
	T := 0.05
	N := 200
	u := make([]float64, N)
	for k := range u {
		u[k] = float64(k) * T
	}
	a := 1.5
	m, err := FromTransferFunction([]float64{1}, []float64{1, a})
	if err != nil {
		t.Fatal(err)
	}
	phi, g1, g2, err := m.FirstOrderHold(T)
	if err != nil {
		t.Fatal(err)
	}
	// Closed form Γ2 = (1/T)∫₀ᵀ e^(−aη)(T − η) dη·b with C·b = 1.
	if got, want := m.C[0]*g2[0], 1/a-(-math.Expm1(-a*T))/(a*a*T); !testutil.Close(got, want, 1e-13, 0) {
		t.Errorf("CΓ2 = %v, want %v", got, want)
	}
	y := simulate(m, phi, g1, g2, u)
	for k, got := range y {
		tk := u[k]
		want := tk/a + math.Expm1(-a*tk)/(a*a)
		if math.Abs(got-want) > 1e-12 {
			t.Fatalf("first order k=%d: %.17g want %.17g", k, got, want)
		}
	}
	zeta, wn := 0.3, 2.0
	m, err = FromTransferFunction([]float64{wn * wn}, []float64{1, 2 * zeta * wn, wn * wn})
	if err != nil {
		t.Fatal(err)
	}
	phi, g1, g2, err = m.FirstOrderHold(T)
	if err != nil {
		t.Fatal(err)
	}
	y = simulate(m, phi, g1, g2, u)
	wd := wn * math.Sqrt(1-zeta*zeta)
	for k, got := range y {
		tk := u[k]
		want := tk - 2*zeta/wn + math.Exp(-zeta*wn*tk)/wd*math.Sin(wd*tk+2*math.Acos(zeta))
		if math.Abs(got-want) > 1e-12 {
			t.Fatalf("second order k=%d: %.17g want %.17g", k, got, want)
		}
	}
}

// markov returns the first count coefficients h_0 = D, h_k = C·A^(k−1)·B.
func markov(m Model, count int) []float64 {
	n := m.Order()
	h := []float64{m.D}
	v := append([]float64(nil), m.B...)
	w := make([]float64, n)
	for k := 1; k < count; k++ {
		s := 0.0
		for i := range v {
			s += m.C[i] * v[i]
		}
		h = append(h, s)
		for i := 0; i < n; i++ {
			w[i] = 0
			for j := 0; j < n; j++ {
				w[i] += m.A.At(i, j) * v[j]
			}
		}
		v, w = w, v
	}
	return h
}

// seriesAtInfinity returns the expansion num/den = Σ h_k s^(−k) by long
// division (a slow, independent reference).
func seriesAtInfinity(num, den []float64, count int) []float64 {
	n := len(den) - 1
	r := make([]float64, n+count+1)
	copy(r[n+1-len(num):], num)
	h := make([]float64, count)
	for k := 0; k < count; k++ {
		q := r[k] / den[0]
		h[k] = q
		for i, d := range den {
			r[k+i] -= q * d
		}
	}
	return h
}

func TestRealisationMarkovParameters(t *testing.T) {
	// Property: the realisation reproduces num/den, checked through the
	// Markov parameters against long division. Random polynomials with
	// fixed seed; tolerance 1e-11 relative to the largest Markov parameter
	// (a few ulps per product, times the growth of A^k over 8 powers).
	rng := rand.New(rand.NewPCG(1, 1))
	for trial := 0; trial < 50; trial++ {
		n := 1 + rng.IntN(8)
		den := make([]float64, n+1)
		for i := range den {
			den[i] = rng.NormFloat64()
		}
		num := make([]float64, 1+rng.IntN(n+1))
		for i := range num {
			num[i] = rng.NormFloat64()
		}
		m, err := FromTransferFunction(num, den)
		if err != nil {
			t.Fatal(err)
		}
		got := markov(m, 10)
		want := seriesAtInfinity(num, den, 10)
		scale := 0.0
		for _, v := range want {
			scale = math.Max(scale, math.Abs(v))
		}
		for k := range want {
			if math.Abs(got[k]-want[k]) > 1e-11*scale {
				t.Fatalf("trial %d (num %v den %v): h_%d = %v, want %v", trial, num, den, k, got[k], want[k])
			}
		}
		// Scale recovers the companion form: diag(Scale)·A·diag(1/Scale) has
		// ones on its superdiagonal (exactly, up to the rounding of ρ^k).
		for i := 0; i+1 < n; i++ {
			if got := m.A.At(i, i+1) * m.Scale[i] / m.Scale[i+1]; !testutil.Close(got, 1, 1e-14, 0) {
				t.Fatalf("trial %d: companion superdiagonal %d recovers %v, want 1", trial, i, got)
			}
		}
	}
}

func TestHighOrderConditioning(t *testing.T) {
	// (s + 9)^24: the plain companion form has ‖A‖₁ ≈ 2e9; the scaled,
	// balanced realisation must be far smaller (measured: reported in the
	// log). The bound 1e4 is a regression guard: four orders below ‖A‖₁ of
	// the plain form.
	den := []float64{1}
	for k := 0; k < 24; k++ {
		next := make([]float64, len(den)+1)
		for i, v := range den {
			next[i] += v
			next[i+1] += 9 * v
		}
		den = next
	}
	m, err := FromTransferFunction([]float64{1}, den)
	if err != nil {
		t.Fatal(err)
	}
	norm := mat.Norm(m.A, 1)
	t.Logf("order 24, poles at −9: ‖A‖₁ = %.3g", norm)
	if norm > 1e4 {
		t.Errorf("‖A‖₁ = %g, realisation not balanced", norm)
	}
}

func TestBadInput(t *testing.T) {
	cases := []struct {
		name     string
		num, den []float64
		want     error
	}{
		{"empty denominator", []float64{1}, nil, ErrDenominator},
		{"zero leading denominator", []float64{1}, []float64{0, 1}, ErrDenominator},
		{"improper", []float64{1, 0, 0}, []float64{1, 1}, ErrImproper},
		{"NaN numerator", []float64{math.NaN()}, []float64{1, 1}, ErrNotFinite},
		{"Inf denominator", []float64{1}, []float64{1, math.Inf(1)}, ErrNotFinite},
	}
	for _, c := range cases {
		if _, err := FromTransferFunction(c.num, c.den); !errors.Is(err, c.want) {
			t.Errorf("%s: err = %v, want %v", c.name, err, c.want)
		}
	}
	m, err := FromTransferFunction([]float64{2}, []float64{4})
	if err != nil || m.D != 0.5 || m.A != nil {
		t.Errorf("static gain: %+v, %v", m, err)
	}
	if _, _, err := m.ZeroOrderHold(1); !errors.Is(err, ErrNoState) {
		t.Errorf("static ZOH: %v", err)
	}
	m, _ = FromTransferFunction([]float64{1}, []float64{1, 1})
	for _, T := range []float64{0, -1, math.NaN(), math.Inf(1)} {
		if _, _, err := m.ZeroOrderHold(T); err == nil {
			t.Errorf("ZOH T=%v: no error", T)
		}
		if _, _, _, err := m.FirstOrderHold(T); err == nil {
			t.Errorf("FOH T=%v: no error", T)
		}
	}
	// A·T that overflows (finite T, huge product) is an error, not a hang
	// in mat.Exp's scaling loop.
	fast, _ := FromTransferFunction([]float64{1}, []float64{1, 1e10})
	if _, _, err := fast.ZeroOrderHold(1e300); !errors.Is(err, ErrNotFinite) {
		t.Errorf("ZOH with overflowing A·T: %v, want ErrNotFinite", err)
	}
	// Leading zeros of the numerator are dropped: (0s + 1)/(s + 1) is proper.
	if _, err := FromTransferFunction([]float64{0, 0, 1}, []float64{1, 1}); err != nil {
		t.Errorf("leading zeros: %v", err)
	}
}
