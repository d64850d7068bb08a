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
func (s *system) addFree(phi []float64, z []float64, out []float64) {
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
		y = advance(phi, z, nz, zero, 0, nil, 0, w)
		z, nz = nz, z
	}
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
		s.addFree(flat(p), z, out)
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
	s.discreteSequence(u, out)
	if z != nil {
		s.addFree(flat(s.m.A), z, out)
	}
	return nil
}

// discreteSequence runs x[k+1] = A·x[k] + B·u[k], y[k] = C·x[k] + D·u[k]
// from rest.
func (s *system) discreteSequence(u, out []float64) {
	m := s.m
	if s.n == 0 {
		for k, v := range u {
			out[k] = m.D * v
		}
		return
	}
	a := flat(m.A)
	x := make([]float64, s.n)
	nx := make([]float64, s.n)
	y := 0.0
	for k, v := range u {
		out[k] = y + m.D*v
		y = advance(a, x, nx, m.B, v, nil, 0, m.C)
		x, nx = nx, x
	}
}
