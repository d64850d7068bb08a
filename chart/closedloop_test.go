package chart_test

import (
	"errors"
	"testing"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/closedloop"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
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

// TestClosedLoopGolden compares the figures with the images checked by eye
// (regenerate with -regen, as TestGolden).
func TestClosedLoopGolden(t *testing.T) {
	checkGolden(t, "closedloop", closedLoopFigure(t))
	load, ctrl := signalFigures(t)
	checkGolden(t, "load_disturbance", load)
	checkGolden(t, "control_signal", ctrl)
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
