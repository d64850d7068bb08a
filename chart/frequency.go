package chart

import (
	"fmt"
	"math"
	"strings"

	"github.com/loopwise/loopwise/margins"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// FrequencySettings controls FrequencyResponse. A nil *FrequencySettings
// means the defaults.
type FrequencySettings struct {
	// Size is the output size. Its zero value gives 16 × 16 cm at 150 dpi
	// (two panels).
	Size
	// Theme is the look. If nil, defaults to DefaultTheme().
	Theme *Theme
	// Title is the figure title. If empty, defaults to "Frequency
	// response of the loop".
	Title string
	// SampleTimeSec is the sample period of a discrete loop in seconds
	// (≥ 0). If positive, a line marks the Nyquist frequency π/T, the end
	// of a discrete frequency response. If zero, no line.
	SampleTimeSec float64
}

func (s *FrequencySettings) check() error {
	if s == nil {
		return nil
	}
	if s.SampleTimeSec < 0 || !finite(s.SampleTimeSec) {
		return fmt.Errorf("%w: SampleTimeSec = %g, want 0 or a finite value > 0", ErrSettings, s.SampleTimeSec)
	}
	return s.Size.check()
}

// FrequencyResponse returns the magnitude (dB) and phase (degrees) of a
// loop's frequency response in two stacked panels on a shared logarithmic
// frequency axis (rad/s). With the margins m (from margins.Compute for the
// same loop) it marks every gain crossover (on the 0 dB line, with the
// phase margin drawn as a distance above the −180° line) and every phase
// crossover (on the −180° line, with the gain margin drawn as a distance
// below 0 dB), and writes the margins in words under the panels, in the
// same two lines as under a Nyquist curve: gain margin and peak
// sensitivity, then phase and delay margin and the closed-loop verdict.
// With m nil it draws the curves alone.
//
// Frequencies that are not positive cannot go on the logarithmic axis and
// give ErrFrequency; samples with an infinite magnitude (a pole on the
// axis) are left out and break the curves there. ErrNoData for an empty
// response, ErrLength for slices of different lengths.
func FrequencyResponse(resp margins.Response, m *margins.Result, set *FrequencySettings) (*Figure, error) {
	if err := set.check(); err != nil {
		return nil, err
	}
	w := resp.FrequencyRadPerSec
	n := len(w)
	if n == 0 {
		return nil, fmt.Errorf("%w: frequency response has no samples", ErrNoData)
	}
	if len(resp.MagnitudeDB) != n || len(resp.PhaseDeg) != n {
		return nil, fmt.Errorf("%w: %d frequencies, %d magnitudes, %d phases", ErrLength, n, len(resp.MagnitudeDB), len(resp.PhaseDeg))
	}
	for i, x := range w {
		if !(x > 0) || !finite(x) {
			return nil, fmt.Errorf("%w: FrequencyRadPerSec[%d] = %g", ErrFrequency, i, x)
		}
	}
	th := DefaultTheme()
	size := Size{}
	title := "Frequency response of the loop"
	if set != nil {
		if set.Theme != nil {
			th = set.Theme.withDefaults()
		}
		if set.Title != "" {
			title = set.Title
		}
		size = set.Size
	}
	if size.HeightCm == 0 {
		size.HeightCm = 16
	}

	// The phase is drawn shifted by a whole number of turns so that it
	// starts in (−270°, 90°]: an unwrapped phase built from the poles and
	// zeros may start a turn away (+270° for an integrator in discrete
	// time), which is the same angle but reads wrongly.
	phase := make([]float64, n)
	shift := 0.0
	for _, v := range resp.PhaseDeg {
		if finite(v) {
			shift = -360 * math.Ceil((v-90)/360)
			break
		}
	}
	for i, v := range resp.PhaseDeg {
		phase[i] = v + shift
	}

	// Finite pieces of both curves.
	magPieces := finitePieces(w, resp.MagnitudeDB)
	phPieces := finitePieces(w, phase)
	if len(magPieces) == 0 || len(phPieces) == 0 {
		return nil, fmt.Errorf("%w: no finite magnitude or phase samples", ErrNoData)
	}
	// Magnitude range: the finite data, at most 160 dB deep below its top
	// (a zero on the axis would otherwise squash everything). Where the
	// curve rolls off below that floor at either end of the band, the
	// frequency axis ends where it reaches the floor, so that the curve
	// does not leave the panel before the axis ends.
	mlo, mhi := math.Inf(1), math.Inf(-1)
	for _, pc := range magPieces {
		mlo, mhi = math.Min(mlo, minOf(pc[1])), math.Max(mhi, maxOf(pc[1]))
	}
	mlo = math.Max(mlo, mhi-160)
	wmin, wmax := rollOffRange(w, resp.MagnitudeDB, mlo)

	mag := newPanel(th, "", "", "magnitude (dB)")
	ph := newPanel(th, "", "frequency ω (rad/s)", "phase (°)")
	for _, p := range []*plot.Plot{mag, ph} {
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = logTicks{}
		p.X.Min, p.X.Max = wmin, wmax
	}
	mag.X.Tick.Marker = unlabelled{logTicks{}}

	magAvoid, phAvoid := &obstacles{}, &obstacles{}
	var magNotes, phNotes []note
	var magKey, phKey []keyEntry
	noteStyle := th.textStyle(th.FontSizeNote, false, draw.XLeft, draw.YBottom)

	mlo, mhi = math.Min(mlo, -10), math.Max(mhi, 10) // 0 dB always in view
	plo, phi := math.Inf(1), math.Inf(-1)
	for i, v := range phase {
		if finite(v) && w[i] >= wmin && w[i] <= wmax {
			plo, phi = math.Min(plo, v), math.Max(phi, v)
		}
	}

	mag.Add(&hLine{Y: 0, LineStyle: draw.LineStyle{Color: th.Axis, Width: th.GuideWidth}})
	if set != nil && set.SampleTimeSec > 0 {
		wn := math.Pi / set.SampleTimeSec
		if wn > wmin && wn <= wmax*(1+1e-9) {
			ny := draw.LineStyle{Color: th.Axis, Width: th.GuideWidth, Dashes: dashGuide}
			mag.Add(&vLine{X: math.Min(wn, wmax), LineStyle: ny})
			ph.Add(&vLine{X: math.Min(wn, wmax), LineStyle: ny})
			magKey = append(magKey, keyEntry{Text: "Nyquist frequency π/T = " + formatNumber(wn, 3) + " rad/s", Line: &ny})
		}
	}

	if m != nil {
		guide := draw.LineStyle{Color: th.Guide, Width: th.GuideWidth, Dashes: dotGuide}
		// Phase crossovers: the gain margin as a distance from |L| to 0 dB.
		for _, pc := range m.PhaseCrossovers {
			wc := pc.FrequencyRadPerSec
			if !(wc >= wmin && wc <= wmax) || !finite(pc.GainFactorDB) {
				continue
			}
			lm := -pc.GainFactorDB // |L| in dB at the crossover
			ref := oddMultiple180(interpLog(w, phase, wc))
			for _, p := range []*plot.Plot{mag, ph} {
				p.Add(&vLine{X: wc, LineStyle: guide})
			}
			mk, _ := NewMarks([]float64{wc}, []float64{ref})
			mk.GlyphStyle = draw.GlyphStyle{Color: okVermillion, Radius: vg.Points(3), Shape: dotGlyph{}}
			ph.Add(mk)
			// The distance to 0 dB is drawn only for the crossovers that set
			// a gain margin; the others are marked on the phase.
			if label := decisiveCrossover(m, pc); label != "" {
				mag.Add(&segment{X0: wc, Y0: lm, X1: wc, Y1: 0, LineStyle: draw.LineStyle{Color: okVermillion, Width: vg.Points(1)}, Heads: vg.Points(5)})
				magAvoid.addCurve([]float64{wc, wc}, []float64{lm, 0})
				magNotes = append(magNotes, note{X: wc, Y: lm / 2, Text: label, Color: okVermillion})
			}
			phAvoid.addPoint(wc, ref)
			mlo, mhi = math.Min(mlo, lm), math.Max(mhi, lm)
		}
		// Gain crossovers: the phase margin as a distance from −180° to ∠L.
		for _, gc := range m.GainCrossovers {
			wc := gc.FrequencyRadPerSec
			if !(wc >= wmin && wc <= wmax) || !finite(gc.PhaseMarginDeg) {
				continue
			}
			phase := interpLog(w, phase, wc)
			ref := oddMultiple180(phase - gc.PhaseMarginDeg)
			for _, p := range []*plot.Plot{mag, ph} {
				p.Add(&vLine{X: wc, LineStyle: guide})
			}
			mk, _ := NewMarks([]float64{wc}, []float64{0})
			mk.GlyphStyle = draw.GlyphStyle{Color: okBluishGreen, Radius: vg.Points(3), Shape: dotGlyph{}}
			mag.Add(mk)
			magAvoid.addPoint(wc, 0)
			ph.Add(&segment{X0: wc, Y0: ref, X1: wc, Y1: phase, LineStyle: draw.LineStyle{Color: okBluishGreen, Width: vg.Points(1)}, Heads: vg.Points(5)})
			phAvoid.addCurve([]float64{wc, wc}, []float64{ref, phase})
			phNotes = append(phNotes, note{X: wc, Y: (ref + phase) / 2, Text: "phase margin " + formatNumber(gc.PhaseMarginDeg, 3) + "°", Color: okBluishGreen})
			plo, phi = math.Min(plo, ref), math.Max(phi, ref)
		}
	}
	// Odd multiples of 180° in view are the phase references.
	if plo > -180 && plo < -180+60 {
		// Keep −180° in view when the phase comes near it.
		plo = -180
	}
	for k := math.Ceil((plo+180)/360 - 1e-9); 360*k-180 <= phi+1e-9; k++ {
		ph.Add(&hLine{Y: 360*k - 180, LineStyle: draw.LineStyle{Color: th.Axis, Width: th.GuideWidth}})
	}

	pal := Palette()
	for _, pc := range magPieces {
		c, _ := NewCurve(pc[0], pc[1])
		c.Color, c.Width = pal[0], th.LineWidth
		mag.Add(c)
		magAvoid.addCurve(pc[0], pc[1])
	}
	for _, pc := range phPieces {
		c, _ := NewCurve(pc[0], pc[1])
		c.Color, c.Width = pal[0], th.LineWidth
		ph.Add(c)
		phAvoid.addCurve(pc[0], pc[1])
	}

	for _, pp := range []struct {
		p     *plot.Plot
		key   []keyEntry
		notes []note
		avoid *obstacles
	}{{mag, magKey, magNotes, magAvoid}, {ph, phKey, phNotes, phAvoid}} {
		layer := &textLayer{}
		if len(pp.key) > 0 {
			layer.Boxes = append(layer.Boxes, &cornerBox{Entries: pp.key, Style: noteStyle,
				Border: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.4)}, Avoid: pp.avoid})
		}
		layer.Notes = append(layer.Notes, &annotations{Notes: pp.notes, Style: noteStyle,
			Leader: draw.LineStyle{Color: th.Guide, Width: vg.Points(0.5)}, Avoid: pp.avoid})
		pp.p.Add(layer)
	}

	pad := 0.08 * (mhi - mlo)
	mag.Y.Min, mag.Y.Max = mlo-pad, mhi+pad
	for _, p := range []*plot.Plot{mag, ph} {
		p.X.Min, p.X.Max = wmin, wmax // Add widened them to the whole data
	}
	span := phi - plo
	if span < 90 {
		mid := (phi + plo) / 2
		plo, phi, span = mid-45, mid+45, 90
	}
	ph.Y.Min, ph.Y.Max = plo-0.08*span, phi+0.08*span
	ph.Y.Tick.Marker = linearTicks{Step: degreeStep(ph.Y.Max - ph.Y.Min)}

	f := newFigure(mag, size, th)
	f.Panels = append(f.Panels, ph)
	f.Title = title
	if m != nil {
		// The margins in words under the panels, as under a Nyquist curve.
		f.Notes = marginNotes(m)
	}
	return f, nil
}

