package margins

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/internal/testutil"
	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// closeRel reports |got − want| ≤ tol·|want| (with equal infinities).
func closeRel(got, want, tol float64) bool { return testutil.Close(got, want, tol, 0) }

// TestThirdOrderClosedForm checks k/(s(s+1)(s+2)): the phase crossover is
// at ω = √2 where |L| = k/6, so the gain factor is 6/k (closed form:
// Im[(jω)(jω+1)(jω+2)] = 2ω − ω³ = 0; Re = −3ω² = −6, hence |L| = k/6).
// The closed loop s³ + 3s² + 2s + k is stable for 0 < k < 6 (Routh).
// Tolerance 1e-13 relative: both values are polished to a few ulps.
func TestThirdOrderClosedForm(t *testing.T) {
	for _, k := range []float64{0.1, 0.5, 1, 2, 5.5, 6.5, 10} {
		g := tf.MustNew([]float64{k}, []float64{1, 3, 2, 0})
		res, err := Compute(g, nil)
		if err != nil {
			t.Fatal(err)
		}
		if len(res.PhaseCrossovers) != 1 {
			t.Fatalf("k=%v: phase crossovers %+v, want one", k, res.PhaseCrossovers)
		}
		pc := res.PhaseCrossovers[0]
		if !closeRel(pc.FrequencyRadPerSec, math.Sqrt2, 1e-13) || !closeRel(pc.GainFactor, 6/k, 1e-13) {
			t.Errorf("k=%v: phase crossover %+v, want ω=√2, k=%v", k, pc, 6/k)
		}
		if stable := k < 6; res.ClosedLoopStable != stable {
			t.Errorf("k=%v: stable=%v, want %v", k, res.ClosedLoopStable, stable)
		}
		if k < 6 {
			if !closeRel(res.GainMargin, 6/k, 1e-13) || !math.IsNaN(res.LowerGainMargin) {
				t.Errorf("k=%v: gain margins %v / %v, want %v / NaN", k, res.GainMargin, res.LowerGainMargin, 6/k)
			}
		} else {
			if !math.IsInf(res.GainMargin, 1) || !closeRel(res.LowerGainMargin, 6/k, 1e-13) || !math.IsNaN(res.DelayMarginSec) {
				t.Errorf("k=%v: gain margin %v, lower %v, delay margin %v; want +Inf, %v, NaN", k, res.GainMargin, res.LowerGainMargin, res.DelayMarginSec, 6/k)
			}
		}
	}
}

// TestPublishedExample checks L = 1/(s(s+1)²), the loop of Franklin, Powell
// & Emami-Naeini, Feedback Control of Dynamic Systems (6th ed., §6.4, from
// memory): gain margin 2 (6 dB) at ω = 1 rad/s and a phase margin printed
// as about 22°. Closed forms: the phase crossover solves ω² = 1, where
// |L| = 1/(1·2); the gain crossover solves ω(1 + ω²) = 1, ω = 0.6823278...
// (root of ω³ + ω − 1), PM = 90° − 2·atan(ω) = 21.386...°.
func TestPublishedExample(t *testing.T) {
	res, err := Compute(tf.MustNew([]float64{1}, []float64{1, 2, 1, 0}), nil)
	if err != nil {
		t.Fatal(err)
	}
	// Real root of ω³ + ω − 1 by Cardano's formula.
	q := math.Sqrt(1.0/4 + 1.0/27)
	wc := math.Cbrt(0.5+q) + math.Cbrt(0.5-q)
	pm := 90 - 2*math.Atan(wc)*180/math.Pi
	if !closeRel(res.GainMargin, 2, 1e-14) || !closeRel(res.PhaseCrossoverRadPerSec, 1, 1e-14) {
		t.Errorf("gain margin %v at %v rad/s, want 2 at 1 rad/s", res.GainMargin, res.PhaseCrossoverRadPerSec)
	}
	if !closeRel(res.GainCrossoverRadPerSec, wc, 1e-14) || !closeRel(res.PhaseMarginDeg, pm, 1e-13) {
		t.Errorf("phase margin %v° at %v rad/s, want %v° at %v", res.PhaseMarginDeg, res.GainCrossoverRadPerSec, pm, wc)
	}
	if math.Abs(res.PhaseMarginDeg-22) > 1 { // the printed value, rounded
		t.Errorf("phase margin %v° is not about the printed 22°", res.PhaseMarginDeg)
	}
}

