package closedloop

import (
	"fmt"
	"math"
	"math/cmplx"
)

// Magnitudes are the magnitudes (absolute ratios, not dB) of the four
// closed-loop functions that describe a loop's robustness and noise
// behaviour, sampled at the same frequencies.
type Magnitudes struct {
	// FrequencyRadPerSec are the sample frequencies in rad/s.
	FrequencyRadPerSec []float64
	// Sensitivity is |S| = |1/(1 + L)| (output disturbance → output).
	Sensitivity []float64
	// Complementary is |T| = |L/(1 + L)| (load disturbance → control).
	Complementary []float64
	// LoadToOutput is |G·S| (load disturbance → output).
	LoadToOutput []float64
	// NoiseToControl is |k·C·S| (measurement noise → control).
	NoiseToControl []float64
}

// Magnitudes evaluates the four functions exactly (dead time included) at
// the given frequencies (rad/s, finite and ≥ 0; at most π/T for a discrete
// loop). Errors: ErrSettings for a bad frequency.
func (fs *Functions) Magnitudes(omegasRadPerSec []float64) (Magnitudes, error) {
	m := Magnitudes{FrequencyRadPerSec: append([]float64(nil), omegasRadPerSec...)}
	for i, w := range omegasRadPerSec {
		if math.IsNaN(w) || math.IsInf(w, 0) || w < 0 {
			return Magnitudes{}, fmt.Errorf("%w: frequency %d is %v rad/s (want finite and ≥ 0)", ErrSettings, i, w)
		}
		if fs.SampleTimeSec > 0 && w > math.Pi/fs.SampleTimeSec*(1+1e-12) {
			return Magnitudes{}, fmt.Errorf("%w: frequency %d is %v rad/s, above the Nyquist frequency %v rad/s", ErrSettings, i, w, math.Pi/fs.SampleTimeSec)
		}
		m.Sensitivity = append(m.Sensitivity, cmplx.Abs(fs.FrequencyResponse(OutputDisturbance, ProcessOutput, w)))
		m.Complementary = append(m.Complementary, cmplx.Abs(fs.FrequencyResponse(LoadDisturbance, Control, w)))
		m.LoadToOutput = append(m.LoadToOutput, cmplx.Abs(fs.FrequencyResponse(LoadDisturbance, ProcessOutput, w)))
		m.NoiseToControl = append(m.NoiseToControl, cmplx.Abs(fs.FrequencyResponse(Noise, Control, w)))
	}
	return m, nil
}

// FrequencyGrid returns n ≥ 2 logarithmically spaced frequencies in rad/s
// covering the loop: from a hundredth of the slowest nonzero closed-loop
// pole (or 1/τ of a dead time) to a hundred times the fastest (continuous),
// or up to the Nyquist frequency π/T (discrete). n < 2 gives 400 points.
func (fs *Functions) FrequencyGrid(n int) []float64 {
	if n < 2 {
		n = 400
	}
	lo, hi := math.Inf(1), 0.0
	for _, p := range fs.ClosedLoopPoles {
		if fs.SampleTimeSec > 0 {
			if p == 0 {
				continue
			}
			p = cmplx.Log(p) / complex(fs.SampleTimeSec, 0)
		}
		if a := cmplx.Abs(p); a > 0 {
			lo, hi = math.Min(lo, a), math.Max(hi, a)
		}
	}
	if hi == 0 {
		lo, hi = 1, 1
	}
	lo, hi = lo/100, hi*100
	if fs.SampleTimeSec > 0 {
		hi = math.Pi / fs.SampleTimeSec
		lo = math.Min(lo, hi/1e4)
	}
	out := make([]float64, n)
	r := math.Log(hi / lo)
	for i := range out {
		out[i] = lo * math.Exp(r*float64(i)/float64(n-1))
	}
	out[n-1] = hi
	return out
}