// gainMarginWords writes the gain-side numbers of m in words.
func gainMarginWords(m *margins.Result) []keyEntry {
	var out []keyEntry
	switch {
	case math.IsInf(m.GainMargin, 1):
		out = append(out, keyEntry{Text: "gain margin infinite (no phase crossover above the loop gain)"})
	case finite(m.GainMarginDB):
		out = append(out, keyEntry{Text: fmt.Sprintf("gain margin %s dB (factor %s) at %s rad/s",
			formatNumber(m.GainMarginDB, 3), formatNumber(m.GainMargin, 3), formatNumber(m.PhaseCrossoverRadPerSec, 3))})
	}
	if finite(m.LowerGainMarginDB) {
		out = append(out, keyEntry{Text: fmt.Sprintf("lower gain margin %s dB at %s rad/s",
			formatNumber(m.LowerGainMarginDB, 3), formatNumber(m.LowerPhaseCrossoverRadPerSec, 3))})
	}
	if finite(m.PeakSensitivity) {
		at := ""
		if finite(m.PeakSensitivityRadPerSec) {
			at = " at " + formatNumber(m.PeakSensitivityRadPerSec, 3) + " rad/s"
		}
		out = append(out, keyEntry{Text: fmt.Sprintf("peak sensitivity %s (%s dB)%s",
			formatNumber(m.PeakSensitivity, 3), formatNumber(20*math.Log10(m.PeakSensitivity), 3), at)})
	}
	return out
}