// TestDeadTimeIntegrator checks k·e^(−sT)/s in closed form: gain crossover
// ω = k with PM = 90° − kT·180°/π; phase crossovers where π/2 + ωT =
// π + 2πm, i.e. ω_m = (π/2 + 2πm)/T, with gain factor ω_m/k; gain margin
// π/(2kT); delay margin π/(2k) − T; stable iff kT < π/2. Tolerance 1e-12:
// Brent's method stops within a few ulps of each crossover.
func TestDeadTimeIntegrator(t *testing.T) {
	for _, c := range []struct{ k, T float64 }{{1, 1}, {0.5, 0.2}, {3, 0.1}, {2, 1}} {
		g, err := tf.MustNew([]float64{c.k}, []float64{1, 0}).WithDelay(c.T)
		if err != nil {
			t.Fatal(err)
		}
		wmax := 30 / c.T
		res, err := Compute(g, &Settings{OmegaMaxRadPerSec: wmax})
		if err != nil {
			t.Fatal(err)
		}
		if len(res.GainCrossovers) != 1 || !closeRel(res.GainCrossovers[0].FrequencyRadPerSec, c.k, 1e-14) {
			t.Fatalf("k=%v T=%v: gain crossovers %+v", c.k, c.T, res.GainCrossovers)
		}
		if pm := wrap180(90 - c.k*c.T*180/math.Pi); math.Abs(res.PhaseMarginDeg-pm) > 1e-11 {
			t.Errorf("k=%v T=%v: PM %v, want %v", c.k, c.T, res.PhaseMarginDeg, pm)
		}
		m := 0
		for ; (math.Pi/2+2*math.Pi*float64(m))/c.T <= wmax; m++ {
			w := (math.Pi/2 + 2*math.Pi*float64(m)) / c.T
			if m >= len(res.PhaseCrossovers) {
				t.Fatalf("k=%v T=%v: %d phase crossovers, want more", c.k, c.T, len(res.PhaseCrossovers))
			}
			pc := res.PhaseCrossovers[m]
			if !closeRel(pc.FrequencyRadPerSec, w, 1e-12) || !closeRel(pc.GainFactor, w/c.k, 1e-12) {
				t.Errorf("k=%v T=%v: crossover %d = %+v, want ω=%v k=%v", c.k, c.T, m, pc, w, w/c.k)
			}
		}
		if len(res.PhaseCrossovers) != m {
			t.Errorf("k=%v T=%v: %d phase crossovers, want %d", c.k, c.T, len(res.PhaseCrossovers), m)
		}
		stable := c.k*c.T < math.Pi/2
		if res.ClosedLoopStable != stable || res.StabilityMethod != MethodNyquist {
			t.Errorf("k=%v T=%v: stable=%v by %q, want %v by Nyquist", c.k, c.T, res.ClosedLoopStable, res.StabilityMethod, stable)
		}
		if stable {
			if !closeRel(res.GainMargin, math.Pi/(2*c.k*c.T), 1e-12) || !closeRel(res.DelayMarginSec, math.Pi/(2*c.k)-c.T, 1e-12) {
				t.Errorf("k=%v T=%v: GM %v, DM %v; want %v, %v", c.k, c.T, res.GainMargin, res.DelayMarginSec, math.Pi/(2*c.k*c.T), math.Pi/(2*c.k)-c.T)
			}
		}
	}
}

// TestOpenLoopUnstableWithDeadTime checks 2·e^(−sτ)/(s − 1): |L| = 1 at
// ωc = √3, where the phase of 1/(jω − 1) is −(π − atan ωc) = −2π/3, so the
// phase margin is 60° − ωc·τ and the closed loop is stable (with P = 1
// open-loop unstable pole, by one counter-clockwise encirclement) iff
// τ < (π/3)/√3 = 0.6046 s (closed form). The lower gain margin is the
// factor 1/2 at ω = 0 (L(0) = −2).
func TestOpenLoopUnstableWithDeadTime(t *testing.T) {
	wc := math.Sqrt(3)
	for _, tau := range []float64{0.05, 0.3, 0.6, 0.61, 1.5} {
		g, err := tf.MustNew([]float64{2}, []float64{1, -1}).WithDelay(tau)
		if err != nil {
			t.Fatal(err)
		}
		res, err := Compute(g, nil)
		if err != nil {
			t.Fatal(err)
		}
		stable := tau < math.Pi/3/wc
		if res.ClosedLoopStable != stable || res.OpenLoopUnstablePoles != 1 {
			t.Errorf("τ=%v: stable=%v P=%d Z=%d, want stable=%v P=1", tau, res.ClosedLoopStable, res.OpenLoopUnstablePoles, res.ClosedLoopUnstablePoles, stable)
		}
		if pm := 60 - wc*tau*180/math.Pi; math.Abs(res.PhaseMarginDeg-wrap180(pm)) > 1e-11 {
			t.Errorf("τ=%v: PM %v, want %v", tau, res.PhaseMarginDeg, pm)
		}
		if stable {
			if !closeRel(res.DelayMarginSec, math.Pi/3/wc-tau, 1e-12) {
				t.Errorf("τ=%v: delay margin %v, want %v", tau, res.DelayMarginSec, math.Pi/3/wc-tau)
			}
			if !closeRel(res.LowerGainMargin, 0.5, 1e-15) || res.LowerPhaseCrossoverRadPerSec != 0 {
				t.Errorf("τ=%v: lower gain margin %v at %v, want 0.5 at 0", tau, res.LowerGainMargin, res.LowerPhaseCrossoverRadPerSec)
			}
		}
	}
}

