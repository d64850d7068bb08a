package chart

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Compile-time checks of the plotter interfaces.
var (
	_ plot.Plotter    = (*Curve)(nil)
	_ plot.DataRanger = (*Curve)(nil)
	_ plot.Plotter    = (*Marks)(nil)
	_ plot.DataRanger = (*Marks)(nil)
	_ plot.Plotter    = (*Rays)(nil)
	_ plot.Plotter    = (*StableRegion)(nil)
	_ plot.Plotter    = (*Band)(nil)
)

// checkXY returns an error naming the input when xs and ys differ in length,
// are empty or hold a NaN or infinite value.
func checkXY(name string, xs, ys []float64) error {
	if len(xs) != len(ys) {
		return fmt.Errorf("%w: %s has %d x values and %d y values", ErrLength, name, len(xs), len(ys))
	}
	if len(xs) == 0 {
		return fmt.Errorf("%w: %s is empty", ErrNoData, name)
	}
	for i := range xs {
		if !finite(xs[i]) || !finite(ys[i]) {
			return fmt.Errorf("%w: %s point %d is (%g, %g)", ErrNotFinite, name, i, xs[i], ys[i])
		}
	}
	return nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func dataRange(xs, ys []float64) (xmin, xmax, ymin, ymax float64) {
	xmin, ymin = math.Inf(1), math.Inf(1)
	xmax, ymax = math.Inf(-1), math.Inf(-1)
	for i := range xs {
		xmin, xmax = math.Min(xmin, xs[i]), math.Max(xmax, xs[i])
		ymin, ymax = math.Min(ymin, ys[i]), math.Max(ymax, ys[i])
	}
	return
}

// Curve is a polyline in data coordinates, clipped to the data area, with
// optional arrowheads showing its direction (the direction of increasing
// gain on a root locus, of increasing frequency on a Nyquist curve).
type Curve struct {
	// X and Y are the points, in order.
	X, Y []float64
	// LineStyle is the style of the line.
	draw.LineStyle
	// Arrows is the number of arrowheads spaced evenly along the visible
	// length of the curve; 0 draws none.
	Arrows int
	// ArrowSize is the length of an arrowhead.
	ArrowSize vg.Length
}

// NewCurve returns a curve through the points (xs[i], ys[i]). The data are
// copied. It returns an error if the lengths differ, the data are empty or
// hold NaN or Inf.
func NewCurve(xs, ys []float64) (*Curve, error) {
	if err := checkXY("curve", xs, ys); err != nil {
		return nil, err
	}
	return &Curve{
		X:         append([]float64(nil), xs...),
		Y:         append([]float64(nil), ys...),
		LineStyle: draw.LineStyle{Color: okBlue, Width: vg.Points(1.4)},
		ArrowSize: vg.Points(6),
	}, nil
}

// DataRange implements plot.DataRanger.
func (c *Curve) DataRange() (xmin, xmax, ymin, ymax float64) { return dataRange(c.X, c.Y) }

// canvasPoints maps the curve to canvas coordinates.
func (c *Curve) canvasPoints(dc draw.Canvas, p *plot.Plot) []vg.Point {
	tx, ty := p.Transforms(&dc)
	pts := make([]vg.Point, len(c.X))
	for i := range c.X {
		pts[i] = vg.Point{X: tx(c.X[i]), Y: ty(c.Y[i])}
	}
	return pts
}

// Plot implements plot.Plotter.
func (c *Curve) Plot(dc draw.Canvas, p *plot.Plot) {
	pts := c.canvasPoints(dc, p)
	if len(pts) < 2 {
		return
	}
	lines := dc.ClipLinesXY(pts)
	dc.StrokeLines(c.LineStyle, lines...)
	if c.Arrows <= 0 {
		return
	}
	// Arc length of the visible parts, then arrowheads at (k+0.5)/n of it.
	var total vg.Length
	for _, l := range lines {
		for i := 1; i < len(l); i++ {
			total += dist(l[i-1], l[i])
		}
	}
	if total < 4*c.ArrowSize {
		return
	}
	for k := 0; k < c.Arrows; k++ {
		target := total * vg.Length(float64(k)+0.5) / vg.Length(c.Arrows)
		var run vg.Length
	search:
		for _, l := range lines {
			for i := 1; i < len(l); i++ {
				d := dist(l[i-1], l[i])
				if run+d >= target && d > 0 {
					f := (target - run) / d
					at := vg.Point{X: l[i-1].X + f*(l[i].X-l[i-1].X), Y: l[i-1].Y + f*(l[i].Y-l[i-1].Y)}
					dir := vg.Point{X: (l[i].X - l[i-1].X) / d, Y: (l[i].Y - l[i-1].Y) / d}
					arrowHead(dc, c.Color, at, dir, c.ArrowSize)
					break search
				}
				run += d
			}
		}
	}
}

func dist(a, b vg.Point) vg.Length {
	return vg.Length(math.Hypot(float64(b.X-a.X), float64(b.Y-a.Y)))
}

// arrowHead fills a narrow triangle whose tip is half its length ahead of
// at, pointing along the unit vector dir.
func arrowHead(dc draw.Canvas, clr color.Color, at, dir vg.Point, size vg.Length) {
	if !dc.Contains(at) {
		return
	}
	nx, ny := -dir.Y, dir.X
	tip := vg.Point{X: at.X + dir.X*size/2, Y: at.Y + dir.Y*size/2}
	base := vg.Point{X: at.X - dir.X*size/2, Y: at.Y - dir.Y*size/2}
	w := size * 0.38
	var path vg.Path
	path.Move(tip)
	path.Line(vg.Point{X: base.X + nx*w, Y: base.Y + ny*w})
	path.Line(vg.Point{X: base.X + dir.X*size*0.15, Y: base.Y + dir.Y*size*0.15})
	path.Line(vg.Point{X: base.X - nx*w, Y: base.Y - ny*w})
	path.Close()
	dc.SetColor(clr)
	dc.Fill(path)
}

// Marks draws a glyph at each point: poles as crosses, zeros as rings,
// closed-loop poles as filled circles. Glyphs outside the data area are not
// drawn.
type Marks struct {
	// X and Y are the points.
	X, Y []float64
	// GlyphStyle is the style of the glyphs.
	draw.GlyphStyle
	// Halo, if positive, draws a white disc of this radius under each glyph
	// so that it stands out on curves drawn before it.
	Halo vg.Length
}

// NewMarks returns marks at the points (xs[i], ys[i]), drawn as crosses
// until GlyphStyle is changed. The data are copied. It returns an error if
// the lengths differ, the data are empty or hold NaN or Inf.
func NewMarks(xs, ys []float64) (*Marks, error) {
	if err := checkXY("marks", xs, ys); err != nil {
		return nil, err
	}
	return &Marks{
		X:          append([]float64(nil), xs...),
		Y:          append([]float64(nil), ys...),
		GlyphStyle: draw.GlyphStyle{Color: okBlack, Radius: vg.Points(4), Shape: crossGlyph{Width: vg.Points(1.3)}},
	}, nil
}

var _ plot.Thumbnailer = (*Marks)(nil)

// DataRange implements plot.DataRanger.
func (m *Marks) DataRange() (xmin, xmax, ymin, ymax float64) { return dataRange(m.X, m.Y) }

// Plot implements plot.Plotter.
func (m *Marks) Plot(dc draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&dc)
	for i := range m.X {
		pt := vg.Point{X: tx(m.X[i]), Y: ty(m.Y[i])}
		if !dc.Contains(pt) {
			continue
		}
		if m.Halo > 0 {
			dc.DrawGlyphNoClip(draw.GlyphStyle{Color: color.White, Radius: m.Halo, Shape: draw.CircleGlyph{}}, pt)
		}
		dc.DrawGlyphNoClip(m.GlyphStyle, pt)
	}
}

