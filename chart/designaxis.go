package chart

import (
	"fmt"
	"math"

	"github.com/loopwise/loopwise/design"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// DesignAxisSettings controls DesignAxis. A nil value means the defaults.
type DesignAxisSettings struct {
	// Size is the output size. Its zero value gives 16 × 12 cm at 150 dpi.
	Size
	// Theme is the look. If nil, defaults to DefaultTheme().
	Theme *Theme
	// Title is the panel title. If empty, defaults to "Where each
	// requirement holds, over the <variable>".
	Title string
	// Min and Max are the ends of the horizontal axis. If both are zero,
	// the axis spans the finite interval ends of the result with a margin
	// (and the finite ends of its range).
	Min, Max float64
}

// DesignAxis draws the variable's axis with one row per requirement: a
// thick bluish-green bar where it holds, a thin vermillion line where it
// does not; below them the stable values and the values where all hold
// (orange), and the suggested value as a vertical line.
func DesignAxis(res design.Result, set *DesignAxisSettings) (*Figure, error) {
	var s DesignAxisSettings
	if set != nil {
		s = *set
	}
	if err := s.Size.check(); err != nil {
		return nil, err
	}
	if len(res.Requirements) == 0 {
		return nil, fmt.Errorf("%w: the design result has no requirements", ErrNoData)
	}
	th := DefaultTheme()
	if s.Theme != nil {
		th = s.Theme.withDefaults()
	}
	lo, hi := s.Min, s.Max
	if lo == 0 && hi == 0 {
		lo, hi = axisSpan(res)
	}
	if !(lo < hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil, fmt.Errorf("%w: axis [%g, %g] of the variable", ErrSettings, lo, hi)
	}
	title := s.Title
	if title == "" {
		title = "Where each requirement holds, over the " + res.Variable
	}
	p := newPanel(th, title, res.Variable, "")
	p.X.Min, p.X.Max = lo, hi
	type row struct {
		name string
		ivs  []design.Interval
		c    bool // the "all" row
	}
	var rows []row
	for _, r := range res.Requirements {
		rows = append(rows, row{name: r.Requirement.String(), ivs: r.Intervals})
	}
	rows = append(rows, row{name: "closed loop stable", ivs: res.Stable}, row{name: "all requirements", ivs: res.AllMet, c: true})
	var ticks []plot.Tick
	n := len(rows)
	for i, r := range rows {
		y := float64(n - i)
		ticks = append(ticks, plot.Tick{Value: y, Label: r.name})
		base, _ := plotter.NewLine(plotter.XYs{{X: lo, Y: y}, {X: hi, Y: y}})
		base.LineStyle = draw.LineStyle{Color: okVermillion, Width: vg.Points(0.8)}
		p.Add(base)
		for _, iv := range r.ivs {
			a, b := math.Max(iv.Lo, lo), math.Min(iv.Hi, hi)
			if !(a < b) {
				continue
			}
			bar, _ := plotter.NewLine(plotter.XYs{{X: a, Y: y}, {X: b, Y: y}})
			bar.LineStyle = draw.LineStyle{Color: okBluishGreen, Width: vg.Points(7)}
			if r.c {
				bar.LineStyle.Color = okOrange
			}
			p.Add(bar)
		}
	}
	p.Y.Min, p.Y.Max = 0.3, float64(n)+0.7
	p.Y.Tick.Marker = plot.ConstantTicks(ticks)
	p.Y.Tick.Label = th.textStyle(th.FontSizeNote, false, draw.XRight, draw.YCenter)
	var notes []string
	if !math.IsNaN(res.Suggested) {
		l, _ := plotter.NewLine(plotter.XYs{{X: res.Suggested, Y: 0.3}, {X: res.Suggested, Y: float64(n) + 0.7}})
		l.LineStyle = draw.LineStyle{Color: okBlack, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(4), vg.Points(2)}}
		p.Add(l)
		notes = append(notes, fmt.Sprintf("Dashed line: the suggested %s = %s (largest smallest relative slack, %s %%).", res.Variable, formatNumber(res.Suggested, 4), formatNumber(100*res.SuggestedSlack, 3)))
	} else {
		notes = append(notes, "No value in the range meets every requirement.")
	}
	notes = append(notes, "Green: the requirement holds; vermillion: it does not; orange: all hold and the loop is stable.")
	f := newFigure(p, s.Size, th)
	f.Notes = notes
	return f, nil
}

// axisSpan returns the finite span of the result's interval ends and range
// with a 10 % margin.
func axisSpan(res design.Result) (float64, float64) {
	lo, hi := math.Inf(1), math.Inf(-1)
	add := func(x float64) {
		if !math.IsInf(x, 0) && !math.IsNaN(x) {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
	}
	add(res.Range.Min)
	add(res.Range.Max)
	for _, r := range res.Requirements {
		for _, iv := range r.Intervals {
			add(iv.Lo)
			add(iv.Hi)
		}
	}
	for _, iv := range res.Stable {
		add(iv.Lo)
		add(iv.Hi)
	}
	add(res.Suggested)
	if !(lo < hi) {
		return lo - 1, lo + 1
	}
	m := 0.1 * (hi - lo)
	if lo >= 0 && lo-m < 0 {
		return 0, hi + m
	}
	return lo - m, hi + m
}
