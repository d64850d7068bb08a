package chart

import (
	"fmt"
	"math"

	"github.com/loopwise/loopwise/response"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// StepSettings controls StepResponse. A nil *StepSettings means the
// defaults.
type StepSettings struct {
	// Size is the output size. Its zero value gives 16 × 12 cm at 150 dpi.
	Size
	// Theme is the look. If nil, defaults to DefaultTheme().
	Theme *Theme
	// Title is the panel title. If empty, defaults to "Step response".
	Title string
	// OutputLabel names the output and its unit on the vertical axis. If
	// empty, defaults to "output".
	OutputLabel string
	// Levels are the rise levels and the settling band the metrics were
	// computed with; pass the same value given to response.StepMetrics.
	// If nil, defaults to 10 % and 90 % and a band of ±2 %.
	Levels *response.MetricSettings
	// EndTimeSec is the right end of the time axis in seconds (> 0). If
	// zero, the axis ends at 1.5 times the settling time (or the peak and
	// rise times if later), but not after the last sample.
	EndTimeSec float64
	// Between, for a sampled response of a continuous plant under a hold
	// (a digital controller), is the plant's output between the samples:
	// response.Simulate of the plant with the held control input, on a
	// grid finer than the sample period that contains the sample instants.
	// It is drawn as a line through the samples. If nil, the samples are
	// drawn alone.
	Between *response.Response
}

func (s *StepSettings) check() error {
	if s == nil {
		return nil
	}
	if err := s.Size.check(); err != nil {
		return err
	}
	if s.EndTimeSec < 0 || !finite(s.EndTimeSec) {
		return fmt.Errorf("%w: EndTimeSec = %g, want 0 (automatic) or a finite value > 0", ErrSettings, s.EndTimeSec)
	}
	if b := s.Between; b != nil {
		if err := checkXY("Between", b.TimeSec, b.Output); err != nil {
			return err
		}
		if b.SampleTimeSec > 0 {
			return fmt.Errorf("%w: Between is sampled (T = %g s); it must be the continuous output", ErrSettings, b.SampleTimeSec)
		}
	}
	if l := s.Levels; l != nil {
		lo, hi, b := levels(l)
		if !(lo > 0 && lo < hi && hi <= 1) || !(b > 0 && b < 1) {
			return fmt.Errorf("%w: Levels rise %g–%g and band %g, want 0 < low < high ≤ 1 and 0 < band < 1", ErrSettings, lo, hi, b)
		}
	}
	return nil
}

// levels returns the rise fractions and the band with defaults filled in,
// as response.StepMetrics fills them.
func levels(l *response.MetricSettings) (lo, hi, band float64) {
	lo, hi, band = 0.1, 0.9, 0.02
	if l != nil {
		if l.RiseLowFraction != 0 {
			lo = l.RiseLowFraction
		}
		if l.RiseHighFraction != 0 {
			hi = l.RiseHighFraction
		}
		if l.SettlingBandFraction != 0 {
			band = l.SettlingBandFraction
		}
	}
	return lo, hi, band
}

// StepResponse returns a figure of a sampled time response r. With
// metrics m (from response.StepMetrics for the same system) it also shows
// the final value, the settling band shaded, the rise between its two
// levels, the overshoot at its peak and the settling time, each marked on
// the curve and written out in words in a corner box. With m nil it draws
// the response alone (an impulse or ramp response, say). A discrete
// response is drawn as what it is, a sequence of samples: a dot at each
// sample instant on a thin stem from zero (stems are left out beyond 60
// samples in view). It is not drawn as a held staircase: the output of a
// continuous plant under a hold is not constant between samples. Where
// that output is known, StepSettings.Between draws it through the
// samples.
//
// Errors: ErrNoData for an empty response, ErrLength when TimeSec and
// Output differ in length, ErrNotFinite for a NaN or infinite sample or
// metric that must be drawn, ErrSettings and ErrSize for bad settings.
func StepResponse(r response.Response, m *response.Metrics, set *StepSettings) (*Figure, error) {
	if err := set.check(); err != nil {
		return nil, err
	}
	if err := checkXY("response", r.TimeSec, r.Output); err != nil {
		return nil, err
	}
	th := DefaultTheme()
	title, ylab := "Step response", "output"
	var lv *response.MetricSettings
	var size Size
	endTime := 0.0
	if set != nil {
		if set.Theme != nil {
			th = set.Theme.withDefaults()
		}
		if set.Title != "" {
			title = set.Title
		}
		if set.OutputLabel != "" {
			ylab = set.OutputLabel
		}
		lv, size, endTime = set.Levels, set.Size, set.EndTimeSec
	}
	if m == nil && (set == nil || set.Title == "") {
		title = "Time response"
	}
	lo, hi, band := levels(lv)
	p := newPanel(th, title, "time (s)", ylab)

	ts, ys := r.TimeSec, r.Output
	sampled := r.SampleTimeSec > 0
	var between *response.Response
	if set != nil && set.Between != nil && sampled {
		between = set.Between
		ts, ys = between.TimeSec, between.Output
	}
	tEnd := r.TimeSec[len(r.TimeSec)-1]
	xmax := tEnd
	ymin, ymax := math.Min(0, minOf(r.Output)), math.Max(0, maxOf(r.Output))
	if between != nil {
		ymin, ymax = math.Min(ymin, minOf(ys)), math.Max(ymax, maxOf(ys))
	}
	avoid := &obstacles{}
	if !sampled || between != nil {
		avoid.addCurve(ts, ys)
	}
	for i := range r.TimeSec {
		if sampled {
			avoid.addPoint(r.TimeSec[i], r.Output[i])
		}
	}
	layer := &textLayer{}
	noteStyle := th.textStyle(th.FontSizeNote, false, draw.XLeft, draw.YBottom)
	var notes []note
	var key []keyEntry

	if m != nil {
		F := m.FinalValue
		if !finite(F) {
			return nil, fmt.Errorf("%w: final value %g", ErrNotFinite, F)
		}
		bandLo, bandHi := F-band*math.Abs(F), F+band*math.Abs(F)
		ymin, ymax = math.Min(ymin, bandLo), math.Max(ymax, bandHi)
		p.Add(&Band{Lo: bandLo, Hi: bandHi, Color: th.Stable,
			Edge: draw.LineStyle{Color: alpha(okBluishGreen, 0x80), Width: vg.Points(0.5)}})
		p.Add(&hLine{Y: F, LineStyle: th.guideLine(dashGuide...)})
		key = append(key, keyEntry{Text: "final value " + formatNumber(F, 4), Line: ptr(th.guideLine(dashGuide...))})
		key = append(key, keyEntry{Text: fmt.Sprintf("settling band ±%s %%", formatNumber(100*band, 3)), Fill: th.Stable})

		// Automatic end of the time axis: enough to see the response settle.
		if endTime == 0 {
			want := 0.0
			for _, t := range []float64{1.5 * m.SettlingTimeSec, 1.3 * m.PeakTimeSec, 2 * m.RiseEndSec, 1.3 * m.UndershootTimeSec} {
				if finite(t) {
					want = math.Max(want, t)
				}
			}
			if want > 0 && want < tEnd {
				xmax = want
			}
		}

		// Rise: the two levels on the curve and a bracket between them.
		if finite(m.RiseStartSec) && finite(m.RiseEndSec) && m.RiseTimeSec > 0 {
			yl, yh := lo*F, hi*F
			rm, _ := NewMarks([]float64{m.RiseStartSec, m.RiseEndSec}, []float64{yl, yh})
			rm.GlyphStyle = draw.GlyphStyle{Color: okVermillion, Radius: vg.Points(2.8), Shape: dotGlyph{}}
			p.Add(&segment{X0: m.RiseStartSec, Y0: yl, X1: m.RiseStartSec, Y1: yh, LineStyle: draw.LineStyle{Color: alpha(okVermillion, 0xa0), Width: vg.Points(0.6), Dashes: dotGuide}})
			p.Add(&segment{X0: m.RiseStartSec, Y0: yh, X1: m.RiseEndSec, Y1: yh, LineStyle: draw.LineStyle{Color: okVermillion, Width: vg.Points(0.9)}, Heads: vg.Points(5)})
			p.Add(rm)
			text := fmt.Sprintf("rise time %s s (%s–%s %%)", formatNumber(m.RiseTimeSec, 3), formatNumber(100*lo, 3), formatNumber(100*hi, 3))
			key = append(key, keyEntry{Text: text, Glyph: &draw.GlyphStyle{Color: okVermillion, Radius: vg.Points(2.8), Shape: dotGlyph{}}})
			notes = append(notes, note{X: (m.RiseStartSec + m.RiseEndSec) / 2, Y: yh, Text: "rise " + formatNumber(m.RiseTimeSec, 3) + " s"})
		}
		// Overshoot: the peak and its height above the final value.
		if m.OvershootPct > 0 && finite(m.PeakTimeSec) && finite(m.PeakValue) {
			pk := m.PeakValue
			p.Add(&segment{X0: m.PeakTimeSec, Y0: F, X1: m.PeakTimeSec, Y1: pk, LineStyle: draw.LineStyle{Color: okReddishPurple, Width: vg.Points(0.9)}, Heads: vg.Points(5)})
			pm, _ := NewMarks([]float64{m.PeakTimeSec}, []float64{pk})
			pm.GlyphStyle = draw.GlyphStyle{Color: okReddishPurple, Radius: vg.Points(3), Shape: dotGlyph{}}
			p.Add(pm)
			text := fmt.Sprintf("overshoot %s %% at %s s", formatNumber(m.OvershootPct, 3), formatNumber(m.PeakTimeSec, 3))
			key = append(key, keyEntry{Text: text, Glyph: &pm.GlyphStyle})
			notes = append(notes, note{X: m.PeakTimeSec, Y: pk, Text: "overshoot " + formatNumber(m.OvershootPct, 3) + " %"})
			ymax = math.Max(ymax, pk)
		} else {
			key = append(key, keyEntry{Text: "no overshoot"})
		}
		if m.UndershootPct > 0 && finite(m.UndershootTimeSec) && finite(m.UndershootValue) {
			// The mark sits on the drawn curve at the undershoot time.
			uv := interp(r.TimeSec, r.Output, m.UndershootTimeSec)
			um, _ := NewMarks([]float64{m.UndershootTimeSec}, []float64{uv})
			um.GlyphStyle = draw.GlyphStyle{Color: okOrange, Radius: vg.Points(3), Shape: dotGlyph{}}
			p.Add(um)
			text := fmt.Sprintf("undershoot %s %% at %s s", formatNumber(m.UndershootPct, 3), formatNumber(m.UndershootTimeSec, 3))
			key = append(key, keyEntry{Text: text, Glyph: &um.GlyphStyle})
		}
		// Settling: the last exit from the band.
		if finite(m.SettlingTimeSec) && m.SettlingTimeSec > 0 {
			st := m.SettlingTimeSec
			p.Add(&vLine{X: st, LineStyle: draw.LineStyle{Color: okBluishGreen, Width: vg.Points(0.8), Dashes: dashGuide}})
			ysAt := interp(r.TimeSec, r.Output, st)
			sm, _ := NewMarks([]float64{st}, []float64{ysAt})
			sm.GlyphStyle = draw.GlyphStyle{Color: okBluishGreen, Radius: vg.Points(3), Shape: dotGlyph{}}
			p.Add(sm)
			text := fmt.Sprintf("settling time %s s (±%s %% band)", formatNumber(st, 3), formatNumber(100*band, 3))
			key = append(key, keyEntry{Text: text, Line: &draw.LineStyle{Color: okBluishGreen, Width: vg.Points(0.8), Dashes: dashGuide}})
			notes = append(notes, note{X: st, Y: ysAt, Text: "settled " + formatNumber(st, 3) + " s"})
		}
	}
	if endTime > 0 {
		xmax = endTime
	}
	if m != nil {
		// Guides are obstacles too: the key box should not hide them.
		F := m.FinalValue
		for _, y := range []float64{F, F - band*math.Abs(F), F + band*math.Abs(F)} {
			avoid.addCurve([]float64{0, xmax}, []float64{y, y})
		}
		if finite(m.RiseStartSec) && finite(m.RiseEndSec) {
			avoid.addCurve([]float64{m.RiseStartSec, m.RiseStartSec, m.RiseEndSec}, []float64{lo * F, hi * F, hi * F})
		}
		if m.OvershootPct > 0 && finite(m.PeakTimeSec) && finite(m.PeakValue) {
			avoid.addCurve([]float64{m.PeakTimeSec, m.PeakTimeSec}, []float64{F, m.PeakValue})
		}
		if finite(m.SettlingTimeSec) && m.SettlingTimeSec > 0 {
			avoid.addCurve([]float64{m.SettlingTimeSec, m.SettlingTimeSec}, []float64{ymin, ymax})
		}
	}

	if !sampled || between != nil {
		c, err := NewCurve(ts, ys)
		if err != nil {
			return nil, err
		}
		c.Color, c.Width = okBlue, th.LineWidth
		if between != nil {
			c.Width = th.LineWidth * 0.7
		}
		p.Add(c)
	}
	if sampled {
		samples := sampleStyle()
		inView := 0
		for _, t := range r.TimeSec {
			if t <= xmax {
				inView++
			}
		}
		if inView <= maxStems {
			for i, t := range r.TimeSec {
				avoid.addCurve([]float64{t, t}, []float64{0, r.Output[i]})
			}
			p.Add(&stems{X: append([]float64(nil), r.TimeSec...), Y: append([]float64(nil), r.Output...),
				LineStyle: draw.LineStyle{Color: alpha(okBlue, 0x90), Width: vg.Points(0.6)}})
		}
		dm, _ := NewMarks(r.TimeSec, r.Output)
		dm.GlyphStyle = samples
		p.Add(dm)
		text := fmt.Sprintf("samples, every %s s", formatNumber(r.SampleTimeSec, 3))
		key = append([]keyEntry{{Text: text, Glyph: &samples}}, key...)
		if between != nil {
			key = append(key[:1], append([]keyEntry{{Text: "output between the samples", Line: &draw.LineStyle{Color: okBlue, Width: th.LineWidth * 0.7}}}, key[1:]...)...)
		}
	}
	layer.Notes = append(layer.Notes, &annotations{Notes: notes, Style: noteStyle,
		Leader: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.5)}, Avoid: avoid})
	layer.Avoid = avoid
	p.Add(layer)

	pad := 0.08 * (ymax - ymin)
	if pad == 0 {
		pad = 1
	}
	p.X.Min, p.X.Max = 0, xmax
	p.Y.Min, p.Y.Max = ymin-pad, ymax+pad
	f := newFigure(p, size, th)
	f.layers = append(f.layers, layer)
	if len(key) > 0 {
		// Outside the data, right of the panel, as in every figure.
		f.setSideKey(&cornerBox{Entries: key, Style: noteStyle,
			Border: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.4)}}, size.WidthCm == 0)
	}
	return f, nil
}

