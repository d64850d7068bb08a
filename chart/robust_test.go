package chart_test

import (
	"bytes"
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/plot/cmpimg"

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

func robustFigures(t *testing.T) map[string]*chart.Figure {
	b, mc := robustBand(t)
	nyq, err := chart.RobustNyquist(b, nil)
	if err != nil {
		t.Fatal(err)
	}
	var panels []chart.HistogramPanel
	for _, q := range []struct {
		title string
		v     []float64
		limit float64
		text  string
	}{
		{"phase margin (deg)", mc.PhaseMarginDeg, 45, "required ≥ 45°"},
		{"delay margin (s)", mc.DelayMarginSec, 0.2, "required ≥ 0.2 s"},
		{"peak sensitivity Ms", mc.PeakSensitivity, 1.4, "required ≤ 1.4"},
		{"gain margin (dB)", mc.GainMarginDB, 0, ""},
	} {
		h, err := robust.NewHistogram(q.v, 20)
		if err != nil {
			t.Fatal(err)
		}
		panels = append(panels, chart.HistogramPanel{Title: q.title, Histogram: h, Limit: q.limit, LimitText: q.text})
	}
	panels[3].Limit = nan()
	hist, err := chart.Histograms(panels, nil)
	if err != nil {
		t.Fatal(err)
	}
	return map[string]*chart.Figure{"robust_nyquist": nyq, "robust_histograms": hist}
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

func nan() float64 { return math.NaN() }

// TestRobustGolden compares the robust figures with images checked by eye
// (regenerate with go test ./chart/ -run RobustGolden -regen).
func TestRobustGolden(t *testing.T) {
	for name, f := range robustFigures(t) {
		t.Run(name, func(t *testing.T) {
			f.DPI = 72
			var buf bytes.Buffer
			if err := f.Render(&buf, chart.FormatPNG); err != nil {
				t.Fatal(err)
			}
			if *outDir != "" {
				if err := f.Save(filepath.Join(*outDir, name+".png")); err != nil {
					t.Fatal(err)
				}
			}
			path := filepath.Join("testdata", name+"_golden.png")
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
				t.Errorf("%s differs from %s", name, path)
			}
		})
	}
}
