package margins

import (
	"math"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// sampleLoop samples g at perDecade log-spaced frequencies from lo to hi.
func sampleLoop(t *testing.T, g tf.TF, lo, hi float64, perDecade int) Measured {
	t.Helper()
	n := int(math.Round(math.Log10(hi/lo)*float64(perDecade))) + 1
	ws := make([]float64, n)
	for i := range ws {
		ws[i] = lo * math.Pow(hi/lo, float64(i)/float64(n-1))
	}
	r, err := FrequencyResponse(g, ws)
	if err != nil {
		t.Fatal(err)
	}
	return Measured{FrequencyRadPerSec: ws, Value: r.Value}
}

// TestMeasuredAgainstExact samples analytic loops (100 and 300 log-spaced
// points per decade) and compares FromMeasured with Compute on the loop
// itself. The tolerances are the accuracy stated in the FromMeasured doc
// comment: the cubic interpolation in ln ω has an error of order h⁴, h the
// sample spacing in ln ω (h = 0.023 at 100 points per decade), scaled by
// the fourth derivative of ln|L| and of the phase, which is largest at a
// lightly damped resonance.
func TestMeasuredAgainstExact(t *testing.T) {
	resonance := tf.MustNew([]float64{7.8125, 12.8125, 2005, 2000}, []float64{1, 10.8, 408, 4000, 0})
	deadTime, _ := tf.MustNew([]float64{1}, []float64{1, 0}).WithDelay(1)
	tests := []struct {
		name      string
		g         tf.TF
		lo, hi    float64
		p         int     // open-loop unstable poles
		perDecade int     // samples per decade
		tolW      float64 // relative, crossover frequencies and gain factors
		tolPM     float64 // degrees
	}{
		// Measured: at most 1.4e-8 relative and 4e-7° on the smooth loops,
		// 5.2e-5 and 0.080° (100 per decade) or 6.4e-7 and 0.0018° (300 per
		// decade) on the resonance (damping 0.02): a factor 3 in density
		// gains about 3⁴, as an h⁴ error should. Tolerances: twice that,
		// rounded up.
		{"1/(s(s+1)(s+2))", tf.MustNew([]float64{1}, []float64{1, 3, 2, 0}), 1e-3, 1e2, 0, 100, 1e-7, 1e-5},
		{"4/(s+1)^3", tf.MustNew([]float64{4}, []float64{1, 3, 3, 1}), 1e-3, 1e2, 0, 100, 1e-7, 1e-5},
		{"2(s+2)/((s-1)(s+3))", tf.MustNew([]float64{2, 4}, []float64{1, 2, -3}), 1e-3, 1e3, 1, 100, 1e-7, 1e-5},
		{"e^-s/s", deadTime, 1e-3, 1e2, 0, 100, 1e-7, 1e-5},
		{"resonance, 100 per decade", resonance, 1e-3, 1e3, 0, 100, 2e-4, 0.2},
		{"resonance, 300 per decade", resonance, 1e-3, 1e3, 0, 300, 2e-6, 4e-3},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			exact, err := Compute(test.g, &Settings{OmegaMaxRadPerSec: test.hi})
			if err != nil {
				t.Fatal(err)
			}
			got, err := FromMeasured(sampleLoop(t, test.g, test.lo, test.hi, test.perDecade), test.p, nil)
			if err != nil {
				t.Fatal(err)
			}
			if len(got.GainCrossovers) != len(exact.GainCrossovers) {
				t.Fatalf("gain crossovers %+v, want %+v", got.GainCrossovers, exact.GainCrossovers)
			}
			worstW, worstPM := 0.0, 0.0
			for i, e := range exact.GainCrossovers {
				g := got.GainCrossovers[i]
				worstW = math.Max(worstW, math.Abs(g.FrequencyRadPerSec-e.FrequencyRadPerSec)/e.FrequencyRadPerSec)
				worstPM = math.Max(worstPM, math.Abs(g.PhaseMarginDeg-e.PhaseMarginDeg))
			}
			// Exact phase crossovers inside the measured range (ω = 0 is
			// not measured).
			var want []PhaseCrossover
			for _, pc := range exact.PhaseCrossovers {
				if pc.FrequencyRadPerSec >= test.lo && pc.FrequencyRadPerSec <= test.hi {
					want = append(want, pc)
				}
			}
			if len(got.PhaseCrossovers) != len(want) {
				t.Fatalf("phase crossovers %+v, want %+v", got.PhaseCrossovers, want)
			}
			for i, e := range want {
				g := got.PhaseCrossovers[i]
				worstW = math.Max(worstW, math.Abs(g.FrequencyRadPerSec-e.FrequencyRadPerSec)/e.FrequencyRadPerSec)
				worstW = math.Max(worstW, math.Abs(g.GainFactor-e.GainFactor)/e.GainFactor)
			}
			t.Logf("worst relative error of crossovers and gain factors %.2g, of phase margins %.2g°", worstW, worstPM)
			if worstW > test.tolW || worstPM > test.tolPM {
				t.Errorf("errors %.3g (rel), %.3g° exceed %.3g, %.3g°", worstW, worstPM, test.tolW, test.tolPM)
			}
			if got.ClosedLoopStable != exact.ClosedLoopStable || got.ClosedLoopUnstablePoles != exact.ClosedLoopUnstablePoles {
				t.Errorf("stability %v (Z=%d), want %v (Z=%d)", got.ClosedLoopStable, got.ClosedLoopUnstablePoles, exact.ClosedLoopStable, exact.ClosedLoopUnstablePoles)
			}
			if exact.ClosedLoopStable && math.Abs(got.DelayMarginSec-exact.DelayMarginSec) > 10*test.tolW*exact.DelayMarginSec {
				t.Errorf("delay margin %v, want %v", got.DelayMarginSec, exact.DelayMarginSec)
			}
			// Ms from samples: the refined sampled maximum is within
			// 1e-4 relative of the exact peak for these loops (a peak
			// inside the range).
			if exact.PeakSensitivityRadPerSec > test.lo && exact.PeakSensitivityRadPerSec < test.hi {
				if e := math.Abs(got.PeakSensitivity-exact.PeakSensitivity) / exact.PeakSensitivity; e > 1e-4 {
					t.Errorf("Ms %v, want %v", got.PeakSensitivity, exact.PeakSensitivity)
				}
			}
		})
	}
}

