package chart

import (
	"fmt"
	"image/color"
	"math"
	"math/cmplx"
	"sort"

	"github.com/loopwise/loopwise/poly"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// valuedPoint is a point of the plane with the label that goes beside it.
type valuedPoint struct {
	At    complex128
	Value float64 // value of the locus variable there
	Label string
}

// planeSpec is everything a complex-plane figure (root locus or pole–zero
// map) may show, already in plain numbers.
type planeSpec struct {
	th          Theme
	size        Size
	title       string
	discrete    bool
	sampleTime  float64
	poles       []poly.Root
	zeros       []poly.Root
	branches    [][]complex128
	colourIndex []int // palette index per branch; nil means the branch index
	hasAsym     bool
	centroid    float64
	anglesDeg   []float64
	breaks      []valuedPoint
	crossings   []valuedPoint
	marked      []complex128
	markedLabel string
	also        [][]complex128 // closed-loop poles at further values (alsoGlyph(i))
	dampings    []float64
	freqs       []float64
	autoGrid    bool
	key         []keyEntry
	artPoles    []poly.Root  // poles of an approximation (Approximation), drawn as artefacts
	artZeros    []poly.Root  // zeros of an approximation
	artName     string       // the approximation's name in the key
	mustSee     []complex128 // points the automatic view must show
	window      *Window      // fixed view; nil = automatic
}

// Style constants of complex-plane figures.
var (
	markRadius = vg.Points(4)
	dashGuide  = []vg.Length{vg.Points(4), vg.Points(3)}
	dotGuide   = []vg.Length{vg.Points(1), vg.Points(2)}
)

// keyPoints returns the points the automatic view frames.
func (s *planeSpec) keyPoints() []complex128 {
	var key []complex128
	for _, r := range s.poles {
		key = append(key, r.Value)
	}
	for _, r := range s.zeros {
		key = append(key, r.Value)
	}
	for _, b := range s.breaks {
		key = append(key, b.At)
	}
	for _, c := range s.crossings {
		key = append(key, c.At)
	}
	key = append(key, s.marked...)
	for _, a := range s.also {
		key = append(key, a...)
	}
	if s.hasAsym && len(s.artPoles)+len(s.artZeros) == 0 {
		// (An approximation's poles and zeros move the centroid: it is
		// not framed then, like them.)
		key = append(key, complex(s.centroid, 0))
	}
	if reach := s.artefactReach(); reach > 0 {
		// With an approximation, frame the region where it is faithful:
		// the points within half the modulus of its nearest pole or zero,
		// and the points the view must show.
		kept := key[:0:0]
		for _, z := range key {
			if cmplx.Abs(z) < reach {
				kept = append(kept, z)
			}
		}
		key = append(kept, s.mustSee...)
	}
	if len(key) == 0 && len(s.branches) > 0 {
		// Nothing special to frame: frame the branches.
		for _, b := range s.branches {
			key = append(key, b...)
		}
	}
	return key
}

// artefactReach returns half the smallest modulus of the approximation's
// poles and zeros (0 without them): the automatic view frames the points
// within it, the region where the approximation is faithful.
func (s *planeSpec) artefactReach() float64 {
	r := math.Inf(1)
	for _, a := range [][]poly.Root{s.artPoles, s.artZeros} {
		for _, z := range a {
			r = math.Min(r, cmplx.Abs(z.Value))
		}
	}
	if math.IsInf(r, 1) {
		return 0
	}
	return r / 2
}

// view returns the axis limits and the number of key points left out of
// view by focus.
func (s *planeSpec) view() (xmin, xmax, ymin, ymax float64, left int) {
	key := s.keyPoints()
	if !s.discrete {
		key, left = focus(key, s.mustSee)
	}
	key = append(key, s.boundedBranchPoints(key)...)
	xmin, xmax, ymin, ymax = planeView(key, s.discrete)
	if w := s.window; w != nil {
		xmin, xmax, ymin, ymax = w.RealMin, w.RealMax, w.ImagMin, w.ImagMax
		left = 0
	}
	return xmin, xmax, ymin, ymax, left
}

// detailGapRatio separates the group of key points nearest the origin
// from the rest for the detail panel: a smaller ratio than focusGapRatio,
// since the far points stay in the main panel.
const detailGapRatio = 2.5

// detailWindow returns the region of the detail panel: the box of the key
// points nearest the origin, up to the first gap of detailGapRatio in
// modulus, padded as planeView pads. ok is false when there is no such
// group or it is not at least six times smaller than the main view.
func (s *planeSpec) detailWindow(xmin, xmax, ymin, ymax float64) (w Window, ok bool) {
	key := s.keyPoints()
	if !s.discrete {
		key, _ = focus(key, s.mustSee)
	}
	sort.Slice(key, func(i, j int) bool { return cmplx.Abs(key[i]) < cmplx.Abs(key[j]) })
	cut := len(key)
	for i := 2; i < len(key); i++ {
		lo, hi := cmplx.Abs(key[i-1]), cmplx.Abs(key[i])
		if lo > 0 && hi > detailGapRatio*lo {
			cut = i
			break
		}
	}
	if cut < 2 || cut == len(key) {
		return w, false
	}
	group := key[:cut]
	group = append(group, s.boundedBranchPoints(group)...)
	x0, x1, y0, y1 := planeView(group, s.discrete)
	if 6*math.Max(x1-x0, y1-y0) > math.Max(xmax-xmin, ymax-ymin) {
		return w, false
	}
	return Window{RealMin: x0, RealMax: x1, ImagMin: y0, ImagMax: y1}, true
}

// crowdFraction: key points closer than this fraction of the larger side
// of the view are crowded — at the default size about 6 pt apart, so
// that their marks (8 pt across) overlap and their labels cannot all sit
// beside them.
const crowdFraction = 0.015

// crowdWindow returns a window around the largest group of crowded key
// points (points linked by distances below crowdFraction of the view),
// padded by half its size, when it is at least four times smaller than
// the view.
func (s *planeSpec) crowdWindow(xmin, xmax, ymin, ymax float64) (w Window, ok bool) {
	key := s.keyPoints()
	if s.hasAsym && len(key) > 0 {
		key = key[:len(key)-1] // the centroid (last): a faint dot, no label
	}
	if !s.discrete {
		key, _ = focus(key, s.mustSee)
	}
	S := math.Max(xmax-xmin, ymax-ymin)
	d := crowdFraction * S
	var pts []complex128
	for _, z := range key {
		dup := false
		for _, q := range pts {
			if cmplx.Abs(z-q) <= 1e-9*S {
				dup = true
				break
			}
		}
		if !dup && real(z) >= xmin && real(z) <= xmax && imag(z) >= ymin && imag(z) <= ymax {
			pts = append(pts, z)
		}
	}
	// Single-linkage groups (union–find over all pairs; a plane has a few
	// dozen key points).
	parent := make([]int, len(pts))
	for i := range parent {
		parent[i] = i
	}
	root := func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	for i := range pts {
		for j := i + 1; j < len(pts); j++ {
			if cmplx.Abs(pts[i]-pts[j]) < d {
				parent[root(i)] = root(j)
			}
		}
	}
	groups := map[int][]complex128{}
	for i, z := range pts {
		groups[root(i)] = append(groups[root(i)], z)
	}
	var best []complex128
	for _, g := range groups {
		if len(g) < 2 {
			continue
		}
		if len(g) > len(best) || (len(g) == len(best) && cmplx.Abs(g[0]) < cmplx.Abs(best[0])) {
			best = g
		}
	}
	if best == nil {
		return w, false
	}
	x0, x1, ya := math.Inf(1), math.Inf(-1), 0.0
	for _, z := range best {
		x0, x1 = math.Min(x0, real(z)), math.Max(x1, real(z))
		ya = math.Max(ya, math.Abs(imag(z)))
	}
	span := math.Max(math.Max(x1-x0, 2*ya), 2*d)
	if !s.discrete && x1 < 0 && -x1 < span {
		x1 = 0 // the imaginary axis is near: show it
		span = math.Max(span, x1-x0)
	}
	pad := 0.5 * span
	w = Window{RealMin: x0 - pad, RealMax: x1 + pad, ImagMin: -(ya + pad), ImagMax: ya + pad}
	if 4*math.Max(w.RealMax-w.RealMin, w.ImagMax-w.ImagMin) > S {
		return w, false
	}
	return w, true
}

// figureWithDetail is figure plus a zoomed second panel to the right when
// set.Detail asks for one and a small group of key points lies near the
// origin, or, unasked, when key points crowd (crowdWindow). The labels of
// points inside the zoomed region are written in the detail panel only.
func (s *planeSpec) figureWithDetail(set *PlaneSettings) (*Figure, error) {
	if set != nil && set.Window != nil {
		return s.figure()
	}
	xmin, xmax, ymin, ymax, _ := s.view()
	var win Window
	ok := false
	if set != nil && set.Detail {
		win, ok = s.detailWindow(xmin, xmax, ymin, ymax)
	}
	if !ok {
		win, ok = s.crowdWindow(xmin, xmax, ymin, ymax)
	}
	if !ok {
		return s.figure()
	}
	main := *s
	main.breaks = unlabelledIn(s.breaks, win)
	main.crossings = unlabelledIn(s.crossings, win)
	f, err := main.figure()
	if err != nil {
		return nil, err
	}
	d := *s
	d.window = &win
	d.key = nil
	d.title = "Detail near the origin"
	if !(win.RealMin < 0 && win.RealMax > 0 && win.ImagMin < 0 && win.ImagMax > 0) {
		v := "s"
		if s.discrete {
			v = "z"
		}
		d.title = fmt.Sprintf("Detail near %s = %s", v, formatNumber((win.RealMin+win.RealMax)/2, 3))
	}
	df, err := d.figure()
	if err != nil {
		return nil, err
	}
	f.panelTitles = []string{"Whole view", d.title}
	f.Panels[0].Add(&outline{W: win, Style: draw.LineStyle{Color: s.th.Axis, Width: vg.Points(0.7), Dashes: []vg.Length{vg.Points(2), vg.Points(2)}}})
	f.Panels = append(f.Panels, df.Panels[0])
	f.layers = append(f.layers, df.layers...)
	f.square[1] = true
	f.cols = 2
	if s.size.WidthCm == 0 {
		f.WidthCm += 10
	}
	return f, nil
}

// unlabelledIn returns vs with the labels of the points inside w removed.
func unlabelledIn(vs []valuedPoint, w Window) []valuedPoint {
	out := append([]valuedPoint(nil), vs...)
	for i, v := range out {
		if real(v.At) >= w.RealMin && real(v.At) <= w.RealMax && imag(v.At) >= w.ImagMin && imag(v.At) <= w.ImagMax {
			out[i].Label = ""
		}
	}
	return out
}

// outline draws the boundary of a window of the plane (the region shown
// in the detail panel).
type outline struct {
	W     Window
	Style draw.LineStyle
}

func (o *outline) Plot(dc draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&dc)
	w := o.W
	pts := []vg.Point{
		{X: tx(w.RealMin), Y: ty(w.ImagMin)}, {X: tx(w.RealMax), Y: ty(w.ImagMin)},
		{X: tx(w.RealMax), Y: ty(w.ImagMax)}, {X: tx(w.RealMin), Y: ty(w.ImagMax)},
		{X: tx(w.RealMin), Y: ty(w.ImagMin)},
	}
	dc.StrokeLines(o.Style, dc.ClipLinesXY(pts)...)
}

