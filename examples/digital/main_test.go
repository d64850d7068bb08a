package main

import (
	"bytes"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// Hand derivations.
//
// Zero-order-hold equivalent of G(s) = 200/(s(s + a)), a = 10:
// G(z) = (1 − z⁻¹)·Z{G(s)/s}, and by partial fractions
// G(s)/s = 200·[1/(a s²) − 1/(a² s) + 1/(a²(s + a))], with
// Z{1/s²} = Tz/(z − 1)², Z{1/s} = z/(z − 1), Z{1/(s + a)} = z/(z − e),
// e = e^(−aT). Collecting terms,
//
//	G(z) = (200/a²)·[(aT − 1 + e)z + (1 − e − aT·e)] / ((z − 1)(z − e)).
//
// Tustin equivalent of C(s) = 4(s + 10)/(s + 40): s = c(z − 1)/(z + 1),
// c = 2/T, gives C(z) = 4[(c + 10)z + (10 − c)] / [(c + 40)z + (40 − c)].
//
// Continuous loop: C·G = 800/(s(s + 40)) after the cancellation, so the
// closed loop is 800/(s² + 40s + 800): ωn = √800, ζ = 40/(2√800) = 1/√2,
// overshoot 100·e^(−ζπ/√(1−ζ²)) = 100·e^(−π) %, peak time
// π/(ωn√(1 − ζ²)) = π/20 s. |L(jω)| = 1 gives ω⁴ + 1600ω² − 640000 = 0,
// ωc² = 800(√2 − 1), and the phase margin is 90° − atan(ωc/40).
func zohPlant(T float64) (num, den []float64) {
	const a = 10.0
	e := math.Exp(-a * T)
	k := 200 / (a * a)
	return []float64{k * (a*T - 1 + e), k * (1 - e - a*T*e)}, []float64{1, -(1 + e), e}
}

func tustinController(T float64) (num, den []float64) {
	c := 2 / T
	return []float64{4 * (c + 10), 4 * (10 - c)}, []float64{c + 40, 40 - c}
}

func mul(p, q []float64) []float64 {
	r := make([]float64, len(p)+len(q)-1)
	for i, a := range p {
		for j, b := range q {
			r[i+j] += a * b
		}
	}
	return r
}

// handLoop returns the numerator (degree 2) and denominator (degree 3) of
// the discrete loop C(z)·G(z) from the closed forms above.
func handLoop(T float64) (num, den []float64) {
	gn, gd := zohPlant(T)
	cn, cd := tustinController(T)
	return mul(cn, gn), mul(cd, gd)
}

// juryStable reports whether the cubic den + k·num has all roots inside the
// unit circle, by Jury's test for a cubic P(z) = z³ + a2 z² + a1 z + a0
// (Jury 1964, Theory and Application of the z-Transform Method; the cubic
// conditions from memory): P(1) > 0, −P(−1) > 0, |a0| < 1 and
// |a0² − 1| > |a0·a2 − a1|.
func juryStable(num, den []float64, k float64) bool {
	p := []float64{den[0], den[1] + k*num[0], den[2] + k*num[1], den[3] + k*num[2]}
	a2, a1, a0 := p[1]/p[0], p[2]/p[0], p[3]/p[0]
	p1 := 1 + a2 + a1 + a0
	pm1 := -1 + a2 - a1 + a0
	return p1 > 0 && -pm1 > 0 && math.Abs(a0) < 1 && math.Abs(a0*a0-1) > math.Abs(a0*a2-a1)
}

// juryCriticalGain finds the smallest factor k > 1 at which the loop stops
// being stable: geometric scan by 1 %, then bisection to 1e-13 relative.
func juryCriticalGain(num, den []float64) float64 {
	lo := 1.0
	hi := lo
	for juryStable(num, den, hi) {
		lo, hi = hi, hi*1.01
	}
	for hi-lo > 1e-13*hi {
		if m := (lo + hi) / 2; juryStable(num, den, m) {
			lo = m
		} else {
			hi = m
		}
	}
	return (lo + hi) / 2
}

func near(got, want, rel float64) bool { return math.Abs(got-want) <= rel*math.Abs(want) }

func TestDiscretisationAgainstClosedForms(t *testing.T) {
	c, err := compare()
	if err != nil {
		t.Fatal(err)
	}
	for i, T := range samplePeriods {
		v := c.Variants[i+1]
		gn, gd := zohPlant(T)
		want, err := tf.NewDiscrete(gn, gd, T)
		if err != nil {
			t.Fatal(err)
		}
		// 1e-10: the closed form and the library's block exponential agree
		// to rounding of e^(−aT) and a few operations on it.
		if !v.Plant.EqualApprox(want, 1e-10) {
			t.Errorf("T = %v: zero-order-hold plant %v, want %v", T, v.Plant, want)
		}
		cn, cd := tustinController(T)
		if want, err = tf.NewDiscrete(cn, cd, T); err != nil {
			t.Fatal(err)
		}
		if !v.Controller.EqualApprox(want, 1e-12) {
			t.Errorf("T = %v: Tustin controller %v, want %v", T, v.Controller, want)
		}
	}
}

func TestGainMarginAgainstJury(t *testing.T) {
	c, err := compare()
	if err != nil {
		t.Fatal(err)
	}
	for i, T := range samplePeriods {
		v := c.Variants[i+1]
		kc := juryCriticalGain(handLoop(T))
		// 1e-8: the bisection stops at 1e-13; the Jury conditions are
		// evaluated from rounded coefficients whose errors (about 1e-15
		// relative) move the boundary by far less than 1e-8.
		if !near(v.Margins.GainMargin, kc, 1e-8) {
			t.Errorf("T = %v: gain margin %.12g, want %.12g (Jury)", T, v.Margins.GainMargin, kc)
		}
		iv := v.Locus.StableIntervals
		if len(iv) == 0 || !near(iv[0].Hi, kc, 1e-8) {
			t.Errorf("T = %v: stable factors %+v, want up to %.12g (Jury)", T, iv, kc)
		}
	}
}

func TestContinuousAgainstSecondOrderFormulas(t *testing.T) {
	c, err := compare()
	if err != nil {
		t.Fatal(err)
	}
	v := c.Variants[0]
	wc := math.Sqrt(800 * (math.Sqrt2 - 1))
	checks := []struct {
		name      string
		got, want float64
	}{
		{"overshoot (%)", v.Step.OvershootPct, 100 * math.Exp(-math.Pi)},
		{"peak time (s)", v.Step.PeakTimeSec, math.Pi / 20},
		{"gain crossover (rad/s)", v.Margins.GainCrossoverRadPerSec, wc},
		{"phase margin (deg)", v.Margins.PhaseMarginDeg, 90 - math.Atan(wc/40)*180/math.Pi},
	}
	for _, ch := range checks {
		// 1e-9: the library locates these to about 1e-13 (see the response
		// and margins package docs); the formulas are exact.
		if !near(ch.got, ch.want, 1e-9) {
			t.Errorf("%s = %.15g, want %.15g", ch.name, ch.got, ch.want)
		}
	}
	if !math.IsInf(v.Margins.GainMargin, 1) {
		t.Errorf("continuous gain margin = %v, want +Inf (phase never reaches −180°)", v.Margins.GainMargin)
	}
}

// TestDiscreteStepAgainstRecursion runs the closed-loop difference equation
// of C(z)G(z)/(1 + C(z)G(z)), built from the closed forms, for a unit step
// and compares its largest sample with the library's peak.
func TestDiscreteStepAgainstRecursion(t *testing.T) {
	c, err := compare()
	if err != nil {
		t.Fatal(err)
	}
	for i, T := range samplePeriods {
		num, den := handLoop(T)
		b := []float64{0, num[0], num[1], num[2]}
		a := []float64{den[0], den[1] + num[0], den[2] + num[1], den[3] + num[2]}
		y := make([]float64, 4000)
		peak := 0.0
		for k := range y {
			s := 0.0
			for j := 0; j <= 3 && j <= k; j++ {
				s += b[j] // u = 1 for k ≥ 0
				if j > 0 {
					s -= a[j] * y[k-j]
				}
			}
			y[k] = s / a[0]
			peak = math.Max(peak, y[k])
		}
		v := c.Variants[i+1]
		// 1e-9: the recursion is stable and short; rounding stays near 1e-14.
		if !near(v.Step.PeakValue, peak, 1e-9) {
			t.Errorf("T = %v: peak %.12g, want %.12g (difference equation)", T, v.Step.PeakValue, peak)
		}
		if !near(v.Step.OvershootPct, 100*(peak-1), 1e-7) {
			t.Errorf("T = %v: overshoot %.12g %%, want %.12g %%", T, v.Step.OvershootPct, 100*(peak-1))
		}
	}
}

func TestRun(t *testing.T) {
	dir := t.TempDir()
	var out bytes.Buffer
	if err := run(&out, dir); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"unit circle", "phase margin", "65.5°"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("summary lacks %q:\n%s", want, out.String())
		}
	}
	entries, err := os.ReadDir(dir)
	if err != nil || len(entries) == 0 {
		t.Errorf("no plots written (%v)", err)
	}
}

