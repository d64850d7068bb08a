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

// checkpointEvery is the spacing, in samples, of the states the evaluator
// keeps. locate recomputes the state at the start of its interval from the
// checkpoint at or before it with the recursion's own steps — the same
// operations as when it was first computed, so the same numbers bit for
// bit — at a cost of at most checkpointEvery−1 steps of n² per located
// time, while the evaluator holds n/checkpointEvery floats per sample
// instead of n.
const checkpointEvery = 16

// evaluator gives the exact continuous step response from rest between
// stored samples. Its growing buffers live in the workspace it embeds.
type evaluator struct {
	*stepWork
	s      *system
	h      float64
	n      int
	phi, g []float64 // the step's Φ(h) (flat) and Γ(h)
	// In the workspace: checkpoints, row c = x(c·checkpointEvery·h); x,
	// the state at the last sample; ys, ds, y and y′ at the samples; lphi,
	// lgam, the lattice pieces, index j−1 for Φ_j, Γ_j (flat n×n, n).
	//
	// rows[j]·x + cons[j] = y^(j) for j = 0…3: rows[j] = C·A^j, cons[0] =
	// D, cons[j] = C·A^(j−1)·B.
	rows [4][]float64
	cons [4]float64
}

// newEvaluator prepares the recursion with step h and the lattice pieces,
// with its buffers in w (whose earlier contents are dropped).
func (s *system) newEvaluator(h float64, w *stepWork) (*evaluator, error) {
	n, m := s.n, s.m
	phiD, g, err := m.ZeroOrderHold(h)
	if err != nil {
		return nil, err
	}
	ev := &evaluator{stepWork: w, s: s, h: h, n: n, phi: flat(phiD), g: g}
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
	ev.x = zeroed(ev.x, n)
	ev.nx = zeroed(ev.nx, n)
	ev.xa = zeroed(ev.xa, n)
	ev.xb = zeroed(ev.xb, n)
	ev.xm = zeroed(ev.xm, n)
	ev.checkpoints = append(ev.checkpoints[:0], ev.x...)
	ev.ys = append(ev.ys[:0], m.D)
	ev.ds = append(ev.ds[:0], ev.cons[1])
	return ev, nil
}

// buildLattice forms Φ_j, Γ_j, j = 1…L, by squaring from Φ_L, Γ_L, or
// each by its own exponential when the squared-up step disagrees with the
// recursion's.
func (ev *evaluator) buildLattice(L int) error {
	n := ev.n
	ev.lphi = slices.Grow(ev.lphi[:0], L)[:L]
	ev.lgam = slices.Grow(ev.lgam[:0], L)[:L]
	// Level j at (j−1)·(n²+n): Φ_j, then Γ_j; one more level for the
	// squared-up Φ_0, Γ_0.
	size := n*n + n
	ev.lattice = zeroed(ev.lattice, (L+1)*size)
	level := func(j int) (p, g []float64) {
		off := (j - 1) * size
		if j == 0 {
			off = L * size
		}
		return ev.lattice[off : off+n*n], ev.lattice[off+n*n : off+size]
	}
	p, g, err := ev.s.m.ZeroOrderHold(math.Ldexp(ev.h, -L))
	if err != nil {
		return err
	}
	cur, cg := level(L)
	for i := 0; i < n; i++ {
		copy(cur[i*n:i*n+n], p.RawRowView(i))
	}
	copy(cg, g)
	ev.lphi[L-1], ev.lgam[L-1] = cur, cg
	for j := L - 1; j >= 0; j-- {
		np, ng := level(j)
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
	ev.ys = slices.Grow(ev.ys, N-K)
	ev.ds = slices.Grow(ev.ds, N-K)
	ev.checkpoints = slices.Grow(ev.checkpoints, ((N-K)/checkpointEvery+1)*n)
	for k := K; k < N; k++ {
		y := advance(ev.phi, ev.x, ev.nx, ev.g, 1, nil, 0, ev.rows[0])
		ev.x, ev.nx = ev.nx, ev.x
		ev.ys = append(ev.ys, y+ev.cons[0])
		ev.ds = append(ev.ds, dot(ev.rows[1], ev.x)+ev.cons[1])
		if (k+1)%checkpointEvery == 0 {
			ev.checkpoints = append(ev.checkpoints, ev.x...)
		}
	}
}

// stateAt returns x(k·h) in one of the buffers a and b (length n; the
// other is overwritten, and returned as spare), recomputed from the
// checkpoint at or before k (see checkpointEvery).
func (ev *evaluator) stateAt(k int, a, b []float64) (x, spare []float64) {
	n := ev.n
	c := k / checkpointEvery
	copy(a, ev.checkpoints[c*n:c*n+n])
	for j := c * checkpointEvery; j < k; j++ {
		advance(ev.phi, a, b, ev.g, 1, nil, 0, ev.rows[0])
		a, b = b, a
	}
	return a, b
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
	h := ev.h
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
	xa, xb := ev.stateAt(k, ev.xa, ev.xb)
	advance(ev.phi, xa, xb, ev.g, 1, nil, 0, ev.rows[0])
	xm := ev.xm
	f := func(x []float64) float64 { return dot(ev.rows[order], x) + ev.cons[order] - target }
	fa := f(xa)
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
