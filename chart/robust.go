package chart

import (
	"fmt"
	"image/color"
	"math"
	"math/cmplx"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/loopwise/loopwise/robust"
	"github.com/loopwise/loopwise/spec"
)

// RobustNyquist draws the Nyquist curves of an uncertain loop's box
// (robust.NyquistBandOf): the guaranteed envelope as light rectangles (every
// curve of the box, at every frequency of the band's range, lies inside
// them), the sampled curves as thin lines (the centre of the box thicker),
// the unit circle and the critical point −1. The view frames the critical
// region (ViewRadius around the origin if set, else the curves up to
// |L| = 3). The settings' Title defaults to "Nyquist curves over the
// parameter box".
//
// Errors: ErrNoData when the band has no curve, ErrSettings and ErrSize.
func RobustNyquist(b robust.NyquistBand, set *NyquistSettings) (*Figure, error) {
	if err := set.check(); err != nil {
		return nil, err
	}
	if len(b.Curves) == 0 {
		return nil, fmt.Errorf("%w: the band has no curve", ErrNoData)
	}
	th, size, viewR, p := set.panel("Nyquist curves over the parameter box")
	avoid := &obstacles{}
	p.Add(&hLine{Y: 0, LineStyle: draw.LineStyle{Color: th.Guide, Width: th.GuideWidth * 0.8}})
	p.Add(&vLine{X: 0, LineStyle: draw.LineStyle{Color: th.Guide, Width: th.GuideWidth * 0.8}})

	const reach = 3.0
	// Opaque: overlapping cells must not darken each other. Sky blue at
	// 30 % on white.
	envFill := color.NRGBA{R: 0xcc, G: 0xe8, B: 0xf8, A: 0xff}
	cells := &rectangles{Fill: envFill}
	for _, c := range b.Envelope {
		if !finite(c.ReMin) || !finite(c.ReMax) || !finite(c.ImMin) || !finite(c.ImMax) {
			continue
		}
		cells.R = append(cells.R, [4]float64{c.ReMin, c.ReMax, c.ImMin, c.ImMax})
	}
	p.Add(cells)
	guide := th.guideLine(dotGuide...)
	p.Add(&circle{R: 1, LineStyle: guide})

	xmin, xmax, ymin, ymax := -1.2, 0.2, -1.2, 0.2
	sampled := draw.LineStyle{Color: alpha(okBlue, 0x90), Width: th.LineWidth * 0.5}
	centre := draw.LineStyle{Color: okBlue, Width: th.LineWidth}
	for i := len(b.Curves) - 1; i >= 0; i-- {
		var xs, ys []float64
		flush := func() {
			if len(xs) > 1 {
				c, _ := NewCurve(xs, ys)
				c.LineStyle = sampled
				if i == 0 {
					c.LineStyle = centre
					c.Arrows, c.ArrowSize = 2, vg.Points(6)
				}
				p.Add(c)
				avoid.addCurve(xs, ys)
			}
			xs, ys = nil, nil
		}
		for _, z := range b.Curves[i] {
			if cmplx.IsInf(z) || cmplx.IsNaN(z) {
				flush()
				continue
			}
			xs, ys = append(xs, real(z)), append(ys, imag(z))
			if cmplx.Abs(z) <= reach {
				xmin, xmax = math.Min(xmin, real(z)), math.Max(xmax, real(z))
				ymin, ymax = math.Min(ymin, imag(z)), math.Max(ymax, imag(z))
			}
		}
		flush()
	}
	crit, _ := NewMarks([]float64{-1}, []float64{0})
	crit.GlyphStyle = draw.GlyphStyle{Color: okBlack, Radius: vg.Points(5), Shape: plusGlyph{Width: vg.Points(1.6)}}
	crit.Halo = vg.Points(3)
	p.Add(crit)
	avoid.addPoint(-1, 0)
	if viewR > 0 {
		xmin, xmax, ymin, ymax = -viewR, viewR, -viewR, viewR
	} else {
		padX, padY := 0.08*(xmax-xmin), 0.08*(ymax-ymin)
		xmin, xmax, ymin, ymax = xmin-padX, xmax+padX, ymin-padY, ymax+padY
	}
	lo, hi := 0.0, 0.0
	if len(b.Envelope) > 0 {
		lo, hi = b.Envelope[0].OmegaLoRadPerSec, b.Envelope[len(b.Envelope)-1].OmegaHiRadPerSec
	}
	box := []keyEntry{
		{Text: "centre of the box", Line: &centre},
		{Text: fmt.Sprintf("%d sampled parameter points (centre, corners, random)", len(b.Curves)), Line: &sampled},
		{Text: fmt.Sprintf("guaranteed envelope for %s to %s rad/s", formatNumber(lo, 3), formatNumber(hi, 3)), Fill: envFill},
		{Text: "unit circle (|L| = 1)", Line: &guide},
	}
	layer := &textLayer{}
	noteStyle := th.textStyle(th.FontSizeNote, false, draw.XLeft, draw.YBottom)
	layer.Boxes = append(layer.Boxes, &cornerBox{Entries: box, Style: noteStyle,
		Border: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.4)}, Avoid: avoid})
	layer.Notes = append(layer.Notes, &annotations{Notes: []note{{X: -1, Y: 0, Text: "−1"}}, Style: noteStyle,
		Leader: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.5)}, Avoid: avoid})
	p.Add(layer)
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = xmin, xmax, ymin, ymax
	f := newFigure(p, size, th)
	f.square[0] = true
	return f, nil
}

