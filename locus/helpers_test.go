package locus

import (
	"math"
	"math/cmplx"
	"math/rand/v2"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
	"gonum.org/v1/gonum/mat"
)

// tracedBranch is a branch as a list of (k, s) for the metrics below; both
// the continuation and the baseline produce them.
type tracedBranch []Point

// continueFine follows the root s1 of a + k1·b to k2 by small, bisected
// Euler–Newton steps that move at most 0.2 % of the scale, with no
// knowledge of the other roots. It is the independent checker of branch
// identity: a jump between two points of a trace shows as a mismatch at
// the end.
func continueFine(p *problem, k1 float64, s1 complex128, k2 float64, scale float64) (complex128, bool) {
	s, k := s1, k1
	h := (k2 - k1) / 8
	for guard := 0; guard < 100000 && k != k2; guard++ {
		if math.Abs(h) > math.Abs(k2-k) {
			h = k2 - k
		}
		_, df := p.eval(s, k)
		if df == 0 {
			return s, false
		}
		pred := s - p.b.EvalComplex(s)/df*complex(h, 0)
		c := pred
		ok := false
		for range 20 {
			f, d := p.eval(c, k+h)
			if d == 0 {
				break
			}
			dd := f / d
			c -= dd
			if cmplx.Abs(dd) <= 1e-11*math.Max(cmplx.Abs(c), 1e-6*scale) {
				ok = true
				break
			}
		}
		if f, _ := p.eval(c, k+h); !ok && cmplx.Abs(f) <= 1e-11*p.magnitude(c, k+h) {
			ok = true
		}
		if !ok || cmplx.Abs(c-pred) > math.Min(2e-4*scale, 0.05*cmplx.Abs(c-s)+1e-9*scale) || cmplx.Abs(c-s) > 2e-3*scale {
			h /= 2
			if math.Abs(h) < 1e-13*math.Max(1, math.Abs(k)) {
				return s, false
			}
			continue
		}
		s, k = c, k+h
		h *= 1.5
	}
	return s, k == k2
}

// rootError estimates how far a double-precision root s of a + k·b can be
// from the exact one: the first-order bound u·M/|P′| and the second-order
// bound √(2u·M/|P″|) near a double root, with M the magnitude of the terms
// (Wilkinson 1963, Rounding Errors in Algebraic Processes, ch. 2).
func rootError(p *problem, s complex128, k float64) float64 {
	const u = 0x1p-53
	m := p.magnitude(s, k)
	_, d1 := p.eval(s, k)
	d2 := p.ad.Derivative().EvalComplex(s) + complex(k, 0)*p.bd.Derivative().EvalComplex(s)
	e1 := u * m / cmplx.Abs(d1)
	e2 := math.Sqrt(2 * u * m / cmplx.Abs(d2))
	return math.Min(e1, e2)
}

// countSwaps counts the steps of the branches whose end point is not the
// continuation of their start point, beyond the accuracy double precision
// allows there (rootError); steps the checker cannot follow are not
// counted (checked counts the others). Steps that touch a break value
// (where branches meet and any continuation is legitimate) or an infinite
// value are skipped.
func countSwaps(p *problem, an Analysis, branches []tracedBranch, scale float64) (swaps, checked, inconclusive int) {
	nearBreak := func(k1, k2 float64) bool {
		lo, hi := math.Min(k1, k2), math.Max(k1, k2)
		for _, b := range an.BreakPoints {
			if b.Value >= lo-1e-9*math.Abs(lo) && b.Value <= hi+1e-9*math.Abs(hi) {
				return true
			}
		}
		if kd, ok := p.degreeDrop(); ok && kd >= lo && kd <= hi {
			return true
		}
		return lo <= 0 && hi >= 0 && p.rng.Min < 0
	}
	for _, br := range branches {
		for i := 0; i+1 < len(br); i++ {
			a, b := br[i], br[i+1]
			if math.IsInf(a.Value, 0) || math.IsInf(b.Value, 0) || a.Value == b.Value || nearBreak(a.Value, b.Value) {
				continue
			}
			if a.Value == 0 && multiplePole(an) {
				continue // leaving a multiple pole: any order is legitimate
			}
			checked++
			e, ok := continueFine(p, a.Value, a.S, b.Value, scale)
			if !ok {
				inconclusive++ // the checker itself could not follow (see rootError)
				continue
			}
			if cmplx.Abs(e-b.S) > 1e-6*scale+1e3*rootError(p, b.S, b.Value) {
				swaps++
			}
		}
	}
	return swaps, checked, inconclusive
}

func multiplePole(an Analysis) bool {
	for _, q := range an.Poles {
		if q.Multiplicity > 1 {
			return true
		}
	}
	return false
}

