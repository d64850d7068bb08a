package main

import (
	"fmt"
	"io"
	"math"

	"github.com/loopwise/loopwise/examples/internal/words"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/tf"
)

// Plant and tuning numbers of the scenario.
const (
	plantGain       = 2.5    // °C per % of heater power
	lagSec          = 90.0   // s, the vessel's time constant
	deadTimeSec     = 12.0   // s, transport delay to the sensor
	lambdaSec       = 30.0   // s, requested closed-loop time constant
	integralTimeSec = lagSec // s, PI integral time (cancels the lag)
)

// padeOrders are the approximation orders compared in the locus.
var padeOrders = []int{1, 2, 3}

// padeLocus is what one Padé order gives.
type padeLocus struct {
	// Order is the Padé order.
	Order int
	// AddedPoles and AddedZeros are the poles and zeros of the Padé
	// approximation of e^(−12s) (1/s).
	AddedPoles, AddedZeros []complex128
	// Analysis is the gain root locus of the approximated loop, the
	// variable being a factor on the nominal controller gain.
	Analysis locus.Analysis
	// LimitFactor is the upper end of the stable interval (the factor on
	// Kc at which the approximated loop goes unstable) and LimitRadPerSec
	// the frequency of the crossing there.
	LimitFactor, LimitRadPerSec float64
}

// heater holds everything the program computes.
type heater struct {
	// Plant is G(s) in °C per %, Controller the PI controller C(s) in % per
	// °C and Loop is C·G, dead time included.
	Plant, Controller, Loop tf.TF
	// Kc is the controller gain in % per °C.
	Kc float64
	// Margins are the margins of the loop with the dead time kept exactly.
	Margins margins.Result
	// Pade lists the locus of each approximation order.
	Pade []padeLocus
}

func analyse() (heater, error) {
	var d heater
	var err error
	d.Plant, err = tf.New([]float64{plantGain}, []float64{lagSec, 1})
	if err == nil {
		d.Plant, err = d.Plant.WithDelay(deadTimeSec)
	}
	if err != nil {
		return d, fmt.Errorf("plant: %w", err)
	}
	d.Kc = lagSec / (plantGain * (lambdaSec + deadTimeSec))
	// Kc·(1 + 1/(Ti·s)) = Kc·(Ti·s + 1)/(Ti·s).
	d.Controller, err = tf.New([]float64{d.Kc * integralTimeSec, d.Kc}, []float64{integralTimeSec, 0})
	if err != nil {
		return d, fmt.Errorf("controller: %w", err)
	}
	d.Loop, err = d.Controller.Series(d.Plant)
	if err != nil {
		return d, err
	}
	d.Margins, err = margins.Compute(d.Loop, nil)
	if err != nil {
		return d, fmt.Errorf("margins with exact dead time: %w", err)
	}
	for _, n := range padeOrders {
		pl, err := padeAnalysis(d.Loop, n)
		if err != nil {
			return d, fmt.Errorf("locus with the Padé approximation of order %d: %w", n, err)
		}
		d.Pade = append(d.Pade, pl)
	}
	return d, nil
}

func padeAnalysis(loop tf.TF, order int) (padeLocus, error) {
	pl := padeLocus{Order: order}
	delay, err := tf.New([]float64{1}, []float64{1})
	if err == nil {
		delay, err = delay.WithDelay(deadTimeSec)
	}
	if err == nil {
		delay, err = delay.Pade(order)
	}
	if err != nil {
		return pl, err
	}
	if pl.AddedPoles, err = delay.Poles(); err != nil {
		return pl, err
	}
	if pl.AddedZeros, err = delay.Zeros(); err != nil {
		return pl, err
	}
	pl.Analysis, err = locus.Analyze(loop, &locus.Settings{PadeOrder: order})
	if err != nil {
		return pl, err
	}
	iv := pl.Analysis.StableIntervals
	if len(iv) == 0 {
		return pl, fmt.Errorf("no stable gains")
	}
	pl.LimitFactor = iv[0].Hi
	pl.LimitRadPerSec = math.NaN()
	for _, c := range pl.Analysis.AxisCrossings {
		if math.Abs(c.Value-pl.LimitFactor) <= 1e-9*pl.LimitFactor {
			pl.LimitRadPerSec = c.FrequencyRadPerSec
		}
	}
	return pl, nil
}

func (d heater) print(w io.Writer) error {
	p := words.NewPrinter(w)
	m := d.Margins
	p.Heading("Process heater with dead time")
	p.F("Plant (temperature per heater power): G(s) = %.4g·e^(-%.4gs)/(%.4gs + 1) °C/%%\n", plantGain, deadTimeSec, lagSec)
	p.F("PI controller, lag cancelled (Ti = %.4g s), closed-loop time constant %.4g s:\n", integralTimeSec, lambdaSec)
	p.F("  C(s) = Kc·(1 + 1/(%.4gs)), Kc = 90/(2.5·(30 + 12)) = %.4g %%/°C\n\n", integralTimeSec, d.Kc)

	p.F("Margins with the dead time kept exactly\n")
	p.F("  phase margin %.2f° at %.4g rad/s (gain crossover)\n", m.PhaseMarginDeg, m.GainCrossoverRadPerSec)
	p.F("  delay margin %s: the loop tolerates this much extra dead time (%s in total)\n",
		words.Seconds(m.DelayMarginSec), words.Seconds(m.DelayMarginSec+deadTimeSec))
	p.F("  gain margin %s (first phase crossover)\n", words.GainMargin(m.GainMargin, m.GainMarginDB, m.PhaseCrossoverRadPerSec))
	p.F("  the loop goes unstable when Kc rises to %.4g %%/°C\n\n", m.GainMargin*d.Kc)

	p.F("Root locus over a factor on Kc, with the dead time replaced by a Padé approximation\n")
	for _, pl := range d.Pade {
		p.F("  order %d adds poles %s and zeros %s (1/s)\n", pl.Order, words.Points(pl.AddedPoles), words.Points(pl.AddedZeros))
		p.F("          stable up to factor %.5g (exact: %.5g, %+.2f %%), crossing at %.5g rad/s (exact: %.5g, %+.2f %%)\n",
			pl.LimitFactor, m.GainMargin, 100*(pl.LimitFactor/m.GainMargin-1),
			pl.LimitRadPerSec, m.PhaseCrossoverRadPerSec, 100*(pl.LimitRadPerSec/m.PhaseCrossoverRadPerSec-1))
	}
	p.F("  The zeros in the right half plane stand for the delay's phase lag; each order\n")
	p.F("  adds one more pole-zero pair, and the stability limit closes in on the exact one.\n")
	p.F("  A delay has infinitely many closed-loop poles; a Padé locus shows only the first few.\n")
	return p.Err()
}