// panel resolves the settings' theme, size and view radius and returns the
// complex-plane panel of a Nyquist figure with the given default title
// (shared by Nyquist and RobustNyquist).
func (s *NyquistSettings) panel(defaultTitle string) (th Theme, size Size, viewR float64, p *plot.Plot) {
	th, title := DefaultTheme(), defaultTitle
	if s != nil {
		if s.Theme != nil {
			th = s.Theme.withDefaults()
		}
		if s.Title != "" {
			title = s.Title
		}
		size, viewR = s.Size, s.ViewRadius
	}
	return th, size, viewR, newPanel(th, title, "real part of L", "imaginary part of L")
}

// rectangles fills axis-aligned rectangles given as [xmin, xmax, ymin, ymax].
type rectangles struct {
	R    [][4]float64
	Fill color.Color
}

// Plot implements plot.Plotter.
func (r *rectangles) Plot(dc draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&dc)
	if r.Fill == nil {
		return
	}
	for _, q := range r.R {
		pts := []vg.Point{{X: tx(q[0]), Y: ty(q[2])}, {X: tx(q[1]), Y: ty(q[2])}, {X: tx(q[1]), Y: ty(q[3])}, {X: tx(q[0]), Y: ty(q[3])}}
		if c := dc.ClipPolygonXY(pts); len(c) > 2 {
			dc.FillPolygon(r.Fill, c)
		}
	}
}

// HistogramPanel is one histogram of a margin over samples.
type HistogramPanel struct {
	// Title names the quantity with its unit ("phase margin (deg)").
	Title string
	// Histogram holds the counts (robust.NewHistogram).
	Histogram robust.Histogram
	// Limit, if finite, is a requirement's limit, drawn as a vertical line.
	Limit float64
	// LimitText names the limit ("required ≥ 45°").
	LimitText string
}

// HistogramSettings controls Histograms. A nil *HistogramSettings means the
// defaults.
type HistogramSettings struct {
	// Size is the output size; its zero value gives 22 × 14 cm at 150 dpi.
	Size
	// Theme is the look. If nil, defaults to DefaultTheme().
	Theme *Theme
	// Title is written above the panels. If empty, "Margins over the
	// sampled parameter points".
	Title string
}

