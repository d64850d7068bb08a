package robust

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/margins"
)

// EnvelopeCell encloses the loop's frequency response over a frequency
// interval and the whole box: for every ω in [OmegaLoRadPerSec,
// OmegaHiRadPerSec] and every parameter value, L(jω) lies in the rectangle
// [ReMin, ReMax] × [ImMin, ImMax]. A cell whose bounds are infinite holds a
// pole of L on the axis for some parameter value.
type EnvelopeCell struct {
	OmegaLoRadPerSec, OmegaHiRadPerSec float64
	ReMin, ReMax, ImMin, ImMax         float64
}

// NyquistBand is the Nyquist curves of a box: sampled curves and the
// guaranteed envelope.
type NyquistBand struct {
	// FrequencyRadPerSec is the common frequency grid of the curves.
	FrequencyRadPerSec []float64
	// Curves[i] is L(jω) on the grid at the parameter values Values[i]
	// (the centre first, then corners, then pseudo-random points).
	Curves [][]complex128
	Values [][]float64
	// Envelope covers the frequency range of the grid.
	Envelope []EnvelopeCell
	// SampleTimeSec is that of the loop (0: continuous).
	SampleTimeSec float64
}

// BandSettings controls NyquistBandOf. A nil *BandSettings means the
// defaults.
type BandSettings struct {
	// Curves is the number of sampled curves (centre, up to 2ⁿ corners,
	// then random points). If zero, defaults to 24.
	Curves int
	// Points is the number of frequencies of the grid. If zero, defaults
	// to 400.
	Points int
	// Cells is the number of envelope cells along the frequency range. If
	// zero, defaults to 300.
	Cells int
	// MinRadPerSec and MaxRadPerSec bound the grid. If zero, they default
	// to the nominal loop's gain crossover / 100 and × 100 (or 0.01 and
	// 100 rad/s without one; discrete loops end at π/T).
	MinRadPerSec, MaxRadPerSec float64
	// Seed seeds the random curves.
	Seed uint64
}

