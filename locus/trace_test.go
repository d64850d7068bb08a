package locus

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/internal/refcases"
	"github.com/loopwise/loopwise/internal/testutil"
	"github.com/loopwise/loopwise/tf"
)

type namedLoop struct {
	name string
	loop tf.TF
	rng  Range
}

// propertyLoops are the reference-case loops (with their gain sign), the
// golden loops of testdata/golden.py and the benchmark family up to n = 12.
func propertyLoops(t *testing.T) []namedLoop {
	t.Helper()
	cases, err := refcases.ByType("root_locus")
	if err != nil {
		t.Fatal(err)
	}
	var out []namedLoop
	for _, c := range cases {
		var q rlQuery
		if err := c.DecodeQuery(&q); err != nil {
			t.Fatal(err)
		}
		l, err := tf.NewDiscrete(c.Loop.Num, c.Loop.Den, c.Loop.SampleTime)
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, namedLoop{c.ID, l, rangeForSign(q.GainSign)})
		// Also the other sign and a range through zero.
		out = append(out, namedLoop{c.ID + "/other-sign", l, rangeForSign(-q.GainSign)})
	}
	g := loadGolden(t)
	out = append(out,
		namedLoop{"conditionally-stable", tf.MustNew(g.CondStable.Num, g.CondStable.Den), Range{}},
		namedLoop{"discrete", mustDiscrete(g.Discrete.Num, g.Discrete.Den, g.Discrete.SampleTime), Range{}},
		namedLoop{"biproper-negative", tf.MustNew([]float64{2, 1}, []float64{1, 3, 2}), Range{Min: -10, Max: 10}},
		namedLoop{"lead-lag-both-signs", tf.MustNew([]float64{1, 3, 2}, []float64{1, 5, 6, 0}), Range{Min: math.Inf(-1), Max: math.Inf(1)}},
		namedLoop{"improper", tf.MustNew([]float64{1, 3, 2}, []float64{1, 0}), Range{}},
		namedLoop{"biproper-drop", tf.MustNew([]float64{1, 6, 8}, []float64{1, 4, 3}), Range{Min: math.Inf(-1), Max: 0}},
		namedLoop{"biproper-drop-finite", tf.MustNew([]float64{1, 6, 8}, []float64{1, 4, 3}), Range{Min: -5, Max: 5}},
		namedLoop{"finite-range", tf.MustNew([]float64{1}, []float64{1, 3, 2, 0}), Range{Min: 0.1, Max: 20}},
	)
	for _, n := range []int{4, 8, 12} {
		out = append(out, namedLoop{fmt.Sprintf("family-%d", n), familyLoop(n), Range{}})
	}
	return out
}

func mustDiscrete(num, den []float64, ts float64) tf.TF {
	l, err := tf.NewDiscrete(num, den, ts)
	if err != nil {
		panic(err)
	}
	return l
}

// TestTraceProperties checks, for every loop: each point satisfies the
// characteristic equation to a relative backward error of 1e-9 (Newton
// converges to about 1e-13; 1e-9 leaves room for multiple roots at break
// points, which are only known to the accuracy of the break point); values
// increase along each branch; the branches start at the roots for the
// start of the range and end at the zeros or beyond the extent; break
// points and crossings are points of the branches; and no step of a
// branch jumps to another branch (independent fine continuation).
func TestTraceProperties(t *testing.T) {
	for _, nl := range propertyLoops(t) {
		t.Run(nl.name, func(t *testing.T) {
			set := &Settings{Range: nl.rng}
			loc, err := Trace(nl.loop, set)
			if err != nil {
				t.Fatal(err)
			}
			r, _ := resolve(set)
			nl.rng = r.rng
			full, err := newProblem(nl.loop, r)
			if err != nil {
				t.Fatal(err)
			}
			p := full.moving() // the traced equation, shared roots divided out
			an := loc.Analysis
			scale := math.Hypot(loc.View.ReMax-loc.View.ReMin, loc.View.ImMax-loc.View.ImMin) / 2
			seen := map[int]bool{}
			for _, br := range loc.Branches {
				seen[br.Index] = true
				for i, q := range br.Points {
					if math.IsInf(q.Value, 0) {
						if i != len(br.Points)-1 && i != 0 {
							t.Errorf("branch %d: infinite value inside the branch", br.Index)
						}
						if cmplx.Abs(full.b.EvalComplex(q.S)) > 1e-9*absEval(full.b, cmplx.Abs(q.S)) {
							t.Errorf("branch %d ends at %v, not a zero", br.Index, q.S)
						}
						continue
					}
					eq := p
					if br.Index >= p.order {
						eq = full // a root shared by a and b: fixed, a root of both
					}
					f, _ := eq.eval(q.S, q.Value)
					if cmplx.Abs(f) > 1e-9*eq.magnitude(q.S, q.Value) {
						t.Errorf("branch %d point %d (%v, %v): residual %g", br.Index, i, q.Value, q.S, cmplx.Abs(f)/eq.magnitude(q.S, q.Value))
					}
					if i > 0 && q.Value < br.Points[i-1].Value {
						t.Errorf("branch %d: value decreases at point %d", br.Index, i)
					}
					if !nl.rng.Contains(q.Value) {
						t.Errorf("branch %d: value %v outside the range", br.Index, q.Value)
					}
				}
				first, last := br.Points[0], br.Points[len(br.Points)-1]
				if !math.IsInf(last.Value, 0) && last.Value != nl.rng.Max && cmplx.Abs(last.S-complex((loc.View.ReMin+loc.View.ReMax)/2, (loc.View.ImMin+loc.View.ImMax)/2)) < loc.ExtentRadius {
					if kd, ok := p.degreeDrop(); !ok || math.Abs(last.Value-kd) > 1e-6*math.Max(1, math.Abs(kd)) {
						t.Errorf("branch %d ends at %v (value %v) inside the extent", br.Index, last.S, last.Value)
					}
				}
				if first.Value == 0 && nl.rng.Min == 0 {
					found := false
					for _, q := range an.Poles {
						found = found || first.S == q.Value
					}
					if !found {
						t.Errorf("branch %d starts at %v, not a pole", br.Index, first.S)
					}
				}
			}
			if len(seen) != an.Branches {
				t.Errorf("%d branch indices traced, want %d", len(seen), an.Branches)
			}
			hits := func(s complex128, k float64) int {
				n := 0
				for _, br := range loc.Branches {
					for _, q := range br.Points {
						if q.S == s && sameValue(q.Value, k) {
							n++
							break
						}
					}
				}
				return n
			}
			for _, b := range an.BreakPoints {
				if nl.rng.Min < b.Value && b.Value < nl.rng.Max {
					if got := hits(b.Point, b.Value); got != b.Branches {
						t.Errorf("break point %v (value %v) is a point of %d branches, want %d", b.Point, b.Value, got, b.Branches)
					}
				}
			}
			for _, c := range an.AxisCrossings {
				if hits(c.Point, c.Value) < 1 {
					t.Errorf("crossing %v (value %v) is not a traced point", c.Point, c.Value)
				}
			}
			if testing.Short() {
				return
			}
			swaps, checked, _ := countSwaps(p, an, branchesOf(loc), scale)
			if swaps != 0 {
				t.Errorf("%d of %d steps jump between branches", swaps, checked)
			}
		})
	}
}

