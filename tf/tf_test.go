package tf

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"sync"
	"testing"

	"github.com/loopwise/loopwise/internal/testutil"
	"github.com/loopwise/loopwise/poly"
)

func TestNewErrors(t *testing.T) {
	tests := []struct {
		name     string
		num, den []float64
		ts       float64
		want     error
	}{
		{"empty numerator", nil, []float64{1}, 0, ErrEmpty},
		{"empty denominator", []float64{1}, []float64{}, 0, ErrEmpty},
		{"zero denominator", []float64{1}, []float64{0, 0}, 0, ErrZeroDenominator},
		{"NaN numerator", []float64{math.NaN()}, []float64{1}, 0, ErrNotFinite},
		{"Inf denominator", []float64{1}, []float64{1, math.Inf(-1)}, 0, ErrNotFinite},
		{"negative period", []float64{1}, []float64{1, 1}, -0.1, ErrSampleTime},
		{"NaN period", []float64{1}, []float64{1, 1}, math.NaN(), ErrNotFinite},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			if _, err := NewDiscrete(test.num, test.den, test.ts); !errors.Is(err, test.want) {
				t.Errorf("got %v, want %v", err, test.want)
			}
		})
	}
	if _, err := FromZerosPolesGain([]complex128{complex(1, 1)}, nil, 1); err == nil {
		t.Error("unpaired complex zero accepted")
	}
	if _, err := FromZerosPolesGain(nil, []complex128{-1}, math.NaN()); !errors.Is(err, ErrNotFinite) {
		t.Errorf("NaN gain: %v", err)
	}
	g := MustNew([]float64{1}, []float64{1, 1})
	for _, d := range []float64{-1, math.NaN()} {
		if _, err := g.WithDelay(d); err == nil {
			t.Errorf("delay %v accepted", d)
		}
	}
	if _, err := g.Scale(math.Inf(1)); !errors.Is(err, ErrNotFinite) {
		t.Errorf("Scale(Inf): %v", err)
	}
}

func TestInputsCopied(t *testing.T) {
	num, den := []float64{1, 2}, []float64{1, 3, 2}
	g := MustNew(num, den)
	num[0], den[0] = 99, 99
	if g.Num().Lead() != 1 || g.Den().Lead() != 1 {
		t.Errorf("constructor kept a reference to its input: %v", g)
	}
}

func TestQueries(t *testing.T) {
	// 10(s+1)/(s(s+5)²): poles 0, −5, −5; zero −1; gain factor 10;
	// relative degree 2 (hand factorisation).
	g := MustParse("10(s+1)/(s(s+5)^2)")
	poles, err := g.Poles()
	if err != nil {
		t.Fatal(err)
	}
	dist, ok := testutil.MatchMultiset(poles, []complex128{0, -5, -5})
	if !ok || dist[0] > 1e-14 || dist[1] > 1e-7 || dist[2] > 1e-7 {
		t.Errorf("poles %v", poles)
	}
	zeros, _ := g.Zeros()
	if len(zeros) != 1 || cmplx.Abs(zeros[0]+1) > 1e-15 {
		t.Errorf("zeros %v", zeros)
	}
	if g.GainFactor() != 10 || g.RelativeDegree() != 2 || !g.IsProper() || !g.IsStrictlyProper() {
		t.Errorf("gain %v, relative degree %d", g.GainFactor(), g.RelativeDegree())
	}
	if _, err := g.StaticGain(); !errors.Is(err, ErrInfiniteGain) {
		t.Errorf("static gain with integrator: %v", err)
	}
	h := MustParse("(2s+6)/(s^2+3s+2)")
	if k, err := h.StaticGain(); err != nil || k != 3 {
		t.Errorf("static gain %v, %v; want 3", k, err)
	}
	// Common root at the origin cancels: s/(s(s+2)) has static gain 1/2.
	if k, err := MustParse("s/(s^2+2s)").StaticGain(); err != nil || k != 0.5 {
		t.Errorf("static gain with cancelling origin %v, %v", k, err)
	}
	if k, err := (TF{}).StaticGain(); err != nil || k != 0 {
		t.Errorf("zero value static gain %v, %v", k, err)
	}
	if k, err := MustParse("0/s").StaticGain(); err != nil || k != 0 {
		t.Errorf("0/s static gain %v, %v", k, err)
	}
	gd, _ := NewDiscrete([]float64{0.5}, []float64{1, -0.5}, 0.1)
	if k, err := gd.StaticGain(); err != nil || k != 1 {
		t.Errorf("discrete static gain %v, %v", k, err)
	}
	// A pole at z = 1 written in factors expands to coefficients whose sum
	// is rounding noise (about 1e-16), not 0: still an infinite gain, not
	// the 5.7e15 that a plain division gives.
	integ, _ := ParseDiscrete("(0.368z+0.264)/((z-1)(z-0.368))", 1)
	if k, err := integ.StaticGain(); !errors.Is(err, ErrInfiniteGain) {
		t.Errorf("discrete integrator static gain %v, %v; want ErrInfiniteGain", k, err)
	}
	// And a common factor (z − 1) in both, expanded inexactly, cancels:
	// (z−1)(z−0.3)/((z−1)(z−0.5)(z−0.2)) has static gain 0.7/(0.5·0.8).
	common, _ := ParseDiscrete("(z-1)(z-0.3)/((z-1)(z-0.5)(z-0.2))", 1)
	if k, err := common.StaticGain(); err != nil || math.Abs(k-1.75) > 1e-12 {
		t.Errorf("static gain with a cancelling z = 1: %v, %v; want 1.75", k, err)
	}
	if MustParse("(s^2+1)/(s+1)").IsProper() {
		t.Error("improper reported proper")
	}
}

