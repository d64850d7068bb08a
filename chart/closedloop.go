package chart

import (
	"fmt"
	"image/color"
	"math"
	"slices"

	"github.com/loopwise/loopwise/closedloop"
	"github.com/loopwise/loopwise/response"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ClosedLoopSettings controls ClosedLoopMagnitudes. A nil
// *ClosedLoopSettings means the defaults.
type ClosedLoopSettings struct {
	// Size is the output size. Its zero value gives 16 × 12 cm at 150 dpi.
	Size
	// Theme is the look. If nil, defaults to DefaultTheme().
	Theme *Theme
	// Title is the figure title. If empty, defaults to "The four closed-loop
	// functions".
	Title string
	// SampleTimeSec is the sample period of a discrete loop (≥ 0); if
	// positive, a dashed line marks the Nyquist frequency π/T.
	SampleTimeSec float64
}

// ClosedLoopMagnitudes draws the magnitudes (dB) of the four closed-loop
// functions of a loop on one logarithmic frequency axis: the sensitivity
// |S| (disturbance rejection; its peak Ms), the complementary sensitivity
// |T| (noise on the output and robustness to model errors; Mt), the load
// disturbance → output |G·S| and the measurement noise → control |C·S|.
// With the metrics m (from Functions.Analyze) each function's peak is
// marked with a dot of its colour and the peaks are written in words under
// the panel. ErrNoData for no samples, ErrLength for slices of different
// lengths, ErrFrequency for a frequency that is not positive and finite.
func ClosedLoopMagnitudes(mag closedloop.Magnitudes, m *closedloop.Metrics, set *ClosedLoopSettings) (*Figure, error) {
	if set != nil {
		if set.SampleTimeSec < 0 || !finite(set.SampleTimeSec) {
			return nil, fmt.Errorf("%w: SampleTimeSec = %g, want 0 or a finite value > 0", ErrSettings, set.SampleTimeSec)
		}
		if err := set.Size.check(); err != nil {
			return nil, err
		}
	}
	w := mag.FrequencyRadPerSec
	n := len(w)
	if n == 0 {
		return nil, fmt.Errorf("%w: closed-loop magnitudes have no samples", ErrNoData)
	}
	series := []struct {
		name  string
		v     []float64
		color color.Color
		dash  []vg.Length
		peak  *closedloop.FrequencyPeak
	}{
		{"sensitivity |S|", mag.Sensitivity, okBlue, nil, nil},
		{"complementary sensitivity |T|", mag.Complementary, okVermillion, []vg.Length{vg.Points(5), vg.Points(2.5)}, nil},
		{"load disturbance → output |G·S|", mag.LoadToOutput, okBluishGreen, nil, nil},
		{"measurement noise → control |C·S|", mag.NoiseToControl, okReddishPurple, []vg.Length{vg.Points(1.5), vg.Points(2)}, nil},
	}
	if m != nil {
		series[0].peak, series[1].peak = &m.SensitivityPeak, &m.ComplementaryPeak
		series[2].peak, series[3].peak = &m.LoadToOutputPeak, &m.NoiseToControlPeak
	}
	for _, s := range series {
		if len(s.v) != n {
			return nil, fmt.Errorf("%w: %d frequencies, %d values of %s", ErrLength, n, len(s.v), s.name)
		}
	}
	if i := slices.IndexFunc(w, func(x float64) bool { return !(x > 0) || !finite(x) }); i >= 0 {
		return nil, fmt.Errorf("%w: FrequencyRadPerSec[%d] = %g", ErrFrequency, i, w[i])
	}
	var size Size
	var theme *Theme
	var title string
	if set != nil {
		size, theme, title = set.Size, set.Theme, set.Title
	}
	th, title := look(theme, title, "The four closed-loop functions")
	p := newPanel(th, title, "frequency ω (rad/s)", "magnitude (dB)")
	p.X.Scale = plot.LogScale{}
	p.X.Tick.Marker = logTicks{}
	p.Add(&hLine{Y: 0, LineStyle: draw.LineStyle{Color: th.Axis, Width: th.GuideWidth}})
	avoid := &obstacles{}
	var key []keyEntry
	var notes []note
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, s := range series {
		db := make([]float64, n)
		for i, v := range s.v {
			db[i] = 20 * math.Log10(v)
		}
		pieces := finitePieces(w, db)
		for _, pc := range pieces {
			c, _ := NewCurve(pc[0], pc[1])
			c.Color, c.Width, c.Dashes = s.color, th.LineWidth, s.dash
			p.Add(c)
			avoid.addCurve(pc[0], pc[1])
			lo, hi = math.Min(lo, minOf(pc[1])), math.Max(hi, maxOf(pc[1]))
		}
		ls := draw.LineStyle{Color: s.color, Width: th.LineWidth, Dashes: s.dash}
		key = append(key, keyEntry{Text: s.name, Line: &ls})
		if s.peak != nil && finite(s.peak.Value) && s.peak.Value > 0 && s.peak.FrequencyRadPerSec > 0 && finite(s.peak.FrequencyRadPerSec) &&
			s.peak.FrequencyRadPerSec >= w[0] && s.peak.FrequencyRadPerSec <= w[n-1] {
			y := 20 * math.Log10(s.peak.Value)
			mk, _ := NewMarks([]float64{s.peak.FrequencyRadPerSec}, []float64{y})
			mk.GlyphStyle = draw.GlyphStyle{Color: s.color, Radius: vg.Points(3), Shape: dotGlyph{}}
			p.Add(mk)
			avoid.addPoint(s.peak.FrequencyRadPerSec, y)
			notes = append(notes, note{X: s.peak.FrequencyRadPerSec, Y: y, Text: formatNumber(s.peak.Value, 3), Color: s.color})
		}
	}
	if math.IsInf(lo, 1) {
		return nil, fmt.Errorf("%w: no finite magnitudes", ErrNoData)
	}
	lo = math.Max(lo, hi-120)
	lo, hi = math.Min(lo, -10), math.Max(hi, 10)
	if set != nil && set.SampleTimeSec > 0 {
		wn := math.Pi / set.SampleTimeSec
		if wn > w[0] && wn <= w[n-1]*(1+1e-9) {
			ny := draw.LineStyle{Color: th.Axis, Width: th.GuideWidth, Dashes: dashGuide}
			p.Add(&vLine{X: math.Min(wn, w[n-1]), LineStyle: ny})
			key = append(key, keyEntry{Text: "Nyquist frequency π/T = " + formatNumber(wn, 3) + " rad/s", Line: &ny})
		}
	}
	noteStyle := th.textStyle(th.FontSizeNote, false, draw.XLeft, draw.YBottom)
	layer := &textLayer{Notes: []*annotations{{Notes: notes, Style: noteStyle,
		Leader: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.5)}, Avoid: avoid}}}
	p.Add(layer)
	pad := 0.06 * (hi - lo)
	p.Y.Min, p.Y.Max = lo-pad, hi+pad
	p.X.Min, p.X.Max = w[0], w[n-1]
	f := newFigure(p, size, th)
	f.setSideKey(&cornerBox{Entries: key, Style: noteStyle, Border: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.4)}}, set == nil || set.WidthCm == 0)
	if m != nil {
		f.Notes = []string{
			fmt.Sprintf("peak sensitivity Ms = %s at %s; peak complementary sensitivity Mt = %s at %s",
				formatNumber(m.SensitivityPeak.Value, 4), freqWords(m.SensitivityPeak.FrequencyRadPerSec),
				formatNumber(m.ComplementaryPeak.Value, 4), freqWords(m.ComplementaryPeak.FrequencyRadPerSec)),
			fmt.Sprintf("peak load disturbance → output %s at %s; peak noise → control %s at %s",
				formatNumber(m.LoadToOutputPeak.Value, 4), freqWords(m.LoadToOutputPeak.FrequencyRadPerSec),
				formatNumber(m.NoiseToControlPeak.Value, 4), freqWords(m.NoiseToControlPeak.FrequencyRadPerSec)),
		}
	}
	return f, nil
}