func (s *planeSpec) figure() (*Figure, error) {
	th := s.th
	xl, yl := "real part σ (1/s)", "imaginary part ω (rad/s)"
	if s.discrete {
		xl, yl = "real part of z", "imaginary part of z"
	}
	p := newPanel(th, s.title, xl, yl)

	xmin, xmax, ymin, ymax, left := s.view()
	if left > 0 && s.key != nil {
		s.key = append(s.key, keyEntry{Text: fmt.Sprintf("%d far points lie outside this view", left)})
	}

	avoid := &obstacles{}
	// Stable region and its boundary.
	p.Add(&StableRegion{Discrete: s.discrete, Color: th.Stable,
		Boundary: draw.LineStyle{Color: th.Guide, Width: th.GuideWidth}})
	// Real axis as a faint reference.
	p.Add(&hLine{Y: 0, LineStyle: draw.LineStyle{Color: th.Guide, Width: th.GuideWidth * 0.8}})

	// Damping grid, laid out when drawn (the view is final only then).
	gridNotes := &annotations{Style: th.textStyle(th.FontSizeNote*0.95, false, draw.XLeft, draw.YBottom),
		Leader: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.5)}, Avoid: avoid}
	p.Add(&dampingGrid{spec: s, notes: gridNotes})

	// Asymptotes.
	if s.hasAsym && len(s.anglesDeg) > 0 {
		p.Add(&Rays{OriginX: s.centroid, AnglesDeg: append([]float64(nil), s.anglesDeg...),
			LineStyle: asymptoteLine(th)})
		cm, _ := NewMarks([]float64{s.centroid}, []float64{0})
		cm.GlyphStyle = draw.GlyphStyle{Color: th.Axis, Radius: vg.Points(2), Shape: draw.CircleGlyph{}}
		p.Add(cm)
	}

	// Branches, one colour each, with arrows in the direction of increasing
	// gain (the tracer orders points by value).
	pal := Palette()
	for i, b := range s.branches {
		xs, ys := splitComplex(b)
		if len(xs) < 2 {
			continue
		}
		c, err := NewCurve(xs, ys)
		if err != nil {
			return nil, fmt.Errorf("branch %d: %w", i, err)
		}
		ci := i
		if s.colourIndex != nil {
			ci = s.colourIndex[i]
		}
		c.Color = pal[ci%len(pal)]
		c.Width = th.LineWidth
		c.Arrows = 2
		c.ArrowSize = vg.Points(6.5)
		p.Add(c)
		avoid.addCurve(xs, ys)
	}

	// Break points, crossings, marked closed-loop poles, poles and zeros.
	var notes []note
	notes = addValuedMarks(p, s.breaks, breakGlyph(), avoid, notes)
	notes = addValuedMarks(p, s.crossings, crossingGlyph(), avoid, notes)
	if len(s.marked) > 0 {
		xs, ys := splitComplex(s.marked)
		m, _ := NewMarks(xs, ys)
		m.GlyphStyle = markedGlyph()
		p.Add(m)
		for _, z := range s.marked {
			avoid.addPoint(real(z), imag(z))
		}
	}
	for i, a := range s.also {
		if len(a) == 0 {
			continue
		}
		xs, ys := splitComplex(a)
		m, _ := NewMarks(xs, ys)
		m.GlyphStyle = alsoGlyph(i)
		p.Add(m)
		for _, z := range a {
			avoid.addPoint(real(z), imag(z))
		}
	}
	if len(s.poles) > 0 {
		xs, ys, counts := splitRoots(s.poles)
		m, _ := NewMarks(xs, ys)
		m.GlyphStyle = poleGlyph()
		p.Add(m)
		p.Add(&multiplicities{X: xs, Y: ys, N: counts, Style: th.textStyle(th.FontSizeNote, true, draw.XLeft, draw.YBottom)})
		for i := range xs {
			avoid.addPoint(xs[i], ys[i])
		}
	}
	if len(s.zeros) > 0 {
		xs, ys, counts := splitRoots(s.zeros)
		m, _ := NewMarks(xs, ys)
		m.GlyphStyle = zeroGlyph()
		p.Add(m)
		p.Add(&multiplicities{X: xs, Y: ys, N: counts, Style: th.textStyle(th.FontSizeNote, true, draw.XLeft, draw.YBottom)})
		for i := range xs {
			avoid.addPoint(xs[i], ys[i])
		}
	}

	for _, a := range []struct {
		roots []poly.Root
		glyph draw.GlyphStyle
	}{{s.artPoles, artefactPoleGlyph()}, {s.artZeros, artefactZeroGlyph()}} {
		if len(a.roots) == 0 {
			continue
		}
		xs, ys, _ := splitRoots(a.roots)
		m, _ := NewMarks(xs, ys)
		m.GlyphStyle = a.glyph
		p.Add(m)
		for i := range xs {
			avoid.addPoint(xs[i], ys[i])
		}
	}

	layer := &textLayer{Avoid: avoid}
	layer.Notes = append(layer.Notes, &annotations{Notes: notes,
		Style:  th.textStyle(th.FontSizeNote, false, draw.XLeft, draw.YBottom),
		Leader: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.5)}, Avoid: avoid}, gridNotes)
	p.Add(layer)

	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = xmin, xmax, ymin, ymax
	f := newFigure(p, s.size, th)
	f.square[0] = true
	f.layers = append(f.layers, layer)
	if len(s.key) > 0 {
		// The key goes outside the data, right of the panel: a plane has
		// no corner that is sure to be empty (branches, the damping grid
		// and its labels, the shaded region reach every corner).
		f.setSideKey(&cornerBox{Entries: s.key,
			Style:  th.textStyle(th.FontSizeNote, false, draw.XLeft, draw.YBottom),
			Border: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.4)}}, s.size.WidthCm == 0)
	}
	return f, nil
}

