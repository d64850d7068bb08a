package locus

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"runtime"
	"slices"
	"strconv"
	"testing"
	"time"

	"github.com/loopwise/loopwise/internal/testutil"
	"github.com/loopwise/loopwise/tf"
)

// TestBreakPointsHighOrder checks the real break points of loops of order
// 12, 16 and 24 against mpmath (testdata/breaks_highorder.py, 50 digits):
// s and k to 4u relative. Before the break points were polished against
// the unexpanded a′b − ab′ (polishBreak), the order-24 loop's were 1.2e-7
// off in s and 1.6e-10 in k.
func TestBreakPointsHighOrder(t *testing.T) {
	loops := loadHarnessLoops(t)
	const tol = 4 * 0x1p-53
	for _, l := range loops {
		t.Run(l.Name, func(t *testing.T) {
			an, err := Analyze(l.loop, &Settings{Range: Range{Min: l.Kmin, Max: l.Kmax}})
			if err != nil {
				t.Fatal(err)
			}
			var real_ []BreakPoint
			for _, b := range an.BreakPoints {
				if imag(b.Point) == 0 {
					real_ = append(real_, b)
				}
			}
			if len(real_) != len(l.Breaks) {
				t.Fatalf("%d real break points, want %d", len(real_), len(l.Breaks))
			}
			for _, w := range l.Breaks {
				ws, _ := strconv.ParseFloat(w[0], 64)
				wk, _ := strconv.ParseFloat(w[1], 64)
				best := real_[0]
				for _, b := range real_ {
					if math.Abs(real(b.Point)-ws) < math.Abs(real(best.Point)-ws) {
						best = b
					}
				}
				if e := math.Abs(real(best.Point)-ws) / math.Abs(ws); e > tol {
					t.Errorf("break point %v, want %v (rel. error %.2g)", real(best.Point), ws, e)
				}
				if e := math.Abs(best.Value-wk) / wk; e > tol {
					t.Errorf("gain at %v: %v, want %v (rel. error %.2g)", ws, best.Value, wk, e)
				}
			}
		})
	}
}

