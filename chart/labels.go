package chart

import (
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// obstacles are the things labels should not cover: curves (polylines)
// and marks (points), in data coordinates.
type obstacles struct {
	curves [][2][]float64
	points [2][]float64
}

func (o *obstacles) addCurve(xs, ys []float64) {
	o.curves = append(o.curves, [2][]float64{xs, ys})
}

func (o *obstacles) addPoint(x, y float64) {
	o.points[0] = append(o.points[0], x)
	o.points[1] = append(o.points[1], y)
}

// canvasPoints returns the obstacles as canvas points no more than step
// apart along each curve, keeping only those inside the data area.
func (o *obstacles) canvasPoints(dc draw.Canvas, p *plot.Plot, step vg.Length) []vg.Point {
	tx, ty := p.Transforms(&dc)
	var out []vg.Point
	add := func(pt vg.Point) {
		if dc.Contains(pt) {
			out = append(out, pt)
		}
	}
	for _, c := range o.curves {
		xs, ys := c[0], c[1]
		var prev vg.Point
		for i := range xs {
			pt := vg.Point{X: tx(xs[i]), Y: ty(ys[i])}
			if i > 0 {
				d := dist(prev, pt)
				if n := int(d / step); n > 0 && n < 10000 {
					for k := 1; k <= n; k++ {
						f := vg.Length(k) / vg.Length(n+1)
						add(vg.Point{X: prev.X + f*(pt.X-prev.X), Y: prev.Y + f*(pt.Y-prev.Y)})
					}
				}
			}
			add(pt)
			prev = pt
		}
	}
	for i := range o.points[0] {
		add(vg.Point{X: tx(o.points[0][i]), Y: ty(o.points[1][i])})
	}
	return out
}

// note is a text label tied to a data point.
type note struct {
	X, Y  float64
	Text  string
	Color color.Color // nil: theme text colour
}

// annotations places notes near their anchors without overlapping each
// other, the obstacles or the edge of the data area. For each note in
// order it tries positions around the anchor at three distances in eight
// directions and keeps the one with the least overlap (a greedy search, as
// in point-feature labelling; see Christensen, Marks and Shieber, "An
// empirical study of algorithms for point-feature label placement", ACM
// Transactions on Graphics 14(3), 1995). A note placed away from its
// anchor gets a thin leader line.
type annotations struct {
	Notes  []note
	Style  text.Style
	Leader draw.LineStyle
	Avoid  *obstacles
}

// placed boxes are kept between plotters of the same panel through this
// shared list, so that a corner box avoids labels and vice versa.
type layout struct {
	boxes []vg.Rectangle // every placed box: keys and labels
	// For tests of the layout: keys are the boxes of symbols and words,
	// labels the text labels, points the obstacles (curve and mark
	// points), area the data area.
	keys, labels []vg.Rectangle
	points       []vg.Point
	area         vg.Rectangle
}

func overlapArea(a, b vg.Rectangle) float64 {
	w := math.Min(float64(a.Max.X), float64(b.Max.X)) - math.Max(float64(a.Min.X), float64(b.Min.X))
	h := math.Min(float64(a.Max.Y), float64(b.Max.Y)) - math.Max(float64(a.Min.Y), float64(b.Min.Y))
	if w <= 0 || h <= 0 {
		return 0
	}
	return w * h
}

func inside(r vg.Rectangle, pt vg.Point) bool {
	return pt.X >= r.Min.X && pt.X <= r.Max.X && pt.Y >= r.Min.Y && pt.Y <= r.Max.Y
}

// outsideArea is the area of r that lies outside the canvas.
func outsideArea(dc draw.Canvas, r vg.Rectangle) float64 {
	sz := r.Size()
	return float64(sz.X*sz.Y) - overlapArea(r, dc.Rectangle)
}

func (a *annotations) plot(dc draw.Canvas, p *plot.Plot, lay *layout) {
	if len(a.Notes) == 0 {
		return
	}
	tx, ty := p.Transforms(&dc)
	var obs []vg.Point
	if a.Avoid != nil {
		obs = a.Avoid.canvasPoints(dc, p, vg.Points(2))
	}
	// Every anchor is itself an obstacle for the other labels.
	anchors := make([]vg.Point, len(a.Notes))
	for i, n := range a.Notes {
		anchors[i] = vg.Point{X: tx(n.X), Y: ty(n.Y)}
	}
	pad := vg.Points(1.5)
	for i, n := range a.Notes {
		at := anchors[i]
		if !dc.Contains(at) {
			continue
		}
		sty := a.Style
		sty.XAlign, sty.YAlign = draw.XLeft, draw.YBottom
		if n.Color != nil {
			sty.Color = n.Color
		}
		size := sty.Rectangle(n.Text).Size()
		w, h := size.X+2*pad, size.Y+2*pad
		best := math.Inf(1)
		var bestBox vg.Rectangle
		var bestDist vg.Length
		for ring, r := range []vg.Length{vg.Points(5), vg.Points(16), vg.Points(30), vg.Points(48)} {
			for k := 0; k < 8; k++ {
				ang := float64(k) * math.Pi / 4
				// Prefer upper right, then the other diagonals.
				s, c := math.Sincos(ang + math.Pi/4)
				cx, cy := at.X+r*vg.Length(c), at.Y+r*vg.Length(s)
				// Align the box so that it grows away from the anchor.
				var x0, y0 vg.Length
				switch {
				case c > 0.3:
					x0 = cx
				case c < -0.3:
					x0 = cx - w
				default:
					x0 = cx - w/2
				}
				switch {
				case s > 0.3:
					y0 = cy
				case s < -0.3:
					y0 = cy - h
				default:
					y0 = cy - h/2
				}
				box := vg.Rectangle{Min: vg.Point{X: x0, Y: y0}, Max: vg.Point{X: x0 + w, Y: y0 + h}}
				score := 50*outsideArea(dc, box) + float64(ring)*30 + float64(k)
				for _, b := range lay.boxes {
					score += 20 * overlapArea(box, b)
				}
				for _, o := range obs {
					if inside(box, o) {
						score += 25
					}
				}
				for j, o := range anchors {
					if j != i && inside(grow(box, vg.Points(4)), o) {
						score += 400
					}
				}
				if score < best {
					best, bestBox, bestDist = score, box, r
				}
			}
		}
		lay.boxes = append(lay.boxes, bestBox)
		lay.labels = append(lay.labels, bestBox)
		if bestDist > vg.Points(8) && a.Leader.Width > 0 {
			// Leader from near the anchor to the nearest point of the box.
			q := vg.Point{X: clampLen(at.X, bestBox.Min.X, bestBox.Max.X), Y: clampLen(at.Y, bestBox.Min.Y, bestBox.Max.Y)}
			d := dist(at, q)
			if d > vg.Points(5) {
				u := vg.Point{X: (q.X - at.X) / d, Y: (q.Y - at.Y) / d}
				start := vg.Point{X: at.X + u.X*vg.Points(4), Y: at.Y + u.Y*vg.Points(4)}
				dc.StrokeLine2(a.Leader, start.X, start.Y, q.X, q.Y)
			}
		}
		dc.FillPolygon(color.NRGBA{R: 255, G: 255, B: 255, A: 0xd8}, rectPoints(bestBox))
		dc.FillText(sty, vg.Point{X: bestBox.Min.X + pad, Y: bestBox.Min.Y + pad}, n.Text)
	}
}

func grow(r vg.Rectangle, d vg.Length) vg.Rectangle {
	return vg.Rectangle{Min: vg.Point{X: r.Min.X - d, Y: r.Min.Y - d}, Max: vg.Point{X: r.Max.X + d, Y: r.Max.Y + d}}
}

func clampLen(v, lo, hi vg.Length) vg.Length {
	if v < lo {
		return lo
	}
	if v > hi {
		return hi
	}
	return v
}

func rectPoints(r vg.Rectangle) []vg.Point {
	return []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}}
}

