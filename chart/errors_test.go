package chart_test

import (
	"bytes"
	"errors"
	"math"
	"path/filepath"
	"sync"
	"testing"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// TestBadInput checks that every kind of bad input gives an error that
// matches the documented sentinel, and no panic.
func TestBadInput(t *testing.T) {
	nan := math.NaN()
	okResp := response.Response{TimeSec: []float64{0, 1, 2}, Output: []float64{0, 0.5, 1}}
	okFreq := margins.Response{FrequencyRadPerSec: []float64{1, 2}, MagnitudeDB: []float64{0, -6}, PhaseDeg: []float64{-90, -120}}
	fig := must(chart.PoleZero(servoLoop(), nil))
	tests := []struct {
		name string
		run  func() error
		want error
	}{
		{"constant transfer function", func() error { _, err := chart.PoleZero(tf.MustNew([]float64{2}, []float64{1}), nil); return err }, chart.ErrNoData},
		{"damping ratio 1", func() error {
			_, err := chart.PoleZero(servoLoop(), &chart.PlaneSettings{DampingRatios: []float64{1}})
			return err
		}, chart.ErrSettings},
		{"negative natural frequency", func() error {
			_, err := chart.PoleZero(servoLoop(), &chart.PlaneSettings{NaturalFrequenciesRadPerSec: []float64{-1}})
			return err
		}, chart.ErrSettings},
		{"empty window", func() error {
			_, err := chart.PoleZero(servoLoop(), &chart.PlaneSettings{Window: &chart.Window{RealMin: 1, RealMax: 1, ImagMin: -1, ImagMax: 1}})
			return err
		}, chart.ErrSettings},
		{"negative width", func() error {
			_, err := chart.PoleZero(servoLoop(), &chart.PlaneSettings{Size: chart.Size{WidthCm: -3}})
			return err
		}, chart.ErrSize},
		{"huge height", func() error {
			_, err := chart.PoleZero(servoLoop(), &chart.PlaneSettings{Size: chart.Size{HeightCm: 1e6}})
			return err
		}, chart.ErrSize},
		{"DPI out of range", func() error {
			_, err := chart.PoleZero(servoLoop(), &chart.PlaneSettings{Size: chart.Size{DPI: 5000}})
			return err
		}, chart.ErrSize},
		{"empty locus", func() error { _, err := chart.RootLocus(locus.Locus{}, nil); return err }, chart.ErrNoData},
		{"NaN on a branch", func() error {
			l := locus.Locus{Branches: []locus.Branch{{Points: []locus.Point{{Value: 0, S: -1}, {Value: 1, S: complex(nan, 0)}}}}}
			_, err := chart.RootLocus(l, nil)
			return err
		}, chart.ErrNotFinite},
		{"NaN mark value", func() error {
			_, err := chart.RootLocus(sweptLocusQuick(), &chart.LocusSettings{Mark: &chart.LocusMark{Value: nan}})
			return err
		}, chart.ErrNotFinite},
		{"empty step response", func() error { _, err := chart.StepResponse(response.Response{}, nil, nil); return err }, chart.ErrNoData},
		{"step lengths differ", func() error {
			_, err := chart.StepResponse(response.Response{TimeSec: []float64{0, 1}, Output: []float64{0}}, nil, nil)
			return err
		}, chart.ErrLength},
		{"NaN sample", func() error {
			_, err := chart.StepResponse(response.Response{TimeSec: []float64{0, 1}, Output: []float64{0, nan}}, nil, nil)
			return err
		}, chart.ErrNotFinite},
		{"NaN final value", func() error {
			_, err := chart.StepResponse(okResp, &response.Metrics{FinalValue: nan}, nil)
			return err
		}, chart.ErrNotFinite},
		{"negative end time", func() error {
			_, err := chart.StepResponse(okResp, nil, &chart.StepSettings{EndTimeSec: -1})
			return err
		}, chart.ErrSettings},
		{"rise levels reversed", func() error {
			_, err := chart.StepResponse(okResp, nil, &chart.StepSettings{Levels: &response.MetricSettings{RiseLowFraction: 0.9, RiseHighFraction: 0.1}})
			return err
		}, chart.ErrSettings},
		{"empty frequency response", func() error { _, err := chart.FrequencyResponse(margins.Response{}, nil, nil); return err }, chart.ErrNoData},
		{"zero frequency", func() error {
			r := okFreq
			r.FrequencyRadPerSec = []float64{0, 1}
			_, err := chart.FrequencyResponse(r, nil, nil)
			return err
		}, chart.ErrFrequency},
		{"frequency lengths differ", func() error {
			r := okFreq
			r.PhaseDeg = []float64{-90}
			_, err := chart.FrequencyResponse(r, nil, nil)
			return err
		}, chart.ErrLength},
		{"negative sample period", func() error {
			_, err := chart.FrequencyResponse(okFreq, nil, &chart.FrequencySettings{SampleTimeSec: -0.1})
			return err
		}, chart.ErrSettings},
		{"empty Nyquist curve", func() error { _, err := chart.Nyquist(margins.Nyquist{}, nil, nil); return err }, chart.ErrNoData},
		{"Nyquist lengths differ", func() error {
			_, err := chart.Nyquist(margins.Nyquist{Positive: []complex128{1, 2}, PositiveFrequencyRadPerSec: []float64{1}}, nil, nil)
			return err
		}, chart.ErrLength},
		{"negative view radius", func() error {
			_, err := chart.Nyquist(margins.Nyquist{Positive: []complex128{1, 2}, PositiveFrequencyRadPerSec: []float64{1, 2}}, nil, &chart.NyquistSettings{ViewRadius: -2})
			return err
		}, chart.ErrSettings},
		{"unknown format", func() error { return fig.Render(&bytes.Buffer{}, "gif") }, chart.ErrFormat},
		{"unknown extension", func() error { return fig.Save(filepath.Join(t.TempDir(), "x.bmp")) }, chart.ErrFormat},
		{"empty figure", func() error { return (&chart.Figure{}).Render(&bytes.Buffer{}, chart.FormatSVG) }, chart.ErrNoData},
		{"nil figure", func() error { var f *chart.Figure; return f.Render(&bytes.Buffer{}, chart.FormatSVG) }, chart.ErrNoData},
		{"zero-size figure", func() error {
			f := *fig
			f.WidthCm = 0
			return f.Render(&bytes.Buffer{}, chart.FormatPNG)
		}, chart.ErrSize},
		{"curve lengths differ", func() error { _, err := chart.NewCurve([]float64{1, 2}, []float64{1}); return err }, chart.ErrLength},
		{"empty curve", func() error { _, err := chart.NewCurve(nil, nil); return err }, chart.ErrNoData},
		{"infinite mark", func() error { _, err := chart.NewMarks([]float64{math.Inf(1)}, []float64{0}); return err }, chart.ErrNotFinite},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			err := test.run()
			if !errors.Is(err, test.want) {
				t.Errorf("error %v, want one matching %v", err, test.want)
			}
		})
	}
}

