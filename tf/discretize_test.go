package tf

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"testing"

	"gonum.org/v1/gonum/mat"

	"github.com/loopwise/loopwise/internal/refcases"
	"github.com/loopwise/loopwise/internal/statespace"
	"github.com/loopwise/loopwise/internal/testutil"
	"github.com/loopwise/loopwise/poly"
)

// checkCoeffs compares coefficient lists (highest power first) with an
// absolute tolerance of tol times the largest |want| coefficient: the
// discretization routes have errors of that form (rounding relative to the
// scale of the polynomial).
func checkCoeffs(t *testing.T, what string, got poly.Poly, want []float64, tol float64) {
	t.Helper()
	gc := got.Coeffs()
	if len(gc) != len(want) {
		t.Errorf("%s: got %v (degree %d), want %v", what, gc, got.Degree(), want)
		return
	}
	scale := 0.0
	for _, w := range want {
		scale = math.Max(scale, math.Abs(w))
	}
	for i := range want {
		if math.Abs(gc[i]-want[i]) > tol*scale {
			t.Errorf("%s: coefficient %d = %.17g, want %.17g (diff %.3g, allowed %.3g)", what, i, gc[i], want[i], gc[i]-want[i], tol*scale)
		}
	}
}

func TestDiscretizeReferenceCases(t *testing.T) {
	for _, typ := range []string{"zoh", "tustin"} {
		cases, err := refcases.ByType(typ)
		if err != nil {
			t.Fatal(err)
		}
		if len(cases) == 0 {
			t.Fatalf("no %s reference cases", typ)
		}
		for _, c := range cases {
			t.Run(c.ID, func(t *testing.T) {
				var q struct {
					T            float64  `json:"T"`
					PrewarpOmega *float64 `json:"prewarp_omega"`
				}
				if err := c.DecodeQuery(&q); err != nil {
					t.Fatal(err)
				}
				var want struct {
					NumZ []float64 `json:"num_z"`
					DenZ []float64 `json:"den_z"`
				}
				if err := c.Decode(&want); err != nil {
					t.Fatal(err)
				}
				g, err := New(c.Loop.Num, c.Loop.Den)
				if err != nil {
					t.Fatal(err)
				}
				method := ZeroOrderHold
				var set *DiscretizeSettings
				if typ == "tustin" {
					method = Tustin
					if q.PrewarpOmega != nil {
						set = &DiscretizeSettings{PrewarpRadPerSec: *q.PrewarpOmega}
					}
				}
				gd, err := g.Discretize(q.T, method, set)
				if err != nil {
					t.Fatal(err)
				}
				if gd.SampleTimeSec() != q.T {
					t.Errorf("sample period %v, want %v", gd.SampleTimeSec(), q.T)
				}
				// The case's own tolerance: |got − want| ≤ abs + rel·|want|.
				check := func(what string, got poly.Poly, want []float64) {
					gc := got.Coeffs()
					if len(gc) != len(want) {
						t.Fatalf("%s = %v, want %v", what, gc, want)
					}
					for i := range want {
						if !testutil.Close(gc[i], want[i], c.Tolerance.Rel, c.Tolerance.Abs) {
							t.Errorf("%s[%d] = %.17g, want %.17g", what, i, gc[i], want[i])
						}
					}
				}
				check("num_z", gd.Num(), want.NumZ)
				check("den_z", gd.Den(), want.DenZ)
				if gd.Den().Lead() != 1 {
					t.Errorf("denominator not monic: lead %v", gd.Den().Lead())
				}
			})
		}
	}
}