// randomLoop returns a random proper continuous loop of the given order
// with real and complex poles (some unstable, some at s = 0) and zeros.
func randomLoop(r *rand.Rand, order int) tf.TF {
	var poles, zeros []complex128
	for len(poles) < order {
		re := r.NormFloat64()
		switch {
		case r.IntN(6) == 0:
			re = 0 // integrator
		case r.IntN(4) != 0:
			re = -math.Abs(re)
		}
		if order-len(poles) >= 2 && r.IntN(2) == 0 {
			im := math.Abs(r.NormFloat64()) + 0.1
			poles = append(poles, complex(re, im), complex(re, -im))
		} else {
			poles = append(poles, complex(re, 0))
		}
	}
	for range r.IntN(order) {
		zeros = append(zeros, complex(r.NormFloat64(), 0))
	}
	g, err := tf.FromZerosPolesGain(zeros, poles, math.Exp(2*r.NormFloat64()))
	if err != nil {
		panic(err)
	}
	return g
}

// closedLoopRoots returns the roots of den + num by poly.Roots.
func closedLoopRoots(t *testing.T, g tf.TF) []complex128 {
	t.Helper()
	rs, err := g.Den().Add(g.Num()).Roots()
	if err != nil {
		t.Fatal(err)
	}
	return rs
}

// TestNyquistAgreesWithClosedLoopPoles checks the Nyquist count (the
// method used with dead time) against the roots of den + num on random
// rational loops (fixed seed), with open-loop unstable poles and
// integrators; loops with a closed-loop root within 1e-6 of the axis are
// skipped (their count is decided by rounding).
func TestNyquistAgreesWithClosedLoopPoles(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	checked := 0
	for range 400 {
		g := randomLoop(r, 1+r.IntN(6))
		rs := closedLoopRoots(t, g)
		want, near := 0, false
		for _, z := range rs {
			if real(z) >= 0 {
				want++
			}
			if math.Abs(real(z)) < 1e-6*math.Max(1, cmplx.Abs(z)) {
				near = true
			}
		}
		if near {
			continue
		}
		lp, err := newLoop(g)
		if err != nil {
			t.Fatal(err)
		}
		if err := lp.countOpenLoop(); err != nil {
			t.Fatal(err)
		}
		gains, err := lp.gainCrossovers()
		if err != nil {
			t.Fatal(err)
		}
		cs, err := lp.rationalPhaseCrossovers()
		if err != nil {
			t.Fatal(err)
		}
		if lo, _ := lp.endpointCrossings(); lo != nil {
			cs = append([]crossing{*lo}, cs...)
		}
		z, _, err := lp.encirclementCount(gains, func(float64) ([]crossing, error) { return cs, nil })
		if err != nil {
			t.Errorf("%v: %v", g, err)
			continue
		}
		if z != want {
			t.Errorf("%v: Nyquist count Z = %d, closed-loop poles give %d (roots %v)", g, z, want, rs)
		}
		res, err := Compute(g, nil)
		if err != nil {
			t.Fatal(err)
		}
		if res.ClosedLoopUnstablePoles != want {
			t.Errorf("%v: Compute Z = %d, want %d", g, res.ClosedLoopUnstablePoles, want)
		}
		checked++
	}
	if checked < 300 {
		t.Errorf("only %d loops checked", checked)
	}
}

// TestSmallDeadTimeKeepsCount checks the dead-time route end to end: a dead
// time of 1e-7 s moves the closed-loop poles of a strictly proper loop by
// O(1e-7), so the Nyquist count with it must equal the closed-loop pole
// count without it (random loops, poles on the axis included; loops with a
// closed-loop root within 1e-4 of the axis skipped).
func TestSmallDeadTimeKeepsCount(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	checked := 0
	for range 150 {
		g := randomLoop(r, 1+r.IntN(5))
		if !g.IsStrictlyProper() {
			continue
		}
		rs := closedLoopRoots(t, g)
		want, near := 0, false
		for _, z := range rs {
			if real(z) >= 0 {
				want++
			}
			if math.Abs(real(z)) < 1e-4*math.Max(1, cmplx.Abs(z)) {
				near = true
			}
		}
		if near {
			continue
		}
		gd, err := g.WithDelay(1e-7)
		if err != nil {
			t.Fatal(err)
		}
		res, err := Compute(gd, &Settings{SkipPeaks: true})
		if err != nil {
			t.Errorf("%v: %v", gd, err)
			continue
		}
		if res.ClosedLoopUnstablePoles != want {
			t.Errorf("%v: Nyquist Z = %d, closed-loop poles without dead time give %d", gd, res.ClosedLoopUnstablePoles, want)
		}
		checked++
	}
	if checked < 80 {
		t.Errorf("only %d loops checked", checked)
	}
}

