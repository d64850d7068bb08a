package chart_test

import (
	"bytes"
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
	"gonum.org/v1/plot/vg"
)

// crowdedDigitalLoop is a fast-sampled servo (T = 5 ms): the zero-order-
// hold plant 200/(s(s+10)) with the Tustin equivalent of the lead
// 4(s+10)/(s+40). Its poles, zeros and break points crowd near z = 1
// (z = e^(sT) with |s|·T small).
func crowdedDigitalLoop(t *testing.T) tf.TF {
	t.Helper()
	g := must(tf.MustParse("200/(s(s+10))").Discretize(0.005, tf.ZeroOrderHold, nil))
	c := must(tf.MustParse("4(s+10)/(s+40)").Discretize(0.005, tf.Tustin, nil))
	return must(c.Series(g))
}

// layoutCases are the figures with a key whose layout is checked: every
// locus, pole–zero, Nyquist and step case of the figure tests and the
// crowded digital locus.
func layoutCases() []figureCase {
	var out []figureCase
	for _, c := range allCases() {
		if !strings.HasPrefix(c.name, "frequency") {
			out = append(out, c)
		}
	}
	out = append(out, figureCase{name: "locus_crowded", build: func(t *testing.T) *chart.Figure {
		return must(chart.RootLocus(traceLocus(t, crowdedDigitalLoop(t), nil), &chart.LocusSettings{
			PlaneSettings: chart.PlaneSettings{DampingRatios: []float64{0.3, 0.7}},
			Mark:          &chart.LocusMark{Value: 1}}))
	}})
	return out
}

func drawn(t *testing.T, f *chart.Figure) chart.DrawnLayout {
	t.Helper()
	if err := f.Render(&bytes.Buffer{}, chart.FormatPNG); err != nil {
		t.Fatal(err)
	}
	return chart.Layout(f)
}

func overlap(a, b vg.Rectangle) bool {
	return a.Min.X < b.Max.X && b.Min.X < a.Max.X && a.Min.Y < b.Max.Y && b.Min.Y < a.Max.Y
}

func contains(r vg.Rectangle, p vg.Point) bool {
	return p.X >= r.Min.X && p.X <= r.Max.X && p.Y >= r.Min.Y && p.Y <= r.Max.Y
}

// TestKeyCoversNothing is the regression test of issue 11 item 16: the box
// that explains the symbols of a root locus, pole–zero map, Nyquist curve
// or step response covers no
// drawn point (of a branch, a guide curve or a mark) and no label, and it
// lies outside every data area.
func TestKeyCoversNothing(t *testing.T) {
	for _, c := range layoutCases() {
		t.Run(c.name, func(t *testing.T) {
			d := drawn(t, c.build(t))
			if len(d.Keys) == 0 {
				t.Fatal("no key drawn")
			}
			for _, k := range d.Keys {
				for _, p := range d.Points {
					if contains(k, p) {
						t.Errorf("key %v covers the drawn point %v", k, p)
						break
					}
				}
				for _, l := range d.Labels {
					if overlap(k, l) {
						t.Errorf("key %v covers the label at %v", k, l)
					}
				}
				for _, a := range d.Areas {
					if overlap(k, a) {
						t.Errorf("key %v lies in the data area %v", k, a)
					}
				}
			}
		})
	}
}

// TestCrowdedPointsGetDetail is the regression test of the second part of
// item 16: when key points crowd (the fast-sampled locus near z = 1) a
// zoomed panel is added without being asked for, the labels of the
// crowded points are written there, and no two labels of any plane figure
// overlap.
func TestCrowdedPointsGetDetail(t *testing.T) {
	for _, c := range layoutCases() {
		t.Run(c.name, func(t *testing.T) {
			f := c.build(t)
			d := drawn(t, f)
			for i, a := range d.Labels {
				for _, b := range d.Labels[i+1:] {
					if overlap(a, b) {
						t.Errorf("labels at %v and %v overlap", a, b)
					}
				}
			}
			if c.name == "locus_crowded" {
				if len(f.Panels) != 2 {
					t.Fatalf("%d panels, want the whole view and a detail", len(f.Panels))
				}
				// The detail is around z = 1, at least four times smaller.
				w, dt := f.Panels[0], f.Panels[1]
				if !(dt.X.Min < 1 && dt.X.Max > 0.9) || 4*(dt.X.Max-dt.X.Min) > w.X.Max-w.X.Min {
					t.Errorf("detail spans [%g, %g] of [%g, %g]", dt.X.Min, dt.X.Max, w.X.Min, w.X.Max)
				}
			}
		})
	}
}

