package locus

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// illConditionedLoop18 draws loop i of the ill-conditioned order-18 family
// (issue 12; the family the issue names is not in the harness, so this is
// the project's own construction): 18 poles and 0 to 16 zeros, built from clusters of 2 to 4
// nearly repeated roots. Each cluster has a centre of modulus 10^U(−D/2, D/2), D = f.decades
// (D decades of scale spread across the loop), real (negative with
// probability 0.8) or a complex pair (in the left half plane with
// probability 0.85); its members are the centre times 1 + j·δ (and, for
// pairs, rotated by j·δ′ radians), j = 0, 1, …, with δ, δ′ = 10^U(f.clusterLo, f.clusterHi)
// relative. Half of the zero clusters sit beside a pole cluster, offset by
// 10^U(f.cancelLo, f.cancelHi) relative (nearly cancelling pole–zero pairs). Seeded by
// PCG(18, i); the gain is 1.
func illConditionedLoop18(i int, f illFamily) (tf.TF, error) {
	rng := rand.New(rand.NewPCG(18, uint64(i)))
	logU := func(lo, hi float64) float64 { return math.Pow(10, lo+(hi-lo)*rng.Float64()) }
	type cluster struct {
		centre complex128
		size   int
	}
	cluster1 := func(c cluster, room int) []complex128 {
		size := min(c.size, room)
		d, dt := logU(f.clusterLo, f.clusterHi), logU(f.clusterLo, f.clusterHi)
		var out []complex128
		if imag(c.centre) == 0 {
			for j := range size {
				out = append(out, c.centre*complex(1+float64(j)*d, 0))
			}
			return out
		}
		for j := range size / 2 {
			z := c.centre * complex(1+float64(j)*d, 0) * cmplx.Exp(complex(0, float64(j)*dt))
			out = append(out, z, cmplx.Conj(z))
		}
		return out
	}
	newCluster := func(room int) cluster {
		rho := logU(-f.decades/2, f.decades/2)
		size := 2 + rng.IntN(3)
		if rng.IntN(2) == 0 || room < 2 {
			if rng.Float64() < 0.2 {
				return cluster{complex(rho, 0), size}
			}
			return cluster{complex(-rho, 0), size}
		}
		th := math.Pi/2 + math.Pi/2*rng.Float64()
		if rng.Float64() < 0.15 {
			th = math.Pi / 2 * rng.Float64()
		}
		return cluster{cmplx.Rect(rho, th), 2 * (1 + rng.IntN(2))}
	}
	var poles []complex128
	var pc []cluster
	for len(poles) < 18 {
		c := newCluster(18 - len(poles))
		pc = append(pc, c)
		poles = append(poles, cluster1(c, 18-len(poles))...)
	}
	m := rng.IntN(17)
	var zeros []complex128
	for len(zeros) < m {
		c := newCluster(m - len(zeros))
		if rng.IntN(2) == 0 {
			// Beside a pole cluster of the same kind.
			q := pc[rng.IntN(len(pc))]
			if (imag(q.centre) == 0) == (imag(c.centre) == 0) {
				c.centre = q.centre * complex(1+logU(f.cancelLo, f.cancelHi), 0)
			}
		}
		zeros = append(zeros, cluster1(c, m-len(zeros))...)
	}
	return tf.FromZerosPolesGain(zeros, poles, 1)
}

// illcond18 is the family's setting used by TestIllConditionedOrder18:
// cluster centres over four decades, members 10^U(−4, −2) apart
// (relative), pole–zero offsets 10^U(−4, −2).
var illcond18 = illFamily{decades: 4, clusterLo: -4, clusterHi: -2, cancelLo: -4, cancelHi: -2}

// illFamily sets the spreads of illConditionedLoop18 (base-10 exponents).
type illFamily struct{ decades, clusterLo, clusterHi, cancelLo, cancelHi float64 }