// TestOutputBetweenSamples checks the curve drawn between the samples
// (issue 11 item 18): the continuous plant under the held controller
// output must pass exactly through the sampled closed-loop response at
// every sample instant (the zero-order-hold equivalent G(z) is exact
// there, Franklin, Powell & Workman, Digital Control of Dynamic Systems,
// 3rd ed., §4.3.3, from memory), and for T = 50 ms the angle between the
// samples exceeds the largest sample: the held staircase drawn before hid
// a higher peak.
func TestOutputBetweenSamples(t *testing.T) {
	c, err := compare()
	if err != nil {
		t.Fatal(err)
	}
	plant := tf.MustParse(plantText)
	for _, v := range c.Variants[1:] {
		b, err := between(v, plant)
		if err != nil {
			t.Fatal(err)
		}
		worst, checked := 0.0, 0
		for j := 0; j < len(b.TimeSec); j += pointsPerSample {
			k := j / pointsPerSample
			// 1e-9: both are exact recursions of the same loop, but the
			// sampled one runs on z-domain coefficients whose poles lie
			// within 0.2 of z = 1 at T = 5 ms (|s|·T ≤ 0.2), a representation
			// that loses about five digits to rounding (4e-11 seen). A held
			// staircase is off by 0.01 and more.
			worst = math.Max(worst, math.Abs(b.Output[j]-v.StepCurve.Output[k]))
			checked++
		}
		if worst > 1e-9 || checked < 12 {
			t.Errorf("%s: between-sample curve differs from the samples by %.3g at the sample instants (%d checked)", v.Name, worst, checked)
		}
		if v.SampleTimeSec == 0.05 {
			top := 0.0
			for _, y := range b.Output {
				top = math.Max(top, y)
			}
			if !(top > v.Step.PeakValue+0.01) {
				t.Errorf("%s: largest angle between samples %.4g, largest sample %.4g: expected a higher peak between samples", v.Name, top, v.Step.PeakValue)
			}
		}
	}
}