// TestStartEndWordsAlike is the regression test of item 17's first part:
// a gain locus and a parameter locus name their × and ○ alike (the start
// at the value 0 and the end as the value grows), so the same mark never
// means an open-loop pole in one figure and a closed-loop pole in another.
func TestStartEndWordsAlike(t *testing.T) {
	gain := svgText(t, must(chart.RootLocus(traceLocus(t, servoLoop(), nil), nil)))
	pm := must(locus.FromText("Td", "4(1+Td*s)", tf.MustParse("1/(s(s+1)(s+3))")))
	param := svgText(t, must(chart.RootLocus(traceLocus(t, pm.Loop, &locus.Settings{Variable: pm.Name}), nil)))
	for _, w := range []string{"start: closed-loop pole at gain = 0", "end: where poles go as gain → ∞"} {
		if !strings.Contains(gain, w) {
			t.Errorf("gain locus key lacks %q", w)
		}
	}
	for _, w := range []string{"start: closed-loop pole at Td = 0", "end: where poles go as Td → ∞"} {
		if !strings.Contains(param, w) {
			t.Errorf("parameter locus key lacks %q", w)
		}
	}
	if strings.Contains(gain, "open-loop pole") || strings.Contains(gain, "open-loop zero") {
		t.Errorf("gain locus key still names open-loop poles and zeros")
	}
}

func svgText(t *testing.T, f *chart.Figure) string {
	t.Helper()
	var buf bytes.Buffer
	if err := f.Render(&buf, chart.FormatSVG); err != nil {
		t.Fatal(err)
	}
	return buf.String()
}

// TestMagnitudeStaysInPanel is the regression test of item 17's magnitude
// clause: a loop rolling off 160 dB per decade (eight poles at 1 rad/s)
// falls far below the 160 dB the magnitude panel shows; the frequency
// axis must end where the curve reaches the panel's floor instead of the
// curve leaving the panel before the axis ends.
func TestMagnitudeStaysInPanel(t *testing.T) {
	loop := tf.MustParse("1e4/(s+1)^8")
	r := must(margins.FrequencyResponse(loop, nil))
	m := must(margins.Compute(loop, nil))
	f := must(chart.FrequencyResponse(r, &m, nil))
	mag, ph := f.Panels[0], f.Panels[1]
	if mag.X.Max != ph.X.Max || mag.X.Min != ph.X.Min {
		t.Errorf("panels disagree on the frequency axis: [%g, %g] and [%g, %g]", mag.X.Min, mag.X.Max, ph.X.Min, ph.X.Max)
	}
	shown := 0
	for i, w := range r.FrequencyRadPerSec {
		if w < mag.X.Min || w > mag.X.Max {
			continue
		}
		shown++
		if v := r.MagnitudeDB[i]; v < mag.Y.Min || v > mag.Y.Max {
			t.Fatalf("at %g rad/s the magnitude %g dB leaves the panel [%g, %g] before the axis ends at %g rad/s",
				w, v, mag.Y.Min, mag.Y.Max, mag.X.Max)
		}
	}
	if shown < len(r.FrequencyRadPerSec)/3 {
		t.Errorf("only %d of %d samples shown", shown, len(r.FrequencyRadPerSec))
	}
}

// TestOneStyle is the regression test of item 17's unit and title
// clauses: every figure writes angles with ° (never "deg" or "degrees")
// and has one title, centred across the top of the figure (Figure.Title),
// with no panel title of its own unless it has several panels.
func TestOneStyle(t *testing.T) {
	for _, c := range allCases() {
		t.Run(c.name, func(t *testing.T) {
			f := c.build(t)
			s := svgText(t, f)
			for _, bad := range []string{"degrees", " deg ", "(deg)"} {
				if strings.Contains(s, bad) {
					t.Errorf("figure writes %q", bad)
				}
			}
			if strings.HasPrefix(c.name, "frequency") && !strings.Contains(s, "phase (°)") {
				t.Errorf("phase axis not labelled \"phase (°)\"")
			}
			if f.Title == "" {
				t.Errorf("no figure title")
			}
			if len(f.Panels) == 1 && f.Panels[0].Title.Text != "" {
				t.Errorf("panel title %q besides the figure title", f.Panels[0].Title.Text)
			}
		})
	}
}

