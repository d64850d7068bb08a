package margins_test

import (
	"fmt"
	"log"
	"math"

	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/tf"
)

// A speed loop of a conveyor drive (this project's own scenario): a PI
// controller 8(s + 2)/s around a motor 1/(s + 10), with 20 ms of transport
// delay in the measurement. (Checked by hand: |L| = 1 at 2.466 rad/s, where
// the phase is −90° + atan(ω/2) − atan(ω/10) − 0.02ω = −55.7°; the phase
// reaches −180° at 83.31 rad/s, where |L| = 0.0954.)
func ExampleCompute() {
	loop, err := tf.Parse("8(s+2)/(s(s+10))*exp(-0.02*s)")
	if err != nil {
		log.Fatal(err)
	}
	res, err := margins.Compute(loop, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("gain margin %.4g (%.4g dB) at %.4g rad/s\n", res.GainMargin, res.GainMarginDB, res.PhaseCrossoverRadPerSec)
	fmt.Printf("phase margin %.4g° at %.4g rad/s\n", res.PhaseMarginDeg, res.GainCrossoverRadPerSec)
	fmt.Printf("delay margin %.4g s\n", res.DelayMarginSec)
	fmt.Printf("peak sensitivity %.4g at %.4g rad/s\n", res.PeakSensitivity, res.PeakSensitivityRadPerSec)
	fmt.Printf("closed loop stable: %v (%s)\n", res.ClosedLoopStable, res.StabilityMethod)
	// Output:
	// gain margin 10.49 (20.41 dB) at 83.31 rad/s
	// phase margin 124.3° at 2.466 rad/s
	// delay margin 0.8795 s
	// peak sensitivity 1.128 at 57.13 rad/s
	// closed loop stable: true (Nyquist criterion)
}

// Margins from a measured frequency response: here the samples come from a
// model, 50 points per decade, as a swept-sine test would deliver them.
func ExampleFromMeasured() {
	plant := tf.MustNew([]float64{4}, []float64{1, 3, 3, 1}) // 4/(s+1)³
	var ws []float64
	for i := 0; i <= 150; i++ {
		ws = append(ws, 0.01*math.Pow(10, float64(i)/50))
	}
	r, err := margins.FrequencyResponse(plant, ws)
	if err != nil {
		log.Fatal(err)
	}
	data, err := margins.MeasuredFromMagnitudePhase(ws, r.MagnitudeDB, r.PhaseDeg, margins.Decibel)
	if err != nil {
		log.Fatal(err)
	}
	res, err := margins.FromMeasured(data, 0, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("gain margin %.4g dB at %.4g rad/s\n", res.GainMarginDB, res.PhaseCrossoverRadPerSec)
	fmt.Printf("phase margin %.4g° at %.4g rad/s\n", res.PhaseMarginDeg, res.GainCrossoverRadPerSec)
	fmt.Printf("closed loop stable: %v\n", res.ClosedLoopStable)
	// Output:
	// gain margin 6.021 dB at 1.732 rad/s
	// phase margin 27.14° at 1.233 rad/s
	// closed loop stable: true
}