// keyEntry is one line of a corner box: an optional symbol and a text.
type keyEntry struct {
	Text  string
	Glyph *draw.GlyphStyle // symbol drawn left of the text
	Line  *draw.LineStyle  // short line drawn left of the text
	Fill  color.Color      // small filled square left of the text
}

// cornerBox is a block of lines (a key to the symbols, the margins in
// words, the response figures) put into the corner of the data area where
// it covers the fewest curve points and labels.
type cornerBox struct {
	Entries []keyEntry
	Style   text.Style
	Border  draw.LineStyle
	Avoid   *obstacles
}

// size returns the width and height of the box and whether its entries
// have symbols.
func (b *cornerBox) size() (w, h, lineH vg.Length, hasSym bool) {
	sty := b.Style
	sty.XAlign, sty.YAlign = draw.XLeft, draw.YBottom
	var tw vg.Length
	lineH = sty.Rectangle("Ag").Size().Y * 1.15
	for _, e := range b.Entries {
		if e.Glyph != nil || e.Line != nil || e.Fill != nil {
			hasSym = true
		}
		if wd := sty.Rectangle(e.Text).Size().X; wd > tw {
			tw = wd
		}
	}
	w = tw + 2*keyPad
	if hasSym {
		w += keySym
	}
	h = lineH*vg.Length(len(b.Entries)) + 2*keyPad
	return w, h, lineH, hasSym
}