// NyquistBandOf samples the Nyquist curves of the box and encloses them.
// The envelope is an outward-rounded interval enclosure of N(jω)/D(jω)
// (times e^(−jωτ)) over each frequency cell and sub-boxes of the parameter
// box (4 per parameter for one or two parameters, 2 for up to four, else the
// whole box), computed as N·conj(D)/|D|² in interval arithmetic; discrete
// loops are evaluated through the bilinear map, whose frequency is
// tan(ωT/2).
func NyquistBandOf(l *Loop, set *BandSettings) (NyquistBand, error) {
	var s BandSettings
	if set != nil {
		s = *set
	}
	if s.Curves < 0 || s.Points < 0 || s.Cells < 0 || s.MinRadPerSec < 0 || s.MaxRadPerSec < 0 || (s.MaxRadPerSec > 0 && s.MaxRadPerSec <= s.MinRadPerSec) {
		return NyquistBand{}, fmt.Errorf("%w: band settings %+v", ErrSettings, s)
	}
	if s.Curves == 0 {
		s.Curves = 24
	}
	if s.Points == 0 {
		s.Points = 400
	}
	if s.Cells == 0 {
		s.Cells = 300
	}
	T := l.ts
	if s.MinRadPerSec == 0 || s.MaxRadPerSec == 0 {
		wc := 1.0
		if w, err := l.nominalCrossover(); err == nil && w > 0 {
			wc = w
		}
		if s.MinRadPerSec == 0 {
			s.MinRadPerSec = wc / 100
		}
		if s.MaxRadPerSec == 0 {
			s.MaxRadPerSec = wc * 100
		}
	}
	if T > 0 {
		s.MaxRadPerSec = math.Min(s.MaxRadPerSec, math.Pi/T*(1-1e-9))
		s.MinRadPerSec = math.Min(s.MinRadPerSec, s.MaxRadPerSec/1000)
	}
	b := NyquistBand{SampleTimeSec: T}
	lw, hw := math.Log(s.MinRadPerSec), math.Log(s.MaxRadPerSec)
	for k := range s.Points {
		b.FrequencyRadPerSec = append(b.FrequencyRadPerSec, math.Exp(lw+(hw-lw)*float64(k)/float64(s.Points-1)))
	}
	pts := l.probePoints(max(0, s.Curves-1-(1<<min(len(l.mid), 10))), s.Seed)
	if len(pts) > s.Curves {
		pts = pts[:s.Curves]
	}
	for _, t := range pts {
		g, err := l.At(l.valuesOf(t))
		if err != nil {
			return b, err
		}
		c := make([]complex128, len(b.FrequencyRadPerSec))
		for k, w := range b.FrequencyRadPerSec {
			v, err := g.FrequencyResponse(w)
			if err != nil {
				v = cmplx.Inf()
			}
			c[k] = v
		}
		b.Curves = append(b.Curves, c)
		b.Values = append(b.Values, l.valuesOf(t))
	}
	f := l.family()
	split := 1
	switch n := len(l.mid); {
	case n <= 2:
		split = 4
	case n <= 4:
		split = 2
	}
	subs := subBoxes(len(l.mid), split)
	for k := range s.Cells {
		lo := math.Exp(lw + (hw-lw)*float64(k)/float64(s.Cells))
		hi := math.Exp(lw + (hw-lw)*float64(k+1)/float64(s.Cells))
		if k == s.Cells-1 {
			hi = s.MaxRadPerSec
		}
		w := interval{down(lo), up(hi)}
		if T > 0 {
			// ν = tan(ωT/2), monotone on [0, π/T)
			w = interval{down(math.Tan(lo * T / 2)), up(math.Tan(hi * T / 2))}
			w = interval{down(w.lo * (1 - 4e-16)), up(w.hi * (1 + 4e-16))}
		}
		cell := EnvelopeCell{OmegaLoRadPerSec: lo, OmegaHiRadPerSec: hi, ReMin: math.Inf(1), ReMax: math.Inf(-1), ImMin: math.Inf(1), ImMax: math.Inf(-1)}
		for _, box := range subs {
			c := f.baseCell(w)
			copy(c[1:], box)
			re, im := f.loopEnclosure(c)
			cell.ReMin, cell.ReMax = math.Min(cell.ReMin, re.lo), math.Max(cell.ReMax, re.hi)
			cell.ImMin, cell.ImMax = math.Min(cell.ImMin, im.lo), math.Max(cell.ImMax, im.hi)
		}
		b.Envelope = append(b.Envelope, cell)
	}
	return b, nil
}

func subBoxes(n, split int) [][]interval {
	total := 1
	for range n {
		total *= split
	}
	out := make([][]interval, 0, total)
	for g := range total {
		box := make([]interval, n)
		r := g
		for i := range n {
			j := r % split
			r /= split
			box[i] = interval{-1 + 2*float64(j)/float64(split), -1 + 2*float64(j+1)/float64(split)}
		}
		out = append(out, box)
	}
	return out
}

// loopEnclosure encloses L = N·e^(−sτ)/D over a cell: N·conj(D)/|D|².
func (f *family) loopEnclosure(cell []interval) (re, im interval) {
	w, t := cell[0], cell[1:1+f.n]
	d := f.sum(f.den, t, w)
	nv := f.sum(f.num, t, w)
	if !f.tau.isZero() {
		c, s := cosSin(w.mul(f.tau.evalInterval(t)))
		nv = nv.mul(cinterval{c, s.neg()})
	}
	mag := d.re.pow(2).add(d.im.pow(2))
	if mag.lo <= 0 {
		inf := interval{math.Inf(-1), math.Inf(1)}
		return inf, inf
	}
	p := nv.mul(cinterval{d.re, d.im.neg()})
	inv := interval{down(1 / mag.hi), up(1 / mag.lo)}
	return p.re.mul(inv), p.im.mul(inv)
}

// nominalCrossover returns the nominal loop's gain crossover in rad/s.
func (l *Loop) nominalCrossover() (float64, error) {
	m, err := margins.Compute(l.nomial, nil)
	if err != nil {
		return 0, err
	}
	return m.GainCrossoverRadPerSec, nil
}
