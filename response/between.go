package response

import (
	"math"
	"slices"

	"github.com/loopwise/loopwise/internal/rootfind"
)

// The step response between samples (StepMetrics).
//
// StepMetrics locates its times — level crossings and the extrema, where
// y′ changes sign — between the samples x_k = x(k·h) of the exact
// recursion. Forming e^{A·τ} for every trial point τ of a root finder (an
// (n+1)×(n+1) exponential per evaluation) made it cost up to 100 Step
// calls. Instead each sample interval is cut into a dyadic lattice of
// 2^L cells, and the state is carried along it with cached pieces
//
//	Φ_j = e^{A·h/2^j},  Γ_j = ∫₀^{h/2^j} e^{A·η} dη·B,   j = 1…L,
//
// the scaling-and-squaring pieces of the step's own exponential: Φ_L, Γ_L
// come from one block exponential (Van Loan 1978, gonum's mat.Exp), and
// Φ_{j−1} = Φ_j², Γ_{j−1} = Φ_j·Γ_j + Γ_j (C. Moler and C. Van Loan,
// "Nineteen dubious ways to compute the exponential of a matrix,
// twenty-five years later", SIAM Review 45(1), 2003, Method 3). The
// squared-up Φ_0, Γ_0 must reproduce the recursion's own Φ(h), Γ(h) to
// latticeCheckTol, otherwise every piece is formed by its own exponential.
//
// A root in interval k is bracketed by bisection on the lattice: each
// halving is one step x ← Φ_j·x + Γ_j (n² multiply–adds) from the left end
// of the bracket, so after L steps the root lies in a cell of width
// δ = h/2^L whose end states are exact up to rounding. In that cell the
// output is the quintic Hermite interpolant of y, y′, y″ (or y′, y″, y‴
// for an extremum) at both ends, whose error is at most
// max|g⁽⁶⁾|·δ⁶/46080 (Hermite interpolation error, e.g. Burden & Faires,
// Numerical Analysis, Theorem 3.9, from memory): L is chosen so that
// δ·max|p| ≤ cellSpeed, where every mode is resolved to below 1e-17 of its
// amplitude (cellSpeed⁶/46080 ≈ 1e-20). Brent's method (1973) on the
// interpolant then gives the time to about 4 ulps.
//
// Cost per root: L steps of n² plus O(1) per trial point; setup: one
// exponential and L matrix squarings (2n³ each).

const (
	// cellSpeed bounds δ·max|p| in a lattice cell (see above).
	cellSpeed = 1.0 / 320
	// latticeCheckTol is the largest difference between the squared-up
	// Φ_0, Γ_0 and the exponential of the full step, relative to the
	// largest entry of [Φ(h) Γ(h)]: about 20 roundings of n-term sums.
	latticeCheckTol = 1e-13
)

// evaluator gives the exact continuous step response from rest between
// stored samples.
type evaluator struct {
	s      *system
	h      float64
	n      int
	phi, g []float64 // the step's Φ(h) (flat) and Γ(h)
	states []float64 // (N+1)·n, row k = x(k·h)
	ys, ds []float64 // y and y′ at the samples
	// rows[j]·x + cons[j] = y^(j) for j = 0…3: rows[j] = C·A^j, cons[0] =
	// D, cons[j] = C·A^(j−1)·B.
	rows [4][]float64
	cons [4]float64
	// lattice pieces, index j−1 for Φ_j, Γ_j (flat n×n, n).
	lphi, lgam [][]float64
}

// newEvaluator prepares the recursion with step h and the lattice pieces.
func (s *system) newEvaluator(h float64) (*evaluator, error) {
	n, m := s.n, s.m
	phiD, g, err := m.ZeroOrderHold(h)
	if err != nil {
		return nil, err
	}
	ev := &evaluator{s: s, h: h, n: n, phi: flat(phiD), g: g}
	a := flat(m.A)
	ev.rows[0] = append([]float64(nil), m.C...)
	ev.cons[0] = m.D
	for j := 1; j < 4; j++ {
		r := make([]float64, n)
		prev := ev.rows[j-1]
		for i, c := range prev {
			for l := 0; l < n; l++ {
				r[l] += c * a[i*n+l]
			}
		}
		ev.rows[j] = r
		ev.cons[j] = dot(prev, m.B)
	}
	fastest := 0.0
	for _, p := range s.poles {
		fastest = math.Max(fastest, math.Hypot(real(p), imag(p)))
	}
	L := 1
	for h*fastest/math.Ldexp(1, L) > cellSpeed && L < 60 {
		L++
	}
	if err := ev.buildLattice(L); err != nil {
		return nil, err
	}
	ev.states = make([]float64, n)
	ev.ys = []float64{m.D}
	ev.ds = []float64{ev.cons[1]}
	return ev, nil
}

