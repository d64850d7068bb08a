package locus

import (
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
}

// newProblem turns a loop N/D (dead time replaced by a Padé approximation)
// into a = D, b = N.
func newProblem(loop tf.TF, r resolved) (*problem, error) {
	num, den := loop.Num(), loop.Den()
	var notes []string
	if d := loop.DelaySec(); d != 0 {
		if loop.IsDiscrete() {
			steps := d / loop.SampleTimeSec()
			ms := math.Round(steps)
			if math.Abs(steps-ms) > 1e-9*math.Max(1, steps) {
				return nil, fmt.Errorf("%w: dead time %v s is not a whole number of sample periods (%v s) in a discrete loop", ErrUnsupported, d, loop.SampleTimeSec())
			}
			den = den.ShiftUp(int(ms))
			notes = append(notes, fmt.Sprintf("dead time of %v s (%d samples) written exactly as z^-%d", d, int(ms), int(ms)))
		} else {
			pn, pd := padeDelay(d, r.padeOrder)
			num, den = num.Mul(pn), den.Mul(pd)
			notes = append(notes, fmt.Sprintf("dead time of %v s replaced by a Padé approximation of order %d", d, r.padeOrder))
		}
	}
	return newProblemPolys(den, num, loop.IsDiscrete(), loop.SampleTimeSec(), r, notes)
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
	if p.poles, err = rootsMult(a); err != nil {
		return nil, fmt.Errorf("locus: poles: %w", err)
	}
	if p.zeros, err = rootsMult(b); err != nil {
		return nil, fmt.Errorf("locus: zeros: %w", err)
	}
	for _, z := range p.zeros {
		if cabs(a.EvalComplex(z.Value)) <= 1e-9*absEval(a, cabs(z.Value)) {
			p.notes = append(p.notes, fmt.Sprintf("numerator and denominator share the root %v: it is a closed-loop pole for every %s", fmtC(z.Value), r.variable))
		}
	}
	if p.m > p.n {
		p.notes = append(p.notes, fmt.Sprintf("b has higher degree than a (%d > %d): %d branch(es) come from infinity as the %s approaches 0", p.m, p.n, p.m-p.n, r.variable))
	}
	return p, nil
}

// padeDelay returns the numerator and denominator of the diagonal Padé
// approximation of order n of e^(−sT): Σ c_k (−sT)^k / Σ c_k (sT)^k with
// c_k = (2n−k)!·n! / ((2n)!·k!·(n−k)!) (Padé 1892; see Golub & Van Loan,
// Matrix Computations, 4th ed., §9.3.1). The error is O((sT)^(2n+1)).
func padeDelay(T float64, n int) (num, den poly.Poly) {
	cn := make([]float64, n+1) // ascending powers
	cd := make([]float64, n+1)
	c := 1.0
	for k := 0; k <= n; k++ {
		if k > 0 {
			c *= float64(n-k+1) / (float64(2*n-k+1) * float64(k))
		}
		tk := c * math.Pow(T, float64(k))
		cd[k] = tk
		if k%2 == 1 {
			cn[k] = -tk
		} else {
			cn[k] = tk
		}
	}
	num, _ = poly.FromAscending(cn)
	den, _ = poly.FromAscending(cd)
	return num, den
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

func cabs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }

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