// BenchmarkHarnessLoops times Analyze and Trace on the order-12, 16 and 24
// loops of the project's performance harness (../shared/perf; the
// coefficients are those of testdata/breaks_highorder.json) over their
// gain span K0·[1e-4, 1e4], at the default chord tolerance.
func BenchmarkHarnessLoops(b *testing.B) {
	for _, l := range loadHarnessLoops(b) {
		g := l.loop
		set := &Settings{Range: Range{Min: l.Kmin, Max: l.Kmax}}
		b.Run("Analyze/"+l.Name, func(b *testing.B) {
			for b.Loop() {
				if _, err := Analyze(g, set); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run("Trace/"+l.Name, func(b *testing.B) {
			var loc Locus
			var err error
			for b.Loop() {
				if loc, err = Trace(g, set); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(loc.Stats.Points), "points/op")
		})
	}
}

// harnessLoop is a loop of testdata/breaks_highorder.json with its
// transfer function and mpmath break points (s, k as decimal strings).
type harnessLoop struct {
	Name       string
	N, D       []float64
	Kmin, Kmax float64
	Breaks     [][2]string
	loop       tf.TF
}

// loadHarnessLoops reads testdata/breaks_highorder.json (ascending
// coefficients) and builds each loop's transfer function.
func loadHarnessLoops(tb testing.TB) []harnessLoop {
	raw, err := os.ReadFile("testdata/breaks_highorder.json")
	if err != nil {
		tb.Fatal(err)
	}
	var loops []harnessLoop
	if err := json.Unmarshal(raw, &loops); err != nil {
		tb.Fatal(err)
	}
	for i, l := range loops {
		n, d := slices.Clone(l.N), slices.Clone(l.D)
		slices.Reverse(n)
		slices.Reverse(d)
		if loops[i].loop, err = tf.New(n, d); err != nil {
			tb.Fatal(err)
		}
	}
	return loops
}

// harnessFamilyLoop returns the harness's family loop num/den of order n
// (internal/testutil.HarnessFamily) and its locus span k0·[1e-4, 1e4].
func harnessFamilyLoop(tb testing.TB, n int) (tf.TF, *Settings) {
	num, den, k0 := testutil.HarnessFamily(n)
	g, err := tf.New(num, den)
	if err != nil {
		tb.Fatal(err)
	}
	return g, &Settings{Range: Range{Min: 1e-4 * k0, Max: 1e4 * k0}}
}

// BenchmarkAnalyzeGrowth times Analyze on the harness's family loops of
// order 24, 40 and 60 (the harness's growth rows); the growth exponent
// from n = 24 to 60 is log(t60/t24)/log(2.5) (goal ≤ 3):
//
//	go test ./locus -run '^$' -bench AnalyzeGrowth -benchtime 20x -count 3
func BenchmarkAnalyzeGrowth(b *testing.B) {
	for _, n := range []int{24, 40, 60} {
		g, set := harnessFamilyLoop(b, n)
		b.Run(fmt.Sprintf("order=%d", n), func(b *testing.B) {
			for b.Loop() {
				if _, err := Analyze(g, set); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// TestSignsDifferAgreesWithRoots checks the O(n) instability test of
// stable (Stodola's condition, signsDiffer) against the closed-loop roots
// on the harness's loops of order 24, 40 and 60 at 40 gains across their
// span: wherever a coefficient certainly has the wrong sign, a
// closed-loop root must lie in Re ≥ 0, by a margin larger than the
// roots' rounding (1e-9 relative: the roots of these loops are good to
// far better than that).
func TestSignsDifferAgreesWithRoots(t *testing.T) {
	decided := 0
	for _, n := range []int{24, 40, 60} {
		g, set := harnessFamilyLoop(t, n)
		r, err := resolve(set)
		if err != nil {
			t.Fatal(err)
		}
		p, err := newProblem(g, r)
		if err != nil {
			t.Fatal(err)
		}
		for i := range 40 {
			k := set.Range.Min * math.Pow(set.Range.Max/set.Range.Min, float64(i)/39)
			c := p.charPoly(k)
			if !p.signsDiffer(c, k) {
				continue
			}
			decided++
			rs, err := c.Roots()
			if err != nil {
				t.Fatal(err)
			}
			worst := math.Inf(-1)
			for _, z := range rs {
				worst = math.Max(worst, real(z)/math.Max(1, cabs(z)))
			}
			if !(worst > 1e-9) {
				t.Errorf("order %d, k = %g: signsDiffer reports unstable, rightmost root has Re/|z| = %g", n, k, worst)
			}
		}
	}
	if decided == 0 {
		t.Error("signsDiffer decided no gain: the test checks nothing")
	}
}

// BenchmarkAnalyzeGrowthExponent alternates Analyze on the harness's
// order-24 and order-60 loops on the calling thread's CPU clock
// (internal/testutil.ThreadCPU, so that other processes on a shared
// machine do not count) and reports the growth exponent
// log(t60/t24)/log(60/24) of the summed times (goal ≤ 3):
//
//	go test ./locus -run '^$' -bench AnalyzeGrowthExponent -benchtime 20x -count 3
func BenchmarkAnalyzeGrowthExponent(b *testing.B) {
	g24, s24 := harnessFamilyLoop(b, 24)
	g60, s60 := harnessFamilyLoop(b, 60)
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	var t24, t60 time.Duration
	for b.Loop() {
		t0 := testutil.ThreadCPU()
		if _, err := Analyze(g24, s24); err != nil {
			b.Fatal(err)
		}
		t1 := testutil.ThreadCPU()
		if _, err := Analyze(g60, s60); err != nil {
			b.Fatal(err)
		}
		t60 += testutil.ThreadCPU() - t1
		t24 += t1 - t0
	}
	b.ReportMetric(math.Log(float64(t60)/float64(t24))/math.Log(60.0/24), "exponent")
	b.ReportMetric(float64(t24.Microseconds())/float64(b.N), "µs24/op")
	b.ReportMetric(float64(t60.Microseconds())/float64(b.N), "µs60/op")
}

// TestMultipleBreakPoints: where three or four branches meet, a′b − ab′
// has a multiple root, which the break-point search must still recognise
// after it solves without cluster recognition first (mayMerge). Closed
// forms: s(s² + 3s + 3) + 1 = (s + 1)³ and (s + 1)⁴ − 1 + 1 = (s + 1)⁴, so
// at k = 1 three (four) branches meet at s = −1. (For the first, a′b − ab′
// is a quadratic with an exactly double root; for the second a cubic with
// a triple root, which only cluster recognition reports as one.)
func TestMultipleBreakPoints(t *testing.T) {
	for _, tc := range []struct {
		text     string
		at       float64
		branches int
	}{
		{"1/(s*(s^2+3*s+3))", -1, 3},
		{"1/(s^4+4*s^3+6*s^2+4*s)", -1, 4},
	} {
		g, err := tf.Parse(tc.text)
		if err != nil {
			t.Fatal(err)
		}
		an, err := Analyze(g, nil)
		if err != nil {
			t.Fatal(err)
		}
		found := false
		for _, b := range an.BreakPoints {
			if math.Abs(real(b.Point)-tc.at) <= 1e-6 && imag(b.Point) == 0 {
				found = true
				// The m-fold root is known to about ε^(1/m) relative.
				if b.Branches != tc.branches || math.Abs(b.Value-1) > 1e-12 {
					t.Errorf("%s: break point %+v, want %d branches at k = 1", tc.text, b, tc.branches)
				}
			}
		}
		if !found {
			t.Errorf("%s: no break point at %v: %+v", tc.text, tc.at, an.BreakPoints)
		}
	}
}