func TestEvalAndFrequencyResponse(t *testing.T) {
	g, _ := MustParse("1/(s+1)").WithDelay(0.5)
	// 1/(1 + jω)·e^{−jω·0.5} at ω = 2 (closed form).
	w := 2.0
	want := 1 / complex(1, w) * cmplx.Exp(complex(0, -w*0.5))
	got, err := g.FrequencyResponse(w)
	if err != nil || !testutil.CloseComplex(got, want, 1e-15, 0) {
		t.Errorf("G(j2) = %v, %v; want %v", got, err, want)
	}
	if v := g.Eval(complex(0, w)); !testutil.CloseComplex(v, want, 1e-15, 0) {
		t.Errorf("Eval = %v, want %v", v, want)
	}
	if v := MustParse("1/s").Eval(0); !cmplx.IsInf(v) {
		t.Errorf("at a pole: %v", v)
	}
	if _, err := g.FrequencyResponse(math.NaN()); !errors.Is(err, ErrNotFinite) {
		t.Errorf("NaN frequency: %v", err)
	}
	gd, _ := NewDiscrete([]float64{1}, []float64{1, -0.5}, 0.1)
	if _, err := gd.FrequencyResponse(40); !errors.Is(err, ErrAboveNyquist) {
		t.Errorf("above Nyquist: %v", err)
	}
	// 1/(e^{jωT} − 0.5) at ω = π/T is 1/(−1.5).
	if v, err := gd.FrequencyResponse(math.Pi / 0.1); err != nil || !testutil.CloseComplex(v, -1/1.5, 1e-15, 1e-15) {
		t.Errorf("at Nyquist: %v, %v", v, err)
	}
}

// TestAlgebraIdentities checks the block-diagram algebra against pointwise
// evaluation (the definitions), at random points with a fixed seed.
func TestAlgebraIdentities(t *testing.T) {
	g := MustParse("10(s+1)/(s(s+5)^2)")
	h := MustParse("2/(0.1s+1)")
	rng := rand.New(rand.NewPCG(1, 1))
	series, _ := g.Series(h)
	par, _ := g.Parallel(h)
	fb, _ := Feedback(g, h)
	pfb, _ := PositiveFeedback(g, h)
	inv, _ := g.Inverse()
	cl, _ := g.ClosedLoop()
	sens, _ := g.Sensitivity()
	sc, _ := g.Scale(-3)
	for range 20 {
		s := complex(rng.NormFloat64()*3, rng.NormFloat64()*3)
		G, H := g.Eval(s), h.Eval(s)
		checks := []struct {
			name      string
			got, want complex128
		}{
			{"series", series.Eval(s), G * H},
			{"parallel", par.Eval(s), G + H},
			{"feedback", fb.Eval(s), G / (1 + G*H)},
			{"positive feedback", pfb.Eval(s), G / (1 - G*H)},
			{"inverse", inv.Eval(s), 1 / G},
			{"closed loop", cl.Eval(s), G / (1 + G)},
			{"sensitivity", sens.Eval(s), 1 / (1 + G)},
			{"S + T", sens.Eval(s) + cl.Eval(s), 1},
			{"scale", sc.Eval(s), -3 * G},
			{"neg", g.Neg().Eval(s), -G},
		}
		for _, c := range checks {
			// 1e-12: a handful of rational evaluations at |s| ≈ 3.
			if !testutil.CloseComplex(c.got, c.want, 1e-12, 1e-14) {
				t.Errorf("%s at %v: %v, want %v", c.name, s, c.got, c.want)
			}
		}
	}
	// Characteristic polynomial D + N: s(s+5)² + 10(s+1).
	want := poly.MustNew(1, 10, 35, 10)
	if cp := g.CharacteristicPolynomial(); !cp.Equal(want) {
		t.Errorf("characteristic polynomial %v, want %v", cp, want)
	}
}