// Known failures of the ill-conditioned order-18 family (illcond18, all
// 480 loops), measured on 2026-12-06 (33, 4, 55 before the reseed by
// root-set matching; 26, 4, 24 after): the goal of issue 12 is zero. They
// are a ratchet: the test fails when a change makes any count larger.
// A smaller count is progress; lower the constant with it.
const (
	illcond18KnownErrors    = 26 // Trace returned an error (step size underflow, too many points)
	illcond18KnownResiduals = 4  // a point's relative residual exceeds 1e-9
	illcond18KnownJumps     = 24 // a step inside the view longer than the chord limit
)

// TestIllConditionedOrder18 traces the 480 loops of the ill-conditioned
// order-18 family (illConditionedLoop18 with illcond18) over k ∈ (0, ∞)
// and counts the traces that end in an error, that have a point whose
// relative residual exceeds the documented 1e-9, or whose branches are
// not continuous (values descending, or a step between two points inside
// the view longer than the default chord limit, 0.02 of the view's
// half-diagonal, times 1.01 for the rounding of the step control). The
// goal (issue 12) is that none does; today the counts are the known ones
// above, and the test fails when one grows. -short runs the first 120
// loops against the same limits.
func TestIllConditionedOrder18(t *testing.T) {
	count := 480
	if testing.Short() {
		count = 120
	}
	var errs, residuals, jumps int
	for i := range count {
		loop, err := illConditionedLoop18(i, illcond18)
		if err != nil {
			t.Fatalf("loop %d: %v", i, err)
		}
		loc, err := Trace(loop, nil)
		if err != nil {
			errs++
			t.Logf("loop %d: %v", i, err)
			continue
		}
		switch msg, kind := checkTrace(loop, loc); kind {
		case 1:
			residuals++
			t.Logf("loop %d: %s", i, msg)
		case 2:
			jumps++
			t.Logf("loop %d: %s", i, msg)
		}
	}
	t.Logf("%d loops: %d errors, %d residuals above 1e-9, %d discontinuous", count, errs, residuals, jumps)
	if errs > illcond18KnownErrors || residuals > illcond18KnownResiduals || jumps > illcond18KnownJumps {
		t.Errorf("%d errors, %d residuals, %d discontinuous traces: more than the known %d, %d, %d", errs, residuals, jumps, illcond18KnownErrors, illcond18KnownResiduals, illcond18KnownJumps)
	}
}

// checkTrace checks the residual of every point and the continuity of
// every branch of loc (see TestIllConditionedOrder18); kind is 0 when all
// hold, 1 for a residual and 2 for a discontinuity, msg the first failure.
func checkTrace(loop tf.TF, loc Locus) (msg string, kind int) {
	r, _ := resolve(nil)
	full, err := newProblem(loop, r)
	if err != nil {
		return err.Error(), 1
	}
	p := full.moving()
	v := loc.View
	cx, cy := (v.ReMin+v.ReMax)/2, (v.ImMin+v.ImMax)/2
	half := math.Hypot(v.ReMax-v.ReMin, v.ImMax-v.ImMin) / 2
	inView := func(s complex128) bool { return math.Hypot(real(s)-cx, imag(s)-cy) <= half }
	for _, br := range loc.Branches {
		eq := p
		if br.Index >= p.order {
			eq = full
		}
		for j, q := range br.Points {
			if math.IsInf(q.Value, 0) {
				continue
			}
			f, _ := eq.eval(q.S, q.Value)
			if e := cmplx.Abs(f) / eq.magnitude(q.S, q.Value); e > 1e-9 {
				return fmt.Sprintf("branch %d residual %.3g at %v", br.Index, e, q), 1
			}
			if j == 0 {
				continue
			}
			prev := br.Points[j-1]
			if q.Value < prev.Value {
				return fmt.Sprintf("branch %d values descend at %v → %v", br.Index, prev, q), 2
			}
			if inView(prev.S) && inView(q.S) && cmplx.Abs(q.S-prev.S) > 1.01*0.02*half {
				return fmt.Sprintf("branch %d jumps %.3g half-diagonals at %v → %v", br.Index, cmplx.Abs(q.S-prev.S)/half, prev, q), 2
			}
		}
	}
	return "", 0
}
