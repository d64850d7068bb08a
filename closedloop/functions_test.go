package closedloop

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// randomTF returns a stable-denominator proper transfer function of the
// given degrees with coefficients drawn from rng (denominator from real
// negative roots, so it never vanishes on the axis).
func randomTF(rng *rand.Rand, nz, np int) tf.TF {
	var zs, ps []complex128
	for range nz {
		zs = append(zs, complex(-4*rng.Float64()-0.1, 0))
	}
	for range np {
		ps = append(ps, complex(-5*rng.Float64()-0.2, 0))
	}
	g, err := tf.FromZerosPolesGain(zs, ps, 0.5+2*rng.Float64())
	if err != nil {
		panic(err)
	}
	return g
}

// TestFunctionsMatchBlockAlgebra: every minimal closed-loop function equals
// the loop equations solved at the point s from the values of C, G, H, F
// (y = (k·C·G·F·r + G·d + dₒ − k·C·G·n)/(1 + k·C·G·H), u from the
// controller equation, e = r − y), for seeded random loops, to 1e-9
// relative (the cancellation tolerance is 1e-8 on the roots).
func TestFunctionsMatchBlockAlgebra(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for trial := range 40 {
		l := Loop{
			Plant:      randomTF(rng, rng.IntN(2), 2+rng.IntN(2)),
			Controller: randomTF(rng, 1+rng.IntN(2), 1+rng.IntN(2)),
			Sensor:     randomTF(rng, 0, rng.IntN(2)),
			Prefilter:  randomTF(rng, 0, 1),
			Gain:       0.2 + rng.Float64(),
		}
		fs, err := Of(l, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, w := range []float64{0.03, 0.7, 2.2, 9} {
			s := complex(0, w)
			c, g, h, f := complex(l.Gain, 0)*l.Controller.Eval(s), l.Plant.Eval(s), l.Sensor.Eval(s), l.Prefilter.Eval(s)
			for in := range numInputs {
				var r, d, do, n complex128
				switch in {
				case Reference:
					r = 1
				case LoadDisturbance:
					d = 1
				case OutputDisturbance:
					do = 1
				case Noise:
					n = 1
				}
				y := (c*g*f*r + g*d + do - c*g*n) / (1 + c*g*h)
				u := c * (f*r - h*y - n)
				want := [numOutputs]complex128{ProcessOutput: y, Error: r - y, Control: u}
				for out := range numOutputs {
					got := fs.Function(in, out).TF.Eval(s)
					if cmplx.Abs(got-want[out]) > 1e-9*math.Max(cmplx.Abs(want[out]), 1e-3) {
						t.Errorf("trial %d, %v → %v at %v rad/s: %v, want %v", trial, in, out, w, got, want[out])
					}
					if ex := fs.FrequencyResponse(in, out, w); cmplx.Abs(ex-want[out]) > 1e-12*math.Max(cmplx.Abs(want[out]), 1e-3) {
						t.Errorf("trial %d, %v → %v exact at %v rad/s: %v, want %v", trial, in, out, w, ex, want[out])
					}
				}
			}
		}
	}
}

// TestMinimalCancelsStableFactors: the plant (s + 2)/((s + 1)(s + 3)) with
// the controller 4/(s + 2)·(s + 1)/s cancels s + 2 and s + 1 where they
// meet; the loop stays internally stable and nothing is hidden.
func TestMinimalCancelsStableFactors(t *testing.T) {
	l := Loop{Plant: tf.MustParse("(s+2)/((s+1)(s+3))"), Controller: tf.MustParse("4(s+1)/(s(s+2))")}
	fs, err := Of(l, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !fs.InternallyStable || len(fs.HiddenModes) != 0 {
		t.Fatalf("stable %v, hidden %v", fs.InternallyStable, fs.HiddenModes)
	}
	// r → y = 4/(s² + 3s + 4): order 2 after cancelling s + 1 and s + 2.
	ry := fs.Function(Reference, ProcessOutput)
	if ry.TF.Den().Degree() != 2 || len(ry.Cancelled) != 2 {
		t.Errorf("r → y = %v, cancelled %v", ry.TF, ry.Cancelled)
	}
	want := tf.MustParse("4/(s^2+3s+4)")
	if !ry.TF.Normalized().EqualApprox(want, 1e-12) {
		t.Errorf("r → y = %v, want %v", ry.TF.Normalized(), want)
	}
}

func TestOfBadInput(t *testing.T) {
	g := tf.MustParse("1/(s+1)")
	d, _ := tf.NewDiscrete([]float64{1}, []float64{1, -0.5}, 0.1)
	for _, c := range []struct {
		name string
		l    Loop
		set  *Settings
		want error
	}{
		{"no plant", Loop{Controller: g}, nil, ErrLoop},
		{"no controller", Loop{Plant: g}, nil, ErrLoop},
		{"NaN gain", Loop{Plant: g, Controller: g, Gain: math.NaN()}, nil, ErrLoop},
		{"mixed sample periods", Loop{Plant: g, Controller: d}, nil, ErrLoop},
		{"improper loop", Loop{Plant: tf.MustParse("s+1"), Controller: tf.MustParse("s")}, nil, ErrImproper},
		{"Padé order", Loop{Plant: g, Controller: g}, &Settings{PadeOrder: 99}, ErrSettings},
		{"band", Loop{Plant: g, Controller: g}, &Settings{RecoveryBandFraction: 1.5}, ErrSettings},
		{"tolerance", Loop{Plant: g, Controller: g}, &Settings{MinimalTol: -1}, ErrSettings},
	} {
		if _, err := Of(c.l, c.set); !errors.Is(err, c.want) {
			t.Errorf("%s: %v, want %v", c.name, err, c.want)
		}
	}
	// An unfiltered derivative: the control signal has an impulse.
	fs, err := Of(Loop{Plant: tf.MustParse("1/((s+1)(s+2))"), Controller: tf.MustParse("2 + 0.5s")}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := fs.ControlEffort(Reference); !errors.Is(err, ErrImproper) {
		t.Errorf("control effort of an ideal PD: %v, want ErrImproper", err)
	}
	if ng, err := fs.NoiseGains(); err != nil || !math.IsInf(ng.ToControlHighFrequencyGain, 1) {
		t.Errorf("noise gains of an ideal PD: %+v %v, want an infinite high-frequency gain", ng, err)
	}
}

// TestResidualOffset: without integral action a load step leaves the
// offset G(0)/(1 + k·C(0)·G(0)) = 1/(1 + 4) for G = 1/(s + 1), C = 4; it
// is a result, not an error, and the integrals are infinite. The response
// 0.2·(1 − e^(−5t)) creeps to the offset: the peak is the supremum 0.2,
// approached as t → ∞, and the 2 % band is entered at ln(50)/5.
func TestResidualOffset(t *testing.T) {
	fs, err := Of(Loop{Plant: tf.MustParse("1/(s+1)"), Controller: tf.MustParse("4")}, nil)
	if err != nil {
		t.Fatal(err)
	}
	d, err := fs.StepDeviation(LoadDisturbance, ProcessOutput, nil)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(d.FinalValue-0.2) > 1e-15 || d.PeakDeviation != d.FinalValue || !math.IsInf(d.PeakTimeSec, 1) {
		t.Errorf("offset %v, peak %v at %v", d.FinalValue, d.PeakDeviation, d.PeakTimeSec)
	}
	if want := math.Log(50) / 5; math.Abs(d.RecoveryTimeSec-want) > 1e-12*want {
		t.Errorf("recovery %.15g, want %.15g", d.RecoveryTimeSec, want)
	}
	if !math.IsInf(d.IntegratedAbsoluteError, 1) || !math.IsInf(d.IntegratedSquaredError, 1) {
		t.Errorf("integrals %v %v, want +Inf", d.IntegratedAbsoluteError, d.IntegratedSquaredError)
	}
}
