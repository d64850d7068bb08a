package poly

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// Multiple roots.
//
// A root of multiplicity m is infinitely sensitive: perturbing the
// coefficients by a relative δ scatters it into m roots on a circle of
// radius about (δ·p̃(|r|)·m!/|p⁽ᵐ⁾(r)|)^(1/m), so double-precision
// coefficients (δ = u) fix it only to about u^(1/m) — 1e-5 for a triple
// root — whatever the method. Kahan (1972, "Conserving confluence curbs
// ill-condition", Technical Report 6, Computer Science Department, UC
// Berkeley) observed that the multiple root itself is well conditioned
// when the perturbations are restricted to polynomials that keep the
// multiplicity (the "pejorative manifold"), and Zeng (2004, Algorithm
// 835, ACM Trans. Math. Softw. 30(2); 2005, "Computing multiple roots of
// inexact polynomials", Math. Comp. 74(250)) built a root finder on that
// idea. We use it in this form:
//
//  1. Candidate clusters: two refined roots zᵢ, zⱼ are neighbours when
//     |zᵢ − zⱼ| ≤ 4(κᵢ + κⱼ), κ = u·p̃(|z|)/|p′(z)| being the first-order
//     distance a relative coefficient perturbation u can move a root; the
//     connected components of this graph are the candidates. Well-separated
//     simple roots are never candidates.
//  2. Inside a component, groups of m members (largest m first; for each
//     member, the group of its m nearest) are tested. The centre c of a
//     group is the simple root of p⁽ᵐ⁻¹⁾ found by Newton's method from the
//     group's mean, with p⁽ᵐ⁻¹⁾ evaluated by the compensated Horner scheme
//     on exactly split Taylor coefficients; c is real when the group
//     straddles the real axis.
//  3. The group is accepted as an m-fold root at c when
//     (o) it is isolated: every other computed root is farther than 3·rad
//     from c, rad being the largest distance of a member from c; and
//     (a) every member lies within 4·ρₘ(c) of c, ρₘ(c) =
//     (u·p̃(|c|)·m!/|p⁽ᵐ⁾(c)|)^(1/m), the scatter radius above; and
//     (b) the componentwise backward error of the m-fold root is at most
//     the cluster tolerance (default 8u): there is a polynomial with
//     coefficients aᵢ(1 + tᵢ), |tᵢ| ≤ tolerance, zero coefficients kept
//     zero, that has c as a root of multiplicity m. The tᵢ are the
//     minimum-norm solution (gonum's SVD) of the m linear conditions
//     (p + δp)⁽ʲ⁾(c) = 0, j < m; the test is exact for the given c, not a
//     first-order estimate. Condition (b) is what keeps distinct roots
//     apart: Wilkinson's roots 14 and 15 are both within 4ρ₂ of 14.5, but no
//     perturbation of 8u makes 14.5 a double root.
//
// What this means for a user. Roots that the coefficients determine (their
// separation is well above their sensitivity to a relative coefficient
// change of a few u) are reported separately, each accurate to the
// accuracy the double coefficients allow. A cluster that is a multiple root
// of a polynomial within 8u (componentwise) of the given one is reported as
// one root with its multiplicity, whose centre is accurate to about
// u·cond(c, p⁽ᵐ⁻¹⁾) — to a few ulps when the multiple root is exact in the
// coefficients, as for (x+1)³(x+2). Distinct roots closer than about two
// to four times their scatter radius (so close that a perturbation of
// 8u of the coefficients merges them) are reported as one multiple root;
// roots a little farther apart are reported separately but then carry the
// large error of ill-conditioned roots, about ρₘ, in the sense that the
// coefficients do not determine them better.

// defaultClusterTolerance is the componentwise relative backward error up
// to which a cluster is accepted as one multiple root: 8u ≈ 8.9e-16, a few
// roundings of each coefficient (coefficients computed by a product of
// factors carry a few u of rounding error; a tolerance of u would miss
// them, one of 1e-12 would merge roots 1 and 1 + 2e-6).
const defaultClusterTolerance = 8 * unitRoundoff

