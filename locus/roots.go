package locus

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/poly"
	"gonum.org/v1/gonum/mat"
)

// fastRoots returns the roots of q (degree ≥ 1, finite) as the eigenvalues
// of its companion matrix (gonum's mat.Eigen, which balances the matrix
// first; Edelman & Murakami 1995: backward stable), each polished by up to
// three Newton steps. It is the cheap root solve used at the special
// values of a trace, where break points are then snapped to their exact
// values; the construction quantities use poly's refined roots.
func fastRoots(q poly.Poly) ([]complex128, error) {
	n := q.Degree()
	if n < 1 {
		return nil, nil
	}
	k := 0
	for q.Coef(k) == 0 {
		k++
	}
	out := make([]complex128, 0, n)
	for range k {
		out = append(out, 0)
	}
	r, _ := poly.FromAscending(q.Ascending()[k:])
	m := r.Degree()
	switch {
	case m == 0:
		return out, nil
	case m <= 2:
		rs, err := r.Roots()
		return append(out, rs...), err
	}
	lead := r.Lead()
	c := mat.NewDense(m, m, nil)
	for j := range m {
		c.Set(0, j, -r.Coef(m-1-j)/lead)
	}
	for i := 1; i < m; i++ {
		c.Set(i, i-1, 1)
	}
	var eig mat.Eigen
	if !eig.Factorize(c, mat.EigenNone) {
		return nil, fmt.Errorf("%w: eigenvalues of the degree-%d companion matrix", poly.ErrNoConvergence, m)
	}
	rd := r.Derivative()
	for _, v := range eig.Values(nil) {
		f := r.EvalComplex(v)
		for range 3 {
			d := rd.EvalComplex(v)
			if d == 0 {
				break
			}
			nv := v - f/d
			nf := r.EvalComplex(nv)
			if !(cmplx.Abs(nf) < cmplx.Abs(f)) {
				break
			}
			v, f = nv, nf
		}
		out = append(out, v)
	}
	// Exact conjugate pairs and exactly real roots, as poly returns them.
	for i, v := range out {
		if math.Abs(imag(v)) <= 1e-14*cmplx.Abs(v) {
			out[i] = complex(real(v), 0)
		}
	}
	poly.SortRoots(out)
	return out, nil
}