func TestAlgebraErrors(t *testing.T) {
	g := MustParse("1/(s+1)")
	gd, _ := NewDiscrete([]float64{1}, []float64{1, -0.5}, 0.1)
	gd2, _ := NewDiscrete([]float64{1}, []float64{1, -0.5}, 0.2)
	delayed, _ := g.WithDelay(0.1)
	other, _ := g.WithDelay(0.2)
	if _, err := g.Series(gd); !errors.Is(err, ErrDomainMismatch) {
		t.Errorf("series s·z: %v", err)
	}
	if _, err := gd.Parallel(gd2); !errors.Is(err, ErrDomainMismatch) {
		t.Errorf("parallel with different periods: %v", err)
	}
	if _, err := Feedback(g, gd); !errors.Is(err, ErrDomainMismatch) {
		t.Errorf("feedback s, z: %v", err)
	}
	if _, err := Feedback(delayed, g); !errors.Is(err, ErrDelayInLoop) {
		t.Errorf("feedback with delay: %v", err)
	}
	if _, err := delayed.Sensitivity(); !errors.Is(err, ErrDelayInLoop) {
		t.Errorf("sensitivity with delay: %v", err)
	}
	if _, err := delayed.Parallel(other); !errors.Is(err, ErrDelayInLoop) {
		t.Errorf("parallel with different delays: %v", err)
	}
	if _, err := delayed.Inverse(); !errors.Is(err, ErrDelayInLoop) {
		t.Errorf("inverse with delay: %v", err)
	}
	if _, err := (TF{}).Inverse(); !errors.Is(err, ErrZeroTransferFunction) {
		t.Errorf("inverse of zero: %v", err)
	}
	one := MustNew([]float64{1}, []float64{1})
	if _, err := PositiveFeedback(one, one); !errors.Is(err, ErrZeroDenominator) {
		t.Errorf("1/(1 − 1): %v", err)
	}
	// Overflow is an error, not a value with infinite coefficients.
	huge := MustNew([]float64{1}, []float64{1e200, 1})
	if _, err := huge.Series(huge); !errors.Is(err, ErrNotFinite) {
		t.Errorf("overflowing series: %v", err)
	}
	if _, err := huge.Scale(1e200); err != nil {
		t.Errorf("scale: %v", err) // 1e200/(1e200 s + 1): the numerator is fine
	}
	if _, err := MustNew([]float64{1e300}, []float64{1, 1}).Scale(1e10); !errors.Is(err, ErrNotFinite) {
		t.Errorf("overflowing scale: %v", err)
	}
	longDelay, _ := g.WithDelay(1e308)
	if _, err := longDelay.Series(longDelay); !errors.Is(err, ErrNotFinite) {
		t.Errorf("overflowing dead time: %v", err)
	}
	// A zero term adds no dead time to a sum.
	zeroDelayed, _ := TF{}.WithDelay(0.5)
	for _, p := range [][2]TF{{zeroDelayed, g}, {g, zeroDelayed}} {
		if s, err := p[0].Parallel(p[1]); err != nil || s.DelaySec() != 0 {
			t.Errorf("0·e^(−0.5s) + g: delay %v, %v", s.DelaySec(), err)
		}
	}
	// Series keeps dead time exactly (they add).
	s, err := delayed.Series(other)
	if err != nil || math.Abs(s.DelaySec()-0.3) > 1e-16 {
		t.Errorf("series delay %v, %v", s.DelaySec(), err)
	}
}

func TestZeroValue(t *testing.T) {
	var g TF
	if !g.IsZero() || g.Den().Degree() != 0 || g.String() != "(0)" || g.IsDiscrete() {
		t.Errorf("zero value: %q", g.String())
	}
	if v := g.Eval(1i); v != 0 {
		t.Errorf("zero value at j: %v", v)
	}
}

// TestConcurrentUse runs the read-only methods from several goroutines on
// one value (go test -race checks for data races).
func TestConcurrentUse(t *testing.T) {
	g, _ := MustParse("10(s+1)/(s(s+5)^2)").WithDelay(0.1)
	var wg sync.WaitGroup
	for i := range 4 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			_, _ = g.Poles()
			_ = g.String()
			_, _ = g.FrequencyResponse(float64(i))
			_, _ = g.Discretize(0.1, ZeroOrderHold, nil)
			_, _ = g.Pade(3)
			_, _, _ = g.Minimal(0)
		}()
	}
	wg.Wait()
	if g.String() != "(10*s + 10)/(s^3 + 10*s^2 + 25*s)*exp(-0.1*s)" {
		t.Errorf("value changed: %v", g)
	}
}
