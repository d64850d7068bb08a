package chart

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/margins"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// NyquistSettings controls Nyquist. A nil *NyquistSettings means the
// defaults.
type NyquistSettings struct {
	// Size is the output size. Its zero value gives 16 × 12 cm at 150 dpi.
	Size
	// Theme is the look. If nil, defaults to DefaultTheme().
	Theme *Theme
	// Title is the panel title. If empty, defaults to "Nyquist curve of
	// the loop".
	Title string
	// ViewRadius is the half-width of the view around the origin, in units
	// of L (> 0). If zero, the whole curve is shown when it stays within
	// 6 of the origin; otherwise the view frames the critical point −1,
	// the unit circle, the sensitivity circle and the margin points, and a
	// note says that the curve leaves the view.
	ViewRadius float64
}

func (s *NyquistSettings) check() error {
	if s == nil {
		return nil
	}
	if err := s.Size.check(); err != nil {
		return err
	}
	if s.ViewRadius < 0 || !finite(s.ViewRadius) {
		return fmt.Errorf("%w: ViewRadius = %g, want 0 (automatic) or a finite value > 0", ErrSettings, s.ViewRadius)
	}
	return nil
}

// Nyquist returns the Nyquist curve n of a loop (from margins.NyquistCurve):
// the positive-frequency branch as a solid line and its mirror image as a
// dashed line, both with arrows in the direction of increasing frequency
// along the Nyquist contour; the critical point −1; the unit circle; and,
// with the margins m, the circle of radius 1/Ms around −1 that the curve
// touches at the peak sensitivity Ms, the point −1/(gain margin) where the
// curve crosses the negative real axis, and the point where it crosses
// the unit circle (phase margin), with the numbers in words in a box.
//
// Errors: ErrNoData when both branches are empty, ErrLength when a branch
// has values and frequencies of different lengths, ErrSettings and ErrSize
// for bad settings. Infinite values (poles on the axis) break the curve.
func Nyquist(n margins.Nyquist, m *margins.Result, set *NyquistSettings) (*Figure, error) {
	if err := set.check(); err != nil {
		return nil, err
	}
	if len(n.Positive) != len(n.PositiveFrequencyRadPerSec) || len(n.Mirror) != len(n.MirrorFrequencyRadPerSec) {
		return nil, fmt.Errorf("%w: Nyquist branches have %d/%d and %d/%d values/frequencies", ErrLength,
			len(n.Positive), len(n.PositiveFrequencyRadPerSec), len(n.Mirror), len(n.MirrorFrequencyRadPerSec))
	}
	if len(n.Positive) == 0 && len(n.Mirror) == 0 {
		return nil, fmt.Errorf("%w: Nyquist curve has no points", ErrNoData)
	}
	th, size, viewR, p := set.panel("Nyquist curve of the loop")
	avoid := &obstacles{}

	// Key points that must be in view.
	key := []complex128{-1, 0, 1i, -1i, 1}
	var notes []note
	var box []keyEntry
	guide := th.guideLine(dotGuide...)
	p.Add(&hLine{Y: 0, LineStyle: draw.LineStyle{Color: th.Guide, Width: th.GuideWidth * 0.8}})
	p.Add(&vLine{X: 0, LineStyle: draw.LineStyle{Color: th.Guide, Width: th.GuideWidth * 0.8}})
	p.Add(&circle{R: 1, LineStyle: guide})
	box = append(box, keyEntry{Text: "unit circle (|L| = 1)", Line: &guide})
	if m != nil {
		if ms := m.PeakSensitivity; finite(ms) && ms > 0 {
			r := 1 / ms
			msStyle := draw.LineStyle{Color: okVermillion, Width: vg.Points(0.9), Dashes: dashGuide}
			p.Add(&circle{CX: -1, R: r, LineStyle: msStyle, Fill: alpha(okVermillion, 0x14)})
			key = append(key, complex(-1-r, r), complex(-1+r, -r))
			box = append(box, keyEntry{Text: fmt.Sprintf("peak sensitivity %s: circle of radius 1/%s around −1",
				formatNumber(ms, 3), formatNumber(ms, 3)), Line: &msStyle})
		}
		for _, pc := range m.PhaseCrossovers {
			if !finite(pc.GainFactor) || pc.GainFactor == 0 {
				continue
			}
			x := -1 / pc.GainFactor
			mk, _ := NewMarks([]float64{x}, []float64{0})
			mk.GlyphStyle = draw.GlyphStyle{Color: okVermillion, Radius: vg.Points(3), Shape: dotGlyph{}}
			p.Add(mk)
			avoid.addPoint(x, 0)
			// Only the crossovers that set a margin are named; the others
			// are marked.
			if label := decisiveCrossover(m, pc); label != "" {
				if math.Abs(x) <= 5 {
					// Frame it unless it is far out (a gain margin below
					// −14 dB is written under the figure instead).
					key = append(key, complex(x, 0))
				}
				notes = append(notes, note{X: x, Y: 0, Text: label, Color: okVermillion})
			}
		}
		for _, gc := range m.GainCrossovers {
			if !finite(gc.PhaseMarginDeg) {
				continue
			}
			// |L| = 1 there and ∠L = −180° + PM.
			z := cmplx.Rect(1, (gc.PhaseMarginDeg-180)*math.Pi/180)
			mk, _ := NewMarks([]float64{real(z)}, []float64{imag(z)})
			mk.GlyphStyle = draw.GlyphStyle{Color: okBluishGreen, Radius: vg.Points(3), Shape: dotGlyph{}}
			p.Add(mk)
			notes = append(notes, note{X: real(z), Y: imag(z), Text: "phase margin " + formatNumber(gc.PhaseMarginDeg, 3) + "°", Color: okBluishGreen})
			avoid.addPoint(real(z), imag(z))
		}
	}

	// Curves: mirror branch first (dashed), then the positive one.
	branch := func(v []complex128, dashed bool) (pieces [][2][]float64) {
		var xs, ys []float64
		flush := func() {
			if len(xs) > 1 {
				pieces = append(pieces, [2][]float64{xs, ys})
			}
			xs, ys = nil, nil
		}
		for _, z := range v {
			if cmplx.IsInf(z) || cmplx.IsNaN(z) {
				flush()
				continue
			}
			xs = append(xs, real(z))
			ys = append(ys, imag(z))
		}
		flush()
		return pieces
	}
	extent := 0.0
	for _, v := range [][]complex128{n.Positive, n.Mirror} {
		for _, z := range v {
			if a := cmplx.Abs(z); finite(a) {
				extent = math.Max(extent, a)
			}
		}
	}
	mirrorStyle := draw.LineStyle{Color: alpha(okBlue, 0xb0), Width: th.LineWidth * 0.8, Dashes: []vg.Length{vg.Points(5), vg.Points(3)}}
	for _, pc := range branch(n.Mirror, true) {
		c, _ := NewCurve(pc[0], pc[1])
		c.LineStyle = mirrorStyle
		c.Arrows, c.ArrowSize = 2, vg.Points(6)
		p.Add(c)
		avoid.addCurve(pc[0], pc[1])
	}
	posStyle := draw.LineStyle{Color: okBlue, Width: th.LineWidth}
	for _, pc := range branch(n.Positive, false) {
		c, _ := NewCurve(pc[0], pc[1])
		c.LineStyle = posStyle
		c.Arrows, c.ArrowSize = 3, vg.Points(6.5)
		p.Add(c)
		avoid.addCurve(pc[0], pc[1])
	}
	box = append([]keyEntry{
		{Text: "positive frequencies", Line: &posStyle},
		{Text: "negative frequencies (mirror image)", Line: &mirrorStyle},
	}, box...)

	// The critical point on top.
	crit, _ := NewMarks([]float64{-1}, []float64{0})
	crit.GlyphStyle = draw.GlyphStyle{Color: okBlack, Radius: vg.Points(5), Shape: plusGlyph{Width: vg.Points(1.6)}}
	crit.Halo = vg.Points(3)
	p.Add(crit)
	notes = append([]note{{X: -1, Y: 0, Text: "−1"}}, notes...)
	avoid.addPoint(-1, 0)

	// View: whole curve if modest, else the critical region.
	r := viewR
	clipped := false
	if r == 0 {
		if extent <= 6 {
			for _, v := range [][]complex128{n.Positive, n.Mirror} {
				for _, z := range v {
					if !cmplx.IsInf(z) && !cmplx.IsNaN(z) {
						key = append(key, z)
					}
				}
			}
		} else {
			clipped = true
		}
	}
	xmin, xmax, ymin, ymax := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, z := range key {
		xmin, xmax = math.Min(xmin, real(z)), math.Max(xmax, real(z))
		ymin, ymax = math.Min(ymin, imag(z)), math.Max(ymax, imag(z))
	}
	if r > 0 {
		xmin, xmax, ymin, ymax = -r, r, -r, r
		clipped = extent > r
	} else {
		// Symmetric about the real axis, like the curve with its mirror.
		ya := math.Max(math.Abs(ymin), math.Abs(ymax))
		ymin, ymax = -ya, ya
		if clipped {
			// Room for the curve to show its approach: half again.
			xmin, xmax = xmin-0.5, xmax+0.5
			ymin, ymax = ymin-0.5, ymax+0.5
		}
		padX, padY := 0.08*(xmax-xmin), 0.08*(ymax-ymin)
		xmin, xmax, ymin, ymax = xmin-padX, xmax+padX, ymin-padY, ymax+padY
	}
	if clipped {
		box = append(box, keyEntry{Text: fmt.Sprintf("the curve reaches |L| = %s, outside this view", formatNumber(extent, 3))})
	}
	layer := &textLayer{Avoid: avoid}
	noteStyle := th.textStyle(th.FontSizeNote, false, draw.XLeft, draw.YBottom)
	layer.Notes = append(layer.Notes, &annotations{Notes: notes, Style: noteStyle,
		Leader: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.5)}, Avoid: avoid})
	p.Add(layer)
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = xmin, xmax, ymin, ymax
	f := newFigure(p, size, th)
	if m != nil {
		f.Notes = marginNotes(m)
	}
	f.square[0] = true
	f.layers = append(f.layers, layer)
	// The key stands outside the data, right of the panel, as in every
	// figure.
	f.setSideKey(&cornerBox{Entries: box, Style: noteStyle,
		Border: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.4)}}, size.WidthCm == 0)
	return f, nil
}