// sweptLocusQuick is a tiny valid locus for settings checks.
func sweptLocusQuick() locus.Locus {
	return locus.Locus{Branches: []locus.Branch{{Points: []locus.Point{{Value: 0, S: -1}, {Value: 1, S: -2}}}}}
}

// TestDeterministic renders the same figure twice in each format and
// requires the same bytes (the golden images depend on it), and checks that
// rendering leaves the axis ranges of the panels as they were.
func TestDeterministic(t *testing.T) {
	f := must(chart.RootLocus(must(locus.Trace(servoLoop(), nil)), nil))
	p := f.Panels[0]
	x0, x1, y0, y1 := p.X.Min, p.X.Max, p.Y.Min, p.Y.Max
	for _, format := range []string{chart.FormatSVG, chart.FormatPNG} {
		var a, b bytes.Buffer
		if err := f.Render(&a, format); err != nil {
			t.Fatal(err)
		}
		if err := f.Render(&b, format); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(a.Bytes(), b.Bytes()) {
			t.Errorf("%s output differs between two renderings", format)
		}
	}
	if p.X.Min != x0 || p.X.Max != x1 || p.Y.Min != y0 || p.Y.Max != y1 {
		t.Errorf("rendering changed the axis ranges: [%g, %g]×[%g, %g] became [%g, %g]×[%g, %g]",
			x0, x1, y0, y1, p.X.Min, p.X.Max, p.Y.Min, p.Y.Max)
	}
}

// TestConcurrent builds and renders figures from several goroutines (run
// with -race to check the shared font handler).
func TestConcurrent(t *testing.T) {
	var wg sync.WaitGroup
	errs := make(chan error, 4)
	for i := 0; i < 4; i++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			f, err := chart.PoleZero(servoLoop(), &chart.PlaneSettings{Grid: true})
			if err == nil {
				err = f.Render(&bytes.Buffer{}, chart.FormatPNG)
			}
			errs <- err
		}()
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		if err != nil {
			t.Error(err)
		}
	}
}

// TestInputsNotModified checks that the figure functions copy their input.
func TestInputsNotModified(t *testing.T) {
	xs, ys := []float64{1, 2, 3}, []float64{4, 5, 6}
	c := must(chart.NewCurve(xs, ys))
	c.X[0], c.Y[0] = 100, 100
	if xs[0] != 1 || ys[0] != 4 {
		t.Errorf("NewCurve shares its input slices")
	}
	r := response.Response{TimeSec: []float64{0, 1, 2}, Output: []float64{0, 0.8, 1}}
	m := response.Metrics{FinalValue: 1, RiseTimeSec: 0.5, RiseStartSec: 0.2, RiseEndSec: 0.7, SettlingTimeSec: 1.5,
		PeakValue: math.NaN(), PeakTimeSec: math.NaN(), UndershootValue: math.NaN(), UndershootTimeSec: math.NaN()}
	f := must(chart.StepResponse(r, &m, nil))
	if err := f.Render(&bytes.Buffer{}, chart.FormatSVG); err != nil {
		t.Fatal(err)
	}
	if r.Output[1] != 0.8 || r.TimeSec[2] != 2 {
		t.Errorf("StepResponse changed its input")
	}
}
