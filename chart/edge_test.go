package chart_test

import (
	"bytes"
	"testing"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// TestEdgeCases renders degenerate but valid inputs: a lone integrator, a
// double integrator whose locus lies on the imaginary axis, a zero at the
// origin, an unstable discrete plant, a flat response and a response
// without metrics. Each must render without error.
func TestEdgeCases(t *testing.T) {
	render := func(t *testing.T, f *chart.Figure, err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
		for _, format := range []string{chart.FormatSVG, chart.FormatPNG} {
			if err := f.Render(&bytes.Buffer{}, format); err != nil {
				t.Fatalf("%s: %v", format, err)
			}
		}
	}
	t.Run("integrator pole-zero map", func(t *testing.T) {
		f, err := chart.PoleZero(tf.MustParse("1/s"), nil)
		render(t, f, err)
	})
	t.Run("double integrator locus", func(t *testing.T) {
		l, err := locus.Trace(tf.MustParse("1/s^2"), nil)
		if err != nil {
			t.Fatal(err)
		}
		f, err := chart.RootLocus(l, &chart.LocusSettings{PlaneSettings: chart.PlaneSettings{Grid: true}, Mark: &chart.LocusMark{Value: 4}})
		render(t, f, err)
	})
	t.Run("zero at the origin", func(t *testing.T) {
		l, err := locus.Trace(tf.MustParse("s/((s+1)(s+2)(s+3))"), nil)
		if err != nil {
			t.Fatal(err)
		}
		f, err := chart.RootLocus(l, nil)
		render(t, f, err)
	})
	t.Run("unstable discrete plant", func(t *testing.T) {
		f, err := chart.PoleZero(must(tf.ParseDiscrete("(z+0.5)/((z-1.5)(z-0.2))", 0.01)), &chart.PlaneSettings{Grid: true})
		render(t, f, err)
	})
	t.Run("flat response without metrics", func(t *testing.T) {
		f, err := chart.StepResponse(response.Response{TimeSec: []float64{0, 1, 2}, Output: []float64{1, 1, 1}}, nil, nil)
		render(t, f, err)
	})
	t.Run("constant loop frequency response", func(t *testing.T) {
		g := tf.MustParse("0.5")
		r, err := margins.FrequencyResponse(g, []float64{0.1, 1, 10})
		if err != nil {
			t.Fatal(err)
		}
		f, err := chart.FrequencyResponse(r, nil, nil)
		render(t, f, err)
	})
	t.Run("fixed window and explicit grid", func(t *testing.T) {
		f, err := chart.PoleZero(servoLoop(), &chart.PlaneSettings{
			Window:                      &chart.Window{RealMin: -3, RealMax: 1, ImagMin: -2, ImagMax: 2},
			DampingRatios:               []float64{0.5, 0.707},
			NaturalFrequenciesRadPerSec: []float64{1, 2},
		})
		render(t, f, err)
	})
}

// TestDetailPanel checks that Detail adds a zoomed panel only when a small
// group of points near the origin exists, and widens the default figure.
func TestDetailPanel(t *testing.T) {
	f := must(chart.RootLocus(traceLocus(t, stageLoop(), nil), &chart.LocusSettings{PlaneSettings: chart.PlaneSettings{Detail: true}}))
	plain := must(chart.RootLocus(traceLocus(t, stageLoop(), nil), &chart.LocusSettings{PlaneSettings: chart.PlaneSettings{Window: &chart.Window{RealMin: -60, RealMax: 10, ImagMin: -30, ImagMax: 30}}}))
	if len(f.Panels) != 2 || f.WidthCm != plain.WidthCm+10 {
		t.Errorf("stage loop: %d panels, width %g cm; want 2 panels, %g cm (10 cm wider than one panel with its key)", len(f.Panels), f.WidthCm, plain.WidthCm+10)
	}
	if len(f.Panels) == 2 {
		main, detail := f.Panels[0], f.Panels[1]
		// The break points of the stage loop lie within |s| < 4, the fast
		// pole at −50: the detail must be at least six times smaller.
		if 6*(detail.X.Max-detail.X.Min) > main.X.Max-main.X.Min {
			t.Errorf("detail spans %g, main %g: not a zoom", detail.X.Max-detail.X.Min, main.X.Max-main.X.Min)
		}
	}
	// The servo loop has no separate group near the origin.
	f = must(chart.RootLocus(traceLocus(t, servoLoop(), nil), &chart.LocusSettings{PlaneSettings: chart.PlaneSettings{Detail: true}}))
	if len(f.Panels) != 1 {
		t.Errorf("servo loop: %d panels, want 1", len(f.Panels))
	}
}

// TestEmbedFonts checks that an SVG with EmbedFonts carries its fonts.
func TestEmbedFonts(t *testing.T) {
	f := must(chart.PoleZero(servoLoop(), nil))
	f.EmbedFonts = true
	var buf bytes.Buffer
	if err := f.Render(&buf, chart.FormatSVG); err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(buf.Bytes(), []byte("@font-face")) {
		t.Errorf("SVG with EmbedFonts has no @font-face rule")
	}
}
