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

const (
	plantText      = "200/(s(s+10))"
	controllerText = "4(s+10)/(s+40)"
)

// samplePeriods are the two sample periods compared, in seconds.
var samplePeriods = []float64{0.005, 0.05}

// variant is one of the three loops.
type variant struct {
	// Name says which loop it is, in words.
	Name string
	// SampleTimeSec is 0 for the continuous loop.
	SampleTimeSec float64
	// Controller and Plant are C and G (in z: Tustin and zero-order-hold
	// equivalents); Loop is C·G and ClosedLoop is C·G/(1 + C·G).
	Controller, Plant, Loop, ClosedLoop tf.TF
	// Locus is the gain root locus of Loop (a factor on the controller).
	Locus locus.Analysis
	// Poles are the closed-loop poles at the nominal gain (in s or z) and
	// EquivalentPoles the same mapped to s = ln(z)/T.
	Poles, EquivalentPoles []complex128
	// Margins are the margins of Loop.
	Margins margins.Result
	// Step are the step metrics of ClosedLoop; StepCurve its samples.
	Step      response.Metrics
	StepCurve response.Response
}

// comparison holds the continuous design and its two digital versions.
type comparison struct {
	Variants []variant
}

func compare() (comparison, error) {
	var c comparison
	plant, err := tf.Parse(plantText)
	if err != nil {
		return c, fmt.Errorf("plant: %w", err)
	}
	ctrl, err := tf.Parse(controllerText)
	if err != nil {
		return c, fmt.Errorf("controller: %w", err)
	}
	cont, err := analyseVariant("continuous design", 0, ctrl, plant)
	if err != nil {
		return c, err
	}
	c.Variants = append(c.Variants, cont)
	for _, T := range samplePeriods {
		cd, err := ctrl.Discretize(T, tf.Tustin, nil)
		if err != nil {
			return c, fmt.Errorf("controller at T = %g s: %w", T, err)
		}
		gd, err := plant.Discretize(T, tf.ZeroOrderHold, nil)
		if err != nil {
			return c, fmt.Errorf("plant at T = %g s: %w", T, err)
		}
		v, err := analyseVariant(fmt.Sprintf("digital, T = %s", words.Seconds(T)), T, cd, gd)
		if err != nil {
			return c, err
		}
		c.Variants = append(c.Variants, v)
	}
	return c, nil
}

func analyseVariant(name string, T float64, ctrl, plant tf.TF) (variant, error) {
	v := variant{Name: name, SampleTimeSec: T, Controller: ctrl, Plant: plant}
	var err error
	if v.Loop, err = ctrl.Series(plant); err != nil {
		return v, fmt.Errorf("%s: %w", name, err)
	}
	if v.ClosedLoop, err = v.Loop.ClosedLoop(); err != nil {
		return v, fmt.Errorf("%s: %w", name, err)
	}
	if v.Locus, err = locus.Analyze(v.Loop, nil); err != nil {
		return v, fmt.Errorf("%s: locus: %w", name, err)
	}
	if v.Poles, err = locus.ClosedLoopPoles(v.Loop, 1); err != nil {
		return v, fmt.Errorf("%s: closed-loop poles: %w", name, err)
	}
	for _, p := range v.Poles {
		if T > 0 {
			p = cmplx.Log(p) / complex(T, 0)
		}
		v.EquivalentPoles = append(v.EquivalentPoles, p)
	}
	if v.Margins, err = margins.Compute(v.Loop, nil); err != nil {
		return v, fmt.Errorf("%s: margins: %w", name, err)
	}
	if v.Step, err = response.StepMetrics(v.ClosedLoop, nil); err != nil {
		return v, fmt.Errorf("%s: step metrics: %w", name, err)
	}
	// The same horizon for all three curves so that they can be overlaid.
	if v.StepCurve, err = response.Step(v.ClosedLoop, &response.Settings{HorizonSec: 0.6}); err != nil {
		return v, fmt.Errorf("%s: step response: %w", name, err)
	}
	return v, nil
}

// dominant returns the slowest complex closed-loop pole pair (upper pole),
// as an equivalent s-plane pole: the pair that sets the overshoot.
func (v variant) dominant() complex128 {
	best := complex(math.Inf(-1), 0)
	for _, p := range v.EquivalentPoles {
		if imag(p) > 0 && real(p) > real(best) {
			best = p
		}
	}
	return best
}

