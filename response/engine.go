package response

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// flat returns the row-major data of an n×n matrix as a fresh slice.
func flat(a *mat.Dense) []float64 {
	r, c := a.Dims()
	out := make([]float64, 0, r*c)
	for i := 0; i < r; i++ {
		out = append(out, a.RawRowView(i)...)
	}
	return out
}

// advance sets nx = Φ·x + g1·a + g2·b (g2 may be nil) and returns C·nx.
// Φ is n×n row-major in phi. This is the whole cost of a sample: n² + 3n
// multiply–adds in plain loops over flat slices.
func advance(phi []float64, x, nx, g1 []float64, a float64, g2 []float64, b float64, c []float64) float64 {
	n := len(x)
	nx = nx[:n]
	g1 = g1[:n]
	c = c[:n]
	y := 0.0
	for i := 0; i < n; i++ {
		row := phi[i*n : i*n+n]
		s := g1[i] * a
		if g2 != nil {
			s += g2[i] * b
		}
		for j, v := range row {
			s += v * x[j]
		}
		nx[i] = s
		y += c[i] * s
	}
	return y
}

// stepLoop is advance specialised for a constant unit input: the hot loop
// of Step. It fills out[k] = C·x[k] + d for k = 0..len(out)−1 starting from
// x (which it overwrites).
func stepLoop(phi []float64, x, g, c []float64, d float64, out []float64) {
	n := len(x)
	nx := make([]float64, n)
	g = g[:n]
	c = c[:n]
	y := 0.0
	for i, v := range x {
		y += c[i] * v
	}
	for k := range out {
		out[k] = y + d
		if k+1 == len(out) {
			break
		}
		y = 0
		for i := 0; i < n; i++ {
			row := phi[i*n : i*n+n]
			row = row[:len(x)]
			s := g[i]
			for j, v := range row {
				s += v * x[j]
			}
			nx[i] = s
			y += c[i] * s
		}
		x, nx = nx, x
	}
}

// addFree adds the free response Scale[0]·z[0] (z advanced by Φ) to out.
func (s *system) addFree(phi transition, z []float64, out []float64) {
	if z == nil {
		return
	}
	n := s.n
	nz := make([]float64, n)
	zero := make([]float64, n)
	w := make([]float64, n)
	w[0] = s.m.Scale[0]
	y := w[0] * z[0]
	for k := range out {
		out[k] += y
		y = phi.advance(z, nz, zero, 0, w)
		z, nz = nz, z
	}
}

// transition is the matrix Φ of one sample, x ← Φ·x + g·a, stored densely
// (row-major) or, when at most a quarter of its entries are nonzero, as
// the nonzero entries of each row (compressed sparse rows; Y. Saad,
// Iterative Methods for Sparse Linear Systems, 2nd ed., SIAM 2003,
// Sec. 3.4). A discrete transfer function runs through its companion
// realisation, whose state matrix has one row of denominator coefficients
// and a subdiagonal of ones (the two diagonal scalings keep that
// pattern): a dead time of d samples, the factor z^(−d), adds d states
// that form a shift register but only d entries. A sample then costs the
// nonzero entries, O(n), instead of n² multiply–adds. The sparse form does
// the same multiply–adds in the same order without the zero products, so
// both forms give the same numbers.
//
// In the δ form (deltaform.go) the matrix is A_w and a sample is
// x ← x + (A_w·x + g·a): the increment is formed first, then added.
type transition struct {
	n     int
	delta bool      // δ form: nx = x + Φ·x + g·a
	dense []float64 // n×n row-major, nil in the sparse form
	start []int     // row i holds entries start[i] … start[i+1]−1
	col   []int
	val   []float64
}

// newTransition returns Φ (n×n row-major in phi) in the cheaper form.
func newTransition(phi []float64, n int) transition {
	nnz := 0
	for _, v := range phi[:n*n] {
		if v != 0 {
			nnz++
		}
	}
	if 4*nnz > n*n {
		return transition{n: n, dense: phi}
	}
	t := transition{n: n, start: make([]int, n+1), col: make([]int, 0, nnz), val: make([]float64, 0, nnz)}
	for i := 0; i < n; i++ {
		for j, v := range phi[i*n : i*n+n] {
			if v != 0 {
				t.col = append(t.col, j)
				t.val = append(t.val, v)
			}
		}
		t.start[i+1] = len(t.col)
	}
	return t
}

// entries returns the number of entries a sample multiplies: n² when
// dense, the nonzero count when sparse.
func (t transition) entries() int {
	if t.dense != nil {
		return t.n * t.n
	}
	return len(t.val)
}

// advance sets nx = Φ·x + g·a and returns c·nx, as the function advance.
func (t transition) advance(x, nx, g []float64, a float64, c []float64) float64 {
	if t.dense != nil && !t.delta {
		return advance(t.dense, x, nx, g, a, nil, 0, c)
	}
	n := t.n
	x = x[:n]
	nx = nx[:n]
	g = g[:n]
	c = c[:n]
	y := 0.0
	for i := 0; i < n; i++ {
		s := g[i] * a
		if t.dense != nil {
			for j, v := range t.dense[i*n : i*n+n] {
				s += v * x[j]
			}
		} else {
			lo, hi := t.start[i], t.start[i+1]
			for k, j := range t.col[lo:hi] {
				s += t.val[lo+k] * x[j]
			}
		}
		if t.delta {
			s += x[i]
		}
		nx[i] = s
		y += c[i] * s
	}
	return y
}