// phaseMarginWords writes the phase-side numbers and the verdict of m.
func phaseMarginWords(m *margins.Result) []keyEntry {
	var out []keyEntry
	if finite(m.PhaseMarginDeg) {
		out = append(out, keyEntry{Text: fmt.Sprintf("phase margin %s° at %s rad/s",
			formatNumber(m.PhaseMarginDeg, 3), formatNumber(m.GainCrossoverRadPerSec, 3))})
	} else {
		out = append(out, keyEntry{Text: "phase margin not defined (the gain never crosses 0 dB)"})
	}
	switch {
	case math.IsInf(m.DelayMarginSec, 1):
		out = append(out, keyEntry{Text: "delay margin infinite"})
	case finite(m.DelayMarginSec):
		out = append(out, keyEntry{Text: "delay margin " + formatNumber(m.DelayMarginSec, 3) + " s"})
	}
	if m.ClosedLoopStable {
		out = append(out, keyEntry{Text: "closed loop stable"})
	} else {
		out = append(out, keyEntry{Text: fmt.Sprintf("closed loop UNSTABLE (%d poles in the unstable region)", m.ClosedLoopUnstablePoles)})
	}
	return out
}

// decisiveCrossover returns the label of a phase crossover that sets the
// gain margin or the lower gain margin, and "" for the others.
func decisiveCrossover(m *margins.Result, pc margins.PhaseCrossover) string {
	same := func(a, b float64) bool { return a == b || math.Abs(a-b) <= 1e-9*math.Max(math.Abs(a), math.Abs(b)) }
	switch {
	case finite(m.PhaseCrossoverRadPerSec) && same(pc.FrequencyRadPerSec, m.PhaseCrossoverRadPerSec):
		return "gain margin " + formatNumber(pc.GainFactorDB, 3) + " dB"
	case finite(m.LowerPhaseCrossoverRadPerSec) && same(pc.FrequencyRadPerSec, m.LowerPhaseCrossoverRadPerSec):
		return "lower gain margin " + formatNumber(pc.GainFactorDB, 3) + " dB"
	}
	return ""
}

