package poly

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// benchDegrees are the degrees of the side-by-side root benchmarks.
var benchDegrees = []int{4, 6, 8, 12, 16, 20, 30, 40, 50}

// benchPolys returns 8 seeded random polynomials (standard normal
// coefficients) of degree n.
func benchPolys(n int) []Poly {
	rng := rand.New(rand.NewPCG(uint64(n), 1))
	ps := make([]Poly, 8)
	for i := range ps {
		ps[i] = randomPoly(rng, n)
	}
	return ps
}

// referenceRoots returns roots polished by Newton steps with the residual
// evaluated in math/big: the error yardstick of the benchmarks (the tests
// show they agree with mpmath references).
func referenceRoots(p Poly, start []complex128) []complex128 {
	out := make([]complex128, len(start))
	for i, z := range start {
		for range 3 {
			z -= bigHorner(p.c, z) / newTaylor(p.c).deriv(z)
		}
		out[i] = z
	}
	return out
}

// maxRelError returns the largest relative distance of got from its
// nearest match in want (matched as multisets).
func maxRelError(got, want []complex128) float64 {
	used := make([]bool, len(got))
	worst := 0.0
	for _, w := range want {
		best, bd := -1, math.Inf(1)
		for j, g := range got {
			if d := abs(g - w); !used[j] && d < bd {
				best, bd = j, d
			}
		}
		used[best] = true
		worst = math.Max(worst, bd/abs(w))
	}
	return worst
}

// BenchmarkRoots compares, per degree, the full root finder (Roots) with
// the plain companion eigenvalues it starts from (the baseline named in
// the issue). Besides time it reports, over 8 seeded random polynomials,
// the largest relative root error (against math/big-polished roots) and
// the largest normwise backward error in units of u = 2⁻⁵³.
//
//	go test -run '^$' -bench Roots -benchtime 200x ./poly/
func BenchmarkRoots(b *testing.B) {
	for _, n := range benchDegrees {
		ps := benchPolys(n)
		refs := make([][]complex128, len(ps))
		for i, p := range ps {
			rs, err := p.Roots()
			if err != nil {
				b.Fatal(err)
			}
			refs[i] = referenceRoots(p, rs)
		}
		b.Run(fmt.Sprintf("plain-eigenvalues/degree=%d", n), func(b *testing.B) {
			fwd, bwd := 0.0, 0.0
			for i, p := range ps {
				z, err := companionEigenvalues(p.c)
				if err != nil {
					b.Fatal(err)
				}
				fwd = math.Max(fwd, maxRelError(z, refs[i]))
				eta, _ := p.RootsBackwardError(z)
				bwd = math.Max(bwd, eta)
			}
			k := 0
			for b.Loop() {
				companionEigenvalues(ps[k%len(ps)].c)
				k++
			}
			b.ReportMetric(fwd/unitRoundoff, "max-rel-err/u")
			b.ReportMetric(bwd/unitRoundoff, "backward-err/u")
		})
		b.Run(fmt.Sprintf("refinement-only/degree=%d", n), func(b *testing.B) {
			// Everything Roots does after the eigenvalues: Aberth
			// iteration, clusters, symmetry (the scaled eigenvalues are
			// computed outside the timed loop).
			scs := make([][]float64, len(ps))
			eigs := make([][]complex128, len(ps))
			for i, p := range ps {
				scs[i], _ = scaleToUnitRoots(p.c)
				eigs[i], _ = companionEigenvalues(scs[i])
			}
			z := make([]complex128, n)
			k := 0
			for b.Loop() {
				i := k % len(ps)
				copy(z, eigs[i])
				tc := newTaylor(scs[i])
				aberth(tc, z)
				finish(tc, z, nil)
				k++
			}
		})
		b.Run(fmt.Sprintf("refined/degree=%d", n), func(b *testing.B) {
			fwd, bwd := 0.0, 0.0
			for i, p := range ps {
				z, err := p.Roots()
				if err != nil {
					b.Fatal(err)
				}
				fwd = math.Max(fwd, maxRelError(z, refs[i]))
				eta, _ := p.RootsBackwardError(z)
				bwd = math.Max(bwd, eta)
			}
			k := 0
			for b.Loop() {
				ps[k%len(ps)].Roots()
				k++
			}
			b.ReportMetric(fwd/unitRoundoff, "max-rel-err/u")
			b.ReportMetric(bwd/unitRoundoff, "backward-err/u")
		})
	}
}

// BenchmarkRootsWilkinson is the same comparison on Wilkinson's degree-20
// polynomial (coefficients rounded to double), with the error measured
// against the mpmath references of testdata/roots_golden.json.
func BenchmarkRootsWilkinson(b *testing.B) {
	var c goldenCase
	for _, g := range loadGolden(b) {
		if g.Name == "wilkinson20" {
			c = g
		}
	}
	p := MustNew(c.Coeffs...)
	want := make([]complex128, len(c.Roots))
	for i, r := range c.Roots {
		want[i] = complex(r[0], r[1])
	}
	b.Run("plain-eigenvalues", func(b *testing.B) {
		z, _ := companionEigenvalues(p.c)
		for b.Loop() {
			companionEigenvalues(p.c)
		}
		b.ReportMetric(maxRelError(z, want), "max-rel-err")
	})
	b.Run("plain-eigenvalues+float64-Newton", func(b *testing.B) {
		newton := func() []complex128 {
			z, _ := companionEigenvalues(p.c)
			for i := range z {
				for range 8 {
					f, d := p.EvalWithDerivative(z[i])
					z[i] -= f / d
				}
			}
			return z
		}
		z := newton()
		for b.Loop() {
			newton()
		}
		b.ReportMetric(maxRelError(z, want), "max-rel-err")
	})
	b.Run("refined", func(b *testing.B) {
		z, _ := p.Roots()
		for b.Loop() {
			p.Roots()
		}
		b.ReportMetric(maxRelError(z, want), "max-rel-err")
	})
}

// BenchmarkRootsHighDegree times the roots of (x+1)ⁿ, the denominator of
// the report's 1/(s+1)^n loops (one cluster of n roots: the worst case of
// the cluster search), and of a degree-n polynomial with n distinct roots
// spread over six decades, at n = 100 … 500.
func BenchmarkRootsHighDegree(b *testing.B) {
	for _, n := range []int{100, 250, 500} {
		ones := make([]complex128, n)
		for i := range ones {
			ones[i] = -1
		}
		cluster, err := FromRoots(ones)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("cluster/n=%d", n), func(b *testing.B) {
			for b.Loop() {
				if _, err := cluster.Roots(); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