// maxStems is the largest number of samples in view drawn with stems;
// more would fill the area under the curve.
const maxStems = 60

// sampleStyle is the mark of a sample of a sequence: a small blue dot.
func sampleStyle() draw.GlyphStyle {
	return draw.GlyphStyle{Color: okBlue, Radius: vg.Points(2), Shape: dotGlyph{}}
}

// stems draws a thin vertical line from zero to each sample, the usual
// picture of a sequence.
type stems struct {
	X, Y      []float64
	LineStyle draw.LineStyle
}

func (s *stems) Plot(dc draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&dc)
	for i := range s.X {
		a := vg.Point{X: tx(s.X[i]), Y: ty(0)}
		b := vg.Point{X: tx(s.X[i]), Y: ty(s.Y[i])}
		dc.StrokeLines(s.LineStyle, dc.ClipLinesXY([]vg.Point{a, b})...)
	}
}

// interp returns y at x by linear interpolation in the increasing xs.
func interp(xs, ys []float64, x float64) float64 {
	if len(xs) == 0 {
		return math.NaN()
	}
	if x <= xs[0] {
		return ys[0]
	}
	for i := 1; i < len(xs); i++ {
		if x <= xs[i] {
			f := (x - xs[i-1]) / (xs[i] - xs[i-1])
			return ys[i-1] + f*(ys[i]-ys[i-1])
		}
	}
	return ys[len(ys)-1]
}

func minOf(v []float64) float64 {
	m := math.Inf(1)
	for _, x := range v {
		m = math.Min(m, x)
	}
	return m
}

func maxOf(v []float64) float64 {
	m := math.Inf(-1)
	for _, x := range v {
		m = math.Max(m, x)
	}
	return m
}
