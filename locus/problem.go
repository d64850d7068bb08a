package locus

import (
	"errors"
	"fmt"
	"math"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// problem is the characteristic equation a(x) + k·b(x) = 0 with its
// range, domain and open-loop roots.
type problem struct {
	a, b     poly.Poly
	ad, bd   poly.Poly // derivatives
	n, m     int       // degrees of a and b
	order    int       // max(n, m): number of branches
	rng      Range
	discrete bool
	ts       float64
	variable string
	notes    []string
	poles    []poly.Root
	zeros    []poly.Root
	// common lists the roots shared by a and b (with their common
	// multiplicity): closed-loop poles for every k. reduced is the problem
	// with them divided out (nil when there are none); the moving branches
	// are those of reduced.
	common  []poly.Root
	reduced *problem
}

// moving returns the problem whose roots move with k.
func (p *problem) moving() *problem {
	if p.reduced != nil {
		return p.reduced
	}
	return p
}

// newProblem turns a loop N/D (dead time replaced by a Padé approximation)
// into a = D, b = N.
func newProblem(loop tf.TF, r resolved) (*problem, error) {
	var notes []string
	if d := loop.DelaySec(); d != 0 {
		rl, err := loop.Pade(r.padeOrder)
		if err != nil {
			if errors.Is(err, tf.ErrFractionalDelay) {
				return nil, fmt.Errorf("%w: dead time %v s in a discrete loop: %w", ErrUnsupported, d, err)
			}
			return nil, fmt.Errorf("locus: dead time %v s: %w", d, err)
		}
		if loop.IsDiscrete() {
			k := int(math.Round(d / loop.SampleTimeSec()))
			notes = append(notes, fmt.Sprintf("dead time of %v s (%d samples) written exactly as z^-%d", d, k, k))
		} else {
			notes = append(notes, fmt.Sprintf("dead time of %v s replaced by a Padé approximation of order %d", d, r.padeOrder))
		}
		loop = rl
	}
	return newProblemPolys(loop.Den(), loop.Num(), loop.IsDiscrete(), loop.SampleTimeSec(), r, notes)
}

func newProblemPolys(a, b poly.Poly, discrete bool, ts float64, r resolved, notes []string) (*problem, error) {
	if !a.IsFinite() || !b.IsFinite() {
		return nil, fmt.Errorf("%w: a coefficient of the loop overflowed", ErrNotFinite)
	}
	if b.IsZero() {
		return nil, fmt.Errorf("%w: the %s does not enter a + %s·b = 0", ErrZeroNumerator, r.variable, r.variable)
	}
	if a.IsZero() {
		// a ≡ 0: the roots of k·b are the zeros for every k ≠ 0.
		return nil, fmt.Errorf("%w: the loop denominator a is identically zero", ErrDegenerate)
	}
	p := &problem{a: a, b: b, ad: a.Derivative(), bd: b.Derivative(), n: a.Degree(), m: b.Degree(),
		rng: r.rng, discrete: discrete, ts: ts, variable: r.variable, notes: notes}
	p.order = max(p.n, p.m)
	var err error
	if p.poles, err = a.RootsWithMultiplicity(); err != nil {
		return nil, fmt.Errorf("locus: poles: %w", err)
	}
	if p.zeros, err = b.RootsWithMultiplicity(); err != nil {
		return nil, fmt.Errorf("locus: zeros: %w", err)
	}
	p.findCommon()
	if p.m > p.n {
		p.notes = append(p.notes, fmt.Sprintf("b has higher degree than a (%d > %d): %d branch(es) come from infinity as the %s approaches 0", p.m, p.n, p.m-p.n, r.variable))
	}
	return p, nil
}

// findCommon divides out the roots shared by a and b (matched within
// 1e-8 relative), which stay closed-loop poles for every k.
func (p *problem) findCommon() {
	var common, rp, rz []poly.Root
	zm := map[int]int{}
	for _, q := range p.poles {
		mult := q.Multiplicity
		for j, z := range p.zeros {
			avail := z.Multiplicity - zm[j]
			if avail > 0 && cabs(q.Value-z.Value) <= 1e-8*math.Max(1, cabs(q.Value)) {
				c := min(mult, avail)
				zm[j] += c
				mult -= c
				common = append(common, poly.Root{Value: q.Value, Multiplicity: c})
			}
		}
		if mult > 0 {
			rp = append(rp, poly.Root{Value: q.Value, Multiplicity: mult})
		}
	}
	if len(common) == 0 {
		return
	}
	for j, z := range p.zeros {
		if m := z.Multiplicity - zm[j]; m > 0 {
			rz = append(rz, poly.Root{Value: z.Value, Multiplicity: m})
		}
	}
	// Roots at the origin are divided out exactly (trailing zero
	// coefficients), the others by polynomial division, so that the exact
	// zero roots of a and b stay exact.
	var vals, nonzero []complex128
	origin := 0
	for _, c := range common {
		for range c.Multiplicity {
			vals = append(vals, c.Value)
			if c.Value == 0 {
				origin++
			} else {
				nonzero = append(nonzero, c.Value)
			}
		}
	}
	g, err := poly.FromRoots(nonzero)
	if err != nil {
		return
	}
	ka, kb := trailingZeros(p.a), trailingZeros(p.b)
	a1, _, err1 := dropLow(p.a, ka).DivMod(g)
	b1, _, err2 := dropLow(p.b, kb).DivMod(g)
	if err1 != nil || err2 != nil || b1.IsZero() {
		return
	}
	a1, b1 = a1.ShiftUp(ka-origin), b1.ShiftUp(kb-origin)
	q := *p
	q.a, q.b, q.ad, q.bd = a1, b1, a1.Derivative(), b1.Derivative()
	q.n, q.m = a1.Degree(), b1.Degree()
	q.order = max(q.n, q.m)
	q.poles, q.zeros = rp, rz
	q.common, q.reduced, q.notes = nil, nil, nil
	p.common = common
	p.reduced = &q
	p.notes = append(p.notes, fmt.Sprintf("numerator and denominator share %d root(s), e.g. %v: closed-loop poles for every %s, left out of the moving branches", len(vals), fmtC(vals[0]), p.variable))
}

func trailingZeros(q poly.Poly) int {
	k := 0
	for k < q.Degree() && q.Coef(k) == 0 {
		k++
	}
	return k
}

// dropLow returns q/x^k for the k trailing zero coefficients of q.
func dropLow(q poly.Poly, k int) poly.Poly {
	r, _ := poly.FromAscending(q.Ascending()[k:])
	return r
}

// eval returns a(x) + k·b(x) and its derivative in x.
func (p *problem) eval(x complex128, k float64) (f, df complex128) {
	av, ad := p.a.EvalWithDerivative(x)
	bv, bd := p.b.EvalWithDerivative(x)
	kc := complex(k, 0)
	return av + kc*bv, ad + kc*bd
}

// charPoly returns a + k·b.
func (p *problem) charPoly(k float64) poly.Poly { return p.a.Add(p.b.Scale(k)) }

// magnitude returns Σ|a_i||x|^i + |k|Σ|b_i||x|^i, the scale of the terms
// of a(x) + k·b(x), for relative residuals.
func (p *problem) magnitude(x complex128, k float64) float64 {
	ax := cabs(x)
	return absEval(p.a, ax) + math.Abs(k)*absEval(p.b, ax)
}

func absEval(q poly.Poly, x float64) float64 {
	s := 0.0
	for i := q.Degree(); i >= 0; i-- {
		s = s*x + math.Abs(q.Coef(i))
	}
	return s
}

// cabs returns |z|, without the scaling of math.Hypot when no overflow or
// underflow can occur.
func cabs(z complex128) float64 {
	x, y := math.Abs(real(z)), math.Abs(imag(z))
	if x < 1e150 && y < 1e150 && (x > 1e-150 || y > 1e-150) {
		return math.Sqrt(x*x + y*y)
	}
	return math.Hypot(x, y)
}

func fmtC(z complex128) string {
	if imag(z) == 0 {
		return fmt.Sprintf("%.6g", real(z))
	}
	return fmt.Sprintf("%.6g%+.6gi", real(z), imag(z))
}

// degreeDrop returns the value of k at which the degree of a + k·b drops,
// and whether there is one: −a₀/b₀ when deg a = deg b, 0 when deg b > deg a.
func (p *problem) degreeDrop() (float64, bool) {
	switch {
	case p.n == p.m:
		return -p.a.Lead() / p.b.Lead(), true
	case p.m > p.n:
		return 0, true
	}
	return 0, false
}