// buildLattice forms Φ_j, Γ_j, j = 1…L, by squaring from Φ_L, Γ_L, or
// each by its own exponential when the squared-up step disagrees with the
// recursion's.
func (ev *evaluator) buildLattice(L int) error {
	n := ev.n
	ev.lphi = make([][]float64, L)
	ev.lgam = make([][]float64, L)
	p, g, err := ev.s.m.ZeroOrderHold(math.Ldexp(ev.h, -L))
	if err != nil {
		return err
	}
	cur, cg := flat(p), g
	ev.lphi[L-1], ev.lgam[L-1] = cur, cg
	for j := L - 1; j >= 0; j-- {
		np := make([]float64, n*n)
		ng := make([]float64, n)
		for i := 0; i < n; i++ {
			row := cur[i*n : i*n+n]
			s := cg[i]
			for l, v := range row {
				s += v * cg[l]
				if v != 0 {
					dst := np[i*n : i*n+n]
					src := cur[l*n : l*n+n]
					for c := range dst {
						dst[c] += v * src[c]
					}
				}
			}
			ng[i] = s
		}
		cur, cg = np, ng
		if j > 0 {
			ev.lphi[j-1], ev.lgam[j-1] = cur, cg
		}
	}
	// cur, cg are now the squared-up Φ_0, Γ_0.
	big, diff := 0.0, 0.0
	for i, v := range ev.phi {
		big = math.Max(big, math.Abs(v))
		diff = math.Max(diff, math.Abs(v-cur[i]))
	}
	for i, v := range ev.g {
		big = math.Max(big, math.Abs(v))
		diff = math.Max(diff, math.Abs(v-cg[i]))
	}
	if diff <= latticeCheckTol*big {
		return nil
	}
	for j := 1; j < L; j++ {
		p, g, err := ev.s.m.ZeroOrderHold(math.Ldexp(ev.h, -j))
		if err != nil {
			return err
		}
		ev.lphi[j-1], ev.lgam[j-1] = flat(p), g
	}
	return nil
}

// extend runs the recursion until the grid has N+1 samples.
func (ev *evaluator) extend(N int) {
	n := ev.n
	K := len(ev.ys) - 1
	if N <= K {
		return
	}
	ev.states = slices.Grow(ev.states, (N-K)*n)[:(N+1)*n]
	ev.ys = slices.Grow(ev.ys, N-K)
	ev.ds = slices.Grow(ev.ds, N-K)
	for k := K; k < N; k++ {
		x, nx := ev.states[k*n:k*n+n], ev.states[(k+1)*n:(k+2)*n]
		y := advance(ev.phi, x, nx, ev.g, 1, nil, 0, ev.rows[0])
		ev.ys = append(ev.ys, y+ev.cons[0])
		ev.ds = append(ev.ds, dot(ev.rows[1], nx)+ev.cons[1])
	}
}

// derivs returns y, y′, y″, y‴ at state x.
func (ev *evaluator) derivs(x []float64) (d [4]float64) {
	for j := range d {
		d[j] = dot(ev.rows[j], x) + ev.cons[j]
	}
	return d
}

// locate returns the time t in [ta, tb] where y^(order) (order 0: y, 1: y′)
// equals target, and y(t). [ta, tb] lies in one sample interval and the
// function changes sign over it (or is zero at an end).
func (ev *evaluator) locate(ta, tb float64, order int, target float64) (t, y float64) {
	n, h := ev.n, ev.h
	N := len(ev.ys) - 1
	k := int(math.Floor(ta / h))
	if float64(k+1)*h <= ta {
		k++
	}
	if float64(k)*h > ta {
		k--
	}
	k = min(max(k, 0), N-1)
	lo := float64(k) * h
	xa := append([]float64(nil), ev.states[k*n:k*n+n]...)
	xb := append([]float64(nil), ev.states[(k+1)*n:(k+2)*n]...)
	f := func(x []float64) float64 { return dot(ev.rows[order], x) + ev.cons[order] - target }
	fa := f(xa)
	xm := make([]float64, n)
	for j := 1; j <= len(ev.lphi); j++ {
		width := math.Ldexp(h, -j)
		mid := lo + width
		advance(ev.lphi[j-1], xa, xm, ev.lgam[j-1], 1, nil, 0, ev.rows[0])
		var right bool // whether the root lies right of mid
		switch {
		case mid <= ta:
			right = true
		case mid >= tb:
			right = false
		default:
			fm := f(xm)
			if fm == 0 {
				return mid, ev.derivs(xm)[0]
			}
			right = (fm > 0) == (fa > 0)
		}
		if right {
			lo = mid
			xa, xm = xm, xa
			fa = f(xa)
		} else {
			xb, xm = xm, xb
		}
	}
	delta := math.Ldexp(h, -len(ev.lphi))
	da, db := ev.derivs(xa), ev.derivs(xb)
	herm := func(t float64, o int) float64 {
		return hermite5((t-lo)/delta, da[o], da[o+1]*delta, da[o+2]*delta*delta, db[o], db[o+1]*delta, db[o+2]*delta*delta)
	}
	a, b := math.Max(lo, ta), math.Min(lo+delta, tb)
	g := func(t float64) float64 { return herm(t, order) - target }
	t = rootfind.Brent(g, a, b, g(a), g(b), 4*0x1p-52)
	return t, herm(t, 0)
}

// hermite5 evaluates at θ ∈ [0, 1] the quintic with value, first and second
// derivative f0, d0, s0 at θ = 0 and f1, d1, s1 at θ = 1 (derivatives with
// respect to θ).
func hermite5(th, f0, d0, s0, f1, d1, s1 float64) float64 {
	t2 := th * th
	t3 := t2 * th
	u := 1 - th
	u2 := u * u
	u3 := u2 * u
	// Basis in the symmetric form: H(θ) for the left end, H(1−θ) mirrored
	// for the right end.
	h0 := u3 * (1 + 3*th + 6*t2)
	h1 := u3 * th * (1 + 3*th)
	h2 := u3 * t2 / 2
	h3 := t3 * (1 + 3*u + 6*u2)
	h4 := -t3 * u * (1 + 3*u)
	h5 := t3 * u2 / 2
	return f0*h0 + d0*h1 + s0*h2 + f1*h3 + d1*h4 + s1*h5
}