// clusterIsolationFactor: a group of computed roots is a candidate
// multiple root only if every other computed root is farther from its
// centre than this factor times the group's radius. Without it, a
// polynomial with a high-order cluster, such as (x+0.7)¹²(x+0.71)¹², whose
// roots scatter over a disc of radius 0.35, would let any handful of
// nearby points pass the backward-error test (inside that disc every point
// is a 6-fold root of a polynomial within 8u).
const clusterIsolationFactor = 3

// clusterRadiusFactor is the factor K in condition (a), |zᵢ − c| ≤ K·ρₘ(c):
// the true roots of a polynomial perturbed by u lie within about ρₘ; K = 4
// leaves room for perturbations of a few u. Condition (b) is the sharp test.
const clusterRadiusFactor = 4

// findClusters groups the refined roots z of p (ascending c) into simple
// and multiple roots.
func findClusters(tc *taylor, z []complex128, tol float64) []candidate {
	n := len(z)
	c := tc.c
	kappa := make([]float64, n)
	for i, v := range z {
		kappa[i] = unitRoundoff * absPoly(c, abs(v)) / abs(tc.deriv(v))
	}
	// Union–find over the neighbour graph.
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
			if abs(z[i]-z[j]) <= 4*(kappa[i]+kappa[j]) {
				parent[find(i)] = find(j)
			}
		}
	}
	comps := map[int][]int{}
	var roots []int
	for i := range n {
		r := find(i)
		if _, ok := comps[r]; !ok {
			roots = append(roots, r)
		}
		comps[r] = append(comps[r], i)
	}
	var out []candidate
	// Components entirely in the lower half-plane are mirrored from their
	// upper partner so that multiple complex roots come in exact pairs.
	done := map[int][]candidate{}
	for _, r := range roots {
		idx := comps[r]
		if len(idx) == 1 {
			out = append(out, candidate{z: z[idx[0]], m: 1, noise: simpleNoise(tc, z[idx[0]])})
			continue
		}
		if allBelow(z, idx) {
			continue
		}
		res := splitComponent(tc, z, idx, tol)
		done[r] = res
		out = append(out, res...)
	}
	for _, r := range roots {
		idx := comps[r]
		if len(idx) == 1 || !allBelow(z, idx) {
			continue
		}
		// Find the upper component that mirrors this one.
		mirrored := false
		for ur, res := range done {
			uidx := comps[ur]
			if len(uidx) != len(idx) || !mirrors(z, uidx, idx) {
				continue
			}
			used := map[int]bool{}
			for _, cd := range res {
				var mem []int
				for _, i := range cd.members {
					best, bd := -1, math.Inf(1)
					for _, j := range idx {
						if d := abs(conj(z[i]) - z[j]); !used[j] && d < bd {
							best, bd = j, d
						}
					}
					used[best] = true
					mem = append(mem, best)
				}
				out = append(out, candidate{z: conj(cd.z), m: cd.m, noise: cd.noise, members: mem})
			}
			delete(done, ur)
			mirrored = true
			break
		}
		if !mirrored {
			out = append(out, splitComponent(tc, z, idx, tol)...)
		}
	}
	return out
}

func conj(z complex128) complex128 { return complex(real(z), -imag(z)) }

func allBelow(z []complex128, idx []int) bool {
	for _, i := range idx {
		if imag(z[i]) >= 0 {
			return false
		}
	}
	return true
}

// mirrors reports whether the conjugates of the points a lie near the
// points b: every conj(z[a_i]) is closer to some z[b_j] than the diameter of
// a (or 1e-6·|z[a_i]|, if larger).
func mirrors(z []complex128, a, b []int) bool {
	diam := 0.0
	for _, i := range a {
		for _, j := range a {
			diam = math.Max(diam, abs(z[i]-z[j]))
		}
	}
	for _, i := range a {
		near := false
		for _, j := range b {
			if abs(conj(z[i])-z[j]) <= math.Max(diam, 1e-6*abs(z[i])) {
				near = true
				break
			}
		}
		if !near {
			return false
		}
	}
	return true
}