// look returns the theme (nil: the default) and the title (empty: def).
func look(theme *Theme, title, def string) (Theme, string) {
	th := DefaultTheme()
	if theme != nil {
		th = theme.withDefaults()
	}
	if title == "" {
		title = def
	}
	return th, title
}

func freqWords(w float64) string {
	if math.IsInf(w, 1) {
		return "high frequency (ω → ∞)"
	}
	return formatNumber(w, 4) + " rad/s"
}

// SignalSettings controls LoadDisturbanceResponse and ControlSignal. A nil
// *SignalSettings means the defaults.
type SignalSettings struct {
	// Size is the output size. Its zero value gives 16 × 12 cm at 150 dpi.
	Size
	// Theme is the look. If nil, defaults to DefaultTheme().
	Theme *Theme
	// Title is the figure title. If empty, each function has its own.
	Title string
	// OutputLabel names the signal and its unit on the vertical axis. If
	// empty, each function has its own.
	OutputLabel string
	// EndTimeSec is the right end of the time axis in seconds (> 0). If
	// zero, the axis ends at 1.5 times the last marked time, but not after
	// the last sample.
	EndTimeSec float64
}

// signalMark is a point marked on a signal with its words.
type signalMark struct {
	t, y float64
	text string
	c    color.Color
}

