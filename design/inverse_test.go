package design

import (
	"errors"
	"math"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// TestValuesClosedForms checks the inverse queries against hand
// derivations.
func TestValuesClosedForms(t *testing.T) {
	w45 := (math.Sqrt(17) - 3) / 2
	for _, c := range []struct {
		name   string
		loop   string
		target Target
		want   []float64
		tol    float64
	}{
		// See TestThirdOrderGain.
		{"PM 45°", "1/(s*(s+1)*(s+2))", PhaseMarginDeg(45), []float64{w45 * math.Sqrt(w45*w45+1) * math.Sqrt(w45*w45+4)}, 1e-12},
		{"GM 6 dB", "1/(s*(s+1)*(s+2))", GainMarginDB(6), []float64{6 / math.Pow(10, 0.3)}, 1e-12},
		// |k/(jω(jω+1)(jω+2))| = 1 at ω = 1: k = √2·√5.
		{"crossover 1 rad/s", "1/(s*(s+1)*(s+2))", CrossoverRadPerSec(1), []float64{math.Sqrt(10)}, 1e-12},
		// T = k/(s + 1 + k): bandwidth 1 + k.
		{"bandwidth 5 rad/s", "1/(s+1)", BandwidthRadPerSec(5), []float64{4}, 1e-12},
		// s² + 2s + k: ζ = 1/√k.
		{"damping 0.5", "1/(s*(s+2))", DominantDampingRatio(0.5), []float64{4}, 1e-12},
		// k/(s(s+2)): PM = 180 − 90 − atan(ω/2) = 90 − atan(ω/2); PM 60° at
		// ω = 2·tan 30°, k = ω·√(ω² + 4).
		{"PM 60° second order", "1/(s*(s+2))", PhaseMarginDeg(60), []float64{2 * math.Tan(math.Pi/6) * math.Sqrt(4*math.Pow(math.Tan(math.Pi/6), 2)+4)}, 1e-12},
		// Delay margin of k/(s(s+2)) at crossover ω: PM(ω)/ω with
		// k = ω√(ω²+4); τ = (π/2 − atan(ω/2))/ω; at ω = 1: τ = (π/2 −
		// atan 0.5)/1, k = √5.
		{"DM", "1/(s*(s+2))", DelayMarginSec(math.Pi/2 - math.Atan(0.5)), []float64{math.Sqrt(5)}, 1e-10},
	} {
		t.Run(c.name, func(t *testing.T) {
			v, err := Gain(tf.MustParse(c.loop))
			if err != nil {
				t.Fatal(err)
			}
			sol, err := Values(v, c.target, nil)
			if err != nil {
				t.Fatal(err)
			}
			if len(sol) != len(c.want) {
				t.Fatalf("got %+v, want values %v", sol, c.want)
			}
			for i, s := range sol {
				if math.Abs(s.Value-c.want[i]) > c.tol*c.want[i] {
					t.Errorf("value %.17g, want %.17g", s.Value, c.want[i])
				}
				if math.Abs(s.Measured-c.target.value) > 1e-9*math.Abs(c.target.value) {
					t.Errorf("measured %.17g, target %v", s.Measured, c.target.value)
				}
			}
		})
	}
}

// TestValuesSeveral: a conditionally stable loop has several gains with
// the same phase margin; each is verified by margins.Compute inside Values
// and here the measured value must equal the target to 1e-9.
func TestValuesSeveral(t *testing.T) {
	v, err := Gain(tf.MustParse("(s+0.5)^2/(s^3*(s+10))"))
	if err != nil {
		t.Fatal(err)
	}
	sol, err := Values(v, PhaseMarginDeg(20), &Settings{Range: Range{0, 1e4}})
	if err != nil {
		t.Fatal(err)
	}
	// The phase of L rises above −180° between the two gains' crossovers
	// (two zeros at −0.5 against a triple integrator and a pole at −10),
	// so PM = 20° is reached once on the rising and once on the falling
	// side of the phase bump.
	if len(sol) != 2 {
		t.Fatalf("got %+v, want two gains", sol)
	}
	for _, s := range sol {
		if math.Abs(s.Measured-20) > 1e-9*20 {
			t.Errorf("%+v", s)
		}
	}
	t.Logf("%+v", sol)
}

func TestValuesErrors(t *testing.T) {
	v, _ := Gain(tf.MustParse("1/(s+1)"))
	if _, err := Values(v, PhaseMarginDeg(math.NaN()), nil); !errors.Is(err, ErrInvalidInput) {
		t.Errorf("NaN target: %v", err)
	}
	if _, err := Values(v, Target{}, nil); !errors.Is(err, ErrInvalidInput) {
		t.Errorf("zero target: %v", err)
	}
	vd, _ := Gain(tf.MustParse("exp(-0.1*s)/(s+1)"))
	if _, err := Values(vd, PhaseMarginDeg(45), nil); !errors.Is(err, ErrUnsupported) {
		t.Errorf("dead time: %v", err)
	}
	if _, err := Solve(v, nil, &Settings{Range: Range{2, 1}}); !errors.Is(err, ErrInvalidInput) {
		t.Errorf("empty range: %v", err)
	}
}