// splitComponent finds multiple roots among the points z[idx].
func splitComponent(tc *taylor, z []complex128, idx []int, tol float64) []candidate {
	remaining := append([]int(nil), idx...)
	member := make([]bool, len(z)) // member[i]: z[i] is in the group under test
	var out []candidate
	for len(remaining) >= 2 {
		// For every member, the others by increasing distance: the group
		// of its m nearest is a prefix.
		orders := make([][]int, len(remaining))
		dists := make([][]float64, len(remaining))
		sums := make([][]complex128, len(remaining)) // sums[k][m]: Σ z over orders[k][:m]
		for k, seed := range remaining {
			orders[k], dists[k] = byDistance(z, remaining, seed)
			sums[k] = make([]complex128, len(remaining)+1)
			for j, i := range orders[k] {
				sums[k][j+1] = sums[k][j] + z[i]
			}
		}
		found := false
		for m := len(remaining); m >= 2 && !found; m-- {
			var best candidate
			var bestSet []int
			bestEta := math.Inf(1)
			seen := map[string]bool{}
			for k := range remaining {
				// A necessary condition first, in O(1): with c the mean
				// and δ = |seed − c|, the seed and its m-th nearest
				// point (at dₘ from it) lie within rad of c, so
				// rad ≥ max(dₘ/2, δ); the nearest point left out, at D
				// from the seed, lies within D + δ of c and must lie
				// beyond F·rad (F the isolation factor), so
				// D + δ > F·max(dₘ/2, δ) is required.
				if m < len(remaining) {
					delta := abs(z[remaining[k]] - sums[k][m]/complex(float64(m), 0))
					if !(dists[k][m]+delta > clusterIsolationFactor*math.Max(dists[k][m-1]/2, delta)) {
						continue
					}
				}
				set := orders[k][:m]
				for _, i := range set {
					member[i] = true
				}
				// The isolation test is cheap (O(len(z))) and rejects
				// most prefixes, so it runs before the duplicate check,
				// whose key costs a sort.
				mean, rad0 := centre(z, set)
				isolated := isolatedGroup(z, member, mean, rad0)
				if isolated {
					key := setKey(set)
					isolated = !seen[key]
					seen[key] = true
				}
				if !isolated {
					for _, i := range set {
						member[i] = false
					}
					continue
				}
				cd, eta, ok := testGroup(tc, z, set, member, m, tol)
				for _, i := range set {
					member[i] = false
				}
				if ok && eta < bestEta {
					best, bestSet, bestEta = cd, set, eta
				}
			}
			if bestSet != nil {
				found = true
				out = append(out, best)
				remaining = slices.DeleteFunc(remaining, func(i int) bool { return slices.Contains(bestSet, i) })
			}
		}
		if !found {
			break
		}
	}
	for _, i := range remaining {
		out = append(out, candidate{z: z[i], m: 1, noise: simpleNoise(tc, z[i])})
	}
	return out
}

// byDistance returns pool sorted by increasing distance from z[seed]
// (seed first, ties by index), and the distances.
func byDistance(z []complex128, pool []int, seed int) ([]int, []float64) {
	type item struct {
		i int
		d float64
	}
	items := make([]item, len(pool))
	for k, i := range pool {
		dz := z[i] - z[seed]
		items[k] = item{i, real(dz)*real(dz) + imag(dz)*imag(dz)}
		if i == seed {
			items[k].d = -1
		}
	}
	slices.SortFunc(items, func(a, b item) int {
		if a.d != b.d {
			if a.d < b.d {
				return -1
			}
			return 1
		}
		return a.i - b.i
	})
	out := make([]int, len(pool))
	dist := make([]float64, len(pool))
	for k, it := range items {
		out[k] = it.i
		dist[k] = math.Sqrt(math.Max(it.d, 0))
	}
	return out, dist
}