// LoadDisturbanceResponse draws the output after a unit load-disturbance
// step (r from response.Step of the load disturbance → output function),
// with the metrics d of closedloop.StepDeviation: the peak deviation
// marked, the recovery band (±fraction of the peak around the final value,
// shaded) and the recovery time as a dashed line. recoveryBandFraction is
// the band the metrics were computed with (0 = 0.02).
func LoadDisturbanceResponse(r response.Response, d *closedloop.StepDeviation, recoveryBandFraction float64, set *SignalSettings) (*Figure, error) {
	band := recoveryBandFraction
	if band == 0 {
		band = 0.02
	}
	if !(band > 0 && band < 1) {
		return nil, fmt.Errorf("%w: recovery band fraction %g, want a value in (0, 1)", ErrSettings, band)
	}
	var marks []signalMark
	var key []keyEntry
	var bandLoHi *[2]float64
	var lines []float64
	if d != nil {
		if !finite(d.PeakDeviation) || !finite(d.FinalValue) {
			return nil, fmt.Errorf("%w: peak deviation %g, final value %g", ErrNotFinite, d.PeakDeviation, d.FinalValue)
		}
		if finite(d.PeakTimeSec) {
			marks = append(marks, signalMark{d.PeakTimeSec, d.PeakDeviation, "peak " + formatNumber(d.PeakDeviation, 3) + " at " + formatNumber(d.PeakTimeSec, 3) + " s", okReddishPurple})
		} else {
			key = append(key, keyEntry{Text: "no overshoot: the output creeps to its final value"})
		}
		w := band * math.Abs(d.PeakDeviation)
		bandLoHi = &[2]float64{d.FinalValue - w, d.FinalValue + w}
		key = append(key, keyEntry{Text: fmt.Sprintf("recovery band ±%s %% of the peak", formatNumber(100*band, 3)), Fill: DefaultTheme().Stable})
		if finite(d.RecoveryTimeSec) && d.RecoveryTimeSec > 0 {
			lines = append(lines, d.RecoveryTimeSec)
			key = append(key, keyEntry{Text: "recovered at " + formatNumber(d.RecoveryTimeSec, 3) + " s",
				Line: &draw.LineStyle{Color: okBluishGreen, Width: vg.Points(0.8), Dashes: dashGuide}})
		}
		key = append(key, keyEntry{Text: "final value (residual offset) " + formatNumber(d.FinalValue, 3)})
	}
	return signalFigure(r, marks, key, bandLoHi, lines, set, "Output after a unit load-disturbance step", "output deviation")
}

// ControlSignal draws the control signal u after a unit step of one input
// (r from response.Step of the input → control function) with the effort
// c of closedloop.ControlEffort: u(0+), the peak |u| and the final value.
func ControlSignal(r response.Response, c *closedloop.ControlEffort, set *SignalSettings) (*Figure, error) {
	var marks []signalMark
	var key []keyEntry
	if c != nil {
		for _, v := range []float64{c.InitialValue, c.PeakValue, c.FinalValue} {
			if !finite(v) {
				return nil, fmt.Errorf("%w: control effort %+v", ErrNotFinite, *c)
			}
		}
		marks = append(marks, signalMark{0, c.InitialValue, "u(0+) = " + formatNumber(c.InitialValue, 3), okVermillion})
		switch {
		case math.IsInf(c.PeakTimeSec, 1):
			key = append(key, keyEntry{Text: "|u| creeps up to its final value"})
		case c.PeakTimeSec > 0:
			marks = append(marks, signalMark{c.PeakTimeSec, c.PeakValue, "peak " + formatNumber(c.PeakValue, 3) + " at " + formatNumber(c.PeakTimeSec, 3) + " s", okReddishPurple})
		default:
			key = append(key, keyEntry{Text: "the peak |u| is the initial kick"})
		}
		key = append(key, keyEntry{Text: "final value " + formatNumber(c.FinalValue, 4)})
	}
	return signalFigure(r, marks, key, nil, nil, set, "Control signal after a unit reference step", "control signal u")
}