// maxDeviation returns the largest distance, relative to scale, from the
// midpoint m of a chord of a branch (inside the view) to the exact locus,
// estimated to second order as |Im g(m)|/|g′(m)| for g = −a/b (the locus
// is the level set Im g = 0 with Re g in the range; by the
// Cauchy–Riemann equations |∇ Im g| = |g′|), capped by the distance to the
// nearest break point where g′ vanishes.
func maxDeviation(p *problem, an Analysis, branches []tracedBranch, view Rect, scale float64) float64 {
	worst := 0.0
	for _, br := range branches {
		for i := 0; i+1 < len(br); i++ {
			m := (br[i].S + br[i+1].S) / 2
			if real(m) < view.ReMin || real(m) > view.ReMax || imag(m) < view.ImMin || imag(m) > view.ImMax {
				continue
			}
			av, ad := p.a.EvalWithDerivative(m)
			bv, bd := p.b.EvalWithDerivative(m)
			if bv == 0 {
				continue
			}
			g := -av / bv
			gd := -(ad*bv - av*bd) / (bv * bv)
			d := math.Abs(imag(g)) / cmplx.Abs(gd)
			if real(g) < p.rng.Min || real(g) > p.rng.Max {
				d = math.Max(d, cmplx.Abs(br[i+1].S-br[i].S)/2)
			}
			for _, b := range an.BreakPoints {
				d = math.Min(d, cmplx.Abs(m-b.Point))
			}
			worst = math.Max(worst, d/scale)
		}
	}
	return worst
}

// baselineGrid is the naive locus a Go engineer writes by hand: closed-loop
// roots at 2000 log-spaced gains as eigenvalues of the companion matrix of
// a + k·b (gonum mat.Eigen), branches matched greedily to the nearest root
// of the previous gain. It returns the branches and the number of eigen
// solves.
func baselineGrid(a, b poly.Poly, kLo, kHi float64, n int) ([]tracedBranch, int) {
	deg := max(a.Degree(), b.Degree())
	branches := make([]tracedBranch, deg)
	comp := mat.NewDense(deg, deg, nil)
	var eig mat.Eigen
	vals := make([]complex128, deg)
	used := make([]bool, deg)
	solves := 0
	for i := range n {
		k := kLo * math.Pow(kHi/kLo, float64(i)/float64(n-1))
		c := a.Add(b.Scale(k))
		lead := c.Lead()
		for j := range deg {
			comp.Set(0, j, -c.Coef(deg-1-j)/lead)
		}
		for r := 1; r < deg; r++ {
			comp.Set(r, r-1, 1)
		}
		eig.Factorize(comp, mat.EigenNone)
		solves++
		vals = eig.Values(vals)
		if i == 0 {
			for j := range deg {
				branches[j] = append(branches[j], Point{k, vals[j]})
			}
			continue
		}
		for j := range used {
			used[j] = false
		}
		for j := range deg {
			last := branches[j][len(branches[j])-1].S
			best, bd := -1, math.Inf(1)
			for q, v := range vals {
				if !used[q] {
					if d := cmplx.Abs(v - last); d < bd {
						best, bd = q, d
					}
				}
			}
			used[best] = true
			branches[j] = append(branches[j], Point{k, vals[best]})
		}
	}
	return branches, solves
}

// familyLoop returns the deterministic benchmark loop of order n: poles a
// mix of real and complex pairs, some unstable; n/4 zeros in the left half
// plane (fixed seed).
func familyLoop(n int) tf.TF {
	rng := rand.New(rand.NewPCG(uint64(n), 1))
	var poles []complex128
	for len(poles) < n {
		if len(poles)%3 == 0 || len(poles) == n-1 {
			poles = append(poles, complex(-6+7*rng.Float64(), 0))
			continue
		}
		re, im := -4+4.5*rng.Float64(), 0.5+4.5*rng.Float64()
		poles = append(poles, complex(re, im), complex(re, -im))
	}
	var zeros []complex128
	for len(zeros) < n/4 {
		if len(zeros)%2 == 0 || len(zeros) == n/4-1 {
			zeros = append(zeros, complex(-8+7*rng.Float64(), 0))
			continue
		}
		re, im := -5+4*rng.Float64(), 0.5+3*rng.Float64()
		zeros = append(zeros, complex(re, im), complex(re, -im))
	}
	l, err := tf.FromZerosPolesGain(zeros, poles, 1)
	if err != nil {
		panic(err)
	}
	return l
}

func branchesOf(loc Locus) []tracedBranch {
	var out []tracedBranch
	for _, b := range loc.Branches {
		out = append(out, tracedBranch(b.Points))
	}
	return out
}