// TestGainMarginsBoundStability checks that the gain margins are the ends
// of the stable gain interval around the nominal gain: for random stable
// rational loops (fixed seed), scaling the loop by GM·(1 − 1e-6) keeps the
// closed-loop roots (poly.Roots of den + k·num) in the left half plane and
// GM·(1 + 1e-6) does not; likewise LowerGainMargin·(1 ± 1e-6) from the
// other side.
func TestGainMarginsBoundStability(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	stableAt := func(g tf.TF, k float64) bool {
		rs, err := g.Den().Add(g.Num().Scale(k)).Roots()
		if err != nil {
			t.Fatal(err)
		}
		for _, z := range rs {
			if real(z) >= 0 {
				return false
			}
		}
		return true
	}
	checked := 0
	for range 300 {
		g := randomLoop(r, 1+r.IntN(6))
		res, err := Compute(g, nil)
		if err != nil {
			t.Fatal(err)
		}
		if !res.ClosedLoopStable {
			continue
		}
		if !math.IsInf(res.GainMargin, 1) {
			if !stableAt(g, res.GainMargin*(1-1e-6)) || stableAt(g, res.GainMargin*(1+1e-6)) {
				t.Errorf("%v: gain margin %v is not the upper end of the stable gain interval", g, res.GainMargin)
			}
		} else if !stableAt(g, 1e6) {
			t.Errorf("%v: gain margin +Inf but unstable at gain 1e6", g)
		}
		if !math.IsNaN(res.LowerGainMargin) {
			if !stableAt(g, res.LowerGainMargin*(1+1e-6)) || stableAt(g, res.LowerGainMargin*(1-1e-6)) {
				t.Errorf("%v: lower gain margin %v is not the lower end of the stable gain interval", g, res.LowerGainMargin)
			}
		}
		checked++
	}
	if checked < 50 {
		t.Errorf("only %d stable loops checked", checked)
	}
}

// TestPoleOnImaginaryAxis checks loops with poles on the axis: no division
// by zero, crossovers found around them, stability as from the closed-loop
// poles (computed here by hand), with and without a small dead time.
func TestPoleOnImaginaryAxis(t *testing.T) {
	tests := []struct {
		name   string
		num    []float64
		den    []float64
		stable bool // closed-loop poles, by hand (Routh array)
	}{
		// (s+1)/(s(s²+4)): s³ + 5s + 1 lacks s², unstable.
		{"integrator and undamped pair", []float64{1, 1}, []float64{1, 0, 4, 0}, false},
		// 4(s+0.5)/((s²+1)(s+2)): s³+2s²+5s+4 → Routh 2·5 > 4: stable.
		{"undamped pair with lead", []float64{4, 2}, []float64{1, 2, 1, 2}, true},
		// 1/(s²+1): s² + 2 is marginal: unstable.
		{"pure oscillator", []float64{1}, []float64{1, 0, 1}, false},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			g := tf.MustNew(test.num, test.den)
			res, err := Compute(g, nil)
			if err != nil {
				t.Fatal(err)
			}
			if res.ClosedLoopStable != test.stable {
				t.Errorf("stable=%v, want %v", res.ClosedLoopStable, test.stable)
			}
			for _, pc := range res.PhaseCrossovers {
				if math.IsNaN(pc.GainFactor) || math.IsInf(pc.GainFactor, 0) || pc.GainFactor == 0 {
					t.Errorf("phase crossover %+v at a pole", pc)
				}
			}
			if !test.stable {
				return
			}
			gd, _ := g.WithDelay(1e-6)
			resd, err := Compute(gd, &Settings{SkipPeaks: true})
			if err != nil {
				t.Fatal(err)
			}
			if resd.ClosedLoopStable != test.stable {
				t.Errorf("with 1 µs dead time: stable=%v, want %v", resd.ClosedLoopStable, test.stable)
			}
		})
	}
}

