package chart

import (
	"math"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

func TestFormatNumber(t *testing.T) {
	// Expected strings written by hand from the rule: sig significant
	// digits, trailing zeros dropped, U+2212 for the minus sign.
	tests := []struct {
		v    float64
		sig  int
		want string
	}{
		{0, 3, "0"},
		{1, 3, "1"},
		{350.2, 4, "350.2"},
		{350.24, 3, "350"},
		{-1.5, 3, "−1.5"},
		{0.001234, 3, "0.00123"},
		{9.87654e-5, 3, "9.88e−5"},
		{6.168e-16, 4, "6.168e−16"},
		{1.25e7, 3, "1.25e7"},
		{math.Inf(1), 3, "∞"},
		{math.NaN(), 3, "not defined"},
	}
	for _, test := range tests {
		if got := formatNumber(test.v, test.sig); got != test.want {
			t.Errorf("formatNumber(%g, %d) = %q, want %q", test.v, test.sig, got, test.want)
		}
	}
}

func TestLinearTicks(t *testing.T) {
	ticks := linearTicks{}.Ticks(-2.3, 7.9)
	var labels []string
	for _, tk := range ticks {
		if tk.Label != "" {
			labels = append(labels, tk.Label)
		}
	}
	// A range of 10.2 over about six steps gives a step of 2 (1-2-5 rule).
	want := []string{"−2", "0", "2", "4", "6"}
	if len(labels) != len(want) {
		t.Fatalf("labels %q, want %q", labels, want)
	}
	for i := range want {
		if labels[i] != want[i] {
			t.Errorf("label %d = %q, want %q", i, labels[i], want[i])
		}
	}
	// Phase axes use a forced step.
	for _, tk := range (linearTicks{Step: 45}).Ticks(-270, -90) {
		if tk.Label != "" && math.Mod(tk.Value, 45) != 0 {
			t.Errorf("labelled phase tick at %g, not a multiple of 45", tk.Value)
		}
	}
}

func TestLogTicks(t *testing.T) {
	ticks := logTicks{}.Ticks(0.05, 200)
	labelled := map[string]bool{}
	for _, tk := range ticks {
		if tk.Value < 0.05 || tk.Value > 200 {
			t.Errorf("tick %g outside [0.05, 200]", tk.Value)
		}
		if tk.Label != "" {
			labelled[tk.Label] = true
		}
	}
	for _, w := range []string{"0.1", "1", "10", "100"} {
		if !labelled[w] {
			t.Errorf("decade %s not labelled; labels %v", w, labelled)
		}
	}
	if labelled["2"] {
		t.Errorf("2 labelled over four decades")
	}
}

func TestPlaneView(t *testing.T) {
	// Poles 0, −1, −5, −8 and a zero at −2 (the servo loop of the tests):
	// the box is [−8, 0] × 0, span 8, so a quarter (2) is added on each
	// side and the imaginary range is symmetric.
	x0, x1, y0, y1 := planeView([]complex128{0, -1, -5, -8, -2}, false)
	if x0 != -10 || x1 != 2 || y0 != -2 || y1 != 2 {
		t.Errorf("view [%g, %g] × [%g, %g], want [−10, 2] × [−2, 2]", x0, x1, y0, y1)
	}
	// A stable discrete loop keeps the whole unit circle in view.
	x0, x1, y0, y1 = planeView([]complex128{0.5, 0.9}, true)
	if x0 > -1 || x1 < 1 || y0 > -1 || y1 < 1 {
		t.Errorf("discrete view [%g, %g] × [%g, %g] does not hold the unit circle", x0, x1, y0, y1)
	}
	// The imaginary axis stays in view for poles far to the left.
	if x0, x1, _, _ = planeView([]complex128{-100, -120}, false); x1 < 0 {
		t.Errorf("view [%g, %g] hides the imaginary axis", x0, x1)
	}
}

func TestFocus(t *testing.T) {
	// Three poles at −1, a crossing at 1.54j and Padé poles near 60: the
	// gap of 39× separates them, so the far ones leave the view.
	key := []complex128{-1, -1, -1, 1.54i, -60 + 20i, -60 - 20i, -80}
	kept, left := focus(key, []complex128{1.54i})
	if left != 3 || len(kept) != 4 {
		t.Errorf("kept %v, left %d; want the four near points kept and 3 left", kept, left)
	}
	// A point that must be seen keeps everything below it.
	if _, left = focus(key, []complex128{-80}); left != 0 {
		t.Errorf("left %d points although the farthest must be seen", left)
	}
	// No wide gap: nothing is left out.
	if _, left = focus([]complex128{0, -1, -5, -8, -2, 5.28i}, nil); left != 0 {
		t.Errorf("left %d points without a gap", left)
	}
}

func TestOddMultiple180(t *testing.T) {
	for _, test := range []struct{ in, want float64 }{
		{-170, -180}, {-200, -180}, {170, 180}, {-530, -540}, {0.1, 180}, {-0.1, -180},
	} {
		if got := oddMultiple180(test.in); got != test.want {
			t.Errorf("oddMultiple180(%g) = %g, want %g", test.in, got, test.want)
		}
	}
}

func TestWrapText(t *testing.T) {
	width := func(s string) vg.Length { return vg.Length(len([]rune(s))) }
	lines := wrapText("gain margin 14 dB; lower gain margin −3 dB; peak sensitivity 1.8", 25, width)
	for _, l := range lines {
		if width(l) > 25 {
			t.Errorf("line %q is wider than 25", l)
		}
	}
	if len(lines) < 3 {
		t.Errorf("got %d lines, want at least 3: %q", len(lines), lines)
	}
}

// TestLabelsDoNotOverlap places many labels around a crowded group of
// points and checks that no two labels overlap and none leaves the data
// area, which is what the placement search is for.
func TestLabelsDoNotOverlap(t *testing.T) {
	th := DefaultTheme()
	p := newPanel(th, "", "x", "y")
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = -10, 10, -10, 10
	var notes []note
	for i := 0; i < 8; i++ {
		a := float64(i) * math.Pi / 4
		notes = append(notes, note{X: 2 * math.Cos(a), Y: 2 * math.Sin(a), Text: "gain = " + formatNumber(float64(i)*1.25, 3)})
	}
	ann := &annotations{Notes: notes, Style: th.textStyle(th.FontSizeNote, false, draw.XLeft, draw.YBottom), Avoid: &obstacles{}}
	c := vgimg.New(12*vg.Centimeter, 12*vg.Centimeter)
	dc := p.DataCanvas(draw.New(c))
	var lay layout
	ann.plot(dc, p, &lay)
	if len(lay.boxes) != len(notes) {
		t.Fatalf("%d boxes for %d notes", len(lay.boxes), len(notes))
	}
	for i, a := range lay.boxes {
		if outsideArea(dc, a) > 0 {
			t.Errorf("label %d leaves the data area", i)
		}
		for j := i + 1; j < len(lay.boxes); j++ {
			if overlapArea(a, lay.boxes[j]) > 0 {
				t.Errorf("labels %d and %d overlap", i, j)
			}
		}
	}
	var _ plot.Plotter = (*textLayer)(nil)
}

func TestEqualScale(t *testing.T) {
	p := plot.New()
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0, 10, 0, 1
	c := vgimg.New(10*vg.Centimeter, 10*vg.Centimeter)
	dc := draw.New(c)
	equalScale(p, dc)
	// A square canvas needs equal ranges: y grows to 10 about its centre.
	if p.Y.Max-p.Y.Min != 10 || p.Y.Min != -4.5 || p.X.Max-p.X.Min != 10 {
		t.Errorf("after equalScale x [%g, %g], y [%g, %g]; want y [−4.5, 5.5]", p.X.Min, p.X.Max, p.Y.Min, p.Y.Max)
	}
}

// TestBoundedBranchPoints checks which branch arcs frame the view: an arc
// that leaves the real axis and comes back (a circle between a break-away
// and a break-in point) does; an arc that leaves for infinity does not.
func TestBoundedBranchPoints(t *testing.T) {
	var circle, away []complex128
	for k := 0; k <= 36; k++ {
		a := float64(k) * math.Pi / 36
		circle = append(circle, complex(-2+math.Cos(a), math.Sin(a))) // −1 → −3 over the top
		away = append(away, complex(-1, float64(k)))                  // −1 upwards to 36j
	}
	s := planeSpec{branches: [][]complex128{circle, away}}
	key := []complex128{0, -1, -3, -5}
	pts := s.boundedBranchPoints(key)
	top := 0.0
	for _, z := range pts {
		top = math.Max(top, imag(z))
	}
	// The circle reaches Im = 1; the arc to infinity (Im up to 36) must
	// not be used.
	if math.Abs(top-1) > 1e-12 {
		t.Errorf("highest framed point Im = %g, want 1 (the top of the circle)", top)
	}
	if len(pts) != 35 {
		t.Errorf("%d framed points, want the 35 off-axis points of the circle", len(pts))
	}
}
