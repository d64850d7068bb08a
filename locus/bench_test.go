package locus

import (
	"fmt"
	"math"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

var benchSizes = []int{4, 8, 12, 16, 24}

// comparison holds the fidelity metrics of one method on one loop.
type comparison struct {
	points        int
	maxDev        float64 // largest chord-midpoint distance to the exact locus / scale
	swaps         int     // steps that jump to another branch
	crossRelErr   float64 // largest relative error of crossing values
	breakRelErr   float64 // largest relative error of real break-point values
	eigenSolves   int
	newtonIters   int
	rootSolves    int
	kLo, kHi      float64
	checkedChords int
	inconclusive  int
}

// compareMethods traces loop adaptively and with the baseline grid over
// the same span of gains and measures both against the exact locus.
func compareMethods(loop tf.TF) (trace, base comparison, err error) {
	loc, err := Trace(loop, nil)
	if err != nil {
		return trace, base, err
	}
	r, _ := resolve(nil)
	p, err := newProblem(loop, r)
	if err != nil {
		return trace, base, err
	}
	an := loc.Analysis
	scale := math.Hypot(loc.View.ReMax-loc.View.ReMin, loc.View.ImMax-loc.View.ImMin) / 2
	tb := branchesOf(loc)
	kLo, kHi := math.Inf(1), 0.0
	for _, br := range tb {
		for _, q := range br {
			if q.Value > 0 && !math.IsInf(q.Value, 0) {
				kLo, kHi = math.Min(kLo, q.Value), math.Max(kHi, q.Value)
			}
		}
	}
	trace = comparison{points: loc.Stats.Points, newtonIters: loc.Stats.NewtonIterations, rootSolves: loc.Stats.RootSolves, kLo: kLo, kHi: kHi}
	trace.maxDev = maxDeviation(p, an, tb, loc.View, scale)
	trace.swaps, trace.checkedChords, trace.inconclusive = countSwaps(p, an, tb, scale)
	// The trace's crossing and break values are those of the analysis,
	// inserted exactly; their accuracy is checked against mpmath in
	// TestExactValues.
	bb, solves := baselineGrid(p.a, p.b, kLo, kHi, 2000)
	base = comparison{points: 2000 * len(bb), eigenSolves: solves, kLo: kLo, kHi: kHi}
	base.maxDev = maxDeviation(p, an, bb, loc.View, scale)
	base.swaps, base.checkedChords, base.inconclusive = countSwaps(p, an, bb, scale)
	base.crossRelErr, base.breakRelErr = gridEstimates(an, bb)
	return trace, base, nil
}

// gridEstimates returns the largest relative errors of the crossing values
// (linear interpolation of Re s between grid gains) and of the real
// break-point values (the first grid gain after a branch leaves or joins
// the real axis) that the baseline would report.
func gridEstimates(an Analysis, bb []tracedBranch) (cross, brk float64) {
	var cr, bk []float64
	for _, br := range bb {
		for i := 0; i+1 < len(br); i++ {
			a, b := br[i], br[i+1]
			if (real(a.S) < 0) != (real(b.S) < 0) {
				cr = append(cr, a.Value+(b.Value-a.Value)*real(a.S)/(real(a.S)-real(b.S)))
			}
			if (imag(a.S) == 0) != (imag(b.S) == 0) {
				bk = append(bk, b.Value)
			}
		}
	}
	worst := func(exact []float64, est []float64) float64 {
		w := 0.0
		for _, e := range exact {
			best := math.Inf(1)
			for _, x := range est {
				best = math.Min(best, math.Abs(x-e)/math.Abs(e))
			}
			if !math.IsInf(best, 1) {
				w = math.Max(w, best)
			}
		}
		return w
	}
	var ec, eb []float64
	for _, c := range an.AxisCrossings {
		ec = append(ec, c.Value)
	}
	for _, b := range an.BreakPoints {
		if imag(b.Point) == 0 {
			eb = append(eb, b.Value)
		}
	}
	return worst(ec, cr), worst(eb, bk)
}

// BenchmarkTrace times the adaptive trace on the benchmark family and
// reports its fidelity (largest chord-midpoint distance to the exact locus
// relative to the view scale) and branch swaps; compare with
// BenchmarkBaselineGrid in the same run:
//
//	go test -run '^$' -bench 'Trace|BaselineGrid' -benchtime 20x ./locus/
func BenchmarkTrace(b *testing.B) {
	for _, n := range benchSizes {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			loop := familyLoop(n)
			tr, _, err := compareMethods(loop)
			if err != nil {
				b.Fatal(err)
			}
			for b.Loop() {
				if _, err := Trace(loop, nil); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(tr.points), "points/op")
			b.ReportMetric(float64(tr.newtonIters), "newton/op")
			b.ReportMetric(float64(tr.rootSolves), "rootsolves/op")
			b.ReportMetric(tr.maxDev, "maxdev/scale")
			b.ReportMetric(float64(tr.swaps), "swaps")
		})
	}
}

