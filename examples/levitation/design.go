package main

import (
	"errors"
	"fmt"
	"io"
	"math"

	"github.com/loopwise/loopwise/examples/internal/words"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// loopPerUnitGain is L(s)/Kc = G(s)·(s/15 + 1)/(s/150 + 1)·D(s).
const loopPerUnitGain = "19.62(s/15 + 1)/((s^2 - 900)(s/150 + 1)(s/300 + 1))"

// sweepGains are the controller gains (A/m) of the printed table.
var sweepGains = []float64{30, 60, 117, 250, 320}

// levitation holds everything the program computes.
type levitation struct {
	// PerUnitGain is L(s)/Kc.
	PerUnitGain tf.TF
	// Locus is the gain root locus over Kc ≥ 0.
	Locus locus.Analysis
	// Lo and Hi are the ends of the stable window of Kc (A/m).
	Lo, Hi float64
	// Kc is the chosen gain, √(Lo·Hi), and Loop is Kc·PerUnitGain.
	Kc   float64
	Loop tf.TF
	// Margins are the margins of Loop.
	Margins margins.Result
	// Sweep lists, for each of sweepGains, the closed-loop poles.
	Sweep [][]complex128
	// Step is the response of the ball height to a 1 mm reference step.
	Step response.Metrics
}

func analyse() (levitation, error) {
	var d levitation
	var err error
	d.PerUnitGain, err = tf.Parse(loopPerUnitGain)
	if err != nil {
		return d, fmt.Errorf("loop: %w", err)
	}
	d.Locus, err = locus.Analyze(d.PerUnitGain, nil)
	if err != nil {
		return d, fmt.Errorf("gain locus: %w", err)
	}
	if len(d.Locus.StableIntervals) != 1 {
		return d, fmt.Errorf("expected one window of stable gains, found %d", len(d.Locus.StableIntervals))
	}
	d.Lo, d.Hi = d.Locus.StableIntervals[0].Lo, d.Locus.StableIntervals[0].Hi
	if d.Lo <= 0 || math.IsInf(d.Hi, 1) {
		return d, errors.New("the stable gains are not a bounded window")
	}
	// The geometric middle leaves the same factor of gain change, up or
	// down, before the loop goes unstable (common practice for loops that
	// are stable only in a window).
	d.Kc = math.Sqrt(d.Lo * d.Hi)
	d.Loop, err = d.PerUnitGain.Scale(d.Kc)
	if err != nil {
		return d, err
	}
	d.Margins, err = margins.Compute(d.Loop, nil)
	if err != nil {
		return d, fmt.Errorf("margins: %w", err)
	}
	for _, k := range sweepGains {
		poles, err := locus.ClosedLoopPoles(d.PerUnitGain, k)
		if err != nil {
			return d, fmt.Errorf("closed-loop poles at Kc = %g A/m: %w", k, err)
		}
		d.Sweep = append(d.Sweep, poles)
	}
	closed, err := d.Loop.ClosedLoop()
	if err != nil {
		return d, err
	}
	d.Step, err = response.StepMetrics(closed, nil)
	if err != nil {
		return d, fmt.Errorf("step metrics: %w", err)
	}
	return d, nil
}

func (d levitation) print(w io.Writer) error {
	p := words.NewPrinter(w)
	a := d.Locus
	p.Heading("Magnetic levitation: a loop that is stable only in a gain window")
	p.F("Loop per unit controller gain: L(s)/Kc = %s (m/m per A/m)\n", loopPerUnitGain)
	p.F("  (ball height per coil current 19.62/(s^2 - 900) m/A, lead filter, coil driver)\n")
	p.F("  open-loop poles: %s (1/s); the pole at +30 1/s is unstable\n", words.Roots(a.Poles))
	p.F("  open-loop zeros: %s (1/s)\n\n", words.Roots(a.Zeros))

	p.F("Gain root locus over Kc ≥ 0 (A/m)\n")
	if a.HasAsymptotes {
		p.F("  asymptotes: centroid at %.4g 1/s, angles %s\n", a.CentroidReal, words.Angles(a.AsymptoteAnglesDeg))
	}
	for _, c := range a.AxisCrossings {
		p.F("  crosses the imaginary axis at %.4g rad/s when Kc = %.4g A/m\n", c.FrequencyRadPerSec, c.Value)
	}
	for _, iv := range a.StableIntervals {
		p.F("  stable for %s\n", words.Interval(iv.Lo, iv.Hi, "Kc", "A/m"))
	}
	p.F("  below %.4g A/m the magnet cannot hold the ball; above %.4g A/m the loop oscillates and grows\n\n", d.Lo, d.Hi)

	p.F("Closed-loop poles across the window\n")
	for i, k := range sweepGains {
		verdict := "stable"
		for _, z := range d.Sweep[i] {
			if real(z) >= 0 {
				verdict = "UNSTABLE"
			}
		}
		p.F("  Kc = %5.4g A/m: %-8s poles %s (1/s)\n", k, verdict, words.Points(d.Sweep[i]))
	}

	m := d.Margins
	p.F("\nChosen gain Kc = √(%.4g · %.4g) = %.4g A/m (geometric middle of the window)\n", d.Lo, d.Hi, d.Kc)
	p.F("  upper gain margin %s: the gain may rise by this factor\n", words.GainMargin(m.GainMargin, m.GainMarginDB, m.PhaseCrossoverRadPerSec))
	p.F("  lower gain margin %s: the gain may fall to this fraction\n", words.GainMargin(m.LowerGainMargin, m.LowerGainMarginDB, m.LowerPhaseCrossoverRadPerSec))
	p.F("  phase margin %.1f° at %.4g rad/s\n", m.PhaseMarginDeg, m.GainCrossoverRadPerSec)
	p.F("  delay margin %s\n", words.Seconds(m.DelayMarginSec))
	p.F("  peak sensitivity %.3f (%.2f dB) at %.4g rad/s\n", m.PeakSensitivity, 20*math.Log10(m.PeakSensitivity), m.PeakSensitivityRadPerSec)
	p.F("  Nyquist criterion: %d unstable open-loop pole(s), %d unstable closed-loop pole(s): the curve\n", m.OpenLoopUnstablePoles, m.ClosedLoopUnstablePoles)
	p.F("  must encircle -1 counter-clockwise %d time(s), and the closed loop is %s\n", m.OpenLoopUnstablePoles-m.ClosedLoopUnstablePoles, stableWord(m.ClosedLoopStable))

	s := d.Step
	p.F("\nStep of the height reference by 1 mm\n")
	p.F("  final height change %.4g mm (no integral action: the loop has a static error;\n", s.FinalValue)
	p.F("  a reference prefilter of %.4g would correct it)\n", 1/s.FinalValue)
	p.F("  rise time (10 %% to 90 %%) %s, overshoot %.3g %%, settling time (2 %% band) %s\n",
		words.Seconds(s.RiseTimeSec), s.OvershootPct, words.Seconds(s.SettlingTimeSec))
	return p.Err()
}

func stableWord(stable bool) string {
	if stable {
		return "stable"
	}
	return "unstable"
}
