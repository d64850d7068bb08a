package chart

import (
	"image/color"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// background is the figure background colour (white).
func (t Theme) background() color.Color { return color.White }

// newPanel returns a plot in the theme's look: sans-serif text, grey frame,
// outward ticks with this package's tick marks and number format.
func newPanel(th Theme, title, xLabel, yLabel string) *plot.Plot {
	p := plot.New()
	p.TextHandler = textHandler()
	p.BackgroundColor = nil // the figure paints one background for all panels
	p.Title.Text = title
	p.Title.TextStyle = th.textStyle(th.FontSizeTitle, true, draw.XCenter, draw.YTop)
	p.Title.Padding = vg.Points(6)
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.LineStyle = draw.LineStyle{Color: th.Axis, Width: vg.Points(0.6)}
		a.Padding = vg.Points(0)
		a.Tick.LineStyle = draw.LineStyle{Color: th.Axis, Width: vg.Points(0.5)}
		a.Tick.Length = vg.Points(4)
		a.Tick.Marker = linearTicks{}
		a.Label.Padding = vg.Points(3)
	}
	p.X.Label.Text = xLabel
	p.Y.Label.Text = yLabel
	p.X.Label.TextStyle = th.textStyle(th.FontSizeLabel, false, draw.XCenter, draw.YBottom)
	p.Y.Label.TextStyle = th.textStyle(th.FontSizeLabel, false, draw.XCenter, draw.YBottom)
	p.X.Tick.Label = th.textStyle(th.FontSizeTick, false, draw.XCenter, draw.YTop)
	p.Y.Tick.Label = th.textStyle(th.FontSizeTick, false, draw.XRight, draw.YCenter)
	p.Legend.TextStyle = th.textStyle(th.FontSizeNote, false, draw.XLeft, draw.YCenter)
	return p
}

// formatNumber writes v with up to sig significant digits, no trailing
// zeros, and a true minus sign (U+2212), which reads better than a hyphen.
func formatNumber(v float64, sig int) string {
	if v == 0 {
		return "0"
	}
	if math.IsInf(v, 1) {
		return "∞"
	}
	if math.IsInf(v, -1) {
		return "−∞"
	}
	if math.IsNaN(v) {
		return "not defined"
	}
	a := math.Abs(v)
	var s string
	if a >= 1e-3 && a < 1e6 {
		// Fixed notation with sig significant digits.
		dec := sig - 1 - int(math.Floor(math.Log10(a)))
		if dec < 0 {
			dec = 0
		}
		s = strconv.FormatFloat(v, 'f', dec, 64)
		if strings.Contains(s, ".") {
			s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
		}
	} else {
		s = strconv.FormatFloat(v, 'g', sig, 64)
		s = strings.Replace(s, "e+0", "e", 1)
		s = strings.Replace(s, "e-0", "e-", 1)
		s = strings.Replace(s, "e+", "e", 1)
	}
	return strings.ReplaceAll(s, "-", "−")
}

// niceStep returns a step of 1, 2 or 5 times a power of ten such that
// [min, max] holds about n steps.
func niceStep(min, max float64, n int) float64 {
	raw := (max - min) / float64(n)
	if raw <= 0 || math.IsNaN(raw) || math.IsInf(raw, 0) {
		return 1
	}
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	switch f := raw / mag; {
	case f < 1.5:
		return mag
	case f < 3.5:
		return 2 * mag
	case f < 7.5:
		return 5 * mag
	default:
		return 10 * mag
	}
}

// linearTicks marks about six major ticks at 1-2-5 steps with minor ticks
// between them.
type linearTicks struct {
	// Step, if positive, forces the major step (phase axes use 45° or 90°).
	Step float64
}

func (t linearTicks) Ticks(min, max float64) []plot.Tick {
	step := t.Step
	if step <= 0 {
		step = niceStep(min, max, 6)
		// Long labels need more room: fewer ticks for six or more
		// characters (about 0.55 em each).
		if labelChars(min, max, step) >= 6 {
			step = niceStep(min, max, 4)
		}
	}
	if step <= 0 || (max-min)/step > 200 {
		return nil
	}
	// Minor ticks: 5 per major step for 1 and 5 steps, 4 for 2 steps.
	m := step / 5
	if r := step / math.Pow(10, math.Floor(math.Log10(step))); math.Abs(r-2) < 1e-9 {
		m = step / 4
	}
	if t.Step > 0 {
		m = step / 3
	}
	digits := 0
	if step < 1 {
		digits = int(math.Ceil(-math.Log10(step) - 1e-9))
	}
	var ticks []plot.Tick
	for i := math.Ceil(min/m - 1e-9); i*m <= max+1e-9*m; i++ {
		v := i * m
		if math.Abs(v) < 1e-12*step {
			v = 0
		}
		tk := plot.Tick{Value: v}
		if k := v / step; math.Abs(k-math.Round(k)) < 1e-6 {
			s := strconv.FormatFloat(v, 'f', digits, 64)
			if s == "-0" || strings.Trim(s, "-0.") == "" {
				s = "0"
			}
			tk.Label = strings.ReplaceAll(s, "-", "−")
		}
		ticks = append(ticks, tk)
	}
	return ticks
}

// labelChars is the length of the longest tick label of [min, max] at the
// given step.
func labelChars(min, max, step float64) int {
	digits := 0
	if step < 1 {
		digits = int(math.Ceil(-math.Log10(step) - 1e-9))
	}
	n := 0
	for _, v := range []float64{min, max} {
		v = math.Round(v/step) * step
		if l := len([]rune(strconv.FormatFloat(v, 'f', digits, 64))); l > n {
			n = l
		}
	}
	return n
}

// logTicks labels each decade (and 2 and 5 within it when the range spans
// fewer than three decades) with minor ticks at the other integers.
type logTicks struct{}

func (logTicks) Ticks(min, max float64) []plot.Tick {
	if min <= 0 || max <= 0 || max <= min {
		return nil
	}
	lo := int(math.Floor(math.Log10(min)))
	hi := int(math.Ceil(math.Log10(max)))
	few := hi-lo <= 2
	var ticks []plot.Tick
	for e := lo; e <= hi; e++ {
		dec := math.Pow(10, float64(e))
		for k := 1; k < 10; k++ {
			v := float64(k) * dec
			if v < min*(1-1e-9) || v > max*(1+1e-9) {
				continue
			}
			tk := plot.Tick{Value: v}
			if k == 1 || (few && (k == 2 || k == 5)) {
				tk.Label = formatNumber(v, 3)
			}
			ticks = append(ticks, tk)
		}
	}
	return ticks
}
