package chart_test

import (
	"errors"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/tf"
)

// padeOfDelay returns the poles and zeros of the Padé approximation of
// order n of e^(−sτ).
func padeOfDelay(t *testing.T, tau float64, n int) (poles, zeros []complex128) {
	t.Helper()
	one, err := tf.New([]float64{1}, []float64{1})
	if err != nil {
		t.Fatal(err)
	}
	d, err := one.WithDelay(tau)
	if err != nil {
		t.Fatal(err)
	}
	p, err := d.Pade(n)
	if err != nil {
		t.Fatal(err)
	}
	if poles, err = p.Den().Roots(); err != nil {
		t.Fatal(err)
	}
	if zeros, err = p.Num().Roots(); err != nil {
		t.Fatal(err)
	}
	return poles, zeros
}

// TestApproximationArtefacts: the Padé approximation's poles and zeros
// are drawn apart from the plant's and kept out of the automatic view,
// which then frames the region within half their smallest modulus; without
// the setting they are framed (the view reaches them). The note under the
// figure says where they are.
func TestApproximationArtefacts(t *testing.T) {
	const tau, order = 0.8, 6
	g := tf.MustParse("exp(-0.8s)*(0.4s+1)/(s*(s+1)*(6s+1))")
	poles, zeros := padeOfDelay(t, tau, order)
	near := math.Inf(1)
	for _, z := range append(append([]complex128(nil), poles...), zeros...) {
		near = math.Min(near, cmplx.Abs(z))
	}
	approx := &chart.Approximation{Name: "Padé approximation of the dead time", Poles: poles, Zeros: zeros}
	l, err := locus.Trace(g, &locus.Settings{PadeOrder: order})
	if err != nil {
		t.Fatal(err)
	}
	rational, err := g.Pade(order)
	if err != nil {
		t.Fatal(err)
	}
	reach := func(f *chart.Figure) float64 {
		p := f.Panels[0]
		return math.Max(math.Max(-p.X.Min, p.X.Max), math.Max(-p.Y.Min, p.Y.Max))
	}
	for _, tc := range []struct {
		name string
		draw func(a *chart.Approximation) (*chart.Figure, error)
	}{
		{"root locus", func(a *chart.Approximation) (*chart.Figure, error) {
			return chart.RootLocus(l, &chart.LocusSettings{PlaneSettings: chart.PlaneSettings{Approximation: a}})
		}},
		{"pole-zero map", func(a *chart.Approximation) (*chart.Figure, error) {
			return chart.PoleZero(rational, &chart.PlaneSettings{Approximation: a})
		}},
	} {
		plain, err := tc.draw(nil)
		if err != nil {
			t.Fatal(err)
		}
		marked, err := tc.draw(approx)
		if err != nil {
			t.Fatal(err)
		}
		if r := reach(plain); !(r >= near) {
			t.Errorf("%s without Approximation: view reaches %v, the artefacts are at %v and beyond", tc.name, r, near)
		}
		// The framed points lie within near/2; planeView pads and squares
		// the view, but not by a factor of 2.
		if r := reach(marked); !(r < near) {
			t.Errorf("%s with Approximation: view reaches %v, want less than the nearest artefact %v", tc.name, r, near)
		}
		note := strings.Join(marked.Notes, "\n")
		if !strings.Contains(note, "Padé approximation of the dead time is faithful") || !strings.Contains(note, "6 poles and 6 zeros") {
			t.Errorf("%s: notes %q", tc.name, marked.Notes)
		}
		if strings.Contains(strings.Join(plain.Notes, "\n"), "faithful") {
			t.Errorf("%s without Approximation: notes %q", tc.name, plain.Notes)
		}
	}
	_, err = chart.PoleZero(rational, &chart.PlaneSettings{Approximation: &chart.Approximation{Poles: []complex128{complex(math.NaN(), 0)}}})
	if !errors.Is(err, chart.ErrNotFinite) {
		t.Errorf("NaN artefact: %v", err)
	}
}