func signalFigure(r response.Response, marks []signalMark, key []keyEntry, band *[2]float64, lines []float64, set *SignalSettings, title, ylabel string) (*Figure, error) {
	if err := checkXY("response", r.TimeSec, r.Output); err != nil {
		return nil, err
	}
	var size Size
	var theme *Theme
	var givenTitle string
	end := 0.0
	if set != nil {
		if err := set.Size.check(); err != nil {
			return nil, err
		}
		if set.EndTimeSec < 0 || !finite(set.EndTimeSec) {
			return nil, fmt.Errorf("%w: EndTimeSec = %g, want 0 (automatic) or a finite value > 0", ErrSettings, set.EndTimeSec)
		}
		if set.OutputLabel != "" {
			ylabel = set.OutputLabel
		}
		size, end, theme, givenTitle = set.Size, set.EndTimeSec, set.Theme, set.Title
	}
	th, title := look(theme, givenTitle, title)
	tEnd := r.TimeSec[len(r.TimeSec)-1]
	if end == 0 {
		for _, m := range marks {
			end = math.Max(end, 1.5*m.t)
		}
		for _, t := range lines {
			end = math.Max(end, 1.5*t)
		}
		if end == 0 || end > tEnd {
			end = tEnd
		}
	}
	p := newPanel(th, title, "time t (s)", ylabel)
	avoid := &obstacles{}
	ymin, ymax := math.Inf(1), math.Inf(-1)
	var ts, ys []float64
	for i, t := range r.TimeSec {
		if t <= end*(1+1e-12) && finite(r.Output[i]) {
			ts, ys = append(ts, t), append(ys, r.Output[i])
			ymin, ymax = math.Min(ymin, r.Output[i]), math.Max(ymax, r.Output[i])
		}
	}
	if len(ts) == 0 {
		return nil, fmt.Errorf("%w: no finite samples before %g s", ErrNoData, end)
	}
	if band != nil {
		p.Add(&Band{Lo: band[0], Hi: band[1], Color: th.Stable, Edge: draw.LineStyle{Color: alpha(okBluishGreen, 0x80), Width: vg.Points(0.5)}})
		ymin, ymax = math.Min(ymin, band[0]), math.Max(ymax, band[1])
	}
	p.Add(&hLine{Y: 0, LineStyle: draw.LineStyle{Color: th.Axis, Width: th.GuideWidth}})
	for _, t := range lines {
		p.Add(&vLine{X: t, LineStyle: draw.LineStyle{Color: okBluishGreen, Width: vg.Points(0.8), Dashes: dashGuide}})
	}
	c, _ := NewCurve(ts, ys)
	c.Color, c.Width = okBlue, th.LineWidth
	p.Add(c)
	avoid.addCurve(ts, ys)
	var notes []note
	for _, m := range marks {
		mk, _ := NewMarks([]float64{m.t}, []float64{m.y})
		mk.GlyphStyle = draw.GlyphStyle{Color: m.c, Radius: vg.Points(3), Shape: dotGlyph{}}
		p.Add(mk)
		avoid.addPoint(m.t, m.y)
		notes = append(notes, note{X: m.t, Y: m.y, Text: m.text, Color: m.c})
		ymin, ymax = math.Min(ymin, m.y), math.Max(ymax, m.y)
	}
	ymin, ymax = math.Min(ymin, 0), math.Max(ymax, 0)
	noteStyle := th.textStyle(th.FontSizeNote, false, draw.XLeft, draw.YBottom)
	layer := &textLayer{Notes: []*annotations{{Notes: notes, Style: noteStyle,
		Leader: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.5)}, Avoid: avoid}}}
	if len(key) > 0 {
		layer.Boxes = append(layer.Boxes, &cornerBox{Entries: key, Style: noteStyle,
			Border: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.4)}, Avoid: avoid})
	}
	p.Add(layer)
	pad := 0.1 * (ymax - ymin)
	if pad == 0 {
		pad = 1
	}
	p.Y.Min, p.Y.Max = ymin-pad, ymax+pad
	p.X.Min, p.X.Max = 0, end
	return newFigure(p, size, th), nil
}
