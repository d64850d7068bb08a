package tf

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/loopwise/loopwise/poly"
)

// FromStateSpace returns the continuous-time transfer function
// C(sI − A)⁻¹B + D of the single-input single-output model ẋ = Ax + Bu,
// y = Cx + Du, with A n×n, B n×1, C 1×n and D 1×1 (n ≥ 1). The inputs are
// only read.
//
// Method: the denominator is the characteristic polynomial det(sI − A),
// built from the eigenvalues of A (gonum mat.Eigen, LAPACK Dgeev with
// balancing; backward stable) by poly.FromRoots. The numerator uses the
// identity det(sI − A + αBC) = det(sI − A)·(1 + α·C(sI − A)⁻¹B), so
//
//	N(s) = [det(sI − A + αBC) − det(sI − A)]/α + D·det(sI − A),
//
// with α a power of two chosen so that α‖B‖‖C‖ ≈ ‖A‖ (the two determinants
// then have comparable scale). The leading coefficients of the numerator
// that the Markov parameters CAᵏ⁻¹B show to be zero (relative degree
// r: CB = … = CA^{r−2}B = 0 within rounding) are set to exactly zero, so
// the relative degree is not lost to rounding noise. The identity is the
// matrix determinant lemma; the characteristic polynomials inherit the
// backward stability of the eigenvalue solver, so the coefficients are
// accurate to about n·ε times the size of the characteristic polynomials'
// coefficients (a numerator far smaller than that loses relative accuracy;
// pencil methods for zeros, e.g. Emami-Naeini & Van Dooren, Automatica
// 18(4), 1982, from memory, avoid this but gonum has no generalized
// eigenvalue solver for them).
//
// Errors: ErrShape when a matrix is nil or the dimensions do not fit;
// ErrNotFinite for a NaN or infinite entry; ErrNumerical when the
// eigenvalue iteration fails.
func FromStateSpace(a, b, c, d mat.Matrix) (TF, error) {
	if a == nil || b == nil || c == nil || d == nil {
		return TF{}, fmt.Errorf("%w: a matrix is nil", ErrShape)
	}
	n, na := a.Dims()
	if n != na || n < 1 {
		return TF{}, fmt.Errorf("%w: A is %d×%d, want square n×n with n ≥ 1", ErrShape, n, na)
	}
	if r, cc := b.Dims(); r != n || cc != 1 {
		return TF{}, fmt.Errorf("%w: B is %d×%d, want %d×1", ErrShape, r, cc, n)
	}
	if r, cc := c.Dims(); r != 1 || cc != n {
		return TF{}, fmt.Errorf("%w: C is %d×%d, want 1×%d", ErrShape, r, cc, n)
	}
	if r, cc := d.Dims(); r != 1 || cc != 1 {
		return TF{}, fmt.Errorf("%w: D is %d×%d, want 1×1", ErrShape, r, cc)
	}
	for name, m := range map[string]mat.Matrix{"A": a, "B": b, "C": c, "D": d} {
		if !finiteMatrix(m) {
			return TF{}, fmt.Errorf("%w: an entry of %s", ErrNotFinite, name)
		}
	}
	A := mat.DenseCopyOf(a)
	bv := make([]float64, n)
	cv := make([]float64, n)
	for i := 0; i < n; i++ {
		bv[i] = b.At(i, 0)
		cv[i] = c.At(0, i)
	}
	dv := d.At(0, 0)

	eigA, err := eigenvalues(A)
	if err != nil {
		return TF{}, err
	}
	den, err := poly.FromRoots(eigA)
	if err != nil {
		return TF{}, fmt.Errorf("%w: characteristic polynomial: %v", ErrNumerical, err)
	}
	nb, nc := norm2(bv), norm2(cv)
	num := den.Scale(dv)
	if nb == 0 || nc == 0 {
		return FromPolys(num, den, 0)
	}
	normA := mat.Norm(A, 2)
	if normA == 0 {
		normA = 1
	}
	_, e := math.Frexp(normA / (nb * nc))
	alpha := math.Ldexp(1, e)
	var bc mat.Dense
	bc.Outer(alpha, mat.NewVecDense(n, bv), mat.NewVecDense(n, cv))
	var abc mat.Dense
	abc.Sub(A, &bc)
	eigABC, err := eigenvalues(&abc)
	if err != nil {
		return TF{}, err
	}
	cl, err := poly.FromRoots(eigABC)
	if err != nil {
		return TF{}, fmt.Errorf("%w: characteristic polynomial of A − αBC: %v", ErrNumerical, err)
	}
	diff := cl.Sub(den)
	// Relative degree from the Markov parameters hₖ = C·Aᵏ⁻¹·B: the first
	// k whose |hₖ| exceeds the rounding level of the product. The s^{n−k}
	// coefficients for k before it are exactly zero.
	coef := diff.Ascending()
	if len(coef) < n+1 {
		coef = append(coef, make([]float64, n+1-len(coef))...)
	}
	coef[n] = 0
	v := append([]float64(nil), bv...)
	scale := nb // ‖Aᵏ⁻¹‖·‖B‖ bound, normalised below
	for k := 1; k < n; k++ {
		h := 0.0
		habs := 0.0
		for i := 0; i < n; i++ {
			h += cv[i] * v[i]
			habs += math.Abs(cv[i] * v[i])
		}
		bound := 4 * float64(n) * 0x1p-52 * math.Max(habs, nc*scale)
		if math.Abs(h) > bound {
			break
		}
		coef[n-k] = 0
		// v ← A·v / ‖A‖ (normalised to avoid overflow; the bound scales alike).
		w := make([]float64, n)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				w[i] += A.At(i, j) * v[j]
			}
			w[i] /= normA
		}
		v = w
	}
	r, err := poly.FromAscending(coef)
	if err != nil {
		return TF{}, fmt.Errorf("%w: numerator: %v", ErrNumerical, err)
	}
	num = r.Scale(1 / alpha).Add(num)
	return FromPolys(num, den, 0)
}