// TestMarginWordsAlike is the regression test of item 17's margin clause:
// the frequency response and the Nyquist curve of one loop write its
// margins in the same words at the same place (the notes under the
// panels), and mark the crossovers alike.
func TestMarginWordsAlike(t *testing.T) {
	loop := servoLoop()
	m := must(margins.Compute(loop, nil))
	bode := must(chart.FrequencyResponse(must(margins.FrequencyResponse(loop, nil)), &m, nil))
	nyq := must(chart.Nyquist(must(margins.NyquistCurve(loop, nil)), &m, nil))
	if len(bode.Notes) == 0 || strings.Join(bode.Notes, "\n") != strings.Join(nyq.Notes, "\n") {
		t.Errorf("margins in words differ:\nfrequency response %q\nNyquist curve      %q", bode.Notes, nyq.Notes)
	}
	for _, w := range []string{"gain margin", "phase margin"} {
		if !strings.Contains(svgText(t, bode), w) || !strings.Contains(svgText(t, nyq), w) {
			t.Errorf("%q is not marked in both figures", w)
		}
	}
}

// TestAlsoMarks checks LocusSettings.Also, which lets a design compare
// candidates with the same mark (dots: closed-loop poles at a value)
// instead of borrowing a mark that means something else (the squares of
// the boundary crossings, as the parameter-sweep example did): each value
// is named in the key, and a NaN value is refused.
func TestAlsoMarks(t *testing.T) {
	l := traceLocus(t, servoLoop(), nil)
	f := must(chart.RootLocus(l, &chart.LocusSettings{Mark: &chart.LocusMark{Value: 2}, Also: []chart.LocusMark{{Value: 10}}}))
	s := svgText(t, f)
	for _, w := range []string{"closed-loop poles at gain = 2", "closed-loop poles at gain = 10"} {
		if !strings.Contains(s, w) {
			t.Errorf("key lacks %q", w)
		}
	}
	_, err := chart.RootLocus(l, &chart.LocusSettings{Also: []chart.LocusMark{{Value: math.NaN()}}})
	if !errors.Is(err, chart.ErrNotFinite) || !strings.Contains(err.Error(), "Also[0]") {
		t.Errorf("NaN in Also: %v, want ErrNotFinite naming Also[0]", err)
	}
}

// TestSampledResponseDrawnAsSamples is the regression test of item 18: a
// sampled response is drawn as samples (named in the key with their
// period), not as a held staircase, and StepSettings.Between draws the
// continuous plant's output through them. The scenario: the plant
// 1/(s(s+1)) under a zero-order hold with T = 0.2 s and unit feedback;
// the output between samples is the plant driven by the held error.
func TestSampledResponseDrawnAsSamples(t *testing.T) {
	const T, sub = 0.2, 10
	plant := tf.MustParse("1/(s(s+1))")
	gd := must(plant.Discretize(T, tf.ZeroOrderHold, nil))
	closed := must(gd.ClosedLoop())
	one := must(tf.NewDiscrete([]float64{1}, []float64{1}, T))
	er := must(must(one.Parallel(gd)).Inverse()) // E/R = 1/(1 + G(z))
	y := must(response.Step(closed, &response.Settings{HorizonSec: 8}))
	e := must(response.Step(er, &response.Settings{HorizonSec: 8}))
	var ts, us []float64
	for k := 0; k+1 < len(e.Output); k++ {
		for j := 0; j < sub; j++ {
			ts = append(ts, (float64(k)+float64(j)/sub)*T)
			us = append(us, e.Output[k])
		}
	}
	b := must(response.Simulate(plant, ts, us, nil))
	// At the sample instants the two agree: the hold equivalent is exact
	// (1e-12: a few hundred roundings of order-2 recursions).
	for j := 0; j < len(ts); j += sub {
		if d := math.Abs(b.Output[j] - y.Output[j/sub]); d > 1e-12 {
			t.Fatalf("at t = %g the plant output %g differs from the sample %g", ts[j], b.Output[j], y.Output[j/sub])
		}
	}
	m := must(response.StepMetrics(closed, nil))
	plain := svgText(t, must(chart.StepResponse(y, &m, nil)))
	if !strings.Contains(plain, "samples, every 0.2 s") {
		t.Errorf("the key does not name the samples")
	}
	with := svgText(t, must(chart.StepResponse(y, &m, &chart.StepSettings{Between: &b})))
	if !strings.Contains(with, "output between the samples") {
		t.Errorf("the key does not name the output between the samples")
	}
	if _, err := chart.StepResponse(y, &m, &chart.StepSettings{Between: &y}); !errors.Is(err, chart.ErrSettings) {
		t.Errorf("a sampled Between: %v, want ErrSettings", err)
	}
}
