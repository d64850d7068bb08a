package robust

import (
	"math"
)

// family is the characteristic function F(s) = D(s, t)·(1 + r·e^{jθ}) +
// κ·e^{−jφ}·N(s, t)·e^{−s(τ(t) + τx)} of a continuous loop (a discrete one
// after the bilinear map), evaluated on the ray s = ω·e^{jψ}, ω ≥ 0.
// With κ = 1 and φ = τx = r = 0 it is den + num·e^{−sτ}; the extra
// quantities make families whose stability proves a margin (see worst.go).
type family struct {
	n        int
	den, num []mpoly // ascending powers
	tau      mpoly
	gain     interval // κ
	rot      interval // φ, radians
	delay    interval // τx, seconds
	disk     interval // r
	theta    interval // θ
	ray      float64  // ψ in radians; π/2 is the imaginary axis
}

// dims of a cell: 0 ω, 1..n the scaled parameters, then κ, φ, τx, r, θ.
const nExtra = 5

func (f *family) dims() int { return 1 + f.n + nExtra }

func (f *family) baseCell(omega interval) []interval {
	c := make([]interval, f.dims())
	c[0] = omega
	for i := range f.n {
		c[1+i] = interval{-1, 1}
	}
	c[1+f.n], c[2+f.n], c[3+f.n], c[4+f.n], c[5+f.n] = f.gain, f.rot, f.delay, f.disk, f.theta
	return c
}

func degree(ps []mpoly) int {
	for k := len(ps) - 1; k >= 0; k-- {
		if !ps[k].isZero() {
			return k
		}
	}
	return -1
}

// rayPower returns e^{jkψ} as a point complex interval (exact on the axis).
func (f *family) rayPower(k int) cinterval {
	if f.ray == math.Pi/2 {
		switch k % 4 {
		case 0:
			return cinterval{point(1), point(0)}
		case 1:
			return cinterval{point(0), point(1)}
		case 2:
			return cinterval{point(-1), point(0)}
		default:
			return cinterval{point(0), point(-1)}
		}
	}
	c, s := cosSin(point(float64(k) * f.ray))
	// the product k·ψ is rounded: widen by its rounding as well
	c, s = widenTrig(c), widenTrig(s)
	return cinterval{c, s}
}

func (f *family) sum(ps []mpoly, t []interval, w interval) cinterval {
	acc := cinterval{point(0), point(0)}
	wk := point(1)
	for k, p := range ps {
		if k > 0 {
			wk = wk.mul(w)
		}
		if p.isZero() {
			continue
		}
		acc = acc.add(f.rayPower(k).mulReal(p.evalInterval(t).mul(wk)))
	}
	return acc
}

// eval encloses F over a cell.
func (f *family) eval(cell []interval) cinterval {
	w, t, x := cell[0], cell[1:1+f.n], cell[1+f.n:]
	d := f.sum(f.den, t, w)
	if x[3].hi > 0 {
		c, s := cosSin(x[4])
		d = d.mul(cinterval{point(1).add(x[3].mul(c)), x[3].mul(s)})
	}
	nv := f.sum(f.num, t, w)
	phase := x[1]
	if !f.tau.isZero() || x[2].hi > 0 {
		phase = phase.add(w.mul(f.tau.evalInterval(t).add(x[2])))
	}
	if phase.lo != 0 || phase.hi != 0 {
		c, s := cosSin(phase)
		nv = nv.mul(cinterval{c, s.neg()})
	}
	if x[0].lo != 1 || x[0].hi != 1 {
		nv = nv.mulReal(x[0])
	}
	return d.add(nv)
}

// lead encloses the coefficient of s^n of F over a cell (ω ignored).
func (f *family) lead(cell []interval) cinterval {
	n := degree(f.den)
	t, x := cell[1:1+f.n], cell[1+f.n:]
	d := cinterval{f.den[n].evalInterval(t), point(0)}
	if x[3].hi > 0 {
		c, s := cosSin(x[4])
		d = d.mul(cinterval{point(1).add(x[3].mul(c)), x[3].mul(s)})
	}
	if degree(f.num) == n {
		c, s := cosSin(x[1])
		nv := cinterval{f.num[n].evalInterval(t), point(0)}.mul(cinterval{c, s.neg()}).mulReal(x[0])
		d = d.add(nv)
	}
	return d
}

func cmig(a cinterval) float64 { return math.Max(a.re.mig(), a.im.mig()) }

// splittable reports whether dimension k of a cell has positive width.
func splittable(cell []interval, k int) bool { return cell[k].hi > cell[k].lo }