// addValuedMarks draws the points of vs with glyph, registers them as
// obstacles for label placement, and appends their labels to notes.
func addValuedMarks(p *plot.Plot, vs []valuedPoint, glyph draw.GlyphStyle, avoid *obstacles, notes []note) []note {
	if len(vs) == 0 {
		return notes
	}
	xs, ys := splitValued(vs)
	m, _ := NewMarks(xs, ys)
	m.GlyphStyle = glyph
	p.Add(m)
	for _, v := range vs {
		if v.Label != "" {
			notes = append(notes, note{X: real(v.At), Y: imag(v.At), Text: v.Label})
		}
		avoid.addPoint(real(v.At), imag(v.At))
	}
	return notes
}

func breakGlyph() draw.GlyphStyle {
	return draw.GlyphStyle{Color: okOrange, Radius: vg.Points(3.2), Shape: diamondGlyph{}}
}

func crossingGlyph() draw.GlyphStyle {
	return draw.GlyphStyle{Color: okVermillion, Radius: vg.Points(3.2), Shape: squareGlyph{}}
}

// alsoGlyph is the mark of the closed-loop poles at the i-th further
// value: a dot like the marked poles (the same thing at another value),
// in sky blue, blue, bluish green, reddish purple in turn.
func alsoGlyph(i int) draw.GlyphStyle {
	cs := []color.Color{okSkyBlue, okBlue, okBluishGreen, okReddishPurple}
	return draw.GlyphStyle{Color: cs[i%len(cs)], Radius: vg.Points(3.4), Shape: dotGlyph{}}
}