func TestTraceCancelAndProgress(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := Trace(familyLoop(8), &Settings{Context: ctx})
	if !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled trace: err = %v, want context.Canceled", err)
	}
	var last float64
	calls := 0
	_, err = Trace(familyLoop(8), &Settings{Progress: func(f float64) {
		if f < last || f > 1 {
			t.Errorf("progress %v after %v", f, last)
		}
		last = f
		calls++
	}})
	if err != nil {
		t.Fatal(err)
	}
	if calls == 0 || last != 1 {
		t.Errorf("progress called %d times, last %v", calls, last)
	}
	_, err = Trace(familyLoop(8), &Settings{MaxPoints: 50})
	if !errors.Is(err, ErrTooManyPoints) {
		t.Errorf("MaxPoints 50: err = %v", err)
	}
}

// TestStableIntervalsAgainstRoots samples values of the range (fixed
// seed: log-uniform over 12 decades of either sign in range, plus every
// interval end × (1 ± 1e-6)) and compares "inside a stable interval" with
// the closed-loop roots. Samples with a root within 1e-9 of the boundary
// are skipped (undecidable in double precision).
func TestStableIntervalsAgainstRoots(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for _, nl := range propertyLoops(t) {
		t.Run(nl.name, func(t *testing.T) {
			set := &Settings{Range: nl.rng}
			an, err := Analyze(nl.loop, set)
			if err != nil {
				t.Fatal(err)
			}
			r, _ := resolve(set)
			var ks []float64
			for range 60 {
				k := math.Pow(10, -6+12*rng.Float64())
				if rng.IntN(2) == 0 {
					k = -k
				}
				ks = append(ks, k)
			}
			for _, iv := range an.StableIntervals {
				for _, e := range []float64{iv.Lo, iv.Hi} {
					if !math.IsInf(e, 0) && e != 0 {
						ks = append(ks, e*(1+1e-6), e*(1-1e-6))
					}
				}
			}
			p, _ := newProblem(nl.loop, r)
			for _, k := range ks {
				if !(r.rng.Min < k && k < r.rng.Max) {
					continue
				}
				in := false
				for _, iv := range an.StableIntervals {
					in = in || (iv.Lo < k && k < iv.Hi)
				}
				rs, err := ClosedLoopPoles(nl.loop, k)
				if err != nil {
					t.Fatal(err)
				}
				st, near := true, false
				for _, z := range rs {
					m := real(z)
					if p.discrete {
						m = cmplx.Abs(z) - 1
					}
					st = st && m < 0
					near = near || math.Abs(m) < 1e-9
				}
				if len(rs) < p.order {
					near = true // a root at infinity (degree drop)
				}
				if !near && st != in {
					t.Errorf("k = %v: roots say stable = %v, intervals %v say %v", k, st, an.StableIntervals, in)
				}
			}
		})
	}
}

// TestDepartureDirections checks that the traced branches leave every
// complex or multiple pole along the departure angles of the analysis
// (within 2°: the first traced point is at about 0.2 % of the scale, where
// the curvature of the branch turns it by much less).
func TestDepartureDirections(t *testing.T) {
	for _, nl := range propertyLoops(t) {
		if nl.rng.Min != 0 && !nl.rng.IsZero() {
			continue
		}
		t.Run(nl.name, func(t *testing.T) {
			loc, err := Trace(nl.loop, &Settings{Range: nl.rng})
			if err != nil {
				t.Fatal(err)
			}
			for _, d := range loc.Analysis.Departures {
				best := 180.0
				for _, br := range loc.Branches {
					if len(br.Points) < 2 || br.Points[0].S != d.Point || br.Points[0].Value != 0 {
						continue
					}
					dir := cmplx.Phase(br.Points[1].S-br.Points[0].S) * 180 / math.Pi
					best = math.Min(best, testutil.AngleDiffDeg(dir, d.AngleDeg))
				}
				if best > 2 {
					t.Errorf("no branch leaves %v at %v° (closest %v° off)", d.Point, d.AngleDeg, best)
				}
			}
		})
	}
}