func split(cell []interval, k int) ([]interval, []interval) {
	a := append([]interval(nil), cell...)
	b := append([]interval(nil), cell...)
	m := cell[k].mid()
	a[k].hi, b[k].lo = m, m
	return a, b
}

// chooseSplit picks the dimension whose collapse to its midpoint shrinks
// the enclosure most.
func chooseSplit(cell []interval, from int, eval func([]interval) cinterval) int {
	best, bestW := -1, math.Inf(1)
	for k := from; k < len(cell); k++ {
		if !splittable(cell, k) {
			continue
		}
		c := append([]interval(nil), cell...)
		m := cell[k].mid()
		c[k] = interval{m, m}
		v := eval(c)
		w := v.re.width() + v.im.width()
		if w < bestW || best < 0 {
			best, bestW = k, w
		}
	}
	return best
}

// leadBound returns a lower bound of |lead| over the box and its extras,
// found by subdivision; ok is false when zero could not be excluded within
// maxCells, and bad is then a cell where it was not.
func (f *family) leadBound(maxCells int) (low float64, ok bool, bad []interval) {
	queue := [][]interval{f.baseCell(point(0))}
	low = math.Inf(1)
	for cells := 0; len(queue) > 0; cells++ {
		c := queue[0]
		queue = queue[1:]
		v := f.lead(c)
		if m := cmig(v); m > 0 {
			low = math.Min(low, m)
			continue
		}
		k := chooseSplit(c, 1, f.lead)
		if k < 0 || cells > maxCells {
			return 0, false, c
		}
		a, b := split(c, k)
		queue = append(queue, a, b)
	}
	return low, true, nil
}

// frequencyBound returns R such that F(s) ≠ 0 for |s| > R everywhere in the
// box (Cauchy-type bound: |F| ≥ low·Rⁿ − Σ_{k<n} hi_k·R^k > 0 for R ≥ 1 and
// R > Σ hi_k/low).
func (f *family) frequencyBound(low float64) float64 {
	n := degree(f.den)
	t := f.baseCell(point(0))[1 : 1+f.n]
	rmax := f.disk.hi
	sum := 0.0
	for k := range n {
		var hi float64
		if k < len(f.den) {
			hi += f.den[k].evalInterval(t).mag() * (1 + rmax)
		}
		if k < len(f.num) {
			hi += f.num[k].evalInterval(t).mag() * f.gain.mag()
		}
		sum += hi
	}
	return math.Max(1, sum/low) * (1 + 1e-6)
}

// proofStatus is the outcome of a zero-exclusion run.
type proofStatus int

const (
	proven proofStatus = iota
	notProven
	foundPoint
)

// zeroExclusion subdivides (ω, t, extras) cells over ω ∈ [0, R] until F is
// proven nonzero on each (0 outside the real or the imaginary enclosure), a
// probe reports a counterexample, or maxCells cells have been examined.
// By the zero exclusion principle (Frazer & Duncan 1929; Bhattacharyya,
// Chapellat & Keel 1995, ch. 1) a family of constant degree with one stable
// member is stable for the whole box iff F(jω) ≠ 0 on the whole axis.
// probe, if not nil, is called with the parameter midpoint of deep cells and
// returns true to stop (a counterexample).
func (f *family) zeroExclusion(r float64, maxCells int, fixed func([]interval), probe func(t []float64) bool) (status proofStatus, cells int, unproven [][]interval) {
	var queue [][]interval
	lo := 0.0
	for hi := r / 1024; ; hi *= 2 {
		if hi >= r {
			hi = r
		}
		c := f.baseCell(interval{lo, hi})
		if fixed != nil {
			fixed(c)
		}
		queue = append(queue, c)
		if hi == r {
			break
		}
		lo = hi
	}
	type item struct {
		c     []interval
		depth int
	}
	items := make([]item, len(queue))
	for i, c := range queue {
		items[i] = item{c, 0}
	}
	for len(items) > 0 {
		it := items[0]
		items = items[1:]
		cells++
		v := f.eval(it.c)
		if v.excludes0() {
			continue
		}
		if probe != nil && it.depth >= 6 && it.depth%3 == 0 {
			t := make([]float64, f.n)
			for i := range t {
				t[i] = it.c[1+i].mid()
			}
			if probe(t) {
				return foundPoint, cells, nil
			}
		}
		k := chooseSplit(it.c, 0, f.eval)
		if k < 0 || cells >= maxCells {
			rest := [][]interval{it.c}
			for _, o := range items {
				rest = append(rest, o.c)
			}
			return notProven, cells, rest
		}
		a, b := split(it.c, k)
		items = append(items, item{a, it.depth + 1}, item{b, it.depth + 1})
	}
	return proven, cells, nil
}