// Thumbnail implements plot.Thumbnailer: one glyph in the middle of the
// legend entry.
func (m *Marks) Thumbnail(c *draw.Canvas) {
	c.DrawGlyphNoClip(m.GlyphStyle, c.Center())
}

// crossGlyph is a diagonal cross (×) with a stroke width of its own, so
// that pole marks stay bold when curves are thin.
type crossGlyph struct{ Width vg.Length }

// DrawGlyph implements draw.GlyphDrawer.
func (g crossGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: g.Width})
	r := sty.Radius
	var p vg.Path
	p.Move(vg.Point{X: pt.X - r, Y: pt.Y - r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y + r})
	p.Move(vg.Point{X: pt.X - r, Y: pt.Y + r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y - r})
	c.Stroke(p)
}

// ringGlyph is an open circle (○) with a stroke width of its own and a
// white inside, so that a zero on a branch reads as a zero.
type ringGlyph struct{ Width vg.Length }

// DrawGlyph implements draw.GlyphDrawer.
func (g ringGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	var p vg.Path
	p.Move(vg.Point{X: pt.X + sty.Radius, Y: pt.Y})
	p.Arc(pt, sty.Radius, 0, 2*math.Pi)
	p.Close()
	c.SetColor(color.White)
	c.Fill(p)
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: g.Width})
	c.Stroke(p)
}

// diamondGlyph is a filled diamond with a dark outline (break points).
type diamondGlyph struct{}