// TestMeasuredFromMagnitudePhase checks the polar constructor: dB and
// absolute magnitudes with phases in degrees give the same data.
func TestMeasuredFromMagnitudePhase(t *testing.T) {
	g := tf.MustNew([]float64{1}, []float64{1, 3, 2, 0})
	ws := []float64{0.1, 0.5, 1, 2, 5}
	r, err := FrequencyResponse(g, ws)
	if err != nil {
		t.Fatal(err)
	}
	a, err := MeasuredFromMagnitudePhase(ws, r.Magnitude, r.PhaseDeg, Absolute)
	if err != nil {
		t.Fatal(err)
	}
	b, err := MeasuredFromMagnitudePhase(ws, r.MagnitudeDB, r.PhaseDeg, Decibel)
	if err != nil {
		t.Fatal(err)
	}
	for i := range ws {
		if d := a.Value[i] - r.Value[i]; real(d)*real(d)+imag(d)*imag(d) > 1e-28*real(r.Value[i]*complex(real(r.Value[i]), -imag(r.Value[i]))) {
			t.Errorf("absolute: %v, want %v", a.Value[i], r.Value[i])
		}
		if d := b.Value[i] - r.Value[i]; real(d)*real(d)+imag(d)*imag(d) > 1e-26*real(r.Value[i]*complex(real(r.Value[i]), -imag(r.Value[i]))) {
			t.Errorf("dB: %v, want %v", b.Value[i], r.Value[i])
		}
	}
}