// keyPad is the inner margin of a box of text, keySym the room for the
// symbol left of each line.
var (
	keyPad = vg.Points(4)
	keySym = vg.Points(14)
)

func (b *cornerBox) plot(dc draw.Canvas, p *plot.Plot, lay *layout) {
	if len(b.Entries) == 0 {
		return
	}
	w, h, _, _ := b.size()
	var obs []vg.Point
	if b.Avoid != nil {
		obs = b.Avoid.canvasPoints(dc, p, vg.Points(2))
	}
	m := vg.Points(4)
	cands := []vg.Rectangle{
		{Min: vg.Point{X: dc.Max.X - m - w, Y: dc.Max.Y - m - h}, Max: vg.Point{X: dc.Max.X - m, Y: dc.Max.Y - m}},
		{Min: vg.Point{X: dc.Min.X + m, Y: dc.Max.Y - m - h}, Max: vg.Point{X: dc.Min.X + m + w, Y: dc.Max.Y - m}},
		{Min: vg.Point{X: dc.Max.X - m - w, Y: dc.Min.Y + m}, Max: vg.Point{X: dc.Max.X - m, Y: dc.Min.Y + m + h}},
		{Min: vg.Point{X: dc.Min.X + m, Y: dc.Min.Y + m}, Max: vg.Point{X: dc.Min.X + m + w, Y: dc.Min.Y + m + h}},
	}
	best := math.Inf(1)
	var box vg.Rectangle
	for k, c := range cands {
		score := float64(k) * 0.5
		for _, o := range obs {
			if inside(grow(c, vg.Points(2)), o) {
				score++
			}
		}
		for _, l := range lay.boxes {
			score += overlapArea(c, l) / 4
		}
		if score < best {
			best, box = score, c
		}
	}
	lay.boxes = append(lay.boxes, box)
	lay.keys = append(lay.keys, box)
	b.drawAt(dc, box)
}

// drawAt draws the box into the rectangle box of dc.
func (b *cornerBox) drawAt(dc draw.Canvas, box vg.Rectangle) {
	sty := b.Style
	sty.XAlign, sty.YAlign = draw.XLeft, draw.YBottom
	_, _, lineH, hasSym := b.size()
	dc.FillPolygon(color.NRGBA{R: 255, G: 255, B: 255, A: 0xeb}, rectPoints(box))
	if b.Border.Width > 0 {
		pts := rectPoints(box)
		dc.StrokeLines(b.Border, append(pts, pts[0]))
	}
	y := box.Max.Y - keyPad - lineH
	for _, e := range b.Entries {
		x := box.Min.X + keyPad
		mid := vg.Point{X: x + keySym/2 - vg.Points(1), Y: y + lineH*0.4}
		switch {
		case e.Glyph != nil:
			dc.DrawGlyphNoClip(*e.Glyph, mid)
		case e.Line != nil:
			dc.StrokeLine2(*e.Line, x, mid.Y, x+keySym-vg.Points(3), mid.Y)
		case e.Fill != nil:
			r := vg.Rectangle{Min: vg.Point{X: x, Y: mid.Y - vg.Points(3.5)}, Max: vg.Point{X: x + keySym - vg.Points(3), Y: mid.Y + vg.Points(3.5)}}
			dc.FillPolygon(e.Fill, rectPoints(r))
		}
		if hasSym {
			x += keySym
		}
		dc.FillText(sty, vg.Point{X: x, Y: y + lineH*0.1}, e.Text)
		y -= lineH
	}
}

// textLayer draws a panel's corner boxes and annotations after all other
// plotters, sharing one layout so that they avoid each other. Corner boxes
// are placed first: they are larger and have only four places to go.
type textLayer struct {
	Boxes []*cornerBox
	Notes []*annotations
	// Avoid, if set, are the obstacles recorded with the layout.
	Avoid *obstacles
	// drawn is the layout of the last drawing, in canvas coordinates.
	drawn layout
}

// Plot implements plot.Plotter.
func (t *textLayer) Plot(dc draw.Canvas, p *plot.Plot) {
	var lay layout
	for _, b := range t.Boxes {
		b.plot(dc, p, &lay)
	}
	for _, n := range t.Notes {
		n.plot(dc, p, &lay)
	}
	if t.Avoid != nil {
		lay.points = t.Avoid.canvasPoints(dc, p, vg.Points(2))
	}
	lay.area = dc.Rectangle
	t.drawn = lay
}
