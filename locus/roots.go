package locus

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/poly"
	"gonum.org/v1/gonum/mat"
)

// rootsMult returns the distinct roots of q with multiplicities. It calls
// poly's RootsWithMultiplicity and then recognises clusters that the root
// finder may have left as separate simple roots: a μ-fold root perturbed by
// rounding spreads into μ roots about ε^(1/μ) apart whose mean is accurate
// to O(ε) (the sum of the roots is a coefficient). A candidate cluster
// (single linkage within 1e-3·max(1,|r|)) is accepted when its mean,
// polished by Newton's method on q^(μ−1) (where the root is simple), makes
// q, q′, …, q^(μ−2) vanish to a relative residual of 1e-10: the test of
// Kahan (1972) and Zeng (2004) for numerical multiplicity.
func rootsMult(q poly.Poly) ([]poly.Root, error) {
	rs, err := q.RootsWithMultiplicity()
	if err != nil {
		return nil, err
	}
	n := len(rs)
	if n < 2 {
		return rs, nil
	}
	// Union–find over close roots.
	parent := make([]int, n)
	for i := range parent {
		parent[i] = i
	}
	find := func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	for i := range n {
		for j := i + 1; j < n; j++ {
			d := cmplx.Abs(rs[i].Value - rs[j].Value)
			if d <= 1e-3*math.Max(1, cmplx.Abs(rs[i].Value)) {
				parent[find(i)] = find(j)
			}
		}
	}
	groups := map[int][]int{}
	var order []int
	for i := range n {
		r := find(i)
		if _, ok := groups[r]; !ok {
			order = append(order, r)
		}
		groups[r] = append(groups[r], i)
	}
	var out []poly.Root
	for _, g := range order {
		idx := groups[g]
		if len(idx) == 1 {
			out = append(out, rs[idx[0]])
			continue
		}
		if merged, ok := mergeCluster(q, rs, idx); ok {
			out = append(out, merged...)
			continue
		}
		for _, i := range idx {
			out = append(out, rs[i])
		}
	}
	poly.SortRootSet(out)
	return out, nil
}

// mergeCluster tries to replace the roots rs[idx] by multiple roots. A
// cluster straddling the real axis (conjugate members) becomes one real
// root; a cluster above the axis becomes one complex root and the caller's
// conjugate cluster is handled on its own.
func mergeCluster(q poly.Poly, rs []poly.Root, idx []int) ([]poly.Root, bool) {
	mu := 0
	var sum complex128
	for _, i := range idx {
		mu += rs[i].Multiplicity
		sum += rs[i].Value * complex(float64(rs[i].Multiplicity), 0)
	}
	c := sum / complex(float64(mu), 0)
	realCluster := math.Abs(imag(c)) <= 1e-3*math.Max(1, cmplx.Abs(c))
	if realCluster {
		c = complex(real(c), 0)
	}
	d := q.DerivativeN(mu - 1)
	c = newtonPoly(d, d.Derivative(), c, realCluster)
	for j := 0; j <= mu-2; j++ {
		qj := q.DerivativeN(j)
		if cmplx.Abs(qj.EvalComplex(c)) > 1e-10*absEval(qj, cmplx.Abs(c)) {
			return nil, false
		}
	}
	return []poly.Root{{Value: c, Multiplicity: mu}}, true
}

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