// TestZeroOrderHoldClosedForms checks the exact textbook step-invariant
// equivalents (Franklin, Powell & Workman, Digital Control of Dynamic
// Systems, 3rd ed., Ch. 4 and its table of z-transforms; Ogata,
// Discrete-Time Control Systems, 2nd ed., Ch. 3; both from memory, and each
// formula re-derived here from y(kT) of the step response: the first
// numerator coefficient is y(T), and num(1) = den(1)·G(0)).
func TestZeroOrderHoldClosedForms(t *testing.T) {
	// Tolerance 1e-13 of the largest coefficient: Φ, Γ come from a
	// scaling-and-squaring exponential (a few ulps times ‖AT‖) and the
	// numerator from a unitary interpolation; the closed forms are
	// evaluated in float64 with errors of a few ulps.
	const tol = 1e-13
	t.Run("first order a/(s+a)", func(t *testing.T) {
		for _, a := range []float64{0.1, 1, 2, 50} {
			for _, T := range []float64{0.001, 0.1, 1} {
				g := MustNew([]float64{a}, []float64{1, a})
				gd, err := g.Discretize(T, ZeroOrderHold, nil)
				if err != nil {
					t.Fatal(err)
				}
				e := math.Exp(-a * T)
				// (1 − e^{−aT})/(z − e^{−aT})
				checkCoeffs(t, "num", gd.Num(), []float64{-math.Expm1(-a * T)}, tol)
				checkCoeffs(t, "den", gd.Den(), []float64{1, -e}, tol)
			}
		}
	})
	t.Run("double integrator-like 1/(s(s+1))", func(t *testing.T) {
		for _, T := range []float64{0.01, 0.5, 1, 3} {
			g := MustNew([]float64{1}, []float64{1, 1, 0})
			gd, err := g.Discretize(T, ZeroOrderHold, nil)
			if err != nil {
				t.Fatal(err)
			}
			e := math.Exp(-T)
			// ((T − 1 + e^{−T})z + (1 − e^{−T} − T·e^{−T}))/((z − 1)(z − e^{−T})),
			// written with expm1 so that the reference itself keeps its
			// digits for small T (T − 1 + e^{−T} ≈ T²/2).
			em1 := math.Expm1(-T)
			checkCoeffs(t, "num", gd.Num(), []float64{T + em1, -em1 - T*e}, 1e-12)
			checkCoeffs(t, "den", gd.Den(), []float64{1, -(1 + e), e}, tol)
		}
	})
	t.Run("1/s^2", func(t *testing.T) {
		// T²(z + 1)/(2(z − 1)²)
		T := 0.2
		gd, err := MustNew([]float64{1}, []float64{1, 0, 0}).Discretize(T, ZeroOrderHold, nil)
		if err != nil {
			t.Fatal(err)
		}
		checkCoeffs(t, "num", gd.Num(), []float64{T * T / 2, T * T / 2}, tol)
		checkCoeffs(t, "den", gd.Den(), []float64{1, -2, 1}, tol)
	})
	t.Run("underdamped second order", func(t *testing.T) {
		for _, p := range []struct{ zeta, wn, T float64 }{{0.5, 2, 0.1}, {0.1, 10, 0.05}, {0.9, 1, 1}, {0.3, 3, 0.002}} {
			g := MustNew([]float64{p.wn * p.wn}, []float64{1, 2 * p.zeta * p.wn, p.wn * p.wn})
			gd, err := g.Discretize(p.T, ZeroOrderHold, nil)
			if err != nil {
				t.Fatal(err)
			}
			sigma := p.zeta * p.wn
			wd := p.wn * math.Sqrt(1-p.zeta*p.zeta)
			a := math.Exp(-sigma * p.T)
			c, s := math.Cos(wd*p.T), math.Sin(wd*p.T)
			b1 := 1 - a*(c+sigma/wd*s)
			b2 := a*a + a*(sigma/wd*s-c)
			checkCoeffs(t, "num", gd.Num(), []float64{b1, b2}, 1e-11)
			checkCoeffs(t, "den", gd.Den(), []float64{1, -2 * a * c, a * a}, tol)
		}
	})
	t.Run("static gain", func(t *testing.T) {
		gd, err := MustNew([]float64{3}, []float64{2}).Discretize(0.1, ZeroOrderHold, nil)
		if err != nil {
			t.Fatal(err)
		}
		if !gd.EqualApprox(MustNewDiscrete(t, []float64{1.5}, []float64{1}, 0.1), 0) {
			t.Errorf("got %v, want 1.5", gd)
		}
	})
}

func MustNewDiscrete(t *testing.T, num, den []float64, ts float64) TF {
	t.Helper()
	g, err := NewDiscrete(num, den, ts)
	if err != nil {
		t.Fatal(err)
	}
	return g
}

// TestZeroOrderHoldFractionalDelay checks the modified z-transform against
// its closed form for a/(s+a) with dead time τ = dT + θ (Franklin, Powell &
// Workman, Digital Control of Dynamic Systems, 3rd ed., §4.3 on time delay,
// from memory; re-derived here from the state equation):
//
//	G(z) = [(1 − e^{−a(T−θ)})z + (e^{−a(T−θ)} − e^{−aT})] / (z^{d+1}(z − e^{−aT})).
func TestZeroOrderHoldFractionalDelay(t *testing.T) {
	const a, T = 2.0, 0.1
	for _, tau := range []float64{0.03, 0.25, 0.999 * T} {
		g, _ := MustNew([]float64{a}, []float64{1, a}).WithDelay(tau)
		gd, err := g.Discretize(T, ZeroOrderHold, nil)
		if err != nil {
			t.Fatal(err)
		}
		d := math.Floor(tau / T)
		theta := tau - d*T
		e, eb := math.Exp(-a*T), math.Exp(-a*(T-theta))
		want := MustNewDiscrete(t, []float64{1 - eb, eb - e}, poly.MustNew(1, -e).ShiftUp(int(d)+1).Coeffs(), T)
		if !gd.EqualApprox(want, 1e-13) {
			t.Errorf("τ = %v: got %v, want %v", tau, gd, want)
		}
		if gd.DelaySec() != 0 {
			t.Errorf("τ = %v: result keeps dead time %v", tau, gd.DelaySec())
		}
	}
	// Whole periods become poles at z = 0 for every method.
	g, _ := MustNew([]float64{a}, []float64{1, a}).WithDelay(0.3) // 0.3/0.1 = 2.9999999999999996
	for _, m := range []DiscretizeMethod{ZeroOrderHold, FirstOrderHold, Tustin, MatchedPoleZero} {
		gd, err := g.Discretize(T, m, nil)
		if err != nil {
			t.Fatalf("%v: %v", m, err)
		}
		plain, _ := g.WithoutDelay().Discretize(T, m, nil)
		want := TF{num: plain.num, den: plain.den.ShiftUp(3), ts: T}
		if !gd.EqualApprox(want, 1e-15) {
			t.Errorf("%v: got %v, want %v", m, gd, want)
		}
	}
}

