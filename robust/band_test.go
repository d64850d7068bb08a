package robust

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Every sampled curve, and the loop at further random points, must lie in
// the envelope cell of its frequency (the envelope is a guarantee).
func TestNyquistEnvelopeEncloses(t *testing.T) {
	for _, d := range []Description{
		{Expressions: []string{"9*g/(s^2 (m s + 1))", "(0.4 + 0.3*s)"}, Params: []Param{{Name: "g", Min: 0.8, Max: 1.2}, {Name: "m", Min: 0.05, Max: 0.08}}},
		{Expressions: []string{"2*k*exp(-T*s)/(s+1)"}, Params: []Param{{Name: "k", Min: 0.5, Max: 1}, {Name: "T", Min: 0.1, Max: 0.5}}},
		{Expressions: []string{"k*0.5/(z-0.5)"}, SampleTimeSec: 0.1, Params: []Param{{Name: "k", Min: 0.5, Max: 2}}},
	} {
		l := mustLoop(t, d)
		b, err := NyquistBandOf(l, &BandSettings{Cells: 60, Points: 120})
		if err != nil {
			t.Fatal(err)
		}
		if len(b.Curves) == 0 || len(b.Envelope) != 60 {
			t.Fatalf("%d curves, %d cells", len(b.Curves), len(b.Envelope))
		}
		rng := rand.New(rand.NewPCG(3, 4))
		for trial := range 400 {
			c := b.Envelope[rng.IntN(len(b.Envelope))]
			w := c.OmegaLoRadPerSec + rng.Float64()*(c.OmegaHiRadPerSec-c.OmegaLoRadPerSec)
			v := make([]float64, len(l.mid))
			for i, p := range l.desc.Params {
				v[i] = p.Min + rng.Float64()*(p.Max-p.Min)
				if trial%4 == 0 {
					v[i] = p.Min // corners too
				}
			}
			g, _ := l.At(v)
			z, err := g.FrequencyResponse(w)
			if err != nil {
				t.Fatal(err)
			}
			if real(z) < c.ReMin || real(z) > c.ReMax || imag(z) < c.ImMin || imag(z) > c.ImMax {
				t.Fatalf("%v: L(j%g) = %v at %v outside the cell %+v", d.Expressions, w, z, v, c)
			}
		}
		// The envelope is not vacuous: its cells are bounded near the
		// crossover.
		mid := b.Envelope[len(b.Envelope)/2]
		if math.IsInf(mid.ReMax-mid.ReMin, 0) {
			t.Fatalf("unbounded cell %+v", mid)
		}
	}
}
