package chart_test

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"testing"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/closedloop"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
	"gonum.org/v1/plot/cmpimg"
)

// closedLoopFigure is the belt-drive loop of closedloop's example (a
// scenario of this project's own): plant 2/((s+1)(s+2)(s+4)), a PID with
// gain 3, integral time 1.2 s, derivative time 0.25 s and derivative
// filter 10, a sensor lag of 0.05 s; sampled on a fixed grid.
func closedLoopFigure(t *testing.T) *chart.Figure {
	pid := must(tf.PID{Gain: 3, IntegralTimeSec: 1.2, DerivativeTimeSec: 0.25, DerivativeFilter: 10}.TF())
	fs := must(closedloop.Of(closedloop.Loop{
		Plant:      tf.MustParse("2/((s+1)(s+2)(s+4))"),
		Controller: pid,
		Sensor:     tf.MustParse("1/(0.05s+1)"),
	}, nil))
	m := must(fs.Analyze(nil))
	mag := must(fs.Magnitudes(logGrid(0.01, 1000, 400)))
	return must(chart.ClosedLoopMagnitudes(mag, &m, nil))
}

// TestClosedLoopGolden compares the figure with the image checked by eye
// (regenerate with -regen, as TestGolden).
func TestClosedLoopGolden(t *testing.T) {
	f := closedLoopFigure(t)
	f.DPI = 72
	var buf bytes.Buffer
	if err := f.Render(&buf, chart.FormatPNG); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join("testdata", "closedloop_golden.png")
	if *cmpimg.GenerateTestData {
		if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run with -regen to create it)", err)
	}
	ok, err := cmpimg.EqualApprox("png", buf.Bytes(), raw, goldenDelta)
	if err != nil {
		t.Fatal(err)
	}
	if !ok {
		t.Errorf("%s differs from the rendered figure", path)
	}
}

func TestClosedLoopMagnitudesBadInput(t *testing.T) {
	good := closedloop.Magnitudes{FrequencyRadPerSec: []float64{1, 2}, Sensitivity: []float64{1, 1}, Complementary: []float64{1, 1}, LoadToOutput: []float64{1, 1}, NoiseToControl: []float64{1, 1}}
	if _, err := chart.ClosedLoopMagnitudes(good, nil, nil); err != nil {
		t.Fatal(err)
	}
	short := good
	short.NoiseToControl = []float64{1}
	zero := good
	zero.FrequencyRadPerSec = []float64{0, 1}
	for _, c := range []struct {
		mag  closedloop.Magnitudes
		set  *chart.ClosedLoopSettings
		want error
	}{
		{closedloop.Magnitudes{}, nil, chart.ErrNoData},
		{short, nil, chart.ErrLength},
		{zero, nil, chart.ErrFrequency},
		{good, &chart.ClosedLoopSettings{SampleTimeSec: -1}, chart.ErrSettings},
	} {
		if _, err := chart.ClosedLoopMagnitudes(c.mag, nil, c.set); !errors.Is(err, c.want) {
			t.Errorf("got %v, want %v", err, c.want)
		}
	}
}

// signalFigures are the load-disturbance response and the control signal
// of the loop of closedLoopFigure, sampled on a fixed grid of 601 points
// over 12 s.
func signalFigures(t *testing.T) (*chart.Figure, *chart.Figure) {
	pid := must(tf.PID{Gain: 3, IntegralTimeSec: 1.2, DerivativeTimeSec: 0.25, DerivativeFilter: 10}.TF())
	fs := must(closedloop.Of(closedloop.Loop{
		Plant:      tf.MustParse("2/((s+1)(s+2)(s+4))"),
		Controller: pid,
		Sensor:     tf.MustParse("1/(0.05s+1)"),
	}, nil))
	m := must(fs.Analyze(nil))
	set := &response.Settings{HorizonSec: 12, StepSec: 0.02}
	load := must(response.Step(fs.Function(closedloop.LoadDisturbance, closedloop.ProcessOutput).TF, set))
	ctrl := must(response.Step(fs.Function(closedloop.Reference, closedloop.Control).TF, set))
	return must(chart.LoadDisturbanceResponse(load, &m.LoadDisturbance, 0, nil)), must(chart.ControlSignal(ctrl, &m.ReferenceControl, nil))
}

func TestSignalGolden(t *testing.T) {
	a, b := signalFigures(t)
	for name, f := range map[string]*chart.Figure{"load_disturbance": a, "control_signal": b} {
		f.DPI = 72
		var buf bytes.Buffer
		if err := f.Render(&buf, chart.FormatPNG); err != nil {
			t.Fatal(err)
		}
		path := filepath.Join("testdata", name+"_golden.png")
		if *cmpimg.GenerateTestData {
			if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		raw, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run with -regen to create it)", err)
		}
		if ok, err := cmpimg.EqualApprox("png", buf.Bytes(), raw, goldenDelta); err != nil || !ok {
			t.Errorf("%s differs from the rendered figure (%v)", path, err)
		}
	}
}