func markedGlyph() draw.GlyphStyle {
	return draw.GlyphStyle{Color: okBlack, Radius: vg.Points(3.4), Shape: dotGlyph{}}
}

func asymptoteLine(th Theme) draw.LineStyle {
	return draw.LineStyle{Color: th.Axis, Width: th.GuideWidth, Dashes: dashGuide}
}

// boundedBranchPoints returns the points of the branch arcs that leave
// the real axis and come back to it (a loop between a break-away and a
// break-in point) or end at an open-loop zero in view: bounded parts of the locus
// that the key points alone may not frame. Arcs on their way to infinity
// are left out, and so are points farther than twice the farthest key
// point.
func (s *planeSpec) boundedBranchPoints(key []complex128) []complex128 {
	reach := 0.0
	for _, z := range key {
		reach = math.Max(reach, cmplx.Abs(z))
	}
	if reach == 0 {
		return nil
	}
	tol := 1e-9 * reach
	nearZero := func(z complex128) bool {
		for _, r := range s.zeros {
			// Only zeros in view: an arc on its way to a far zero (of a
			// Padé approximation, say) is like one on its way to infinity.
			if cmplx.Abs(r.Value) <= reach*(1+1e-9) && cmplx.Abs(z-r.Value) <= 1e-3*reach {
				return true
			}
		}
		return false
	}
	var out []complex128
	for _, b := range s.branches {
		start := -1
		for j := 0; j <= len(b); j++ {
			off := j < len(b) && math.Abs(imag(b[j])) > tol
			switch {
			case off && start < 0:
				start = j
			case !off && start >= 0:
				// The arc b[start:j] is off the axis; keep it if it came
				// back to the axis (j < len(b)) or ended at a zero.
				if j < len(b) || nearZero(b[j-1]) {
					for _, z := range b[start:j] {
						if cmplx.Abs(z) <= 2*reach {
							out = append(out, z)
						}
					}
				}
				start = -1
			}
		}
	}
	return out
}

