package chart_test

import (
	"testing"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// The loops below are demonstration scenarios of this project's own.

// servoLoop is a position servo: integrator, two motor/amplifier lags and a
// lead zero; its locus has a break point and crosses the imaginary axis.
func servoLoop() tf.TF { return tf.MustParse("(s+2)/(s(s+1)(s+5)(s+8))") }

// thermalLoop is a continuous loop with dead time (Padé in the locus).
func thermalLoop() tf.TF { return tf.MustParse("5/((s+1)^3)*exp(-0.1s)") }

// digitalLoop is a sampled loop (T = 0.1 s) with an integrator at z = 1.
func digitalLoop() tf.TF {
	return must(tf.ParseDiscrete("0.1(z+0.8)/((z-1)(z-0.6))", 0.1))
}

// parameterLoop is the servo plant with a PD compensator whose derivative
// time Td is the locus parameter; for the other figures Td = 0.5.
func parameterLoop() tf.TF {
	return must(tf.ParseWith("4(1+Td*s)/(s(s+1)(s+3))", &tf.ParseSettings{Params: map[string]float64{"Td": 0.5}}))
}

func must[T any](v T, err error) T {
	if err != nil {
		panic(err)
	}
	return v
}

// figureCase is a figure built from one of the loops.
type figureCase struct {
	name  string
	build func(t *testing.T) *chart.Figure
	// words are texts the SVG must contain (labels in full words).
	words []string
}

func traceLocus(t *testing.T, loop tf.TF, set *locus.Settings) locus.Locus {
	t.Helper()
	l, err := locus.Trace(loop, set)
	if err != nil {
		t.Fatalf("locus.Trace: %v", err)
	}
	return l
}

func rootLocusCase(name string, loop func() tf.TF, mark float64, words ...string) figureCase {
	return figureCase{name: name, words: words, build: func(t *testing.T) *chart.Figure {
		l := traceLocus(t, loop(), nil)
		poles, err := locus.ClosedLoopPoles(loop(), mark)
		if err != nil {
			t.Fatal(err)
		}
		f, err := chart.RootLocus(l, &chart.LocusSettings{
			PlaneSettings: chart.PlaneSettings{Grid: true},
			Mark:          &chart.LocusMark{Value: mark, Poles: poles},
		})
		if err != nil {
			t.Fatal(err)
		}
		return f
	}}
}

func parameterLocusCase() figureCase {
	return figureCase{name: "locus_parameter", words: []string{"Td = 0.5", "Root locus over the parameter Td"},
		build: func(t *testing.T) *chart.Figure {
			pm, err := locus.FromText("Td", "4(1+Td*s)", tf.MustParse("1/(s(s+1)(s+3))"))
			if err != nil {
				t.Fatal(err)
			}
			l := traceLocus(t, pm.Loop, &locus.Settings{Variable: pm.Name})
			f, err := chart.RootLocus(l, &chart.LocusSettings{Mark: &chart.LocusMark{Value: 0.5}})
			if err != nil {
				t.Fatal(err)
			}
			return f
		}}
}

func poleZeroCase(name string, g func() tf.TF) figureCase {
	return figureCase{name: name, words: []string{"pole", "zero", "stable region"}, build: func(t *testing.T) *chart.Figure {
		f, err := chart.PoleZero(g(), &chart.PlaneSettings{Grid: true})
		if err != nil {
			t.Fatal(err)
		}
		return f
	}}
}

func frequencyCase(name string, loop func() tf.TF) figureCase {
	return figureCase{name: name, words: []string{"gain margin", "phase margin", "frequency"}, build: func(t *testing.T) *chart.Figure {
		r, err := margins.FrequencyResponse(loop(), nil)
		if err != nil {
			t.Fatal(err)
		}
		m, err := margins.Compute(loop(), nil)
		if err != nil {
			t.Fatal(err)
		}
		f, err := chart.FrequencyResponse(r, &m, &chart.FrequencySettings{SampleTimeSec: loop().SampleTimeSec()})
		if err != nil {
			t.Fatal(err)
		}
		return f
	}}
}

func nyquistCase(name string, loop func() tf.TF) figureCase {
	return figureCase{name: name, words: []string{"peak sensitivity", "unit circle"}, build: func(t *testing.T) *chart.Figure {
		n, err := margins.NyquistCurve(loop(), nil)
		if err != nil {
			t.Fatal(err)
		}
		m, err := margins.Compute(loop(), nil)
		if err != nil {
			t.Fatal(err)
		}
		f, err := chart.Nyquist(n, &m, nil)
		if err != nil {
			t.Fatal(err)
		}
		return f
	}}
}

func stepCase(name string, loop func() tf.TF) figureCase {
	return figureCase{name: name, words: []string{"settling time", "rise time", "final value"}, build: func(t *testing.T) *chart.Figure {
		cl, err := loop().WithoutDelay().ClosedLoop()
		if err != nil {
			t.Fatal(err)
		}
		r, err := response.Step(cl, nil)
		if err != nil {
			t.Fatal(err)
		}
		m, err := response.StepMetrics(cl, nil)
		if err != nil {
			t.Fatal(err)
		}
		f, err := chart.StepResponse(r, &m, nil)
		if err != nil {
			t.Fatal(err)
		}
		return f
	}}
}

// stageLoop is a positioning stage with a PI controller, a lightly damped
// mount resonance near 11 rad/s and a fast amplifier pole at 50 rad/s:
// its slow break points are tiny against the whole locus, which is what
// the detail panel is for.
func stageLoop() tf.TF { return tf.MustParse("30(s+2.5)/(s(s+1.6)(s^2+1.2s+120)(0.02s+1))") }

// withWords adds words the SVG of c must contain.
func withWords(c figureCase, words ...string) figureCase {
	c.words = append(append([]string(nil), c.words...), words...)
	return c
}

// scaledServo is the servo loop at a gain of 20 (stable closed loop).
func scaledServo() tf.TF { return must(servoLoop().Scale(20)) }

// allCases covers every figure in continuous, discrete and parameter form.
func allCases() []figureCase {
	return []figureCase{
		rootLocusCase("locus_continuous", servoLoop, 20, "gain = 350.2 at 5.28 rad/s", "break point", "stable for 0 &lt; gain &lt; 350.2"),
		rootLocusCase("locus_discrete", digitalLoop, 2, "crossing of the unit circle", "sample period 0.1 s"),
		rootLocusCase("locus_deadtime", thermalLoop, 1, "asymptote"),
		parameterLocusCase(),
		{name: "locus_detail", words: []string{"Detail near the origin", "break point"}, build: func(t *testing.T) *chart.Figure {
			return must(chart.RootLocus(traceLocus(t, stageLoop(), nil), &chart.LocusSettings{PlaneSettings: chart.PlaneSettings{Detail: true}}))
		}},
		poleZeroCase("polezero_continuous", servoLoop),
		poleZeroCase("polezero_discrete", digitalLoop),
		poleZeroCase("polezero_parameter", parameterLoop),
		frequencyCase("frequency_continuous", scaledServo),
		withWords(frequencyCase("frequency_discrete", digitalLoop), "Nyquist frequency π/T = 31.4 rad/s"),
		frequencyCase("frequency_parameter", parameterLoop),
		frequencyCase("frequency_deadtime", thermalLoop),
		nyquistCase("nyquist_continuous", scaledServo),
		nyquistCase("nyquist_discrete", digitalLoop),
		nyquistCase("nyquist_parameter", parameterLoop),
		stepCase("step_continuous", scaledServo),
		stepCase("step_discrete", digitalLoop),
		stepCase("step_parameter", parameterLoop),
	}
}
