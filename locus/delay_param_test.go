package locus

import (
	"encoding/json"
	"github.com/loopwise/loopwise/internal/testutil"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"testing"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

type delayParamRef struct {
	Name           string
	A0, A1, B0, B1 []float64
	Tau            float64
	Range          [2]float64
	Crossings      []struct{ Omega, Value string }
	ZeroCrossing   *string
	Roots          []struct {
		Value     float64
		Rightmost [][2]string
	}
}

func mustPoly(t *testing.T, c []float64) poly.Poly {
	t.Helper()
	p, err := poly.New(c...)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// refNum parses a reference value.
func refNum(t *testing.T, s string) float64 { return testutil.ParseFloat(t, s) }

func (c delayParamRef) build(t *testing.T) DelayedParametric {
	t.Helper()
	dp, err := NewDelayedParametric("p", mustPoly(t, c.A0), mustPoly(t, c.A1), mustPoly(t, c.B0), mustPoly(t, c.B1), c.Tau)
	if err != nil {
		t.Fatal(err)
	}
	return dp
}

// TestDelayParamMpmath compares the crossing values and frequencies and the
// rightmost roots with the 50-digit references of testdata/delay_param.py.
// Tolerance 1e-12 relative for the crossings (the polishing goal;
// ω is found by Brent's method on g to rounding and p = −Re(a/b) is well
// conditioned there) and 1e-11 relative to max(1, |s|) for the roots
// (Newton to 1e-12, DelayedRoots' documented accuracy, with one digit for
// the conditioning of the roots).
func TestDelayParamMpmath(t *testing.T) {
	b, err := os.ReadFile("testdata/delay_param.json")
	if err != nil {
		t.Fatal(err)
	}
	var refs []delayParamRef
	if err := json.Unmarshal(b, &refs); err != nil {
		t.Fatal(err)
	}
	for _, c := range refs {
		t.Run(c.Name, func(t *testing.T) {
			dp := c.build(t)
			st, err := dp.StableIntervals(&Settings{Range: Range{c.Range[0], c.Range[1]}})
			if err != nil {
				t.Fatal(err)
			}
			var got []DelayCrossing
			for _, x := range st.Crossings {
				if x.FrequencyRadPerSec > 0 {
					got = append(got, x)
				} else if c.ZeroCrossing == nil {
					t.Errorf("crossing at s = 0 with value %v, reference has none", x.Value)
				} else if w := refNum(t, *c.ZeroCrossing); math.Abs(x.Value-w) > 1e-12*math.Max(1, math.Abs(w)) {
					t.Errorf("crossing at s = 0: value %v, want %v", x.Value, w)
				}
			}
			if len(got) != len(c.Crossings) {
				t.Fatalf("%d crossings at ω > 0 %+v, want %d %+v", len(got), got, len(c.Crossings), c.Crossings)
			}
			// Both lists are sorted by value.
			for i, x := range got {
				w, v := refNum(t, c.Crossings[i].Omega), refNum(t, c.Crossings[i].Value)
				if math.Abs(x.FrequencyRadPerSec-w) > 1e-12*w || math.Abs(x.Value-v) > 1e-12*math.Abs(v) {
					t.Errorf("crossing %d: ω = %.16g, p = %.16g; want ω = %.16g, p = %.16g", i, x.FrequencyRadPerSec, x.Value, w, v)
				}
			}
			checkPieces(t, dp, st)
			for _, r := range c.Roots {
				res, err := dp.Roots(r.Value, &DelaySettings{Count: 6})
				if err != nil {
					t.Fatal(err)
				}
				// The references hold the upper half plane only.
				var upper []complex128
				for _, s := range res.Roots {
					if imag(s) >= 0 {
						upper = append(upper, s)
					}
				}
				for i, w := range r.Rightmost {
					want := complex(refNum(t, w[0]), refNum(t, w[1]))
					if i >= len(upper) || cmplx.Abs(upper[i]-want) > 1e-11*math.Max(1, cmplx.Abs(want)) {
						t.Errorf("p = %v: root %d = %v, want %v (all %v)", r.Value, i, upper, want, res.Roots)
						break
					}
				}
			}
		})
	}
}

// TestDelayParamPIIntegratorClosedForm: PI control of a delayed
// integrator, L = (Kp·s + Ki)/s · K/s · e^(−sτ), in the integral gain Ki:
// s² + K(Kp·s + Ki)e^(−sτ) = 0 at s = jω gives K(Ki + jωKp) = ω²e^(jωτ),
// so ω·sin(ωτ) = K·Kp and Ki = ω²cos(ωτ)/K (derived by hand), and s = 0
// at Ki = 0. The scalar equation is solved here by bisection on each
// half-period of sin(ωτ) (a different route from the code's g(ω) =
// Im(a·conj b)). Tolerance 1e-12 relative: the goal for the
// interval ends.
func TestDelayParamPIIntegratorClosedForm(t *testing.T) {
	const K, Kp, tau = 1.0, 0.5, 1.0
	a0 := mustPoly(t, []float64{1, 0, 0})
	a1 := mustPoly(t, []float64{K * Kp, 0})
	b1 := mustPoly(t, []float64{K})
	dp, err := NewDelayedParametric("Ki", a0, a1, poly.Poly{}, b1, tau)
	if err != nil {
		t.Fatal(err)
	}
	rng := Range{-40, 40}
	st, err := dp.StableIntervals(&Settings{Range: rng})
	if err != nil {
		t.Fatal(err)
	}
	want := []DelayCrossing{{Value: 0, FrequencyRadPerSec: 0}}
	h := func(w float64) float64 { return w*math.Sin(w*tau) - K*Kp }
	for m := 0; m < 40; m++ {
		// On each half-period ω·sin(ωτ) rises from 0 to a maximum and
		// falls back to 0: one root on each side of the maximum, where
		// tan(ωτ) = −ωτ.
		lo, hi := float64(m)*math.Pi/tau, float64(m+1)*math.Pi/tau
		if m%2 == 1 {
			continue // sin < 0 there: no root for K·Kp > 0
		}
		top := bisect(func(w float64) float64 { return math.Tan(w*tau) + w*tau }, lo+math.Pi/(2*tau)+1e-12, hi-1e-12)
		if m == 0 {
			top = bisect(func(w float64) float64 { return math.Sin(w*tau) + w*tau*math.Cos(w*tau) }, 1e-9, hi-1e-12)
		}
		if h(top) <= 0 {
			continue
		}
		for _, w := range []float64{bisect(h, lo+1e-300, top), bisect(h, top, hi)} {
			if ki := w * w * math.Cos(w*tau) / K; ki > rng.Min && ki < rng.Max {
				want = append(want, DelayCrossing{Value: ki, FrequencyRadPerSec: w})
			}
		}
	}
	if len(st.Crossings) != len(want) {
		t.Fatalf("crossings %+v, want %+v", st.Crossings, want)
	}
	for _, w := range want {
		found := false
		for _, c := range st.Crossings {
			if math.Abs(c.FrequencyRadPerSec-w.FrequencyRadPerSec) <= 1e-12*math.Max(1, w.FrequencyRadPerSec) &&
				math.Abs(c.Value-w.Value) <= 1e-12*math.Max(1, math.Abs(w.Value)) {
				found = true
			}
		}
		if !found {
			t.Errorf("crossing %+v not found in %+v", w, st.Crossings)
		}
	}
	// Stable for 0 < Ki < the first positive crossing: at Ki = 0+ the
	// s = 0 root moves left.
	if len(st.StableIntervals) != 1 || st.StableIntervals[0].Lo != 0 || math.Abs(st.StableIntervals[0].Hi-want[1].Value) > 1e-12 {
		t.Errorf("stable intervals %+v, want (0, %.15g)", st.StableIntervals, want[1].Value)
	}
	checkPieces(t, dp, st)
}

// bisect returns the root of f in [a, b] (a sign change) to rounding.
func bisect(f func(float64) float64, a, b float64) float64 {
	fa := f(a)
	for {
		m := 0.5 * (a + b)
		if m == a || m == b {
			return m
		}
		if fm := f(m); (fm < 0) == (fa < 0) {
			a, fa = m, fm
		} else {
			b = m
		}
	}
}

// checkPieces draws random interior values of every piece and checks that
// the rightmost roots agree with the piece's count of unstable roots, and
// that the counts of neighbouring pieces differ by the crossings between.
func checkPieces(t *testing.T, dp DelayedParametric, st DelayParamStability) {
	t.Helper()
	rnd := rand.New(rand.NewPCG(1, 1))
	for _, n := range st.Notes {
		t.Errorf("note: %s", n)
	}
	for _, pc := range st.Pieces {
		for range 3 {
			v := pc.Lo + (pc.Hi-pc.Lo)*(0.02+0.96*rnd.Float64())
			res, err := dp.Roots(v, &DelaySettings{Region: Above, MinRealPart: 0})
			if err != nil {
				t.Fatalf("%s = %v: %v", dp.Name, v, err)
			}
			if len(res.Roots) != pc.UnstableRoots {
				t.Errorf("%s = %v in (%v, %v): %d roots in Re s > 0 %v, the piece says %d", dp.Name, v, pc.Lo, pc.Hi, len(res.Roots), res.Roots, pc.UnstableRoots)
			}
		}
	}
}

// TestDelayParamGainAgrees: for the gain form A1 = B0 = 0 the general
// D-decomposition must give the crossings of DelayedStableGains (a
// different method: monotone pieces of the phase) on a finite range, to
// 1e-12 relative; and the first-order lag K·e^(−sτ)/(Ts + 1) is stable for
// −1 < K < K*, ωT = −tan(ωτ) (textbook result, from memory; references in
// testdata/delay_ranges.json).
func TestDelayParamGainAgrees(t *testing.T) {
	refs := loadRangeRefs(t)
	for _, c := range refs.FirstOrderLag {
		loop, err := tf.New([]float64{1}, []float64{c.T, 1})
		if err != nil {
			t.Fatal(err)
		}
		loop, _ = loop.WithDelay(c.Tau)
		dp, err := NewDelayedParametric("K", loop.Den(), poly.Poly{}, poly.Poly{}, loop.Num(), c.Tau)
		if err != nil {
			t.Fatal(err)
		}
		set := &Settings{Range: Range{-3, 40}}
		st, err := dp.StableIntervals(set)
		if err != nil {
			t.Fatal(err)
		}
		ks := refNum(t, c.Kstar)
		if len(st.StableIntervals) != 1 || st.StableIntervals[0].Lo != -1 || math.Abs(st.StableIntervals[0].Hi-ks) > 1e-12*ks {
			t.Errorf("T = %v, τ = %v: stable %+v, want (−1, %.16g)", c.T, c.Tau, st.StableIntervals, ks)
		}
		g, err := DelayedStableGains(loop, set)
		if err != nil {
			t.Fatal(err)
		}
		if len(g.Crossings) != len(st.Crossings) {
			t.Fatalf("%d crossings, DelayedStableGains has %d", len(st.Crossings), len(g.Crossings))
		}
		for i := range g.Crossings {
			a, b := st.Crossings[i], g.Crossings[i]
			if math.Abs(a.Value-b.Value) > 1e-12*math.Max(1, math.Abs(b.Value)) || a.Direction != b.Direction {
				t.Errorf("crossing %d: %+v, DelayedStableGains %+v", i, a, b)
			}
		}
		checkPieces(t, dp, st)
	}
}

// TestDelayParamFit: FromDelayedParameter recovers A0, A1, B0, B1 of a PI
// controller's integral gain on a delayed lag, exactly up to rounding.
func TestDelayParamFit(t *testing.T) {
	plant := tf.MustNew([]float64{2}, []float64{1, 1})
	plant, _ = plant.WithDelay(0.5)
	at := func(ki float64) (tf.TF, error) {
		c, err := tf.New([]float64{0.5, ki}, []float64{1, 0})
		if err != nil {
			return tf.TF{}, err
		}
		return c.Series(plant)
	}
	dp, err := FromDelayedParameter("Ki", at)
	if err != nil {
		t.Fatal(err)
	}
	// s(s+1) + (0.5s + Ki)·2·e^(−0.5s): A0 = s² + s, A1 = s, B0 = 0, B1 = 2.
	want := [4][]float64{{1, 1, 0}, {1, 0}, nil, {2}}
	for i, p := range []poly.Poly{dp.A0, dp.A1, dp.B0, dp.B1} {
		var w poly.Poly
		if want[i] != nil {
			w = mustPoly(t, want[i])
		}
		if !p.EqualApprox(w, 1e-14) {
			t.Errorf("part %d = %v, want %v", i, p, w)
		}
	}
	if dp.DelaySec != 0.5 {
		t.Errorf("delay %v", dp.DelaySec)
	}
}

// TestDelayParamErrors: bad input gives a clear error, never a panic.
func TestDelayParamErrors(t *testing.T) {
	s2 := mustPoly(t, []float64{1, 1, 0})
	one := mustPoly(t, []float64{1})
	if _, err := NewDelayedParametric("p", s2, one, poly.Poly{}, poly.Poly{}, 1); err == nil {
		t.Error("no dependence on p accepted")
	}
	if _, err := NewDelayedParametric("p", s2, one, poly.Poly{}, one, 0); err == nil {
		t.Error("zero delay accepted")
	}
	dp, _ := NewDelayedParametric("p", s2, one, poly.Poly{}, s2, 1) // neutral
	if _, err := dp.StableIntervals(&Settings{Range: Range{0, 1}}); err == nil {
		t.Error("neutral accepted")
	}
	dp, _ = NewDelayedParametric("T", mustPoly(t, []float64{1, 1}), mustPoly(t, []float64{2}), s2, poly.Poly{}, 0.4)
	if _, err := dp.StableIntervals(&Settings{Range: Range{0, 1}}); err == nil {
		t.Error("range through the degree drop at T = 0 accepted")
	}
	if _, err := dp.StableIntervals(&Settings{Range: Range{0.1, math.Inf(1)}}); err == nil {
		t.Error("unbounded range of a general parameter accepted")
	}
}

// TestDelayParamAnalyzeGainAgrees: for the gain form the construction
// quantities of the general Analyze equal those of DelayedAnalyze (break
// points from D′N − DN′ + τDN, departure angles 180° + arg N − arg D′ −
// Im(p)τ), to 1e-9 (two independent formulas evaluated in double
// precision at roots known to ~1e-12).
func TestDelayParamAnalyzeGainAgrees(t *testing.T) {
	loop := tf.MustNew([]float64{1, 3}, []float64{1, 2, 5, 0})
	loop, _ = loop.WithDelay(0.2)
	set := &Settings{Range: Range{0.01, 30}}
	want, err := DelayedAnalyze(loop, set)
	if err != nil {
		t.Fatal(err)
	}
	dp, _ := NewDelayedParametric("k", loop.Den(), poly.Poly{}, poly.Poly{}, loop.Num(), 0.2)
	got, err := dp.Analyze(set)
	if err != nil {
		t.Fatal(err)
	}
	if len(got.BreakPoints) != len(want.BreakPoints) {
		t.Fatalf("break points %+v, want %+v", got.BreakPoints, want.BreakPoints)
	}
	for i := range want.BreakPoints {
		if cmplx.Abs(got.BreakPoints[i].Point-want.BreakPoints[i].Point) > 1e-9 || math.Abs(got.BreakPoints[i].Value-want.BreakPoints[i].Value) > 1e-9*want.BreakPoints[i].Value {
			t.Errorf("break %d: %+v, want %+v", i, got.BreakPoints[i], want.BreakPoints[i])
		}
	}
	if len(got.Departures) != len(want.Departures) {
		t.Fatalf("departures %+v, want %+v", got.Departures, want.Departures)
	}
	for i := range want.Departures {
		if math.Abs(got.Departures[i].AngleDeg-want.Departures[i].AngleDeg) > 1e-9 {
			t.Errorf("departure %d: %+v, want %+v", i, got.Departures[i], want.Departures[i])
		}
	}
	if len(got.AxisCrossings) != len(want.AxisCrossings) {
		t.Errorf("crossings %+v, want %+v", got.AxisCrossings, want.AxisCrossings)
	}
}

// TestDelayParamTrace: every traced point of the sensor-lag locus is a
// root of P(s; p) (relative residual at rounding level, 1e-10 allowing
// for |s|³ terms), and the traced points at each crossing value include
// the crossing point jω within 1e-9 relative.
func TestDelayParamTrace(t *testing.T) {
	a0 := mustPoly(t, []float64{1, 1})
	b0 := mustPoly(t, []float64{1, 1, 0})
	a1 := mustPoly(t, []float64{5})
	dp, err := NewDelayedParametric("T", a0, a1, b0, poly.Poly{}, 0.4)
	if err != nil {
		t.Fatal(err)
	}
	l, err := dp.Trace(&Settings{Range: Range{0.05, 2}})
	if err != nil {
		t.Fatal(err)
	}
	if len(l.Branches) == 0 {
		t.Fatal("no branches")
	}
	for _, b := range l.Branches {
		for _, pt := range b.Points {
			q := dp.quasi(pt.Value)
			f, _ := q.Eval(pt.S)
			r := cmplx.Abs(pt.S)
			sc := dp.dAt(pt.Value).NormInf()*math.Pow(math.Max(1, r), 2) + 5*math.Exp(-0.4*real(pt.S))
			if cmplx.Abs(f) > 1e-10*sc {
				t.Fatalf("point %v at T = %v: |P| = %.3g (scale %.3g)", pt.S, pt.Value, cmplx.Abs(f), sc)
			}
		}
	}
	for _, c := range l.Analysis.AxisCrossings {
		found := false
		for _, b := range l.Branches {
			for _, pt := range b.Points {
				if pt.Value == c.Value && cmplx.Abs(pt.S-c.Point) <= 1e-9*math.Max(1, c.FrequencyRadPerSec) {
					found = true
				}
			}
		}
		if !found {
			t.Errorf("crossing %+v not on a traced branch", c)
		}
	}
}