// TestDiscreteWholeSampleDelay checks that a discrete dead time of two
// samples equals multiplying the denominator by z².
func TestDiscreteWholeSampleDelay(t *testing.T) {
	g, err := tf.NewDiscrete([]float64{0.2}, []float64{1, -0.9}, 0.1)
	if err != nil {
		t.Fatal(err)
	}
	gd, err := g.WithDelay(0.2)
	if err != nil {
		t.Fatal(err)
	}
	h, err := tf.NewDiscrete([]float64{0.2}, []float64{1, -0.9, 0, 0}, 0.1)
	if err != nil {
		t.Fatal(err)
	}
	a, err := Compute(gd, nil)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Compute(h, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(a.PhaseCrossovers) != len(b.PhaseCrossovers) || !closeRel(a.GainMargin, b.GainMargin, 1e-14) ||
		a.ClosedLoopStable != b.ClosedLoopStable || !closeRel(a.PeakSensitivity, b.PeakSensitivity, 1e-14) {
		t.Errorf("delayed %+v\nshifted %+v", a, b)
	}
}

// TestBadInput checks that bad loops, frequencies and settings give the
// documented errors.
func TestBadInput(t *testing.T) {
	disc, _ := tf.NewDiscrete([]float64{1}, []float64{1, -0.5}, 0.1)
	frac, _ := disc.WithDelay(0.05)
	improper := tf.MustNew([]float64{1, 0, 0}, []float64{1, 1})
	allPass := tf.MustNew([]float64{1, -1}, []float64{1, 1})
	illPosed := tf.MustNew([]float64{-1, 0}, []float64{1, 1})
	ok := tf.MustNew([]float64{1}, []float64{1, 1})
	tests := []struct {
		name string
		run  func() error
		want error
	}{
		{"zero loop", func() error { _, err := Compute(tf.TF{}, nil); return err }, ErrZeroLoop},
		{"improper loop", func() error { _, err := Compute(improper, nil); return err }, ErrImproper},
		{"all-pass loop", func() error { _, err := Compute(allPass, nil); return err }, ErrDegenerate},
		{"1 + L(∞) = 0", func() error { _, err := Compute(illPosed, nil); return err }, ErrIllPosed},
		{"fractional discrete delay", func() error { _, err := Compute(frac, nil); return err }, ErrUnsupported},
		{"negative OmegaMax", func() error { _, err := Compute(ok, &Settings{OmegaMaxRadPerSec: -1}); return err }, ErrBadSettings},
		{"OmegaMax with 10⁸ crossovers", func() error {
			g, _ := ok.WithDelay(1)
			_, err := Compute(g, &Settings{OmegaMaxRadPerSec: 1e9})
			return err
		}, ErrBadSettings},
		{"NaN OmegaMax", func() error { _, err := Compute(ok, &Settings{OmegaMaxRadPerSec: math.NaN()}); return err }, ErrBadSettings},
		{"NaN frequency", func() error { _, err := FrequencyResponse(ok, []float64{1, math.NaN()}); return err }, ErrNotFinite},
		{"Inf frequency", func() error { _, err := FrequencyResponse(ok, []float64{math.Inf(1)}); return err }, ErrNotFinite},
		{"negative frequency", func() error { _, err := FrequencyResponse(ok, []float64{-1}); return err }, ErrNegativeFrequency},
		{"above Nyquist", func() error { _, err := FrequencyResponse(disc, []float64{40}); return err }, ErrAboveNyquist},
		{"improper response", func() error { _, err := FrequencyResponse(improper, nil); return err }, ErrImproper},
		{"grid above Nyquist", func() error { _, err := AutoGrid(disc, &GridSettings{MaxRadPerSec: 100}); return err }, ErrAboveNyquist},
		{"grid settings", func() error { _, err := AutoGrid(ok, &GridSettings{MinRadPerSec: 10, MaxRadPerSec: 1}); return err }, ErrBadSettings},
		{"measured lengths", func() error {
			_, err := FromMeasured(Measured{FrequencyRadPerSec: []float64{1, 2}, Value: []complex128{1}}, 0, nil)
			return err
		}, ErrBadData},
		{"measured order", func() error {
			_, err := FromMeasured(Measured{FrequencyRadPerSec: []float64{2, 1}, Value: []complex128{1, 1}}, 0, nil)
			return err
		}, ErrBadData},
		{"measured NaN", func() error {
			_, err := FromMeasured(Measured{FrequencyRadPerSec: []float64{1, 2}, Value: []complex128{1, cmplx.NaN()}}, 0, nil)
			return err
		}, ErrNotFinite},
		{"measured negative P", func() error {
			_, err := FromMeasured(Measured{FrequencyRadPerSec: []float64{1, 2}, Value: []complex128{1, 0.5}}, -1, nil)
			return err
		}, ErrBadData},
		{"measured ends above 1", func() error {
			_, err := FromMeasured(Measured{FrequencyRadPerSec: []float64{1, 2}, Value: []complex128{3, 2}}, 0, nil)
			return err
		}, ErrEncirclements},
		{"polar lengths", func() error {
			_, err := MeasuredFromMagnitudePhase([]float64{1, 2}, []float64{1}, []float64{0, 0}, Decibel)
			return err
		}, ErrBadData},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			err := test.run()
			if !errors.Is(err, test.want) {
				t.Errorf("got error %v, want %v", err, test.want)
			}
		})
	}
}