// DrawGlyph implements draw.GlyphDrawer.
func (diamondGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := sty.Radius * 1.25
	var p vg.Path
	p.Move(vg.Point{X: pt.X, Y: pt.Y + r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y})
	p.Line(vg.Point{X: pt.X, Y: pt.Y - r})
	p.Line(vg.Point{X: pt.X - r, Y: pt.Y})
	p.Close()
	c.SetColor(sty.Color)
	c.Fill(p)
	c.SetLineStyle(draw.LineStyle{Color: markOutline, Width: vg.Points(0.7)})
	c.Stroke(p)
}

// markOutline is the dark outline of break-point and crossing marks, so
// that they stand out on a branch of their own colour.
var markOutline = color.NRGBA{R: 0x22, G: 0x22, B: 0x22, A: 0xff}

// dotGlyph is a filled circle with a white outline.
type dotGlyph struct{}

// DrawGlyph implements draw.GlyphDrawer.
func (dotGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	var p vg.Path
	p.Move(vg.Point{X: pt.X + sty.Radius, Y: pt.Y})
	p.Arc(pt, sty.Radius, 0, 2*math.Pi)
	p.Close()
	c.SetColor(sty.Color)
	c.Fill(p)
	c.SetLineStyle(draw.LineStyle{Color: color.White, Width: vg.Points(0.6)})
	c.Stroke(p)
}

// squareGlyph is a filled square with a dark outline (axis crossings).
type squareGlyph struct{}

// DrawGlyph implements draw.GlyphDrawer.
func (squareGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := sty.Radius * 0.9
	var p vg.Path
	p.Move(vg.Point{X: pt.X - r, Y: pt.Y - r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y - r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y + r})
	p.Line(vg.Point{X: pt.X - r, Y: pt.Y + r})
	p.Close()
	c.SetColor(sty.Color)
	c.Fill(p)
	c.SetLineStyle(draw.LineStyle{Color: markOutline, Width: vg.Points(0.7)})
	c.Stroke(p)
}

// plusGlyph is an upright cross (+) for the critical point −1.
type plusGlyph struct{ Width vg.Length }

// DrawGlyph implements draw.GlyphDrawer.
func (g plusGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: g.Width})
	r := sty.Radius
	var p vg.Path
	p.Move(vg.Point{X: pt.X - r, Y: pt.Y})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y})
	p.Move(vg.Point{X: pt.X, Y: pt.Y - r})
	p.Line(vg.Point{X: pt.X, Y: pt.Y + r})
	c.Stroke(p)
}

// Rays draws half-lines from a common origin at the given angles, out to
// the edge of the data area (the asymptotes of a root locus).
type Rays struct {
	// OriginX, OriginY is the common start point (the centroid).
	OriginX, OriginY float64
	// AnglesDeg are the directions in degrees, counter-clockwise from the
	// positive real axis.
	AnglesDeg []float64
	// LineStyle is the style of the rays.
	draw.LineStyle
}

// Plot implements plot.Plotter.
func (r *Rays) Plot(dc draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&dc)
	// Long enough to leave any view: twice the diagonal of the axis box
	// plus the distance of the origin from it.
	reach := 2 * (math.Hypot(p.X.Max-p.X.Min, p.Y.Max-p.Y.Min) +
		math.Hypot(r.OriginX-(p.X.Min+p.X.Max)/2, r.OriginY-(p.Y.Min+p.Y.Max)/2))
	for _, a := range r.AnglesDeg {
		s, c := math.Sincos(a * math.Pi / 180)
		// Sample the ray so that clipping works with any axis scale.
		const n = 64
		pts := make([]vg.Point, 0, n+1)
		for k := 0; k <= n; k++ {
			d := reach * float64(k) / n
			pts = append(pts, vg.Point{X: tx(r.OriginX + d*c), Y: ty(r.OriginY + d*s)})
		}
		dc.StrokeLines(r.LineStyle, dc.ClipLinesXY(pts)...)
	}
}

// StableRegion shades the stable region of the complex plane: the open left
// half-plane in continuous time, the inside of the unit circle in discrete
// time.
type StableRegion struct {
	// Discrete selects the unit disc instead of the left half-plane.
	Discrete bool
	// Color is the fill colour; it should be light and translucent.
	Color color.Color
	// Boundary is the style of the boundary (imaginary axis or unit
	// circle); a zero width draws none.
	Boundary draw.LineStyle
}