type sampledGolden struct {
	StepSamples []sampledCase `json:"step_samples"`
	RampSamples []sampledCase `json:"ramp_samples"`
	ZOHCoeffs   []struct {
		Name string    `json:"name"`
		Num  []float64 `json:"num"`
		Den  []float64 `json:"den"`
		T    float64   `json:"T"`
		NumZ []float64 `json:"num_z"`
		DenZ []float64 `json:"den_z"`
	} `json:"zoh_coeffs"`
}

type sampledCase struct {
	Name  string    `json:"name"`
	Num   []float64 `json:"num"`
	Den   []float64 `json:"den"`
	Delay float64   `json:"delay"`
	T     float64   `json:"T"`
	Y     []float64 `json:"y"`
}

func loadSampledGolden(t *testing.T) sampledGolden {
	t.Helper()
	b, err := os.ReadFile("testdata/sampled_golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g sampledGolden
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	return g
}

// simulate runs the difference equation of the discrete gd on input u
// (u[k] for k ≥ 0, zero before), returning y[0..len(u)-1].
func simulate(gd TF, u []float64) []float64 {
	a := gd.Den().Coeffs() // monic, highest power first
	b := gd.Num().Coeffs()
	n := len(a) - 1
	off := n - (len(b) - 1) // numerator padded to degree n
	y := make([]float64, len(u))
	for k := range u {
		// y[k] = Σ b_i u[k−i] − Σ_{i≥1} a_i y[k−i], coefficients of z^{n−i}
		v := 0.0
		for i := 0; i <= n; i++ {
			bi := 0.0
			if i-off >= 0 {
				bi = b[i-off]
			}
			if k-i >= 0 {
				v += bi * u[k-i]
				if i > 0 {
					v -= a[i] * y[k-i]
				}
			}
		}
		y[k] = v / a[0]
	}
	return y
}

// TestHoldInvariance checks the hold equivalents against step and ramp
// samples computed by residues in mpmath (testdata/gen_sampled.py, no state
// space involved): the zero-order-hold equivalent reproduces the sampled
// step response exactly, dead time included (step invariance), and the
// triangle hold the sampled ramp response (ramp invariance).
func TestHoldInvariance(t *testing.T) {
	gold := loadSampledGolden(t)
	// 1e-12 absolute on responses of size ≤ 2: the difference equation
	// accumulates rounding over 40 steps of a lightly damped system.
	const tol = 1e-12
	run := func(t *testing.T, c sampledCase, m DiscretizeMethod, ramp bool) {
		g, err := New(c.Num, c.Den)
		if err != nil {
			t.Fatal(err)
		}
		if g, err = g.WithDelay(c.Delay); err != nil {
			t.Fatal(err)
		}
		gd, err := g.Discretize(c.T, m, nil)
		if err != nil {
			t.Fatal(err)
		}
		u := make([]float64, len(c.Y))
		for k := range u {
			u[k] = 1
			if ramp {
				u[k] = float64(k) * c.T
			}
		}
		y := simulate(gd, u)
		for k := range y {
			if math.Abs(y[k]-c.Y[k]) > tol*math.Max(1, math.Abs(c.Y[k])) {
				t.Errorf("y[%d] = %.17g, want %.17g (diff %.3g)", k, y[k], c.Y[k], y[k]-c.Y[k])
			}
		}
	}
	for _, c := range gold.StepSamples {
		t.Run("step/"+c.Name, func(t *testing.T) { run(t, c, ZeroOrderHold, false) })
	}
	for _, c := range gold.RampSamples {
		t.Run("ramp/"+c.Name, func(t *testing.T) { run(t, c, FirstOrderHold, true) })
	}
}

// TestZeroOrderHoldCoefficientsGolden compares coefficients with the
// residue route of testdata/gen_sampled.py, including fast sampling where
// the numerator is 1e-12 of the denominator (the route through
// charpoly(Φ − ΓC) − charpoly(Φ) would lose about 4 of the 16 digits there).
func TestZeroOrderHoldCoefficientsGolden(t *testing.T) {
	gold := loadSampledGolden(t)
	for _, c := range gold.ZOHCoeffs {
		t.Run(c.Name, func(t *testing.T) {
			g, err := New(c.Num, c.Den)
			if err != nil {
				t.Fatal(err)
			}
			gd, err := g.Discretize(c.T, ZeroOrderHold, nil)
			if err != nil {
				t.Fatal(err)
			}
			// Numerator and denominator each to 1e-13 of their own largest
			// coefficient: the mapped poles e^{pT} carry the root-finding
			// error of the continuous poles (a few ulps each), the numerator
			// the exponential's error and a unitary interpolation; the worst
			// measured error is 1.3e-14 (sixth order), so 1e-13 leaves a
			// margin for other floating-point contractions.
			checkCoeffs(t, "num", gd.Num(), c.NumZ, 1e-13)
			checkCoeffs(t, "den", gd.Den(), c.DenZ, 1e-13)
		})
	}
}

// TestFirstOrderHoldIntegrator: the triangle hold of 1/s is (T/2)(z+1)/(z−1),
// the trapezoidal rule (Franklin, Powell & Workman, Digital Control of
// Dynamic Systems, 3rd ed., §6.3, from memory; it follows from ramp
// invariance: the area under a linear segment is the trapezoid).
func TestFirstOrderHoldIntegrator(t *testing.T) {
	T := 0.25
	gd, err := MustNew([]float64{1}, []float64{1, 0}).Discretize(T, FirstOrderHold, nil)
	if err != nil {
		t.Fatal(err)
	}
	want := MustNewDiscrete(t, []float64{T / 2, T / 2}, []float64{1, -1}, T)
	if !gd.EqualApprox(want, 1e-14) {
		t.Errorf("got %v, want %v", gd, want)
	}
}

// TestTustinFrequencyMap checks G_d(e^{jωT}) = G(j·c·tan(ωT/2)), the
// defining property of the bilinear substitution s = c(z−1)/(z+1), and
// exactness at the pre-warping frequency.
func TestTustinFrequencyMap(t *testing.T) {
	systems := []TF{
		MustParse("(s + 3)/(s^3 + 1.4s^2 + 4.4s + 4)"),
		MustParse("10(s+1)/(s(s+5)^2)"),
		MustParse("(s^2 + 0.2s + 9)/(s^2 + 2s + 1)"),
		MustParse("(s + 2)^2/(0.5s + 1)"), // improper: allowed for Tustin
	}
	const T = 0.05
	for _, g := range systems {
		for _, w0 := range []float64{0, 7, 50} {
			gd, err := g.Discretize(T, Tustin, &DiscretizeSettings{PrewarpRadPerSec: w0})
			if err != nil {
				t.Fatal(err)
			}
			c := 2 / T
			if w0 != 0 {
				c = w0 / math.Tan(w0*T/2)
			}
			for _, w := range []float64{0.1, 1, 7, 20, 50, 60} {
				got, err := gd.FrequencyResponse(w)
				if err != nil {
					t.Fatal(err)
				}
				want := g.Eval(complex(0, c*math.Tan(w*T/2)))
				// Relative tolerance from the condition of evaluating the
				// discrete polynomials at z = e^{jωT}: about
				// ε·Σ|aᵢ|/|a(z)| each for numerator and denominator (large
				// near z = 1, where the poles cluster), with a factor 16
				// for the rounding of the coefficients themselves.
				z := cmplx.Rect(1, w*T)
				cond := gd.Num().Norm1()/cmplx.Abs(gd.Num().EvalComplex(z)) + gd.Den().Norm1()/cmplx.Abs(gd.Den().EvalComplex(z))
				if !testutil.CloseComplex(got, want, 16*0x1p-52*cond, 1e-14) {
					t.Errorf("%v, ω0 = %v, ω = %v: G_d = %v, G(j c tan(ωT/2)) = %v", g, w0, w, got, want)
				}
			}
			if w0 != 0 {
				got, _ := gd.FrequencyResponse(w0)
				if want := g.Eval(complex(0, w0)); !testutil.CloseComplex(got, want, 1e-12, 1e-14) {
					t.Errorf("%v: at the pre-warping frequency G_d = %v, G = %v", g, got, want)
				}
			}
		}
	}
}

// TestMatchedPoleZero checks the matched pole–zero equivalent against its
// definition (Franklin, Powell & Workman, Digital Control of Dynamic
// Systems, 3rd ed., §6.3.3, from memory): poles and zeros map by e^{sT},
// zeros at infinity go to z = −1, low-frequency gains agree.
func TestMatchedPoleZero(t *testing.T) {
	const T = 0.1
	t.Run("first order", func(t *testing.T) {
		// a/(s+a) → K(z+1)/(z − e^{−aT}) with K = (1 − e^{−aT})/2 (unit static gain).
		a := 3.0
		gd, err := MustNew([]float64{a}, []float64{1, a}).Discretize(T, MatchedPoleZero, nil)
		if err != nil {
			t.Fatal(err)
		}
		e := math.Exp(-a * T)
		k := (1 - e) / 2
		want := MustNewDiscrete(t, []float64{k, k}, []float64{1, -e}, T)
		if !gd.EqualApprox(want, 1e-14) {
			t.Errorf("got %v, want %v", gd, want)
		}
	})
	t.Run("lead with complex poles", func(t *testing.T) {
		g := MustParse("5(s + 2)/((s + 1)(s^2 + 2s + 10))")
		gd, err := g.Discretize(T, MatchedPoleZero, nil)
		if err != nil {
			t.Fatal(err)
		}
		// Relative degree 2: two zeros at infinity, both mapped to z = −1.
		wantZ := []complex128{cmplx.Exp(-2 * T), -1, -1}
		wantP := []complex128{cmplx.Exp(-1 * T), cmplx.Exp(complex(-1, 3) * T), cmplx.Exp(complex(-1, -3) * T)}
		zs, _ := gd.Zeros()
		ps, _ := gd.Poles()
		for _, pr := range []struct {
			got, want []complex128
		}{{zs, wantZ}, {ps, wantP}} {
			dist, ok := testutil.MatchMultiset(pr.got, pr.want)
			if !ok {
				t.Fatalf("got %v, want %v", pr.got, pr.want)
			}
			for i, d := range dist {
				if d > 1e-12 {
					t.Errorf("root %v off by %v", pr.want[i], d)
				}
			}
		}
		g0, _ := g.StaticGain()
		gd0, _ := gd.StaticGain()
		if !testutil.Close(gd0, g0, 1e-13, 0) {
			t.Errorf("static gain %v, want %v", gd0, g0)
		}
	})
	t.Run("integrator gain matching", func(t *testing.T) {
		// lim s·G(s) = 2 as s → 0 must equal lim ((z−1)/T)·G_d(z) as z → 1.
		g := MustParse("2/(s(s+4))")
		gd, err := g.Discretize(T, MatchedPoleZero, nil)
		if err != nil {
			t.Fatal(err)
		}
		z := complex(1+1e-7, 0)
		got := real((z - 1) / complex(T, 0) * gd.Eval(z))
		if !testutil.Close(got, 0.5, 1e-6, 0) { // first-order limit error ~1e-7
			t.Errorf("low-frequency gain %v, want 0.5", got)
		}
	})
}

func TestDiscretizeErrors(t *testing.T) {
	g := MustParse("1/(s+1)")
	gDelay, _ := g.WithDelay(0.05)
	improper := MustParse("(s^2+1)/(s+1)")
	disc := MustNewDiscrete(t, []float64{1}, []float64{1, -0.5}, 0.1)
	tests := []struct {
		name string
		g    TF
		T    float64
		m    DiscretizeMethod
		set  *DiscretizeSettings
		want error
	}{
		{"zero period", g, 0, ZeroOrderHold, nil, ErrSampleTime},
		{"negative period", g, -0.1, ZeroOrderHold, nil, ErrSampleTime},
		{"NaN period", g, math.NaN(), ZeroOrderHold, nil, ErrNotFinite},
		{"infinite period", g, math.Inf(1), Tustin, nil, ErrNotFinite},
		{"already discrete", disc, 0.1, ZeroOrderHold, nil, ErrDomainMismatch},
		{"unknown method", g, 0.1, DiscretizeMethod(9), nil, ErrMethod},
		{"negative method", g, 0.1, DiscretizeMethod(-1), nil, ErrMethod},
		{"prewarp with ZOH", g, 0.1, ZeroOrderHold, &DiscretizeSettings{PrewarpRadPerSec: 1}, ErrMethod},
		{"prewarp above Nyquist", g, 0.1, Tustin, &DiscretizeSettings{PrewarpRadPerSec: 40}, ErrFrequency},
		{"negative prewarp", g, 0.1, Tustin, &DiscretizeSettings{PrewarpRadPerSec: -1}, ErrFrequency},
		// π/T = 31.41592653589793… for T = 0.1, written to 15 digits: it
		// passes ω₀ < π/T, but tan(ω₀T/2) ≈ 6e14 (issue 11, item 13).
		{"prewarp π/T to 15 digits", g, 0.1, Tustin, &DiscretizeSettings{PrewarpRadPerSec: 31.4159265358979}, ErrFrequency},
		{"NaN prewarp", g, 0.1, Tustin, &DiscretizeSettings{PrewarpRadPerSec: math.NaN()}, ErrNotFinite},
		{"improper ZOH", improper, 0.1, ZeroOrderHold, nil, ErrImproper},
		{"improper FOH", improper, 0.1, FirstOrderHold, nil, ErrImproper},
		{"improper matched", improper, 0.1, MatchedPoleZero, nil, ErrImproper},
		{"fractional delay Tustin", gDelay, 0.1, Tustin, nil, ErrFractionalDelay},
		{"fractional delay matched", gDelay, 0.1, MatchedPoleZero, nil, ErrFractionalDelay},
		{"matched zero on the sampling frequency", MustParse("(s^2 + 3947.8417604357433)/(s+1)^2"), 0.1, MatchedPoleZero, nil, ErrNumerical},
		{"ZOH overflow", MustParse("1/(s-1000)"), 10, ZeroOrderHold, nil, ErrNotFinite},
		{"ZOH ‖AT‖ overflow", MustParse("1e300/(s+1e300)"), 1e300, ZeroOrderHold, nil, ErrNotFinite},
		{"ZOH pole far too fast", MustParse("1e100/(s+1e100)"), 1e-3, ZeroOrderHold, nil, ErrNumerical},
		{"FOH pole far too fast", MustParse("1e12/(s+1e12)"), 1, FirstOrderHold, nil, ErrNumerical},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			_, err := test.g.Discretize(test.T, test.m, test.set)
			if !errors.Is(err, test.want) {
				t.Errorf("got error %v, want %v", err, test.want)
			}
		})
	}
}

