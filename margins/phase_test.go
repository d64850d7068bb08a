package margins

import (
	"math"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// phaseAt returns the unwrapped phase of g in degrees at the frequencies ws.
func phaseAt(t *testing.T, g tf.TF, ws []float64) []float64 {
	t.Helper()
	r, err := FrequencyResponse(g, ws)
	if err != nil {
		t.Fatal(err)
	}
	return r.PhaseDeg
}

// TestPhaseRightHalfPlaneZeros is the regression test of issue 11 item 1:
// every pair of right-half-plane zeros used to add 360° to the phase.
//
// Expected values (closed forms, no library code): the [n/n] Padé
// approximant P(s) = D(−s)/D(s) of e^(−sτ) is all-pass with a Hurwitz D, so
// its phase −2·arg D(jω) falls continuously and monotonically from 0 at
// ω = 0 to −n·180° as ω → ∞; it matches the delay's phase −ωτ to order
// (ωτ)^(2n+1): the error is below 2·(n!)²/((2n)!·(2n+1)!)·(ωτ)^(2n+1) rad,
// 3.5e-13 rad for n = 6 and 7.9e-8 rad for n = 4 at ωτ = 1 (Baker &
// Graves-Morris, Padé Approximants, 2nd ed., 1996, §1.2, the remainder of
// the exponential's diagonal approximants; from memory). A sampled Tustin
// equivalent has the continuous phase at the prewarped frequency
// (2/T)·tan(ωT/2) (closed form of the bilinear map).
func TestPhaseRightHalfPlaneZeros(t *testing.T) {
	deg := 180 / math.Pi
	p6, err := tf.PadeDelay(1, 6)
	if err != nil {
		t.Fatal(err)
	}
	ws := []float64{1e-6, 1e-3, 0.3, 1, 3, 10, 100, 1e4, 1e6}
	ph := phaseAt(t, p6, ws)
	for i, w := range ws[:4] {
		// Padé error ≤ 3.5e-13 rad at ωτ = 1; the evaluation adds ulps.
		if d := math.Abs(ph[i] + w*deg); d > 1e-10 {
			t.Errorf("Padé(6) phase at %v rad/s = %.15g°, want −ωτ = %.15g°", w, ph[i], -w*deg)
		}
	}
	for i := 1; i < len(ph); i++ {
		if !(ph[i] < ph[i-1]) {
			t.Errorf("Padé(6) phase not decreasing: %v° at %v, %v° at %v rad/s", ph[i-1], ws[i-1], ph[i], ws[i])
		}
	}
	// Approaches −1080° from above: within 0.01° at 10⁶ rad/s (the
	// remainder is 2·d₅/(d₆·ω) rad = 24/ω rad for τ = 1).
	if last := ph[len(ph)-1]; !(last > -1080 && last < -1080+0.01) {
		t.Errorf("Padé(6) phase at 1e6 rad/s = %v°, want just above −1080°", last)
	}

	// 5/(s(s+2)) times the 4th-order Padé delay of 1 s: phase
	// −90° − atan(ω/2) − ωτ (the issue reports 626.8° for this loop).
	p4, err := tf.PadeDelay(1, 4)
	if err != nil {
		t.Fatal(err)
	}
	g, err := tf.MustParse("5/(s(s+2))").Series(p4)
	if err != nil {
		t.Fatal(err)
	}
	ws = []float64{1e-4, 1e-2, 0.1, 1}
	ph = phaseAt(t, g, ws)
	for i, w := range ws {
		want := -90 - math.Atan(w/2)*deg - w*deg
		// Padé error ≤ 7.9e-8 rad = 4.5e-6° at ωτ = 1, far less below.
		if d := math.Abs(ph[i] - want); d > 5e-6 {
			t.Errorf("5/(s(s+2))·Padé(4) phase at %v rad/s = %.12g°, want %.12g°", w, ph[i], want)
		}
	}

	// A real right-half-plane zero with a negative sign: −(s − 1)/(s + 1)
	// = (1 − s)/(1 + s), phase −2·atan ω, from 0° at ω = 0 to −180°.
	ws = []float64{1e-6, 1, 10, 1e3}
	ph = phaseAt(t, tf.MustParse("-(s-1)/(s+1)"), ws)
	for i, w := range ws {
		if want := -2 * math.Atan(w) * deg; math.Abs(ph[i]-want) > 1e-12 {
			t.Errorf("(1−s)/(1+s) phase at %v rad/s = %v°, want %v°", w, ph[i], want)
		}
	}

	// A negative low-frequency gain starts at +180° (the principal angle
	// of −1), falling towards +90°: −1/(s + 1) has phase 180° − atan ω.
	ph = phaseAt(t, tf.MustParse("-1/(s+1)"), ws)
	for i, w := range ws {
		if want := 180 - math.Atan(w)*deg; math.Abs(ph[i]-want) > 1e-12 {
			t.Errorf("−1/(s+1) phase at %v rad/s = %v°, want %v°", w, ph[i], want)
		}
	}

	// Discrete time: the Tustin equivalent (T = 0.1 s) of the Padé(6)
	// delay has the continuous phase at (2/T)·tan(ωT/2).
	const ts = 0.1
	d6, err := p6.Discretize(ts, tf.Tustin, nil)
	if err != nil {
		t.Fatal(err)
	}
	ws = []float64{1e-6, 1e-3, 1, 31}
	ph = phaseAt(t, d6, ws)
	for i, w := range ws[:3] {
		wc := 2 / ts * math.Tan(w*ts/2)
		if d := math.Abs(ph[i] + wc*deg); d > 1e-9 {
			t.Errorf("Tustin Padé(6) phase at %v rad/s = %.15g°, want %.15g°", w, ph[i], -wc*deg)
		}
	}
	// Near π/T the warped frequency is 20·tan(1.55) = 963 rad/s.
	if last := ph[3]; !(last > -1080 && last < -1000) {
		t.Errorf("Tustin Padé(6) phase at 31 rad/s = %v°, want between −1080° and −1000°", last)
	}
}