// marginNotes writes every margin of m in words, one line per subject.
func marginNotes(m *margins.Result) []string {
	var g, ph []string
	for _, e := range gainMarginWords(m) {
		g = append(g, e.Text)
	}
	for _, e := range phaseMarginWords(m) {
		ph = append(ph, e.Text)
	}
	return []string{strings.Join(g, "; "), strings.Join(ph, "; ")}
}

// rollOffRange returns the frequency band to draw: all of w, except that
// where the magnitude stays below floor up to an end of w (a roll-off
// deeper than the panel), the band ends where it reaches floor
// (interpolated linearly in log ω).
func rollOffRange(w, magDB []float64, floor float64) (lo, hi float64) {
	n := len(w)
	lo, hi = w[0], w[n-1]
	cross := func(i, j int) float64 {
		a, b := magDB[i], magDB[j]
		if !finite(b) || a == b {
			return w[i]
		}
		f := (a - floor) / (a - b)
		return math.Exp(math.Log(w[i]) + f*(math.Log(w[j])-math.Log(w[i])))
	}
	last := n - 1
	for last >= 0 && !(magDB[last] >= floor) {
		last--
	}
	if last < 0 {
		return lo, hi
	}
	if last < n-1 {
		hi = cross(last, last+1)
	}
	first := 0
	for first < n && !(magDB[first] >= floor) {
		first++
	}
	if first > 0 {
		lo = cross(first, first-1)
	}
	return lo, hi
}

// finitePieces splits (x, y) into runs of finite values.
func finitePieces(x, y []float64) [][2][]float64 {
	var out [][2][]float64
	var cx, cy []float64
	flush := func() {
		if len(cx) > 1 {
			out = append(out, [2][]float64{cx, cy})
		}
		cx, cy = nil, nil
	}
	for i := range x {
		if !finite(y[i]) {
			flush()
			continue
		}
		cx = append(cx, x[i])
		cy = append(cy, y[i])
	}
	flush()
	return out
}

// interpLog interpolates y at x linearly in log x (x > 0, xs ascending).
func interpLog(xs, ys []float64, x float64) float64 {
	lx := make([]float64, len(xs))
	for i, v := range xs {
		lx[i] = math.Log(v)
	}
	return interp(lx, ys, math.Log(x))
}

// oddMultiple180 returns the odd multiple of 180° nearest to deg.
func oddMultiple180(deg float64) float64 {
	return 360*math.Round((deg+180)/360) - 180
}

// degreeStep picks a tick step for a phase axis spanning span degrees:
// 15°, 30°, 45°, 90° or 180°, giving at most about eight labels.
func degreeStep(span float64) float64 {
	for _, s := range []float64{15, 30, 45, 90, 180, 360, 720} {
		if span/s <= 8 {
			return s
		}
	}
	return 1440
}

// unlabelled wraps a ticker and removes the labels (the upper of two
// panels that share the frequency axis).
type unlabelled struct{ t plot.Ticker }

func (u unlabelled) Ticks(min, max float64) []plot.Tick {
	ts := u.t.Ticks(min, max)
	for i := range ts {
		ts[i].Label = ""
	}
	return ts
}