func TestDiscretizeMethodNames(t *testing.T) {
	for _, m := range []DiscretizeMethod{ZeroOrderHold, FirstOrderHold, Tustin, MatchedPoleZero} {
		got, err := ParseDiscretizeMethod(m.String())
		if err != nil || got != m {
			t.Errorf("ParseDiscretizeMethod(%q) = %v, %v", m.String(), got, err)
		}
	}
	for text, want := range map[string]DiscretizeMethod{"zoh": ZeroOrderHold, " FOH ": FirstOrderHold, "Tustin": Tustin, "matched": MatchedPoleZero, "bilinear": Tustin} {
		if got, err := ParseDiscretizeMethod(text); err != nil || got != want {
			t.Errorf("ParseDiscretizeMethod(%q) = %v, %v; want %v", text, got, err, want)
		}
	}
	if _, err := ParseDiscretizeMethod("euler"); !errors.Is(err, ErrMethod) {
		t.Errorf("unknown name: got %v", err)
	}
	if s := DiscretizeMethod(7).String(); s != "DiscretizeMethod(7)" {
		t.Errorf("String of unknown method = %q", s)
	}
}

// TestZeroOrderHoldRepeatedPoles checks multiple poles, where the roots of
// the continuous denominator are clustered: 1/(s+1)² against its closed
// form (from the step response y(t) = 1 − e^{−t}(1 + t): the first
// numerator coefficient is y(T) and num(1) = den(1)·G(0)), and 1/(s+1)³
// against the sampled step response 1 − e^{−t}(1 + t + t²/2) (step
// invariance).
func TestZeroOrderHoldRepeatedPoles(t *testing.T) {
	T := 0.1
	gd, err := MustParse("1/(s+1)^2").Discretize(T, ZeroOrderHold, nil)
	if err != nil {
		t.Fatal(err)
	}
	e := math.Exp(-T)
	checkCoeffs(t, "num", gd.Num(), []float64{1 - e*(1+T), e * (e - 1 + T)}, 1e-11)
	checkCoeffs(t, "den", gd.Den(), []float64{1, -2 * e, e * e}, 1e-14)

	gd, err = MustParse("1/(s+1)^3").Discretize(T, ZeroOrderHold, nil)
	if err != nil {
		t.Fatal(err)
	}
	u := make([]float64, 60)
	for i := range u {
		u[i] = 1
	}
	y := simulate(gd, u)
	for k := range y {
		tk := float64(k) * T
		want := 1 - math.Exp(-tk)*(1+tk+tk*tk/2)
		// 1e-12: as in TestHoldInvariance.
		if math.Abs(y[k]-want) > 1e-12 {
			t.Errorf("y[%d] = %.17g, want %.17g", k, y[k], want)
		}
	}
}