func setKey(set []int) string {
	s := slices.Clone(set)
	slices.Sort(s)
	b := make([]byte, 0, 4*len(s))
	for _, v := range s {
		b = append(b, byte(v), byte(v>>8), ',')
	}
	return string(b)
}

// centre returns the mean of the points z[set] and their largest
// distance from it.
func centre(z []complex128, set []int) (mean complex128, rad float64) {
	for _, i := range set {
		mean += z[i]
	}
	mean /= complex(float64(len(set)), 0)
	for _, i := range set {
		rad = math.Max(rad, abs(z[i]-mean))
	}
	return mean, rad
}

// isolatedGroup reports whether every point z[i] outside the group
// (member[i] false) lies farther than clusterIsolationFactor·rad from c.
func isolatedGroup(z []complex128, member []bool, c complex128, rad float64) bool {
	for i, v := range z {
		if !member[i] && abs(v-c) <= clusterIsolationFactor*rad {
			return false
		}
	}
	return true
}

// testGroup decides whether the points z[set] (marked in member) form one
// root of multiplicity m; it returns the candidate, its backward error and
// whether it is accepted.
func testGroup(tc *taylor, z []complex128, set []int, member []bool, m int, tol float64) (candidate, float64, bool) {
	mean, rad0 := centre(z, set)
	if !isolatedGroup(z, member, mean, rad0) {
		return candidate{}, 0, false
	}
	up, down := false, false
	for _, i := range set {
		up = up || imag(z[i]) > 0
		down = down || imag(z[i]) < 0
	}
	if up && down || math.Abs(imag(mean)) <= rad0 {
		mean = complex(real(mean), 0)
	}
	cen, noise, ok := tc.newtonRoot(m-1, mean)
	if !ok {
		return candidate{}, 0, false
	}
	rad := 0.0
	for _, i := range set {
		rad = math.Max(rad, abs(z[i]-cen))
	}
	if !isolatedGroup(z, member, cen, rad) {
		return candidate{}, 0, false
	}
	tm := abs(tc.evalPlain(m, cen))
	if tm == 0 {
		return candidate{}, 0, false
	}
	rho := math.Pow(unitRoundoff*absPoly(tc.c, abs(cen))/tm, 1/float64(m))
	if !(rad <= clusterRadiusFactor*rho) {
		return candidate{}, 0, false
	}
	eta := tc.multipleBackwardError(cen, m)
	return candidate{z: cen, m: m, noise: noise, members: slices.Clone(set)}, eta, eta <= tol
}

// checkConsistency keeps a recognised multiple root only if the whole root
// set stays a root set of a nearby polynomial. The cluster test is local:
// the perturbation that makes c an m-fold root also moves the other roots,
// which is harmless when they are well conditioned but not, for instance,
// on Wilkinson's polynomial of degree 25, where a perturbation of 8u moves
// every root near 15 by about 1. So the normwise backward error (see
// RootsBackwardError) of the set with the merge must not exceed
// max(2·η₀, 64u), η₀ being that of the unmerged approximations (both
// computed at 128 bits, ample for a comparison at the level of u); merges
// that fail (with their conjugate partner) are undone.
func checkConsistency(tc *taylor, z []complex128, cands []candidate) []candidate {
	var multi []int
	for i, cd := range cands {
		if cd.m > 1 {
			multi = append(multi, i)
		}
	}
	if len(multi) == 0 {
		return cands
	}
	limit := math.Max(2*backwardErrorPrec(tc.c, z, 128), 64*unitRoundoff)
	with := func(groups []int) []complex128 {
		drop := map[int]bool{}
		var set []complex128
		for _, g := range groups {
			for _, i := range cands[g].members {
				drop[i] = true
			}
			for range cands[g].m {
				set = append(set, cands[g].z)
			}
		}
		for i, v := range z {
			if !drop[i] {
				set = append(set, v)
			}
		}
		return set
	}
	if backwardErrorPrec(tc.c, with(multi), 128) <= limit {
		return cands
	}
	reject := map[int]bool{}
	for _, g := range multi {
		if backwardErrorPrec(tc.c, with([]int{g}), 128) > limit {
			reject[g] = true
		}
	}
	// Keep decisions symmetric under conjugation.
	for _, g := range multi {
		if reject[g] || imag(cands[g].z) == 0 {
			continue
		}
		for _, h := range multi {
			if reject[h] && cands[h].m == cands[g].m && abs(cands[h].z-conj(cands[g].z)) <= 1e-8*abs(cands[g].z) {
				reject[g] = true
			}
		}
	}
	var out []candidate
	for i, cd := range cands {
		if !reject[i] {
			out = append(out, cd)
			continue
		}
		for _, j := range cd.members {
			out = append(out, candidate{z: z[j], m: 1, noise: simpleNoise(tc, z[j])})
		}
	}
	return out
}

