package chart

import (
	"fmt"
	"image/color"
	"math"

	"github.com/loopwise/loopwise/design"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ParameterPlaneSettings controls ParameterPlane. A nil value means the
// defaults.
type ParameterPlaneSettings struct {
	// Size is the output size. Its zero value gives 16 × 12 cm at 150 dpi.
	Size
	// Theme is the look. If nil, defaults to DefaultTheme().
	Theme *Theme
	// Title is the panel title. If empty, defaults to "Stability and
	// requirements in the plane of X and Y".
	Title string
	// Nominal, if not nil, is the nominal point (x, y), marked with a
	// filled diamond.
	Nominal *[2]float64
	// FrequencyLabels is the number of points of each crossing curve
	// labelled with their frequency, 0 to 20. If zero, defaults to 4; use
	// −1 for none.
	FrequencyLabels int
}

// ParameterPlane draws the D-partition of a plane of two parameters: the
// stable regions shaded, the other regions labelled with their number of
// unstable closed-loop roots, the boundary curves (crossing curve with the
// frequency written at a few points, real-root and degree-drop lines), the
// requirement boundaries dashed, the region where every requirement holds
// hatched in orange, and the nominal point.
func ParameterPlane(pp design.PlanePartition, set *ParameterPlaneSettings) (*Figure, error) {
	var s ParameterPlaneSettings
	if set != nil {
		s = *set
	}
	if err := s.Size.check(); err != nil {
		return nil, err
	}
	if s.FrequencyLabels < -1 || s.FrequencyLabels > 20 {
		return nil, fmt.Errorf("%w: FrequencyLabels = %d, want −1…20", ErrSettings, s.FrequencyLabels)
	}
	if len(pp.Regions) == 0 {
		return nil, fmt.Errorf("%w: the partition has no regions", ErrNoData)
	}
	th := DefaultTheme()
	if s.Theme != nil {
		th = s.Theme.withDefaults()
	}
	title := s.Title
	if title == "" {
		title = fmt.Sprintf("Stability and requirements in the plane of %s and %s", pp.X, pp.Y)
	}
	p := newPanel(th, title, pp.X, pp.Y)
	p.X.Min, p.X.Max = pp.XRange.Min, pp.XRange.Max
	p.Y.Min, p.Y.Max = pp.YRange.Min, pp.YRange.Max

	stableFill := color.NRGBA{R: 0x00, G: 0x9e, B: 0x73, A: 0x40}
	for _, r := range pp.Regions {
		if r.UnstableRoots != 0 {
			continue
		}
		if poly, err := plotter.NewPolygon(xys(r.Polygon)); err == nil {
			poly.Color = stableFill
			poly.LineStyle.Width = 0
			p.Add(poly)
		}
	}
	// Region where every requirement holds.
	for _, rr := range pp.RequirementRegions {
		if rr.Key != "all" {
			continue
		}
		for _, g := range rr.Regions {
			if poly, err := plotter.NewPolygon(xys(g)); err == nil {
				poly.Color = color.NRGBA{R: 0xe6, G: 0x9f, B: 0x00, A: 0x59}
				poly.LineStyle = draw.LineStyle{Color: okOrange, Width: vg.Points(0.8)}
				p.Add(poly)
			}
		}
	}
	var notes []string
	// Boundaries.
	pal := []color.Color{okReddishPurple, okSkyBlue, okOrange, okVermillion}
	reqColour := map[string]color.Color{}
	for _, b := range pp.Boundaries {
		style := draw.LineStyle{Color: okBlue, Width: th.LineWidth}
		switch {
		case hasPrefix(b.Kind, "imaginary-axis") || hasPrefix(b.Kind, "unit-circle"):
		case hasPrefix(b.Kind, "real root"):
			style.Color = okVermillion
		case hasPrefix(b.Kind, "degree drop"), hasPrefix(b.Kind, "singular"):
			style.Color = okBlack
			style.Dashes = []vg.Length{vg.Points(2), vg.Points(2)}
		default: // requirement boundaries
			c, ok := reqColour[b.Kind]
			if !ok {
				c = pal[len(reqColour)%len(pal)]
				reqColour[b.Kind] = c
			}
			style = draw.LineStyle{Color: c, Width: th.LineWidth * 0.8, Dashes: []vg.Length{vg.Points(5), vg.Points(3)}}
		}
		l, err := plotter.NewLine(xys(b.Points))
		if err != nil {
			continue
		}
		l.LineStyle = style
		p.Add(l)
	}
	// Frequency labels on the crossing curves.
	nl := s.FrequencyLabels
	if nl == 0 {
		nl = 4
	}
	var lx, ly []float64
	var lt []string
	for _, b := range pp.Boundaries {
		if nl < 0 || !(hasPrefix(b.Kind, "imaginary-axis") || hasPrefix(b.Kind, "unit-circle")) || len(b.Points) < 3 {
			continue
		}
		// Evenly spaced along the curve (in axis-relative units).
		sx, sy := pp.XRange.Max-pp.XRange.Min, pp.YRange.Max-pp.YRange.Min
		arc := []float64{0}
		for i := 1; i < len(b.Points); i++ {
			arc = append(arc, arc[i-1]+math.Hypot((b.Points[i][0]-b.Points[i-1][0])/sx, (b.Points[i][1]-b.Points[i-1][1])/sy))
		}
		j := 0
		for k := 1; k <= nl; k++ {
			target := arc[len(arc)-1] * float64(k) / float64(nl+1)
			for j < len(arc)-1 && arc[j] < target {
				j++
			}
			i := j
			w := b.FrequencyRadPerSec[i]
			if math.IsNaN(w) {
				continue
			}
			lx = append(lx, b.Points[i][0])
			ly = append(ly, b.Points[i][1])
			lt = append(lt, "ω = "+formatNumber(w, 3))
		}
	}
	if len(lx) > 0 {
		m, _ := NewMarks(lx, ly)
		m.GlyphStyle = draw.GlyphStyle{Color: okBlue, Radius: vg.Points(1.8), Shape: draw.CircleGlyph{}}
		p.Add(m)
		addLabels(p, th, lx, ly, lt, vg.Points(3), okBlue)
	}
	// Unstable-root counts at the middle of each region.
	var cx, cy []float64
	var ct []string
	for _, r := range pp.Regions {
		n := len(r.Polygon) - 1
		if n < 2 {
			continue
		}
		rows := n / 2
		i := rows / 2
		left, right := r.Polygon[i], r.Polygon[n-1-i]
		if math.Abs(right[0]-left[0]) < 0.04*(pp.XRange.Max-pp.XRange.Min) || rows < 3 {
			continue // too small to label
		}
		cx = append(cx, (left[0]+right[0])/2)
		cy = append(cy, left[1])
		if r.UnstableRoots == 0 {
			ct = append(ct, "stable")
		} else {
			ct = append(ct, fmt.Sprintf("%d unstable", r.UnstableRoots))
		}
	}
	addLabels(p, th, cx, cy, ct, 0, th.Text)
	if s.Nominal != nil {
		m, err := NewMarks([]float64{s.Nominal[0]}, []float64{s.Nominal[1]})
		if err == nil {
			m.GlyphStyle = draw.GlyphStyle{Color: okBlack, Radius: vg.Points(3.5), Shape: draw.PyramidGlyph{}}
			p.Add(m)
			addLabels(p, th, []float64{s.Nominal[0]}, []float64{s.Nominal[1]}, []string{"nominal"}, vg.Points(5), okBlack)
		}
	}
	notes = append(notes, "Shaded green: stable; blue: a closed-loop root on the stability boundary (ω at the dots); vermillion: a real root at the boundary; dashed black: degree drop.")
	for _, b := range pp.Boundaries {
		if c, ok := reqColour[b.Kind]; ok && c != nil {
			notes = append(notes, fmt.Sprintf("Dashed %s: %s.", colourName(c), b.Kind))
			reqColour[b.Kind] = nil
		}
	}
	for _, rr := range pp.RequirementRegions {
		if rr.Key == "all" {
			notes = append(notes, "Orange: every requirement holds and the loop is stable.")
		}
	}
	f := newFigure(p, s.Size, th)
	f.Notes = notes
	return f, nil
}

func hasPrefix(s, p string) bool { return len(s) >= len(p) && s[:len(p)] == p }

func colourName(c color.Color) string {
	switch c {
	case okReddishPurple:
		return "reddish purple"
	case okSkyBlue:
		return "sky blue"
	case okOrange:
		return "orange"
	case okVermillion:
		return "vermillion"
	}
	return "line"
}

func xys(pts [][2]float64) plotter.XYs {
	out := make(plotter.XYs, len(pts))
	for i, p := range pts {
		out[i].X, out[i].Y = p[0], p[1]
	}
	return out
}

// addLabels writes texts at data points, offset to the right.
func addLabels(p *plot.Plot, th Theme, xs, ys []float64, ts []string, dx vg.Length, c color.Color) {
	if len(xs) == 0 {
		return
	}
	xy := make(plotter.XYs, len(xs))
	for i := range xs {
		xy[i].X, xy[i].Y = xs[i], ys[i]
	}
	l, err := plotter.NewLabels(plotter.XYLabels{XYs: xy, Labels: ts})
	if err != nil {
		return
	}
	st := th.textStyle(th.FontSizeNote, false, draw.XLeft, draw.YCenter)
	if dx == 0 {
		st = th.textStyle(th.FontSizeNote, false, draw.XCenter, draw.YCenter)
	}
	st.Color = c
	for i := range l.TextStyle {
		l.TextStyle[i] = st
	}
	l.Offset = vg.Point{X: dx}
	p.Add(l)
}