// naiveNumerator is the route through characteristic polynomials,
// num = charpoly(Φ − ΓC) − charpoly(Φ) + D·charpoly(Φ), kept here as the
// baseline for the accuracy comparison below.
func naiveNumerator(t testing.TB, g TF, T float64) poly.Poly {
	t.Helper()
	m, err := statespace.FromTransferFunction(g.Num().Coeffs(), g.Den().Coeffs())
	if err != nil {
		t.Fatal(err)
	}
	phi, gamma, err := m.ZeroOrderHold(T)
	if err != nil {
		t.Fatal(err)
	}
	n := m.Order()
	var gc mat.Dense
	gc.Outer(1, mat.NewVecDense(n, gamma), mat.NewVecDense(n, m.C))
	var cl mat.Dense
	cl.Sub(phi, &gc)
	e1, err := eigenvalues(phi)
	if err != nil {
		t.Fatal(err)
	}
	e2, err := eigenvalues(&cl)
	if err != nil {
		t.Fatal(err)
	}
	p1, _ := poly.FromRoots(e1)
	p2, _ := poly.FromRoots(e2)
	return p2.Sub(p1).Add(p1.Scale(m.D))
}

// TestZeroOrderHoldAccuracyVersusBaseline measures the numerator error of
// Discretize and of the characteristic-polynomial baseline against the
// mpmath residue values, and requires the method used to be at least as
// accurate (it is far more accurate under fast sampling).
func TestZeroOrderHoldAccuracyVersusBaseline(t *testing.T) {
	gold := loadSampledGolden(t)
	for _, c := range gold.ZOHCoeffs {
		g := MustNew(c.Num, c.Den)
		gd, err := g.Discretize(c.T, ZeroOrderHold, nil)
		if err != nil {
			t.Fatal(err)
		}
		relErr := func(p poly.Poly) float64 {
			got := p.Coeffs()
			scale, worst := 0.0, 0.0
			for _, w := range c.NumZ {
				scale = math.Max(scale, math.Abs(w))
			}
			off := len(got) - len(c.NumZ)
			for i, w := range c.NumZ {
				worst = math.Max(worst, math.Abs(got[i+off]-w))
			}
			for i := 0; i < off; i++ {
				worst = math.Max(worst, math.Abs(got[i]))
			}
			return worst / scale
		}
		ours := relErr(gd.Num())
		base := relErr(naiveNumerator(t, g, c.T))
		t.Logf("%s: numerator error (relative to its largest coefficient) interpolation %.2g, characteristic polynomials %.2g", c.Name, ours, base)
		if ours > math.Max(base, 1e-13) {
			t.Errorf("%s: interpolation error %.3g above the baseline's %.3g", c.Name, ours, base)
		}
	}
}