// Histograms draws one bar chart per panel, two panels per row: the counts
// of samples per bin, a requirement limit as a vermillion line, and under
// each panel how many samples were left out (undefined or infinite).
//
// Errors: ErrNoData without panels or with a panel without bins, ErrSettings
// and ErrSize.
func Histograms(panels []HistogramPanel, set *HistogramSettings) (*Figure, error) {
	if len(panels) == 0 {
		return nil, fmt.Errorf("%w: no histogram", ErrNoData)
	}
	th := DefaultTheme()
	title := "Margins over the sampled parameter points"
	var size Size
	if set != nil {
		if err := set.Size.check(); err != nil {
			return nil, err
		}
		if set.Theme != nil {
			th = set.Theme.withDefaults()
		}
		if set.Title != "" {
			title = set.Title
		}
		size = set.Size
	}
	if size.WidthCm == 0 {
		size.WidthCm = 22
	}
	if size.HeightCm == 0 {
		size.HeightCm = 7 * float64((len(panels)+1)/2)
	}
	var plots []*plot.Plot
	var notes []string
	for _, hp := range panels {
		h := hp.Histogram
		if len(h.Counts) == 0 || len(h.Edges) != len(h.Counts)+1 {
			return nil, fmt.Errorf("%w: histogram %q has %d bins and %d edges", ErrNoData, hp.Title, len(h.Counts), len(h.Edges))
		}
		p := newPanel(th, hp.Title, "", "samples")
		bars := &rectangles{Fill: alpha(okBlue, 0xc0)}
		top := 1.0
		for k, c := range h.Counts {
			bars.R = append(bars.R, [4]float64{h.Edges[k], h.Edges[k+1], 0, float64(c)})
			top = math.Max(top, float64(c))
		}
		p.Add(bars)
		xmin, xmax := h.Edges[0], h.Edges[len(h.Edges)-1]
		if finite(hp.Limit) {
			p.Add(&vLine{X: hp.Limit, LineStyle: draw.LineStyle{Color: okVermillion, Width: vg.Points(1.2), Dashes: dashGuide}})
			xmin, xmax = math.Min(xmin, hp.Limit), math.Max(xmax, hp.Limit)
			if hp.LimitText != "" {
				layer := &textLayer{}
				layer.Notes = append(layer.Notes, &annotations{Notes: []note{{X: hp.Limit, Y: top * 0.9, Text: hp.LimitText, Color: okVermillion}},
					Style: th.textStyle(th.FontSizeNote, false, draw.XLeft, draw.YBottom), Leader: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.5)}, Avoid: &obstacles{}})
				p.Add(layer)
			}
		}
		pad := 0.04 * (xmax - xmin)
		p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = xmin-pad, xmax+pad, 0, top*1.08
		plots = append(plots, p)
		if h.Excluded > 0 {
			notes = append(notes, fmt.Sprintf("%s: %d samples left out (undefined or infinite)", hp.Title, h.Excluded))
		}
	}
	first := plots[0].Title.Text
	f := newFigure(plots[0], size, th)
	plots[0].Title.Text = first // newFigure moves it to the figure title
	f.Panels = plots
	f.Title = title
	f.Notes = notes
	if len(plots) > 1 {
		f.cols = 2
	}
	return f, nil
}

// MarginHistograms draws Histograms of the phase margin, gain margin, delay
// margin and peak sensitivity of a Monte Carlo or grid sweep (bins equal
// bins each), with the limit of each requirement in req that bounds one of
// them.
//
// Errors: those of robust.NewHistogram and Histograms.
func MarginHistograms(r robust.SampleResult, req spec.Requirements, bins int, set *HistogramSettings) (*Figure, error) {
	limits := map[string]spec.Requirement{}
	for _, q := range req {
		limits[q.Key()] = q
	}
	var panels []HistogramPanel
	for _, q := range []struct {
		title, key string
		v          []float64
	}{
		{"phase margin (deg)", "min_phase_margin_deg", r.PhaseMarginDeg},
		{"gain margin (dB)", "min_gain_margin_db", r.GainMarginDB},
		{"delay margin (s)", "min_delay_margin_sec", r.DelayMarginSec},
		{"peak sensitivity Ms", "max_peak_sensitivity", r.PeakSensitivity},
	} {
		h, err := robust.NewHistogram(q.v, bins)
		if err != nil {
			return nil, err
		}
		p := HistogramPanel{Title: q.title, Histogram: h, Limit: math.NaN()}
		if lim, ok := limits[q.key]; ok {
			p.Limit, p.LimitText = lim.Limit(), "limit: "+lim.String()
		}
		panels = append(panels, p)
	}
	return Histograms(panels, set)
}