// taylor holds the Taylor-coefficient polynomials Tⱼ(x) = p⁽ʲ⁾(x)/j! =
// Σₖ C(k+j, j)·a_{k+j}·xᵏ of p, each coefficient split exactly into
// hi + lo by TwoProd, so that the compensated evaluation of hi plus the
// plain evaluation of lo gives Tⱼ(x) as accurately as p itself.
type taylor struct {
	c      []float64
	hi, lo [][]float64 // by j; nil until first used
	binom  [][]float64 // Pascal's triangle, exact below 2⁵³; built on first use for j ≥ 2
}

func newTaylor(c []float64) *taylor {
	n := len(c) - 1
	return &taylor{c: c, hi: make([][]float64, n+1), lo: make([][]float64, n+1)}
}

// binomial returns C(i, j), exact below 2⁵³.
func (t *taylor) binomial(i, j int) float64 {
	switch j {
	case 0:
		return 1
	case 1:
		return float64(i)
	}
	if t.binom == nil {
		n := len(t.c) - 1
		b := make([][]float64, n+1)
		for i := range b {
			b[i] = make([]float64, i+1)
			b[i][0], b[i][i] = 1, 1
			for j := 1; j < i; j++ {
				b[i][j] = b[i-1][j-1] + b[i-1][j]
			}
		}
		t.binom = b
	}
	return t.binom[i][j]
}

func (t *taylor) coeffs(j int) (hi, lo []float64) {
	n := len(t.c) - 1
	if j > n {
		return nil, nil
	}
	if t.hi[j] != nil {
		return t.hi[j], t.lo[j]
	}
	hi = make([]float64, n-j+1)
	lo = make([]float64, n-j+1)
	for k := range hi {
		hi[k], lo[k] = twoProd(t.c[k+j], t.binomial(k+j, j))
	}
	t.hi[j], t.lo[j] = hi, lo
	return hi, lo
}

// eval returns Tⱼ(x) accurately with an error bound.
func (t *taylor) eval(j int, x complex128) (complex128, float64) {
	hi, lo := t.coeffs(j)
	v, eb := evalComp(hi, x)
	l := plainHorner(lo, x)
	return v + l, eb + 2*unitRoundoff*abs(l) + gamma(2*len(lo))*absPoly(lo, abs(x))
}

// evalPlain returns Tⱼ(x) by plain Horner's scheme.
func (t *taylor) evalPlain(j int, x complex128) complex128 {
	hi, _ := t.coeffs(j)
	return plainHorner(hi, x)
}

func plainHorner(c []float64, z complex128) complex128 {
	var s complex128
	for i := len(c) - 1; i >= 0; i-- {
		s = s*z + complex(c[i], 0)
	}
	return s
}