func BenchmarkDiscretize(b *testing.B) {
	for _, n := range []int{2, 4, 8, 16} {
		roots := make([]complex128, n)
		for i := range roots {
			roots[i] = complex(-float64(i+1), 0)
		}
		g, err := FromZerosPolesGain(nil, roots, 1)
		if err != nil {
			b.Fatal(err)
		}
		for _, m := range []DiscretizeMethod{ZeroOrderHold, FirstOrderHold, Tustin, MatchedPoleZero} {
			b.Run(fmt.Sprintf("%v/n=%d", m, n), func(b *testing.B) {
				for b.Loop() {
					if _, err := g.Discretize(0.01, m, nil); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

// BenchmarkZeroOrderHoldNumerator compares, side by side, the whole
// zero-order-hold discretization (numerator by unit-circle interpolation)
// with the characteristic-polynomial baseline numerator alone (realisation,
// exponential, two eigenvalue problems), for the accuracy gain measured in
// TestZeroOrderHoldAccuracyVersusBaseline.
func BenchmarkZeroOrderHoldNumerator(b *testing.B) {
	for _, n := range []int{4, 8} {
		roots := make([]complex128, n)
		for i := range roots {
			roots[i] = complex(-float64(i+1), 0)
		}
		g, err := FromZerosPolesGain(nil, roots, 1)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("interpolation/n=%d", n), func(b *testing.B) {
			for b.Loop() {
				if _, err := g.Discretize(0.01, ZeroOrderHold, nil); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("charpoly-baseline/n=%d", n), func(b *testing.B) {
			for b.Loop() {
				naiveNumerator(b, g, 0.01)
			}
		})
	}
}

// TestDiscretizeStaticGainProperty: every method keeps the static gain of a
// stable g, G_d(1) = G(0) (step invariance for the holds; z = 1 ↔ s = 0
// for Tustin; the matched gain by construction), and the holds and the
// matched method keep the poles e^{pT}. Random stable systems, fixed seed.
func TestDiscretizeStaticGainProperty(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for trial := 0; trial < 30; trial++ {
		n := 1 + rng.IntN(5)
		m := rng.IntN(n + 1)
		var poles, zeros []complex128
		for len(poles) < n {
			re := -0.2 - 5*rng.Float64()
			if n-len(poles) >= 2 && rng.IntN(2) == 0 {
				im := 5 * rng.Float64()
				poles = append(poles, complex(re, im), complex(re, -im))
				continue
			}
			poles = append(poles, complex(re, 0))
		}
		for range m {
			zeros = append(zeros, complex(4*rng.NormFloat64(), 0))
		}
		g, err := FromZerosPolesGain(zeros, poles, 1+rng.Float64())
		if err != nil {
			t.Fatal(err)
		}
		T := 0.01 + 0.3*rng.Float64()
		g0, err := g.StaticGain()
		if err != nil {
			t.Fatal(err)
		}
		for _, method := range []DiscretizeMethod{ZeroOrderHold, FirstOrderHold, Tustin, MatchedPoleZero} {
			gd, err := g.Discretize(T, method, nil)
			if err != nil {
				t.Fatalf("%v of %v: %v", method, g, err)
			}
			gd0, err := gd.StaticGain()
			if err != nil {
				t.Fatal(err)
			}
			// G_d(1) = num(1)/den(1) is a ratio of sums of coefficients
			// that cancel: den(1) = ∏(1 − e^{pT}) is small for slow poles
			// and num(1) for a small static gain. The tolerance is the
			// rounding of those sums, 64ε·‖num‖₁/|den(1)| absolute plus
			// 64ε·‖den‖₁/|den(1)| relative (64ε for the coefficients'
			// own errors, measured at a few ε).
			d1 := math.Abs(gd.Den().Eval(1))
			const eps64 = 64 * 0x1p-52
			if !testutil.Close(gd0, g0, eps64*gd.Den().Norm1()/d1, eps64*gd.Num().Norm1()/d1) {
				t.Errorf("%v of %v at T = %v: static gain %.15g, want %.15g", method, g, T, gd0, g0)
			}
			if method == Tustin {
				continue
			}
			got, _ := gd.Poles()
			want := make([]complex128, len(poles))
			for i, p := range poles {
				want[i] = cmplx.Exp(p * complex(T, 0))
			}
			dist, ok := testutil.MatchMultiset(got, want)
			if !ok {
				t.Fatalf("%v: poles %v, want %v", method, got, want)
			}
			for i, d := range dist {
				if d > 1e-9 {
					t.Errorf("%v: pole %v off by %v", method, want[i], d)
				}
			}
		}
	}
}

// TestZeroOrderHoldFastPoles: for poles much faster than the sample
// period the matrix exponential (scaling and squaring) loses about
// 0.13·ε·‖AT‖ relative accuracy; the closed form (1 − e^{−aT})/(z − e^{−aT})
// is met within ε·aT, and beyond ‖AT‖ = 1e9 Discretize refuses.
func TestZeroOrderHoldFastPoles(t *testing.T) {
	for _, aT := range []float64{1e3, 1e5, 1e7} {
		gd, err := MustNew([]float64{aT}, []float64{1, aT}).Discretize(1, ZeroOrderHold, nil)
		if err != nil {
			t.Fatal(err)
		}
		want := -math.Expm1(-aT)
		if got := gd.Num().Coef(0); math.Abs(got-want) > 0x1p-52*aT {
			t.Errorf("aT = %g: numerator %.17g, want %.17g", aT, got, want)
		}
	}
	if _, err := MustNew([]float64{1e10}, []float64{1, 1e10}).Discretize(1, ZeroOrderHold, nil); !errors.Is(err, ErrNumerical) {
		t.Errorf("aT = 1e10: got %v, want ErrNumerical", err)
	}
}

// FuzzDiscretize: no input panics or hangs, and every result keeps the
// invariants (finite coefficients, monic denominator, the sample period
// asked for, no dead time left).
func FuzzDiscretize(f *testing.F) {
	f.Add(1.0, 2.0, 1.0, 3.0, 2.0, 0.1, 0.0, uint8(0))
	f.Add(0.0, 4.0, 1.0, 2.0, 4.0, 0.1, 0.25, uint8(1))
	f.Add(1.0, 1.0, 0.1, 1.0, 0.0, 0.05, 0.0, uint8(2))
	f.Add(0.0, 1.0, 1.0, 0.0, 0.0, 1.0, 0.0, uint8(3))
	f.Fuzz(func(t *testing.T, n1, n0, d2, d1, d0, T, delay float64, method uint8) {
		g, err := New([]float64{n1, n0}, []float64{d2, d1, d0})
		if err != nil {
			return
		}
		if g, err = g.WithDelay(delay); err != nil {
			return
		}
		m := DiscretizeMethod(method % 5) // 4 is invalid on purpose
		gd, err := g.Discretize(T, m, nil)
		if err != nil {
			return
		}
		if !gd.Num().IsFinite() || !gd.Den().IsFinite() || gd.Den().Lead() != 1 || gd.SampleTimeSec() != T || gd.DelaySec() != 0 {
			t.Fatalf("%v of %v at T = %v: %v (T = %v, τ = %v)", m, g, T, gd, gd.SampleTimeSec(), gd.DelaySec())
		}
	})
}

// TestFirstOrderClosedForms checks the first-order lag a/(s+a) against
// closed forms derived here from the definitions (Franklin, Powell &
// Workman, Digital Control of Dynamic Systems, 3rd ed., Ch. 6, from
// memory), with e = e^{−aT}:
//
//	triangle hold  G(z) = (z−1)²/(Tz)·Z{G(s)/s²}
//	               = [(aT + e − 1)z + (1 − e − aT·e)] / (aT·(z − e)),
//	Tustin         G(z) = aT(z + 1) / ((2 + aT)z − (2 − aT)),
//	Tustin of 1/s  G(z) = (T/2)(z + 1)/(z − 1).
func TestFirstOrderClosedForms(t *testing.T) {
	for _, a := range []float64{0.5, 3, 40} {
		for _, T := range []float64{0.01, 0.1, 0.5} {
			g := MustNew([]float64{a}, []float64{1, a})
			e := math.Exp(-a * T)
			aT := a * T
			foh, err := g.Discretize(T, FirstOrderHold, nil)
			if err != nil {
				t.Fatal(err)
			}
			// (aT + e − 1) = aT + expm1(−aT) keeps its digits for small aT.
			em1 := math.Expm1(-aT)
			checkCoeffs(t, "FOH num", foh.Num(), []float64{(aT + em1) / aT, (-em1 - aT*e) / aT}, 1e-13)
			checkCoeffs(t, "FOH den", foh.Den(), []float64{1, -e}, 1e-14)
			tus, err := g.Discretize(T, Tustin, nil)
			if err != nil {
				t.Fatal(err)
			}
			k := aT / (2 + aT)
			checkCoeffs(t, "Tustin num", tus.Num(), []float64{k, k}, 1e-15)
			checkCoeffs(t, "Tustin den", tus.Den(), []float64{1, -(2 - aT) / (2 + aT)}, 1e-15)
		}
	}
	T := 0.02
	integ, err := MustNew([]float64{1}, []float64{1, 0}).Discretize(T, Tustin, nil)
	if err != nil {
		t.Fatal(err)
	}
	checkCoeffs(t, "Tustin 1/s num", integ.Num(), []float64{T / 2, T / 2}, 1e-15)
	checkCoeffs(t, "Tustin 1/s den", integ.Den(), []float64{1, -1}, 0)
}
