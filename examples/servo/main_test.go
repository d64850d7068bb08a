package main

import (
	"bytes"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Hand derivations for L(s) = Kp·2400/(s(s+8)(s+40)); the closed-loop
// characteristic polynomial is s³ + 48s² + 320s + 2400·Kp.
//
// Routh–Hurwitz (Routh 1877): a cubic s³ + a2 s² + a1 s + a0 with positive
// coefficients is stable iff a2·a1 > a0, so 2400·Kp < 48·320 and the
// critical gain is Kp = 6.4 V/rad, where the auxiliary polynomial
// 48s² + 15360 gives the crossing s = ±j√320.
//
// Break-away point: d/ds[s(s+8)(s+40)] = 3s² + 96s + 320 = 0, so
// s = −16 + √5376/6 (the other root, −16 − √5376/6 ≈ −28.2, lies between the
// poles −8 and −40 where the real axis is not on the locus).
//
// Damping ratio ζ = 0.7: the characteristic polynomial factors as
// (s² + 2ζωn s + ωn²)(s + r). Matching coefficients,
// 2ζωn + r = 48 and ωn² + 2ζωn·r = 320, so r = 48 − 1.4ωn and
// ωn² + 1.4ωn(48 − 1.4ωn) = 320, that is −0.96ωn² + 67.2ωn − 320 = 0,
// ωn = 35 − √(35² − 1000/3) (the other root gives r < 0), and
// 2400·Kp = ωn²·r.
const (
	kpCritical = 48.0 * 320 / 2400
)

var (
	crossingRadPerSec = math.Sqrt(320)
	breakPoint        = -16 + math.Sqrt(5376)/6
	wnTarget          = 35 - math.Sqrt(35*35-1000.0/3)
	rTarget           = 48 - 1.4*wnTarget
	kpTarget          = wnTarget * wnTarget * rTarget / 2400
)

func near(got, want, rel float64) bool {
	return math.Abs(got-want) <= rel*math.Abs(want)
}

func TestDesignAgainstHandDerivation(t *testing.T) {
	d, err := designServo()
	if err != nil {
		t.Fatal(err)
	}
	// Relative tolerance 1e-9: every quantity is a root of a well-separated
	// low-degree polynomial with integer coefficients, so double precision
	// gives about 1e-13; 1e-9 leaves room for the iterative refinements.
	const rel = 1e-9
	a := d.Locus
	if !near(a.CentroidReal, -16, rel) {
		t.Errorf("asymptote centroid = %v, want −16 = (0 − 8 − 40)/3", a.CentroidReal)
	}
	if len(a.AxisCrossings) != 1 || !near(a.AxisCrossings[0].Value, kpCritical, rel) ||
		!near(a.AxisCrossings[0].FrequencyRadPerSec, crossingRadPerSec, rel) {
		t.Errorf("axis crossings = %+v, want Kp = %v at %v rad/s (Routh)", a.AxisCrossings, kpCritical, crossingRadPerSec)
	}
	if len(a.StableIntervals) != 1 || a.StableIntervals[0].Lo != 0 || !near(a.StableIntervals[0].Hi, kpCritical, rel) {
		t.Errorf("stable intervals = %+v, want (0, %v)", a.StableIntervals, kpCritical)
	}
	if len(a.BreakPoints) != 1 || !near(real(a.BreakPoints[0].Point), breakPoint, rel) {
		t.Fatalf("break points = %+v, want s = %v", a.BreakPoints, breakPoint)
	}
	s := breakPoint
	if kb := -s * (s + 8) * (s + 40) / 2400; !near(a.BreakPoints[0].Value, kb, rel) {
		t.Errorf("break-away gain = %v, want %v", a.BreakPoints[0].Value, kb)
	}
	if !near(d.Kp, kpTarget, rel) {
		t.Errorf("Kp for damping 0.7 = %v, want %v", d.Kp, kpTarget)
	}
	if !near(cmplx.Abs(d.DominantPole), wnTarget, rel) {
		t.Errorf("natural frequency = %v, want %v", cmplx.Abs(d.DominantPole), wnTarget)
	}
	// For a stable rational loop the gain margin is the end of the stable
	// gain interval divided by the nominal gain (Routh bound above).
	if !near(d.Margins.GainMargin, kpCritical/kpTarget, 1e-8) {
		t.Errorf("gain margin = %v, want %v", d.Margins.GainMargin, kpCritical/kpTarget)
	}
	if !near(d.Margins.PhaseCrossoverRadPerSec, crossingRadPerSec, 1e-8) {
		t.Errorf("phase crossover = %v rad/s, want %v", d.Margins.PhaseCrossoverRadPerSec, crossingRadPerSec)
	}
}

// TestPhaseMarginAgainstHandDerivation: with k = 2400·Kp,
// |L(jω)|² = k²/(ω²(ω² + 64)(ω² + 1600)), which falls monotonically, so the
// gain crossover is the single root of ω²(ω² + 64)(ω² + 1600) = k² (found
// here by bisection), and ∠L(jω) = −90° − atan(ω/8) − atan(ω/40) gives the
// phase margin 90° − atan(ωc/8) − atan(ωc/40) and the delay margin
// PM(rad)/ωc.
func TestPhaseMarginAgainstHandDerivation(t *testing.T) {
	d, err := designServo()
	if err != nil {
		t.Fatal(err)
	}
	k := 2400 * kpTarget
	lo, hi := 0.0, 100.0
	for range 200 {
		w := (lo + hi) / 2
		if w*w*(w*w+64)*(w*w+1600) < k*k {
			lo = w
		} else {
			hi = w
		}
	}
	wc := (lo + hi) / 2
	pm := 90 - (math.Atan(wc/8)+math.Atan(wc/40))*180/math.Pi
	// 1e-9 relative: the bisection converges to rounding; the library
	// locates the crossover to near machine precision.
	if !near(d.Margins.GainCrossoverRadPerSec, wc, 1e-9) {
		t.Errorf("gain crossover = %.15g rad/s, want %.15g", d.Margins.GainCrossoverRadPerSec, wc)
	}
	if !near(d.Margins.PhaseMarginDeg, pm, 1e-9) {
		t.Errorf("phase margin = %.15g degrees, want %.15g", d.Margins.PhaseMarginDeg, pm)
	}
	if want := pm * math.Pi / 180 / wc; !near(d.Margins.DelayMarginSec, want, 1e-9) {
		t.Errorf("delay margin = %.15g s, want %.15g", d.Margins.DelayMarginSec, want)
	}
}

// stepByPartialFractions is the closed-form unit step response of
// c/((s−p1)(s−p2)(s−p3)) with distinct poles: y(t) = 1 + Σ cᵢ e^{pᵢt}/pᵢ,
// cᵢ = c/Π_{j≠i}(pᵢ − pⱼ) (residues of Y(s) = T(s)/s).
func stepByPartialFractions(c float64, p [3]complex128, t float64) float64 {
	y := complex(1, 0)
	for i := range p {
		den := p[i]
		for j := range p {
			if j != i {
				den *= p[i] - p[j]
			}
		}
		y += complex(c, 0) / den * cmplx.Exp(p[i]*complex(t, 0))
	}
	return real(y)
}

func TestStepAgainstPartialFractions(t *testing.T) {
	d, err := designServo()
	if err != nil {
		t.Fatal(err)
	}
	// Closed-loop poles from the hand derivation: −ζωn ± jωn√(1−ζ²), −r.
	wd := wnTarget * math.Sqrt(1-0.49)
	p := [3]complex128{complex(-0.7*wnTarget, wd), complex(-0.7*wnTarget, -wd), complex(-rTarget, 0)}
	c := wnTarget * wnTarget * rTarget
	// Dense sampling at 10 µs: near the peak y' = 0, so the sampled maximum
	// is within y''·dt²/8 ≈ 1e-8 of the true peak; the peak time within dt.
	const dt = 1e-5
	peak, tPeak := 0.0, 0.0
	for k := 0; k <= 200000; k++ {
		tk := float64(k) * dt
		if y := stepByPartialFractions(c, p, tk); y > peak {
			peak, tPeak = y, tk
		}
	}
	if math.Abs(d.Step.FinalValue-1) > 1e-12 {
		t.Errorf("final value = %v, want 1 (type-1 loop)", d.Step.FinalValue)
	}
	if math.Abs(d.Step.PeakValue-peak) > 1e-7 {
		t.Errorf("peak = %v, want %v", d.Step.PeakValue, peak)
	}
	if math.Abs(d.Step.OvershootPct-100*(peak-1)) > 1e-5 {
		t.Errorf("overshoot = %v %%, want %v %%", d.Step.OvershootPct, 100*(peak-1))
	}
	if math.Abs(d.Step.PeakTimeSec-tPeak) > 2*dt {
		t.Errorf("peak time = %v s, want %v s", d.Step.PeakTimeSec, tPeak)
	}
}

func TestRun(t *testing.T) {
	dir := t.TempDir()
	var out bytes.Buffer
	if err := run(&out, dir); err != nil {
		t.Fatal(err)
	}
	text := out.String()
	for _, want := range []string{"gain margin", "phase margin", "overshoot", "Kp = 6.4 V/rad"} {
		if !strings.Contains(text, want) {
			t.Errorf("summary lacks %q:\n%s", want, text)
		}
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	if len(entries) == 0 {
		t.Errorf("no plots written to %s", dir)
	}
	for _, e := range entries {
		if info, err := e.Info(); err != nil || info.Size() == 0 {
			t.Errorf("plot %s is empty", filepath.Join(dir, e.Name()))
		}
	}
}
