package tf

import (
	"fmt"
	"math"

	"github.com/loopwise/loopwise/poly"
)

// DefaultMinimalTol is the relative tolerance Minimal uses when given 0: a
// pole p and a zero z cancel when |p − z| ≤ tol·max(1, |p|). It is about
// √ε (ε = 2.2e-16), the accuracy to which a double root is determined by
// its coefficients, so that a pair cancelled in exact arithmetic but
// computed with rounding is still recognised.
const DefaultMinimalTol = 1e-8

// Minimal returns g with common pole–zero pairs cancelled, and the values
// that were cancelled (each once per cancelled pair, complex ones in
// conjugate pairs, in the order of poly.SortRoots). A pole p and a zero z
// cancel when |p − z| ≤ tol·max(1, |p|) (poly.CommonRoots, nearest first);
// if tol is 0, it defaults to DefaultMinimalTol.
//
// When something cancels, numerator and denominator are rebuilt from their
// remaining roots (poly.FromRoots) times their original leading
// coefficients; the roots come from the backward-stable eigenvalue solver
// of poly.Roots, so the rebuilt polynomials are close to exact factors of
// the originals. When nothing cancels, g is returned unchanged. The gain
// factor, dead time and sample period are kept. The zero transfer function
// has the minimal form 0/1.
//
// Errors: ErrTolerance for a negative, NaN or infinite tol; ErrNumerical if
// the root finder fails.
func (g TF) Minimal(tol float64) (TF, []complex128, error) {
	if math.IsNaN(tol) || math.IsInf(tol, 0) || tol < 0 {
		return TF{}, nil, fmt.Errorf("%w: %v (want a finite value ≥ 0)", ErrTolerance, tol)
	}
	if tol == 0 {
		tol = DefaultMinimalTol
	}
	den := g.Den()
	if g.IsZero() {
		return TF{num: poly.Poly{}, den: poly.Constant(1), delay: g.delay, ts: g.ts}, nil, nil
	}
	if g.num.Degree() == 0 || den.Degree() == 0 {
		return g.withDen(den), nil, nil
	}
	common, err := poly.CommonRoots(g.num, den, tol)
	if err != nil {
		return TF{}, nil, fmt.Errorf("%w: %v", ErrNumerical, err)
	}
	if len(common) == 0 {
		return g.withDen(den), nil, nil
	}
	zeros, err := g.num.Roots()
	if err != nil {
		return TF{}, nil, fmt.Errorf("%w: zeros: %v", ErrNumerical, err)
	}
	poles, err := den.Roots()
	if err != nil {
		return TF{}, nil, fmt.Errorf("%w: poles: %v", ErrNumerical, err)
	}
	zeros = removeNearest(zeros, common)
	poles = removeNearest(poles, common)
	n, err := poly.FromRoots(zeros)
	if err != nil {
		return TF{}, nil, fmt.Errorf("%w: remaining zeros: %v", ErrNumerical, err)
	}
	d, err := poly.FromRoots(poles)
	if err != nil {
		return TF{}, nil, fmt.Errorf("%w: remaining poles: %v", ErrNumerical, err)
	}
	return TF{num: n.Scale(g.num.Lead()), den: d.Scale(den.Lead()), delay: g.delay, ts: g.ts}, common, nil
}

func (g TF) withDen(d poly.Poly) TF {
	g.den = d
	return g
}

// removeNearest removes from roots, for each value in drop, the nearest
// remaining root (complex ones are removed with their conjugates, which
// drop also lists), keeping exact conjugate pairs in what remains.
func removeNearest(roots, drop []complex128) []complex128 {
	used := make([]bool, len(roots))
	for _, c := range drop {
		best, bd := -1, math.Inf(1)
		for j, r := range roots {
			if used[j] || (imag(c) == 0) != (imag(r) == 0) || (imag(c) > 0) != (imag(r) > 0) {
				continue
			}
			if d := abs(r - c); d < bd {
				best, bd = j, d
			}
		}
		if best < 0 {
			// No root of the same kind (real/upper/lower): take the nearest.
			for j, r := range roots {
				if !used[j] {
					if d := abs(r - c); d < bd {
						best, bd = j, d
					}
				}
			}
		}
		if best >= 0 {
			used[best] = true
		}
	}
	var out []complex128
	for j, r := range roots {
		if !used[j] {
			out = append(out, r)
		}
	}
	return out
}

func abs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }

// Normalized returns g scaled so that its denominator is monic (leading
// coefficient exactly 1); the value of the transfer function is unchanged.
func (g TF) Normalized() TF {
	d := g.Den()
	lead := d.Lead()
	if lead == 1 {
		return g.withDen(d)
	}
	g.num = g.num.Scale(1 / lead)
	g.den, _ = d.Monic()
	return g
}