// artefactGrey is the colour of an approximation's poles and zeros: a
// neutral grey, apart from the black of the plant's and the palette of the
// branches.
var artefactGrey = color.NRGBA{R: 0x80, G: 0x80, B: 0x80, A: 0xff}

// artefactPoleGlyph is the mark of an approximation's pole: a small grey +
// (the plant's poles are black ×).
func artefactPoleGlyph() draw.GlyphStyle {
	return draw.GlyphStyle{Color: artefactGrey, Radius: vg.Points(3.5), Shape: draw.PlusGlyph{}}
}

// artefactZeroGlyph is the mark of an approximation's zero: a small grey
// ring (the plant's zeros are larger black rings).
func artefactZeroGlyph() draw.GlyphStyle {
	return draw.GlyphStyle{Color: artefactGrey, Radius: vg.Points(2.8), Shape: draw.RingGlyph{}}
}

func poleGlyph() draw.GlyphStyle {
	return draw.GlyphStyle{Color: okBlack, Radius: markRadius, Shape: crossGlyph{Width: vg.Points(1.5)}}
}

func zeroGlyph() draw.GlyphStyle {
	return draw.GlyphStyle{Color: okBlack, Radius: markRadius, Shape: ringGlyph{Width: vg.Points(1.3)}}
}