func (c comparison) print(w io.Writer) error {
	p := words.NewPrinter(w)
	p.Heading("Digital controller from a continuous design: robot wrist joint")
	p.F("Plant G(s) = %s rad/V, lead compensator C(s) = %s V/rad\n", plantText, controllerText)
	p.F("Digital versions: C by the Tustin rule, G by its zero-order-hold equivalent.\n\n")
	for _, v := range c.Variants[1:] {
		p.F("At T = %s (sampling at %.4g rad/s):\n", words.Seconds(v.SampleTimeSec), 2*math.Pi/v.SampleTimeSec)
		p.F("  C(z) = %s V/rad\n", words.Rational(v.Controller.Num(), v.Controller.Den(), "z"))
		p.F("  G(z) = %s rad/V\n", words.Rational(v.Plant.Num(), v.Plant.Den(), "z"))
	}

	p.F("\nOn the unit circle: the gain root locus over a factor k on the controller\n")
	for _, v := range c.Variants {
		a := v.Locus
		boundary := "imaginary axis"
		if v.SampleTimeSec > 0 {
			boundary = "unit circle"
		}
		if len(a.StableIntervals) > 0 {
			p.F("  %-22s stable for %s", v.Name+":", words.Interval(a.StableIntervals[0].Lo, a.StableIntervals[0].Hi, "k", "(factor)"))
		}
		for _, x := range a.AxisCrossings {
			// The crossing that ends the first stable interval.
			if len(a.StableIntervals) > 0 && math.Abs(x.Value-a.StableIntervals[0].Hi) <= 1e-9*x.Value {
				p.F(";\n  %-22s at k = %.4g a pole pair crosses the %s at %s (%.4g rad/s)", "", x.Value, boundary, words.Point(x.Point), x.FrequencyRadPerSec)
			}
		}
		p.F("\n")
	}

	p.F("\nClosed-loop poles at the nominal gain (k = 1)\n")
	for _, v := range c.Variants {
		d := v.dominant()
		wn := cmplx.Abs(d)
		if v.SampleTimeSec > 0 {
			p.F("  %-22s z = %s\n", v.Name+":", words.Points(v.Poles))
			p.F("  %-22s complex pair as s = ln(z)/T: %s (1/s), damping ratio %.3f, natural frequency %.4g rad/s\n", "", words.Point(d), -real(d)/wn, wn)
		} else {
			p.F("  %-22s s = %s (1/s); the lead zero cancels the pole at -10\n", v.Name+":", words.Points(v.Poles))
			p.F("  %-22s complex pair: damping ratio %.3f, natural frequency %.4g rad/s\n", "", -real(d)/wn, wn)
		}
	}

	p.F("\nMargins and step response\n")
	p.F("  %-34s", "")
	for _, v := range c.Variants {
		p.F("%20s", v.Name)
	}
	p.F("\n")
	row := func(label string, f func(v variant) string) {
		p.F("  %-34s", label)
		for _, v := range c.Variants {
			p.F("%20s", f(v))
		}
		p.F("\n")
	}
	row("phase margin", func(v variant) string { return fmt.Sprintf("%.1f°", v.Margins.PhaseMarginDeg) })
	row("gain crossover", func(v variant) string { return fmt.Sprintf("%.4g rad/s", v.Margins.GainCrossoverRadPerSec) })
	row("gain margin", func(v variant) string {
		if math.IsInf(v.Margins.GainMargin, 1) {
			return "infinite"
		}
		return fmt.Sprintf("%.2f dB", v.Margins.GainMarginDB)
	})
	row("delay margin", func(v variant) string { return words.Seconds(v.Margins.DelayMarginSec) })
	row("overshoot", func(v variant) string { return fmt.Sprintf("%.3g %%", v.Step.OvershootPct) })
	row("rise time (10 % to 90 %)", func(v variant) string { return words.Seconds(v.Step.RiseTimeSec) })
	row("settling time (2 % band)", func(v variant) string { return words.Seconds(v.Step.SettlingTimeSec) })
	p.F("\nThe slow controller loses about ωc·T/2 of phase to the hold and the sampling\n")
	p.F("(%.0f° at T = %s), which shows as the larger overshoot.\n",
		c.Variants[0].Margins.GainCrossoverRadPerSec*samplePeriods[1]/2*180/math.Pi, words.Seconds(samplePeriods[1]))
	p.F("Discrete step metrics are read at the sample instants.\n")
	return p.Err()
}
