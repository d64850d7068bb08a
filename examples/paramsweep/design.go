package main

import (
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"sort"

	"github.com/loopwise/loopwise/examples/internal/words"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// The plant G(s) (rad per V) and the PD controller C(s) (V per rad) with
// the derivative time as the parameter tau (seconds).
const (
	plantText      = "40/(s(s + 2)(s + 20))"
	controllerText = "10(1 + tau*s)"
)

// targetDamping is the damping ratio asked of the dominant pole pair.
const targetDamping = 0.6

// tableTaus are the derivative times (s) of the printed sweep table.
var tableTaus = []float64{0, 0.05, 0.1, 0.2, 0.4, 0.7, 1}

// candidate is a value of τ at which a closed-loop pole pair has the
// target damping ratio.
type candidate struct {
	// TauSec is the derivative time.
	TauSec float64
	// Pair is the upper pole of the pair with the target damping ratio.
	Pair complex128
	// Poles are all closed-loop poles at TauSec.
	Poles []complex128
	// Dominant reports whether the pair is the slowest mode (every other
	// pole lies further left).
	Dominant bool
	// Margins and Step belong to the loop at TauSec.
	Margins margins.Result
	Step    response.Metrics
	// Disturbance are the step metrics of the tilt angle after a 1 V step
	// of disturbance at the motor input (G/(1 + C·G)).
	Disturbance response.Metrics
	// StepCurve is the closed-loop step response.
	StepCurve response.Response
	// DisturbanceCurve is the disturbance step response, sampled.
	DisturbanceCurve response.Response
}

// tableRow is one row of the sweep table.
type tableRow struct {
	TauSec float64
	Poles  []complex128
}

type gimbal struct {
	// Param is the parameter form a(s) + τ·b(s) of the characteristic
	// polynomial.
	Param locus.Parametric
	// Locus is the parameter root locus over τ ≥ 0.
	Locus locus.Analysis
	// Candidates are the values of τ with a pair at the target damping,
	// ascending; Chosen indexes the one picked.
	Candidates []candidate
	Chosen     int
	Table      []tableRow
}

// loopAt returns the loop C·G for the derivative time tau (seconds).
func loopAt(tau float64) (tf.TF, error) {
	return tf.ParseWith(controllerText+"*"+plantText, &tf.ParseSettings{Params: map[string]float64{"tau": tau}})
}

func sweep() (gimbal, error) {
	var d gimbal
	var err error
	d.Param, err = locus.FromParameter("tau", loopAt)
	if err != nil {
		return d, fmt.Errorf("parameter form: %w", err)
	}
	set := &locus.Settings{Variable: "derivative time τ"}
	d.Locus, err = locus.Analyze(d.Param.Loop, set)
	if err != nil {
		return d, fmt.Errorf("parameter locus: %w", err)
	}
	hits, err := locus.DampingCrossings(d.Param.Loop, targetDamping, set)
	if err != nil {
		return d, fmt.Errorf("damping ratio %.2g on the locus: %w", targetDamping, err)
	}
	for _, h := range hits {
		if imag(h.Point) <= 0 || h.Value < 0 {
			continue
		}
		c, err := evaluate(d.Param.Loop, h.Value, h.Point)
		if err != nil {
			return d, err
		}
		d.Candidates = append(d.Candidates, c)
	}
	if len(d.Candidates) == 0 {
		return d, fmt.Errorf("no derivative time gives damping ratio %.2g", targetDamping)
	}
	sort.Slice(d.Candidates, func(i, j int) bool { return d.Candidates[i].TauSec < d.Candidates[j].TauSec })
	// Pick the smallest τ whose pair is the dominant (slowest) mode: the
	// pair then governs the response to references and to disturbances
	// alike, and the least derivative action amplifies sensor noise the
	// least (common practice).
	d.Chosen = -1
	for i, c := range d.Candidates {
		if c.Dominant {
			d.Chosen = i
			break
		}
	}
	if d.Chosen < 0 {
		return d, fmt.Errorf("no derivative time makes a pair with damping ratio %.2g dominant", targetDamping)
	}
	for _, tau := range tableTaus {
		poles, err := locus.ClosedLoopPoles(d.Param.Loop, tau)
		if err != nil {
			return d, fmt.Errorf("closed-loop poles at τ = %g s: %w", tau, err)
		}
		d.Table = append(d.Table, tableRow{TauSec: tau, Poles: poles})
	}
	return d, nil
}

// evaluate computes the closed-loop poles, margins and step response at
// the derivative time tau.
func evaluate(param tf.TF, tau float64, pair complex128) (candidate, error) {
	c := candidate{TauSec: tau, Pair: pair}
	var err error
	if c.Poles, err = locus.ClosedLoopPoles(param, tau); err != nil {
		return c, err
	}
	c.Dominant = true
	for _, p := range c.Poles {
		if cmplx.Abs(p-pair) > 1e-6*cmplx.Abs(pair) && cmplx.Abs(p-cmplx.Conj(pair)) > 1e-6*cmplx.Abs(pair) && real(p) >= real(pair) {
			c.Dominant = false
		}
	}
	loop, err := loopAt(tau)
	if err != nil {
		return c, err
	}
	if c.Margins, err = margins.Compute(loop, nil); err != nil {
		return c, fmt.Errorf("margins at τ = %g s: %w", tau, err)
	}
	closed, err := loop.ClosedLoop()
	if err != nil {
		return c, err
	}
	if c.Step, err = response.StepMetrics(closed, nil); err != nil {
		return c, fmt.Errorf("step metrics at τ = %g s: %w", tau, err)
	}
	if c.StepCurve, err = response.Step(closed, &response.Settings{HorizonSec: 4}); err != nil {
		return c, fmt.Errorf("step response at τ = %g s: %w", tau, err)
	}
	plant, err := tf.Parse(plantText)
	if err != nil {
		return c, err
	}
	ctrl, err := tf.ParseWith(controllerText, &tf.ParseSettings{Params: map[string]float64{"tau": tau}})
	if err != nil {
		return c, err
	}
	dist, err := tf.Feedback(plant, ctrl)
	if err != nil {
		return c, fmt.Errorf("disturbance path at τ = %g s: %w", tau, err)
	}
	if c.Disturbance, err = response.StepMetrics(dist, nil); err != nil {
		return c, fmt.Errorf("disturbance step at τ = %g s: %w", tau, err)
	}
	if c.DisturbanceCurve, err = response.Step(dist, &response.Settings{HorizonSec: 4}); err != nil {
		return c, fmt.Errorf("disturbance step at τ = %g s: %w", tau, err)
	}
	return c, nil
}

// slowest returns the pole closest to the imaginary axis.
func slowest(poles []complex128) complex128 {
	best := poles[0]
	for _, p := range poles[1:] {
		if real(p) > real(best) {
			best = p
		}
	}
	return best
}

// pairDamping returns the damping ratio of the least damped complex pole
// pair in poles, or NaN if all poles are real.
func pairDamping(poles []complex128) float64 {
	z := math.NaN()
	for _, p := range poles {
		if imag(p) > 0 {
			if d := -real(p) / cmplx.Abs(p); math.IsNaN(z) || d < z {
				z = d
			}
		}
	}
	return z
}

func (d gimbal) print(w io.Writer) error {
	p := words.NewPrinter(w)
	p.Heading("Parameter locus: derivative time of a gimbal's PD controller")
	p.F("Loop C(s)·G(s) = 10(1 + τs)·40/(s(s + 2)(s + 20)), τ in seconds, gain fixed at 10 V/rad\n")
	p.F("Characteristic polynomial a(s) + τ·b(s) with\n")
	p.F("  a(s) = %s   (the loop without derivative action, closed)\n", words.Polynomial(d.Param.A, "s"))
	p.F("  b(s) = %s   (what τ multiplies)\n\n", words.Polynomial(d.Param.B, "s"))

	a := d.Locus
	p.F("Root locus over τ ≥ 0\n")
	p.F("  starts (τ = 0) at %s (1/s)\n", words.Roots(a.Poles))
	p.F("  ends (τ → ∞) at %s (1/s)", words.Roots(a.Zeros))
	if a.HasAsymptotes {
		p.F(" and along asymptotes at %s from %.4g 1/s", words.Angles(a.AsymptoteAnglesDeg), a.CentroidReal)
	}
	p.F("\n")
	for _, b := range a.BreakPoints {
		p.F("  %d branches meet at s = %s when τ = %.4g s\n", b.Branches, words.Point(b.Point), b.Value)
	}
	for _, iv := range a.StableIntervals {
		p.F("  stable for %s\n", words.Interval(iv.Lo, iv.Hi, "τ", "s"))
	}

	p.F("\nSweep\n")
	p.F("  %8s  %-42s  %s\n", "τ (s)", "closed-loop poles (1/s)", "damping of the complex pair")
	for _, r := range d.Table {
		z := pairDamping(r.Poles)
		zs := "no complex pair"
		if !math.IsNaN(z) {
			zs = fmt.Sprintf("%.3f", z)
		}
		p.F("  %8.4g  %-42s  %s\n", r.TauSec, words.Points(r.Poles), zs)
	}

	p.F("\nValues of τ that put a pole pair on damping ratio %.2g\n", targetDamping)
	for i, c := range d.Candidates {
		p.F("  τ = %.4g s: pair %s (natural frequency %.4g rad/s), all poles %s (1/s)\n",
			c.TauSec, words.Point(c.Pair), cmplx.Abs(c.Pair), words.Points(c.Poles))
		if c.Dominant {
			pure := 100 * math.Exp(-targetDamping*math.Pi/math.Sqrt(1-targetDamping*targetDamping))
			p.F("      the pair is the slowest mode; the PD zero at -1/τ = %.4g 1/s lies near it and adds\n", -1/c.TauSec)
			p.F("      overshoot beyond the %.3g %% of a pure pair with damping ratio %.2g\n", pure, targetDamping)
		} else {
			slow := slowest(c.Poles)
			p.F("      a pole at %.4g 1/s is slower than the pair; the PD zero at -1/τ = %.4g 1/s nearly\n", real(slow), -1/c.TauSec)
			p.F("      cancels it for the reference, but not for a disturbance at the motor input\n")
		}
		p.F("      reference step 1 rad: overshoot %.3g %%, rise time %s, settling time (2 %% band) %s\n",
			c.Step.OvershootPct, words.Seconds(c.Step.RiseTimeSec), words.Seconds(c.Step.SettlingTimeSec))
		p.F("      disturbance step 1 V at the motor: the tilt moves %.4g rad, settling time (2 %% band) %s\n",
			c.Disturbance.FinalValue, words.Seconds(c.Disturbance.SettlingTimeSec))
		p.F("      phase margin %.1f° at %.4g rad/s, gain margin %s\n",
			c.Margins.PhaseMarginDeg, c.Margins.GainCrossoverRadPerSec, words.GainMargin(c.Margins.GainMargin, c.Margins.GainMarginDB, c.Margins.PhaseCrossoverRadPerSec))
		if i == d.Chosen {
			p.F("      CHOSEN: the smallest τ whose target pair is the slowest mode, so it governs the\n")
			p.F("      response to references and disturbances alike, with the least derivative action\n")
		}
	}
	return p.Err()
}