// TestFrequencyResponse checks the values against tf's evaluation, the
// unwrapped phase of the order-24 family loop (−90° per pole at high
// frequency, so −2160° + the integrator: no 360° jumps), and the discrete
// range.
func TestFrequencyResponse(t *testing.T) {
	g := goldenTF(t, func(l goldenLoop) bool { return l.Order == 24 })
	r, err := FrequencyResponse(g, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i, w := range r.FrequencyRadPerSec {
		want, err := g.FrequencyResponse(w)
		if err != nil {
			t.Fatal(err)
		}
		if !testutil.CloseComplex(r.Value[i], want, 1e-14, 0) {
			t.Fatalf("L(j%v) = %v, want %v", w, r.Value[i], want)
		}
		if d := testutil.AngleDiffDeg(r.PhaseDeg[i], cmplx.Phase(want)*180/math.Pi); d > 1e-9 {
			t.Fatalf("phase at %v: %v is not ∠L mod 360", w, r.PhaseDeg[i])
		}
		if i > 0 && math.Abs(r.PhaseDeg[i]-r.PhaseDeg[i-1]) > 90 {
			t.Fatalf("phase jumps from %v to %v at %v rad/s", r.PhaseDeg[i-1], r.PhaseDeg[i], w)
		}
		if math.Abs(r.MagnitudeDB[i]-20*math.Log10(r.Magnitude[i])) > 1e-12 {
			t.Fatalf("dB mismatch at %v", w)
		}
	}
	// Phase of 0.5/(s·∏(s/pᵢ + 1)) from −90° at low to −24·90° at high
	// frequency (every factor continuous).
	if p := r.PhaseDeg[0]; math.Abs(p+90) > 5 {
		t.Errorf("low-frequency phase %v, want about −90°", p)
	}
	if p := r.PhaseDeg[len(r.PhaseDeg)-1]; p > -2000 || p < -2160 {
		t.Errorf("high-frequency phase %v, want between −2160° and −2000°", p)
	}
}

// TestAutoGridDenserAtResonance checks that the automatic grid of the
// resonance loop (poles at −0.4 ± j19.996, zeros at −0.32 ± j15.997) puts
// many more points between 15 and 25 rad/s than the 20-per-decade starting
// grid, and ends with the exact crossovers inserted.
func TestAutoGridDenserAtResonance(t *testing.T) {
	g := goldenTF(t, func(l goldenLoop) bool { return l.Name == "resonance" })
	grid, err := AutoGrid(g, nil)
	if err != nil {
		t.Fatal(err)
	}
	near := 0
	for i, w := range grid {
		if i > 0 && w <= grid[i-1] {
			t.Fatalf("grid not increasing at %d", i)
		}
		if w > 15 && w < 25 {
			near++
		}
	}
	if base := 20 * math.Log10(25.0/15); float64(near) < 5*base {
		t.Errorf("%d points in [15, 25] rad/s, want at least 5× the %v of the plain grid", near, base)
	}
	res, err := Compute(g, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, gc := range res.GainCrossovers {
		found := false
		for _, w := range grid {
			found = found || w == gc.FrequencyRadPerSec
		}
		if !found {
			t.Errorf("gain crossover %v not on the grid", gc.FrequencyRadPerSec)
		}
	}
}

// TestNyquistCurve checks that the mirror branch is the conjugate of the
// positive branch, in contour order (ω ascending from −ωmax to −ωmin).
func TestNyquistCurve(t *testing.T) {
	g := tf.MustNew([]float64{1}, []float64{1, 3, 2, 0})
	n, err := NyquistCurve(g, nil)
	if err != nil {
		t.Fatal(err)
	}
	m := len(n.Positive)
	if m < 20 || len(n.Mirror) != m || len(n.MirrorFrequencyRadPerSec) != m {
		t.Fatalf("branch lengths %d and %d", m, len(n.Mirror))
	}
	for i := range m {
		if n.Mirror[i] != cmplx.Conj(n.Positive[m-1-i]) || n.MirrorFrequencyRadPerSec[i] != -n.PositiveFrequencyRadPerSec[m-1-i] {
			t.Fatalf("mirror point %d is not the conjugate", i)
		}
		if i > 0 && (n.MirrorFrequencyRadPerSec[i] <= n.MirrorFrequencyRadPerSec[i-1] || n.PositiveFrequencyRadPerSec[i] <= n.PositiveFrequencyRadPerSec[i-1]) {
			t.Fatalf("frequencies not ascending along the contour at %d", i)
		}
	}
}

// TestDelayMarginDefinition checks the delay margin against its definition
// on the resonance loop: adding exactly the reported dead time puts a
// closed-loop pole on the axis, so L·e^(−jωτ) = −1 at the crossover that
// sets it.
func TestDelayMarginDefinition(t *testing.T) {
	g := goldenTF(t, func(l goldenLoop) bool { return l.Name == "resonance" })
	res, err := Compute(g, nil)
	if err != nil {
		t.Fatal(err)
	}
	w := res.DelayMarginRadPerSec
	l, _ := g.FrequencyResponse(w)
	v := l * cmplx.Rect(1, -w*res.DelayMarginSec)
	if cmplx.Abs(v+1) > 1e-12 {
		t.Errorf("L·e^(−jωτ) = %v at ω = %v, τ = %v; want −1", v, w, res.DelayMarginSec)
	}
	// The loop with that delay is on the boundary: slightly less is stable.
	gd, _ := g.WithDelay(res.DelayMarginSec * (1 - 1e-6))
	rd, err := Compute(gd, &Settings{SkipPeaks: true})
	if err != nil {
		t.Fatal(err)
	}
	gu, _ := g.WithDelay(res.DelayMarginSec * (1 + 1e-6))
	ru, err := Compute(gu, &Settings{SkipPeaks: true})
	if err != nil {
		t.Fatal(err)
	}
	if !rd.ClosedLoopStable || ru.ClosedLoopStable {
		t.Errorf("dead time just below/above the delay margin: stable %v/%v, want true/false", rd.ClosedLoopStable, ru.ClosedLoopStable)
	}
}

var _ = poly.MustNew

// TestBandwidthClosedForm checks the −3 dB closed-loop bandwidth: for
// L = k/s, T = k/(s + k) and the bandwidth is k; for L = 1/(s(s+1)),
// |T|² = 1/((1 − ω²)² + ω²) = 1/2 gives ω² = (1 + √5)/2; for a type-0 loop
// 10/(s+1), T = 10/(s + 11) and the bandwidth is 11 (3 dB below T(0)).
func TestBandwidthClosedForm(t *testing.T) {
	tests := []struct {
		num, den []float64
		want     float64
	}{
		{[]float64{3}, []float64{1, 0}, 3},
		{[]float64{1}, []float64{1, 1, 0}, math.Sqrt((1 + math.Sqrt(5)) / 2)},
		{[]float64{10}, []float64{1, 1}, 11},
	}
	for _, test := range tests {
		res, err := Compute(tf.MustNew(test.num, test.den), nil)
		if err != nil {
			t.Fatal(err)
		}
		if !closeRel(res.BandwidthRadPerSec, test.want, 1e-14) {
			t.Errorf("%v/%v: bandwidth %v, want %v", test.num, test.den, res.BandwidthRadPerSec, test.want)
		}
	}
	// With 1 ms of dead time the bandwidth of 3/s moves by O(1e-3):
	// numerical route, compared with the closed form of the rational loop.
	g, _ := tf.MustNew([]float64{3}, []float64{1, 0}).WithDelay(1e-3)
	res, err := Compute(g, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !closeRel(res.BandwidthRadPerSec, 3, 1e-2) {
		t.Errorf("bandwidth with dead time %v, want about 3", res.BandwidthRadPerSec)
	}
}

// TestDefaultOmegaMax checks that the derived search limit for dead-time
// loops contains the crossovers that decide the gain margins of the
// reference cases C04 (e^(−s)/s: π/2 at π/2 rad/s) and C11
// (2e^(−2s)/(s+1): 2.0849 at 4.0481 rad/s, lower 0.7599 at 1.1445 rad/s).
func TestDefaultOmegaMax(t *testing.T) {
	g, _ := tf.MustNew([]float64{1}, []float64{1, 0}).WithDelay(1)
	res, err := Compute(g, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !closeRel(res.GainMargin, math.Pi/2, 1e-14) || res.OmegaMaxRadPerSec < math.Pi/2 {
		t.Errorf("C04: gain margin %v with search limit %v", res.GainMargin, res.OmegaMaxRadPerSec)
	}
	g, _ = tf.MustNew([]float64{2}, []float64{1, 1}).WithDelay(2)
	res, err = Compute(g, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !closeRel(res.GainMargin, 2.084884065873801, 1e-12) || !closeRel(res.LowerGainMargin, 0.7599012806030927, 1e-12) {
		t.Errorf("C11: gain margins %v, %v", res.GainMargin, res.LowerGainMargin)
	}
}

// TestDiscreteIntegratorClosedForm checks L(z) = k/(z − 1) with T = 0.01 s:
// L(e^(jθ)) = k·e^(−jθ/2)/(2j·sin(θ/2)), so the phase is −90° − θ/2 and
// reaches −180° only at the Nyquist frequency θ = π, where L = −k/2: gain
// margin 2/k at π/T (the closed loop z − 1 + k is stable iff 0 < k < 2).
// |L| = 1 at θ = 2·asin(k/2), with phase margin 90° − θ/2 in degrees.
func TestDiscreteIntegratorClosedForm(t *testing.T) {
	const T = 0.01
	for _, k := range []float64{0.1, 0.5, 1, 1.5, 2.5} {
		g, err := tf.NewDiscrete([]float64{k}, []float64{1, -1}, T)
		if err != nil {
			t.Fatal(err)
		}
		res, err := Compute(g, nil)
		if err != nil {
			t.Fatal(err)
		}
		if len(res.PhaseCrossovers) != 1 || !closeRel(res.PhaseCrossovers[0].FrequencyRadPerSec, math.Pi/T, 1e-15) ||
			!closeRel(res.PhaseCrossovers[0].GainFactor, 2/k, 1e-14) {
			t.Errorf("k=%v: phase crossovers %+v, want 2/k at π/T", k, res.PhaseCrossovers)
		}
		if stable := k < 2; res.ClosedLoopStable != stable {
			t.Errorf("k=%v: stable=%v, want %v", k, res.ClosedLoopStable, stable)
		}
		if k < 2 {
			theta := 2 * math.Asin(k/2)
			if len(res.GainCrossovers) != 1 || !closeRel(res.GainCrossoverRadPerSec, theta/T, 1e-13) ||
				math.Abs(res.PhaseMarginDeg-(90-theta/2*180/math.Pi)) > 1e-11 {
				t.Errorf("k=%v: gain crossover %v PM %v, want %v, %v", k, res.GainCrossoverRadPerSec, res.PhaseMarginDeg, theta/T, 90-theta/2*180/math.Pi)
			}
			if !closeRel(res.GainMargin, 2/k, 1e-14) || !closeRel(res.PhaseCrossoverRadPerSec, math.Pi/T, 1e-15) {
				t.Errorf("k=%v: gain margin %v at %v", k, res.GainMargin, res.PhaseCrossoverRadPerSec)
			}
		}
	}
}

// TestNyquistWithDeadTimeAgainstPade checks the Nyquist count with dead
// time against an independent route: the closed-loop roots of the loop
// with its dead time replaced by a Padé approximant of order 10 (tf.Pade).
// The approximant is accurate (phase error below 1e-6 rad) for ωτ up to
// about 4, so only loops whose last gain crossover satisfies ωτ < 3 are
// compared, and loops with a closed-loop root of the approximation within
// 1e-3 of the imaginary axis are skipped (fixed seed).
func TestNyquistWithDeadTimeAgainstPade(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	checked := 0
	for range 300 {
		g := randomLoop(r, 1+r.IntN(5))
		if !g.IsStrictlyProper() {
			continue
		}
		tau := 0.01 + r.Float64()
		gd, err := g.WithDelay(tau)
		if err != nil {
			t.Fatal(err)
		}
		res, err := Compute(gd, &Settings{SkipPeaks: true})
		if err != nil {
			t.Errorf("%v: %v", gd, err)
			continue
		}
		if n := len(res.GainCrossovers); n > 0 && res.GainCrossovers[n-1].FrequencyRadPerSec*tau > 3 {
			continue
		}
		pade, err := gd.Pade(10)
		if err != nil {
			t.Fatal(err)
		}
		want, near := 0, false
		for _, z := range closedLoopRoots(t, pade) {
			if real(z) >= 0 {
				want++
			}
			if math.Abs(real(z)) < 1e-3 {
				near = true
			}
		}
		if near {
			continue
		}
		if res.ClosedLoopUnstablePoles != want {
			t.Errorf("%v: Nyquist Z = %d, Padé closed loop gives %d", gd, res.ClosedLoopUnstablePoles, want)
		}
		checked++
	}
	if checked < 100 {
		t.Errorf("only %d loops checked", checked)
	}
	t.Logf("%d loops checked", checked)
}

// TestDeadTimeSearchAgainstScan checks the guaranteed phase-crossover
// search with dead time against a dense scan (5·10⁴ points on (0, 20]
// rad/s) of the continuous phase on random loops (fixed seed): every level
// crossing the scan sees must be found, within the scan's resolution, and
// nothing else except crossings closer together than the scan spacing.
// It also checks that no sampled |S| or |T| exceeds the reported Ms, Mt.
func TestDeadTimeSearchAgainstScan(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	const wmax, n = 20.0, 50000
	for range 40 {
		g := randomLoop(r, 1+r.IntN(4))
		if !g.IsStrictlyProper() {
			continue
		}
		gd, err := g.WithDelay(0.05 + r.Float64())
		if err != nil {
			t.Fatal(err)
		}
		res, err := Compute(gd, &Settings{OmegaMaxRadPerSec: wmax})
		if err != nil {
			t.Errorf("%v: %v", gd, err)
			continue
		}
		lp, err := newLoop(gd)
		if err != nil {
			t.Fatal(err)
		}
		var scan []float64
		maxS, maxT := 0.0, 0.0
		prev := lp.phase(wmax / n)
		for i := 2; i <= n; i++ {
			w := wmax * float64(i) / n
			p := lp.phase(w)
			if math.Floor((prev+math.Pi)/(2*math.Pi)) != math.Floor((p+math.Pi)/(2*math.Pi)) && math.Abs(p-prev) < 1 {
				scan = append(scan, w)
			}
			prev = p
			s, tt := lp.sensitivities(w)
			maxS, maxT = math.Max(maxS, s), math.Max(maxT, tt)
		}
		var found []float64
		for _, pc := range res.PhaseCrossovers {
			if pc.FrequencyRadPerSec > 0 {
				found = append(found, pc.FrequencyRadPerSec)
			}
		}
		for _, w := range scan {
			ok := false
			for _, f := range found {
				ok = ok || math.Abs(f-w) <= 2*wmax/n
			}
			if !ok {
				t.Errorf("%v: scan crossing near %v rad/s not found (found %v)", gd, w, found)
			}
		}
		if len(found) > len(scan) {
			t.Logf("%v: %d crossings found, %d seen by the scan", gd, len(found), len(scan))
		}
		if maxS > res.PeakSensitivity*(1+1e-9) || maxT > res.PeakComplementarySensitivity*(1+1e-9) {
			t.Errorf("%v: sampled max |S| %v, |T| %v above Ms %v, Mt %v", gd, maxS, maxT, res.PeakSensitivity, res.PeakComplementarySensitivity)
		}
	}
}
