package main

import (
	"fmt"
	"io"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/examples/internal/words"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// The design target: the dominant closed-loop pole pair on this damping
// ratio (about 5 % overshoot for a pure second-order pair; common practice).
const targetDamping = 0.7

// plantText is G(s), table angle (rad) per amplifier voltage (V).
const plantText = "2400/(s(s+8)(s+40))"

// servoDesign holds everything the program computes.
type servoDesign struct {
	// Plant is G(s), table angle (rad) per amplifier voltage (V).
	Plant tf.TF
	// Locus is the gain root locus of Kp·G(s) over Kp ≥ 0.
	Locus locus.Analysis
	// Kp is the chosen proportional gain in V/rad.
	Kp float64
	// DominantPole is the upper closed-loop pole of the dominant pair at Kp.
	DominantPole complex128
	// ClosedLoopPoles are all closed-loop poles at Kp.
	ClosedLoopPoles []complex128
	// Margins are the frequency-domain margins of Kp·G(s).
	Margins margins.Result
	// Step are the metrics of the closed-loop unit step response.
	Step response.Metrics
	// Loop is Kp·G(s) and ClosedLoop is Kp·G/(1 + Kp·G).
	Loop, ClosedLoop tf.TF
}

func designServo() (servoDesign, error) {
	var d servoDesign
	plant, err := tf.Parse(plantText)
	if err != nil {
		return d, fmt.Errorf("plant: %w", err)
	}
	d.Plant = plant

	// The gain locus of Kp·G(s) for Kp from 0 upwards.
	d.Locus, err = locus.Analyze(plant, nil)
	if err != nil {
		return d, fmt.Errorf("gain locus: %w", err)
	}

	// The gain that puts a closed-loop pole pair on the damping ratio 0.7.
	// The locus can meet that line more than once; keep the crossing whose
	// pole pair is dominant (the slowest, so closest to the imaginary axis)
	// and that is stable.
	hits, err := locus.DampingCrossings(plant, targetDamping, nil)
	if err != nil {
		return d, fmt.Errorf("damping ratio %.2g on the locus: %w", targetDamping, err)
	}
	found := false
	for _, h := range hits {
		if h.Value <= 0 || imag(h.Point) <= 0 {
			continue
		}
		if !found || h.Value < d.Kp {
			d.Kp, d.DominantPole, found = h.Value, h.Point, true
		}
	}
	if !found {
		return d, fmt.Errorf("the locus never reaches the damping ratio %.2g", targetDamping)
	}

	d.ClosedLoopPoles, err = locus.ClosedLoopPoles(plant, d.Kp)
	if err != nil {
		return d, fmt.Errorf("closed-loop poles at Kp = %g: %w", d.Kp, err)
	}
	d.Loop, err = plant.Scale(d.Kp)
	if err != nil {
		return d, err
	}
	d.Margins, err = margins.Compute(d.Loop, nil)
	if err != nil {
		return d, fmt.Errorf("margins: %w", err)
	}
	d.ClosedLoop, err = d.Loop.ClosedLoop()
	if err != nil {
		return d, err
	}
	d.Step, err = response.StepMetrics(d.ClosedLoop, nil)
	if err != nil {
		return d, fmt.Errorf("step metrics: %w", err)
	}
	return d, nil
}

func (d servoDesign) print(w io.Writer) error {
	a := d.Locus
	p := words.NewPrinter(w)
	p.Heading("Motor position servo: indexing table on a DC motor")
	p.F("Plant (table angle per amplifier voltage): G(s) = %s rad/V\n", plantText)
	p.F("Controller: proportional gain Kp in V/rad, loop L(s) = Kp·G(s)\n\n")

	p.F("Gain root locus over Kp ≥ 0\n")
	p.F("  open-loop poles: %s (1/s)\n", words.Roots(a.Poles))
	if a.HasAsymptotes {
		p.F("  asymptotes: centroid at %.4g 1/s on the real axis, angles %s\n", a.CentroidReal, words.Angles(a.AsymptoteAnglesDeg))
	}
	for _, b := range a.BreakPoints {
		p.F("  break-away point at s = %s (Kp = %.4g V/rad, %d branches meet)\n", words.Point(b.Point), b.Value, b.Branches)
	}
	for _, c := range a.AxisCrossings {
		p.F("  the locus crosses the imaginary axis at %.4g rad/s when Kp = %.4g V/rad\n", c.FrequencyRadPerSec, c.Value)
	}
	for _, iv := range a.StableIntervals {
		p.F("  the closed loop is stable for %s\n", words.Interval(iv.Lo, iv.Hi, "Kp", "V/rad"))
	}

	p.F("\nTuning for damping ratio %.2g of the dominant pole pair\n", targetDamping)
	p.F("  chosen gain Kp = %.4g V/rad\n", d.Kp)
	wn := cmplx.Abs(d.DominantPole)
	p.F("  dominant poles s = %s: natural frequency %.4g rad/s, damping ratio %.3f\n",
		words.Point(d.DominantPole), wn, -real(d.DominantPole)/wn)
	p.F("  all closed-loop poles: %s (1/s)\n", words.Points(d.ClosedLoopPoles))

	m := d.Margins
	p.F("\nMargins at Kp = %.4g V/rad\n", d.Kp)
	p.F("  gain margin %s\n", words.GainMargin(m.GainMargin, m.GainMarginDB, m.PhaseCrossoverRadPerSec))
	p.F("  phase margin %.1f° at %.4g rad/s (gain crossover)\n", m.PhaseMarginDeg, m.GainCrossoverRadPerSec)
	p.F("  delay margin %s (extra dead time the loop tolerates)\n", words.Seconds(m.DelayMarginSec))
	p.F("  peak sensitivity %.3f (%.2f dB) at %.4g rad/s\n", m.PeakSensitivity, 20*math.Log10(m.PeakSensitivity), m.PeakSensitivityRadPerSec)

	s := d.Step
	p.F("\nUnit step of the table angle reference (1 rad)\n")
	p.F("  final value %.4g rad\n", s.FinalValue)
	p.F("  rise time (10 %% to 90 %%) %s\n", words.Seconds(s.RiseTimeSec))
	p.F("  overshoot %.3g %% (peak %.4g rad at %s)\n", s.OvershootPct, s.PeakValue, words.Seconds(s.PeakTimeSec))
	p.F("  settling time (2 %% band) %s\n", words.Seconds(s.SettlingTimeSec))
	return p.Err()
}