func splitComplex(z []complex128) (xs, ys []float64) {
	xs, ys = make([]float64, 0, len(z)), make([]float64, 0, len(z))
	for _, v := range z {
		if cmplx.IsNaN(v) || cmplx.IsInf(v) {
			continue
		}
		xs = append(xs, real(v))
		ys = append(ys, imag(v))
	}
	return xs, ys
}

func splitValued(v []valuedPoint) (xs, ys []float64) {
	for _, p := range v {
		xs = append(xs, real(p.At))
		ys = append(ys, imag(p.At))
	}
	return xs, ys
}

func splitRoots(r []poly.Root) (xs, ys []float64, n []int) {
	for _, p := range r {
		xs = append(xs, real(p.Value))
		ys = append(ys, imag(p.Value))
		n = append(n, p.Multiplicity)
	}
	return xs, ys, n
}

// multiplicities writes the multiplicity of a repeated pole or zero at the
// upper right of its mark.
type multiplicities struct {
	X, Y  []float64
	N     []int
	Style draw.TextStyle
}

func (m *multiplicities) Plot(dc draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&dc)
	for i := range m.X {
		if m.N[i] < 2 {
			continue
		}
		pt := vg.Point{X: tx(m.X[i]) + markRadius + vg.Points(0.5), Y: ty(m.Y[i]) + markRadius*0.4}
		if dc.Contains(pt) {
			dc.FillText(m.Style, pt, fmt.Sprint(m.N[i]))
		}
	}
}

// dampingGrid draws the lines of constant damping and natural frequency
// for the view in force when the panel is drawn, and hands their labels to
// notes, which the text layer places later with the other labels.
type dampingGrid struct {
	spec  *planeSpec
	notes *annotations
}

func (g *dampingGrid) Plot(dc draw.Canvas, p *plot.Plot) {
	parts := g.spec.gridPlotters(p.X.Min, p.X.Max, p.Y.Max)
	for _, c := range parts.curves {
		c.Plot(dc, p)
	}
	g.notes.Notes = parts.notes
}

// gridParts are the curves and labels of a damping grid.
type gridParts struct {
	curves []plot.Plotter
	notes  []note
}