func (s *system) runContinuous(kind inputKind, h float64, out []float64, z []float64) error {
	m := s.m
	d := s.delay
	// k0: first sample at or after the dead time; τ0 = t[k0] − d ∈ [0, h).
	k0 := int(math.Ceil(d / h))
	for k0 > 0 && float64(k0-1)*h >= d {
		k0--
	}
	for float64(k0)*h < d {
		k0++
	}
	if s.n == 0 {
		for k := k0; k < len(out); k++ {
			switch kind {
			case stepInput:
				out[k] = m.D
			case rampInput:
				out[k] = m.D * (float64(k)*h - d)
			}
		}
		return nil
	}
	var phi []float64
	var g1, g2 []float64
	if kind == rampInput {
		p, a, b, err := m.FirstOrderHold(h)
		if err != nil {
			return err
		}
		phi, g1, g2 = flat(p), a, b
	} else {
		p, a, err := m.ZeroOrderHold(h)
		if err != nil {
			return err
		}
		phi, g1 = flat(p), a
	}
	if k0 < len(out) {
		tau := float64(k0)*h - d
		x := make([]float64, s.n)
		if tau > 0 {
			p, a, b, err := m.FirstOrderHold(tau)
			if err != nil {
				return err
			}
			switch kind {
			case stepInput:
				copy(x, a)
			case impulseInput:
				pf := flat(p)
				for i := range x {
					for j := range x {
						x[i] += pf[i*s.n+j] * m.B[j]
					}
				}
			case rampInput:
				for i := range x {
					x[i] = tau * b[i]
				}
			}
		} else if kind == impulseInput {
			copy(x, m.B)
		}
		rest := out[k0:]
		switch kind {
		case stepInput:
			stepLoop(phi, x, g1, m.C, m.D, rest)
		case impulseInput:
			zero := make([]float64, s.n)
			stepLoop(phi, x, zero, m.C, 0, rest)
		case rampInput:
			nx := make([]float64, s.n)
			y := dot(m.C, x)
			for k := range rest {
				u := float64(k0+k)*h - d
				rest[k] = y + m.D*u
				y = advance(phi, x, nx, g1, u, g2, h, m.C)
				x, nx = nx, x
			}
		}
	}
	if z != nil {
		p, _, err := m.ZeroOrderHold(h)
		if err != nil {
			return err
		}
		s.addFree(newTransition(flat(p), s.n), z, out)
	}
	return nil
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i, v := range a {
		s += v * b[i]
	}
	return s
}

// input returns u[k] of a discrete test input that starts at sample k0.
func discreteInput(kind inputKind, k, k0 int, T float64) float64 {
	if k < k0 {
		return 0
	}
	switch kind {
	case stepInput:
		return 1
	case impulseInput:
		if k == k0 {
			return 1
		}
		return 0
	default:
		return float64(k-k0) * T
	}
}

func (s *system) runDiscrete(kind inputKind, out []float64, z []float64) error {
	u := make([]float64, len(out))
	for k := range u {
		u[k] = discreteInput(kind, k, s.delaySamp, s.ts)
	}
	s.newSequence().run(u, out)
	if z != nil {
		s.addFree(newTransition(flat(s.m.A), s.n), z, out)
	}
	return nil
}

// sequence runs the difference equation x[k+1] = A·x[k] + B·u[k],
// y[k] = C·x[k] + D·u[k] of a discrete system from rest; successive calls
// of run continue where the last one stopped. A system whose poles crowd
// at z = 1 runs in the δ form instead (deltaform.go); its state is then
// not the companion state of s.m (free responses use s.m).
type sequence struct {
	s     *system
	a     transition
	b, c  []float64
	x, nx []float64
	y     float64 // C·x of the current state
}

func (s *system) newSequence() *sequence {
	q := &sequence{s: s}
	if s.n > 0 {
		a, b, c, delta := s.m.A, s.m.B, s.m.C, false
		if needsDelta(s.sys.Den().Coeffs()) {
			if dm, err := s.deltaModel(); err == nil && dm.Order() == s.n {
				a, b, c, delta = dm.A, dm.B, dm.C, true
			}
		}
		q.a = newTransition(flat(a), s.n)
		q.a.delta = delta
		q.b, q.c = b, c
		q.x = make([]float64, s.n)
		q.nx = make([]float64, s.n)
	}
	return q
}

// run writes the outputs for the inputs u, one per sample.
func (q *sequence) run(u, out []float64) {
	m := q.s.m
	if q.s.n == 0 {
		for k, v := range u {
			out[k] = m.D * v
		}
		return
	}
	for k, v := range u {
		out[k] = q.y + m.D*v
		q.y = q.a.advance(q.x, q.nx, q.b, v, q.c)
		q.x, q.nx = q.nx, q.x
	}
}

// discreteSequence runs the difference equation from rest (see sequence).
func (s *system) discreteSequence(u, out []float64) {
	s.newSequence().run(u, out)
}
