package tf

// This file turns a discrete state-space model (Φ, Γ, C, D) back into a
// transfer function: the numerator of C(zI − Φ)⁻¹Γ + D by interpolation on
// the unit circle, and eigenvalues through gonum. The realisation and the
// hold integrals come from internal/statespace.

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"

	"github.com/loopwise/loopwise/poly"
)

func norm2(v []float64) float64 {
	s := 0.0
	for _, x := range v {
		s = math.Hypot(s, x)
	}
	return s
}

// discreteNumerator returns num(z) = den(z)·(C(zI − Φ)⁻¹Γ + D) for the
// discrete model (Φ, Γ, C, D) whose monic characteristic polynomial is den
// (degree n). The strictly proper part r(z) = den(z)·C(zI − Φ)⁻¹Γ has degree
// at most n − 1; it is recovered from its values at n points on the unit
// circle by the inverse discrete Fourier transform, which is unitary and
// therefore well conditioned: the absolute error of each coefficient is
// about machine epsilon times the largest |r(z)| on the circle times the
// condition of the complex solves. This avoids the cancellation of the
// route charpoly(Φ − ΓC) − charpoly(Φ), whose terms are O(1) while the
// numerator of a fast-sampled system is O(Tⁿ). The leading coefficient of
// num is D exactly (0 for a strictly proper model).
//
// eig are the eigenvalues of Φ (the roots of den); the points are rotated
// away from them.
func discreteNumerator(phi *mat.Dense, gamma, c []float64, d float64, den poly.Poly, eig []complex128) (poly.Poly, error) {
	n := len(gamma)
	if n == 0 {
		return poly.Constant(d), nil
	}
	// Rotate the points away from the eigenvalues of Φ (the poles).
	step := 2 * math.Pi / float64(n)
	bestOff, bestDist := 0.0, -1.0
	for m := 0; m < 16; m++ {
		off := step * (float64(m) + 0.5) / 16
		dist := math.Inf(1)
		for k := 0; k < n; k++ {
			z := cmplx.Rect(1, off+step*float64(k))
			for _, l := range eig {
				dist = math.Min(dist, cmplx.Abs(z-l))
			}
		}
		if dist > bestDist {
			bestOff, bestDist = off, dist
		}
	}
	vals := make([]complex128, n)
	sys := mat.NewDense(2*n, 2*n, nil)
	rhs := mat.NewVecDense(2*n, nil)
	for i := 0; i < n; i++ {
		rhs.SetVec(i, gamma[i])
	}
	var sol mat.VecDense
	for k := 0; k < n; k++ {
		z := cmplx.Rect(1, bestOff+step*float64(k))
		x, y := real(z), imag(z)
		// [[xI − Φ, −yI], [yI, xI − Φ]]·[u; v] = [Γ; 0] solves (zI − Φ)(u + jv) = Γ.
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				v := -phi.At(i, j)
				if i == j {
					v += x
				}
				sys.Set(i, j, v)
				sys.Set(n+i, n+j, v)
			}
			for j := 0; j < n; j++ {
				sys.Set(i, n+j, 0)
				sys.Set(n+i, j, 0)
			}
			sys.Set(i, n+i, -y)
			sys.Set(n+i, i, y)
		}
		if err := sol.SolveVec(sys, rhs); err != nil {
			var cond mat.Condition
			if !asCondition(err, &cond) {
				return poly.Poly{}, fmt.Errorf("%w: solving (zI − Φ)x = Γ at z = %v: %v", ErrNumerical, z, err)
			}
		}
		var g complex128
		for i := 0; i < n; i++ {
			g += complex(c[i], 0) * complex(sol.AtVec(i), sol.AtVec(n+i))
		}
		vals[k] = g * den.EvalComplex(z)
	}
	coef := make([]float64, n+1)
	for i := 0; i < n; i++ {
		var s complex128
		for k := 0; k < n; k++ {
			// z_k^{−i} = e^{−j·i·θ_k}
			s += vals[k] * cmplx.Rect(1, -float64(i)*(bestOff+step*float64(k)))
		}
		coef[i] = real(s) / float64(n)
	}
	r, err := poly.FromAscending(coef)
	if err != nil {
		return poly.Poly{}, fmt.Errorf("%w: numerator: %v", ErrNumerical, err)
	}
	return r.Add(den.Scale(d)), nil
}

func asCondition(err error, c *mat.Condition) bool {
	v, ok := err.(mat.Condition)
	if ok {
		*c = v
	}
	return ok
}

// eigenvalues returns the eigenvalues of the square matrix a (gonum's
// mat.Eigen: LAPACK's Dgeev with balancing, backward stable). Complex
// eigenvalues come in exact conjugate pairs.
func eigenvalues(a mat.Matrix) ([]complex128, error) {
	var e mat.Eigen
	if !e.Factorize(a, mat.EigenNone) {
		return nil, fmt.Errorf("%w: the eigenvalue iteration did not converge", ErrNumerical)
	}
	return e.Values(nil), nil
}