// gridPlotters returns lines of constant damping ratio ζ and arcs of
// constant natural frequency ωn. In continuous time a pole
// s = ωn(−ζ ± j√(1−ζ²)) lies on the ray at angle π ∓ arccos ζ and on the
// circle of radius ωn. In discrete time the same poles map to z = e^(sT),
// so the rays become spirals and the circles closed curves inside the
// unit disc (common practice; see Franklin, Powell and Workman, Digital
// Control of Dynamic Systems, 3rd ed., §4.3, from memory).
func (s *planeSpec) gridPlotters(xmin, xmax, ymax float64) gridParts {
	var out gridParts
	zetas := append([]float64(nil), s.dampings...)
	freqs := append([]float64(nil), s.freqs...)
	if s.autoGrid && len(zetas) == 0 && len(freqs) == 0 {
		zetas = []float64{0.2, 0.4, 0.6, 0.8}
		if s.discrete {
			ny := math.Pi / s.sampleTime
			for _, f := range []float64{0.2, 0.4, 0.6, 0.8} {
				freqs = append(freqs, f*ny)
			}
		} else {
			r := math.Max(math.Abs(xmin), ymax)
			step := niceCeil(r / 4)
			for w := step; w < r*0.999; w += step {
				freqs = append(freqs, w)
			}
		}
	}
	if len(zetas) == 0 && len(freqs) == 0 {
		return out
	}
	sty := draw.LineStyle{Color: s.th.Guide, Width: s.th.GuideWidth * 0.8, Dashes: dotGuide}
	add := func(xs, ys []float64) {
		if c, err := NewCurve(xs, ys); err == nil {
			c.LineStyle = sty
			out.curves = append(out.curves, c)
		}
	}
	if !s.discrete {
		reach := 3 * math.Hypot(math.Max(math.Abs(xmin), math.Abs(xmax)), ymax)
		for _, z := range zetas {
			c := -z
			sn := math.Sqrt(1 - z*z)
			add([]float64{0, reach * c}, []float64{0, reach * sn})
			add([]float64{0, reach * c}, []float64{0, -reach * sn})
			// Label just inside the point where the ray leaves the view.
			t := math.Min(ymax*0.9/sn, math.Abs(xmin)*0.9/math.Max(z, 1e-9))
			out.notes = append(out.notes, note{X: t * c, Y: t * sn, Text: "ζ = " + formatNumber(z, 3), Color: s.th.Axis})
		}
		for _, w := range freqs {
			var xs, ys []float64
			for k := 0; k <= 90; k++ {
				a := math.Pi/2 + float64(k)*math.Pi/90
				sn, c := math.Sincos(a)
				xs = append(xs, w*c)
				ys = append(ys, w*sn)
			}
			add(xs, ys)
			// Label where the arc meets the negative real axis.
			if w < 0.95*math.Abs(xmin) {
				a := math.Pi * 0.97
				sn, c := math.Sincos(a)
				out.notes = append(out.notes, note{X: w * c, Y: w * sn, Text: "ωn = " + formatNumber(w, 3) + " rad/s", Color: s.th.Axis})
			}
		}
		return out
	}
	T := s.sampleTime
	ny := math.Pi / T
	for _, z := range zetas {
		sn := math.Sqrt(1 - z*z)
		var xs, ys, ym []float64
		for k := 0; k <= 200; k++ {
			wn := ny / sn * float64(k) / 200
			zz := cmplx.Exp(complex(-z*wn*T, wn*sn*T))
			xs = append(xs, real(zz))
			ys = append(ys, imag(zz))
			ym = append(ym, -imag(zz))
		}
		add(xs, ys)
		add(xs, ym)
		mid := 120
		out.notes = append(out.notes, note{X: xs[mid], Y: ys[mid], Text: "ζ = " + formatNumber(z, 3), Color: s.th.Axis})
	}
	for _, w := range freqs {
		var xs, ys []float64
		for k := 0; k <= 90; k++ {
			a := math.Pi/2 + float64(k)*math.Pi/180
			sn, c := math.Sincos(a)
			zz := cmplx.Exp(complex(w*c*T, w*sn*T))
			xs = append(xs, real(zz))
			ys = append(ys, imag(zz))
		}
		n := len(xs)
		for k := n - 1; k >= 0; k-- {
			xs = append(xs, xs[k])
			ys = append(ys, -ys[k])
		}
		add(xs, ys)
		out.notes = append(out.notes, note{X: xs[0], Y: ys[0], Text: "ωn = " + formatNumber(w, 3) + " rad/s", Color: s.th.Axis})
	}
	return out
}

func cmplxAbs(z complex128) float64 { return cmplx.Abs(z) }
