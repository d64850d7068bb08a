package chart_test

import (
	"context"
	"errors"
	"testing"

	"github.com/loopwise/loopwise/spec"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/robust"
)

// robustCases builds the two robust figures from a box of this project's
// own pick-and-place scenario, with fixed grids and seed.
func robustBand(t *testing.T) (robust.NyquistBand, robust.SampleResult) {
	t.Helper()
	l, err := robust.NewLoop(robust.Description{Expressions: []string{"9*g/(s^2 (m s + 1))", "(0.4 + 0.3*s)"},
		Params: []robust.Param{{Name: "g", Min: 0.8, Max: 1.2}, {Name: "m", Min: 0.05, Max: 0.08}}})
	if err != nil {
		t.Fatal(err)
	}
	b, err := robust.NyquistBandOf(l, &robust.BandSettings{Curves: 12, Points: 300, Cells: 200, MinRadPerSec: 0.3, MaxRadPerSec: 60})
	if err != nil {
		t.Fatal(err)
	}
	mc, err := robust.MonteCarlo(context.Background(), l, nil, &robust.SampleSettings{Samples: 400, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	return b, mc
}

// robustGoldenCases are the robust figures, compared with their golden
// images by TestGolden.
func robustGoldenCases() []figureCase {
	return []figureCase{
		{name: "robust_nyquist", words: []string{"guaranteed envelope"}, build: func(t *testing.T) *chart.Figure {
			b, _ := robustBand(t)
			return must(chart.RobustNyquist(b, nil))
		}},
		{name: "robust_histograms", words: []string{"phase margin"}, build: func(t *testing.T) *chart.Figure {
			_, mc := robustBand(t)
			req := spec.Requirements{spec.MinPhaseMarginDeg(45), spec.MinDelayMarginSec(0.2), spec.MaxPeakSensitivity(1.4)}
			return must(chart.MarginHistograms(mc, req, 20, nil))
		}},
	}
}

func TestRobustFiguresErrors(t *testing.T) {
	if _, err := chart.RobustNyquist(robust.NyquistBand{}, nil); !errors.Is(err, chart.ErrNoData) {
		t.Errorf("empty band: %v", err)
	}
	if _, err := chart.Histograms(nil, nil); !errors.Is(err, chart.ErrNoData) {
		t.Errorf("no panels: %v", err)
	}
	if _, err := chart.Histograms([]chart.HistogramPanel{{Title: "x"}}, nil); !errors.Is(err, chart.ErrNoData) {
		t.Errorf("empty histogram: %v", err)
	}
}
