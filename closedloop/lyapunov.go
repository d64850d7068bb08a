package closedloop

import (
	"fmt"
	"math"

	"github.com/loopwise/loopwise/internal/statespace"
	"github.com/loopwise/loopwise/tf"
	"gonum.org/v1/gonum/mat"
)

// h2Squared returns the squared H2 norm of the stable, proper g:
//
//	continuous:  ‖g‖₂² = ∫₀^∞ g(t)² dt = C·W·Cᵀ,   A·W + W·Aᵀ + B·Bᵀ = 0
//	discrete:    ‖g‖₂² = Σₖ g[k]²    = D² + C·W·Cᵀ,   A·W·Aᵀ − W + B·Bᵀ = 0
//
// the Lyapunov form of the quadratic integral (the impulse response's
// energy is the output weight of the controllability Gramian; K. J.
// Åström, Introduction to Stochastic Control Theory, Academic Press 1970,
// ch. 5, from memory). The Lyapunov equation is solved as the Kronecker
// linear system (I⊗A + A⊗I)·vec W = −vec(B·Bᵀ) (discrete: (A⊗A − I)) by
// LU factorisation with partial pivoting (gonum), which is backward stable
// for the n² unknowns of the orders of interest here (n ≤ 20: 400
// unknowns). The realisation is the balanced companion form of
// internal/statespace. A continuous g with a direct feedthrough D ≠ 0 has
// an infinite norm (+Inf is returned). The caller checks stability.
func h2Squared(g tf.TF) (float64, error) {
	m, err := statespace.FromTransferFunction(g.Num().Coeffs(), g.Den().Coeffs())
	if err != nil {
		return math.NaN(), fmt.Errorf("%w: realisation of %v: %v", ErrNumerical, g, err)
	}
	discrete := g.IsDiscrete()
	if !discrete && m.D != 0 {
		return math.Inf(1), nil
	}
	n := m.Order()
	if n == 0 {
		return m.D * m.D, nil
	}
	N := n * n
	K := mat.NewDense(N, N, nil)
	rhs := mat.NewVecDense(N, nil)
	// vec stacks columns: W[i][j] ↦ index j·n + i.
	for j := range n {
		for i := range n {
			row := j*n + i
			rhs.SetVec(row, -m.B[i]*m.B[j])
			for k := range n {
				if discrete {
					// (A·W·Aᵀ)[i][j] = Σ_{k,l} A[i][k]·W[k][l]·A[j][l]
					for l := range n {
						K.Set(row, l*n+k, K.At(row, l*n+k)+m.A.At(i, k)*m.A.At(j, l))
					}
				} else {
					// (A·W)[i][j] = Σ_k A[i][k]·W[k][j];  (W·Aᵀ)[i][j] = Σ_k W[i][k]·A[j][k]
					K.Set(row, j*n+k, K.At(row, j*n+k)+m.A.At(i, k))
					K.Set(row, k*n+i, K.At(row, k*n+i)+m.A.At(j, k))
				}
			}
			if discrete {
				K.Set(row, row, K.At(row, row)-1)
			}
		}
	}
	var w mat.VecDense
	if err := w.SolveVec(K, rhs); err != nil {
		// gonum reports a singular or near-singular system (its message
		// carries the condition estimate, possibly +Inf); say what that
		// means for the integral instead of passing it on.
		return math.NaN(), fmt.Errorf("%w: the Lyapunov equation of %v is singular to working precision (the poles of its realisation are too widely spread or nearly symmetric about the stability boundary), so the quadratic integral cannot be computed", ErrNumerical, g)
	}
	v := 0.0
	for j := range n {
		for i := range n {
			v += m.C[i] * w.AtVec(j*n+i) * m.C[j]
		}
	}
	if discrete {
		v += m.D * m.D
	}
	return math.Max(v, 0), nil
}