// newtonRoot finds the root of Tⱼ near x0 by Newton's method (staying on
// the real axis for real x0) and returns it with its noise
// (errBound/|Tⱼ′|); ok is false when Newton's method breaks down.
func (t *taylor) newtonRoot(j int, x0 complex128) (x complex128, noise float64, ok bool) {
	x = x0
	last := math.Inf(1)
	for range 40 {
		f, fb := t.eval(j, x)
		d := complex(float64(j+1), 0) * t.evalPlain(j+1, x)
		if d == 0 {
			return x, math.Inf(1), false
		}
		noise = fb / abs(d)
		if f == 0 {
			return x, noise, true
		}
		delta := f / d
		ad := abs(delta)
		if math.IsNaN(ad) || math.IsInf(ad, 0) {
			return x, noise, false
		}
		if ad <= noise || ad >= last && ad <= 64*unitRoundoff*abs(x) {
			return x, noise, true
		}
		if ad >= 2*last {
			return x, noise, false
		}
		last = ad
		x -= delta
		if ad <= 2*unitRoundoff*abs(x) {
			return x, noise, true
		}
	}
	return x, noise, true
}

// multipleBackwardError returns the smallest η found such that a
// polynomial with coefficients aᵢ(1 + tᵢ), |tᵢ| ≤ η (zero coefficients kept
// zero), has c as a root of multiplicity at least m: the ∞-norm of the
// minimum 2-norm solution t of the linear conditions Σᵢ |aᵢ|·tᵢ·C(i, j)·
// c^(i−j) = −Tⱼ(c), j = 0..m−1 (real and imaginary parts for complex c),
// rows scaled to unit norm, solved with gonum's SVD. It returns +Inf when
// the conditions cannot be met.
func (t *taylor) multipleBackwardError(c complex128, m int) float64 {
	n := len(t.c) - 1
	var cols []int
	for i, v := range t.c {
		if v != 0 {
			cols = append(cols, i)
		}
	}
	isReal := imag(c) == 0
	var rows [][]float64
	var rhs []float64
	for j := range m {
		rj, _ := t.eval(j, c)
		re := make([]float64, len(cols))
		im := make([]float64, len(cols))
		for k, i := range cols {
			if i < j {
				continue
			}
			w := complex(math.Abs(t.c[i])*t.binomial(i, j), 0) * cpow(c, i-j)
			re[k], im[k] = real(w), imag(w)
		}
		add := func(row []float64, b float64) bool {
			nr := 0.0
			for _, v := range row {
				nr = math.Hypot(nr, v)
			}
			if math.IsNaN(nr) || math.IsInf(nr, 0) {
				return false
			}
			if nr == 0 {
				return b == 0
			}
			for k := range row {
				row[k] /= nr
			}
			rows = append(rows, row)
			rhs = append(rhs, b/nr)
			return true
		}
		if !add(re, -real(rj)) {
			return math.Inf(1)
		}
		if !isReal && !add(im, -imag(rj)) {
			return math.Inf(1)
		}
	}
	_ = n
	if len(rows) == 0 {
		return 0
	}
	a := mat.NewDense(len(rows), len(cols), nil)
	for r, row := range rows {
		a.SetRow(r, row)
	}
	b := mat.NewVecDense(len(rhs), rhs)
	var svd mat.SVD
	if !svd.Factorize(a, mat.SVDThin) {
		return math.Inf(1)
	}
	sv := svd.Values(nil)
	rank := 0
	for _, s := range sv {
		if s > 1e-12*sv[0] {
			rank++
		}
	}
	if rank == 0 {
		return math.Inf(1)
	}
	var x mat.VecDense
	svd.SolveVecTo(&x, b, rank)
	var res mat.VecDense
	res.MulVec(a, &x)
	res.SubVec(&res, b)
	eta := mat.Norm(&x, math.Inf(1))
	// A residual means the conditions are (numerically) incompatible: the
	// minimum-norm solution of the truncated system does not satisfy them.
	if r := mat.Norm(&res, math.Inf(1)); r > 1e-3*eta+unitRoundoff*mat.Norm(b, math.Inf(1)) {
		return math.Inf(1)
	}
	return eta
}

// cpow returns zᵏ by repeated squaring.
func cpow(z complex128, k int) complex128 {
	r := complex(1, 0)
	for k > 0 {
		if k&1 == 1 {
			r *= z
		}
		z *= z
		k >>= 1
	}
	return r
}