// BenchmarkBaselineGrid times the naive baseline: 2000 log-spaced gains
// over the same span as the trace, companion-matrix eigenvalues (gonum
// mat.Eigen) at each, greedy nearest-neighbour matching.
func BenchmarkBaselineGrid(b *testing.B) {
	for _, n := range benchSizes {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			loop := familyLoop(n)
			_, base, err := compareMethods(loop)
			if err != nil {
				b.Fatal(err)
			}
			a, bb := loop.Den(), loop.Num()
			for b.Loop() {
				baselineGrid(a, bb, base.kLo, base.kHi, 2000)
			}
			b.ReportMetric(float64(base.eigenSolves), "eigensolves/op")
			b.ReportMetric(base.maxDev, "maxdev/scale")
			b.ReportMetric(float64(base.swaps), "swaps")
			b.ReportMetric(base.crossRelErr, "crossrelerr")
			b.ReportMetric(base.breakRelErr, "breakrelerr")
		})
	}
}

// TestCompareBaseline prints the side-by-side fidelity table and requires
// the trace to have no branch swap and a deviation from the exact locus no
// larger than the baseline's. The full family runs outside -short.
func TestCompareBaseline(t *testing.T) {
	sizes := benchSizes
	if testing.Short() {
		sizes = []int{4, 8}
	}
	for _, n := range sizes {
		tr, base, err := compareMethods(familyLoop(n))
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("n=%2d trace: %5d points, dev %.2e, swaps %d/%d (%d inconclusive) | grid: %d points, dev %.2e, swaps %d/%d (%d inconclusive), crossing err %.1e, break err %.1e",
			n, tr.points, tr.maxDev, tr.swaps, tr.checkedChords, tr.inconclusive, base.points, base.maxDev, base.swaps, base.checkedChords, base.inconclusive, base.crossRelErr, base.breakRelErr)
		if tr.swaps != 0 {
			t.Errorf("n=%d: trace has %d branch swaps", n, tr.swaps)
		}
		if tr.maxDev > base.maxDev {
			t.Errorf("n=%d: trace deviation %.3g exceeds the grid's %.3g", n, tr.maxDev, base.maxDev)
		}
	}
}

// TestSwapCheckerDetects makes sure the branch-identity check used for
// the swap counts can fail: two baseline branches exchanged halfway must
// be reported.
func TestSwapCheckerDetects(t *testing.T) {
	loop := familyLoop(8)
	r, _ := resolve(nil)
	p, err := newProblem(loop, r)
	if err != nil {
		t.Fatal(err)
	}
	an, err := p.analyze()
	if err != nil {
		t.Fatal(err)
	}
	bb, _ := baselineGrid(p.a, p.b, 1e-2, 1e2, 400)
	const scale = 10
	if s, _, _ := countSwaps(p, an, bb, scale); s != 0 {
		t.Fatalf("unmodified baseline: %d swaps", s)
	}
	// Exchange the tails of two branches that are far apart at the cut.
	cut := 200
	i, j := 0, 1
	for q := 1; q < len(bb); q++ {
		if math.Abs(real(bb[q][cut].S)-real(bb[0][cut].S)) > 0.5 {
			j = q
			break
		}
	}
	tail := append(tracedBranch(nil), bb[i][cut:]...)
	copy(bb[i][cut:], bb[j][cut:])
	copy(bb[j][cut:], tail)
	if s, _, _ := countSwaps(p, an, bb, scale); s < 2 {
		t.Errorf("exchanged branches: %d swaps reported, want 2", s)
	}
}