// Plot implements plot.Plotter.
func (r *StableRegion) Plot(dc draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&dc)
	var poly []vg.Point
	var edge []vg.Point
	if r.Discrete {
		for k := 0; k <= 360; k++ {
			s, c := math.Sincos(float64(k) * math.Pi / 180)
			pt := vg.Point{X: tx(c), Y: ty(s)}
			poly = append(poly, pt)
			edge = append(edge, pt)
		}
	} else {
		x0 := math.Min(p.X.Min, 0)
		y0, y1 := p.Y.Min, p.Y.Max
		poly = []vg.Point{{X: tx(x0), Y: ty(y0)}, {X: tx(0), Y: ty(y0)}, {X: tx(0), Y: ty(y1)}, {X: tx(x0), Y: ty(y1)}}
		edge = []vg.Point{{X: tx(0), Y: ty(y0)}, {X: tx(0), Y: ty(y1)}}
	}
	if r.Color != nil {
		if clipped := dc.ClipPolygonXY(poly); len(clipped) > 2 {
			dc.FillPolygon(r.Color, clipped)
		}
	}
	if r.Boundary.Width > 0 {
		dc.StrokeLines(r.Boundary, dc.ClipLinesXY(edge)...)
	}
}

// Band shades a horizontal band between two values across the whole width
// (the settling band of a step response), with thin edges.
type Band struct {
	// Lo and Hi are the band limits in data units.
	Lo, Hi float64
	// Color is the fill colour.
	Color color.Color
	// Edge is the style of the two edges; a zero width draws none.
	Edge draw.LineStyle
}

// Plot implements plot.Plotter.
func (b *Band) Plot(dc draw.Canvas, p *plot.Plot) {
	_, ty := p.Transforms(&dc)
	y0, y1 := ty(b.Lo), ty(b.Hi)
	poly := []vg.Point{{X: dc.Min.X, Y: y0}, {X: dc.Max.X, Y: y0}, {X: dc.Max.X, Y: y1}, {X: dc.Min.X, Y: y1}}
	if b.Color != nil {
		if c := dc.ClipPolygonY(poly); len(c) > 2 {
			dc.FillPolygon(b.Color, c)
		}
	}
	if b.Edge.Width > 0 {
		for _, y := range []vg.Length{y0, y1} {
			if dc.ContainsY(y) {
				dc.StrokeLine2(b.Edge, dc.Min.X, y, dc.Max.X, y)
			}
		}
	}
}

// hLine and vLine are full-width or full-height guide lines at a data value.
type hLine struct {
	Y float64
	draw.LineStyle
}

func (h *hLine) Plot(dc draw.Canvas, p *plot.Plot) {
	_, ty := p.Transforms(&dc)
	if y := ty(h.Y); dc.ContainsY(y) {
		dc.StrokeLine2(h.LineStyle, dc.Min.X, y, dc.Max.X, y)
	}
}

type vLine struct {
	X float64
	draw.LineStyle
}

func (v *vLine) Plot(dc draw.Canvas, p *plot.Plot) {
	tx, _ := p.Transforms(&dc)
	if x := tx(v.X); dc.ContainsX(x) {
		dc.StrokeLine2(v.LineStyle, x, dc.Min.Y, x, dc.Max.Y)
	}
}

// segment is a straight line between two data points, optionally with
// arrowheads at both ends (a margin shown as a distance).
type segment struct {
	X0, Y0, X1, Y1 float64
	draw.LineStyle
	Heads vg.Length
}

func (s *segment) Plot(dc draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&dc)
	a := vg.Point{X: tx(s.X0), Y: ty(s.Y0)}
	b := vg.Point{X: tx(s.X1), Y: ty(s.Y1)}
	dc.StrokeLines(s.LineStyle, dc.ClipLinesXY([]vg.Point{a, b})...)
	if s.Heads > 0 {
		d := dist(a, b)
		if d < 2.5*s.Heads {
			return
		}
		u := vg.Point{X: (b.X - a.X) / d, Y: (b.Y - a.Y) / d}
		arrowHead(dc, s.Color, vg.Point{X: b.X - u.X*s.Heads/2, Y: b.Y - u.Y*s.Heads/2}, u, s.Heads)
		arrowHead(dc, s.Color, vg.Point{X: a.X + u.X*s.Heads/2, Y: a.Y + u.Y*s.Heads/2}, vg.Point{X: -u.X, Y: -u.Y}, s.Heads)
	}
}

// circle is a circle in data coordinates (unit circle, sensitivity circle).
type circle struct {
	CX, CY, R float64
	draw.LineStyle
	Fill color.Color
}

func (c *circle) Plot(dc draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&dc)
	pts := make([]vg.Point, 0, 361)
	for k := 0; k <= 360; k++ {
		s, co := math.Sincos(float64(k) * math.Pi / 180)
		pts = append(pts, vg.Point{X: tx(c.CX + c.R*co), Y: ty(c.CY + c.R*s)})
	}
	if c.Fill != nil {
		if cl := dc.ClipPolygonXY(pts); len(cl) > 2 {
			dc.FillPolygon(c.Fill, cl)
		}
	}
	if c.Width > 0 {
		dc.StrokeLines(c.LineStyle, dc.ClipLinesXY(pts)...)
	}
}
