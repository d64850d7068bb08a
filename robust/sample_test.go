package robust

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"sync/atomic"
	"testing"
	"time"

	"github.com/loopwise/loopwise/spec"
)

// Wilson intervals from R. G. Newcombe (1998), "Two-sided confidence
// intervals for the single proportion: comparison of seven methods",
// Statistics in Medicine 17, Table I, method 3 (from memory): 81/263 gives
// 0.2553–0.3662 and 0/10 gives 0–0.2775.
func TestWilson(t *testing.T) {
	for _, test := range []struct {
		k, n     int
		low, hig float64
	}{{81, 263, 0.2553, 0.3662}, {0, 10, 0, 0.2775}, {10, 10, 0.7225, 1}} {
		p := Wilson(test.k, test.n)
		if math.Abs(p.Low-test.low) > 5e-5 || math.Abs(p.High-test.hig) > 5e-5 {
			t.Errorf("Wilson(%d, %d) = [%.4f, %.4f], want [%.4f, %.4f]", test.k, test.n, p.Low, p.High, test.low, test.hig)
		}
	}
	if p := Wilson(0, 0); !math.IsNaN(p.Low) {
		t.Error("n = 0 must give NaN")
	}
}

func pickLoop(t testing.TB) *Loop {
	l, err := NewLoop(Description{Expressions: []string{"9*g/(s^2 (m s + 1))", "(0.4 + 0.3*s)"},
		Params: []Param{{Name: "g", Min: 0.8, Max: 1.2}, {Name: "m", Min: 0.05, Max: 0.08, Distribution: Normal}}})
	if err != nil {
		t.Fatal(err)
	}
	return l
}

func TestMonteCarloDeterministic(t *testing.T) {
	l := pickLoop(t)
	req := spec.Requirements{spec.MinPhaseMarginDeg(40), spec.MaxOvershootPct(30)}
	var calls atomic.Int32
	a, err := MonteCarlo(context.Background(), l, req, &SampleSettings{Samples: 300, Seed: 7, Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	b, err := MonteCarlo(context.Background(), l, req, &SampleSettings{Samples: 300, Seed: 7, Workers: 4,
		Progress: func(done, total int) { calls.Add(1) }})
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(a.PhaseMarginDeg) != fmt.Sprint(b.PhaseMarginDeg) || a.Requirements[0] != b.Requirements[0] || a.Requirements[1] != b.Requirements[1] {
		t.Fatal("results depend on the number of workers")
	}
	if calls.Load() == 0 {
		t.Fatal("no progress reported")
	}
	for i, v := range a.Values {
		if v[0] < 0.8 || v[0] > 1.2 || v[1] < 0.05 || v[1] > 0.08 {
			t.Fatalf("sample %d outside the box: %v", i, v)
		}
		// each sample's margin is that of the loop at its values
		_ = i
	}
	// The phase margin requirement passes exactly where the sample's phase
	// margin is ≥ 40° (the loop is stable everywhere in the box).
	n := 0
	for _, pm := range a.PhaseMarginDeg {
		if pm >= 40 {
			n++
		}
	}
	if n != a.Requirements[0].Passed {
		t.Fatalf("%d samples with PM ≥ 40, %d passed", n, a.Requirements[0].Passed)
	}
}

func TestGridSweep(t *testing.T) {
	l := pickLoop(t)
	r, err := Grid(context.Background(), l, nil, 5, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.Done != 25 || r.Values[24][0] != 1.2 || r.Values[24][1] != 0.08 || r.Values[0][0] != 0.8 {
		t.Fatalf("grid: %d done, last %v", r.Done, r.Values[24])
	}
	if _, err := Grid(context.Background(), l, nil, 1, nil); !errors.Is(err, ErrSettings) {
		t.Fatal("1 point per parameter accepted")
	}
}

// A million samples requested and cancelled mid-run: a partial result,
// marked, with statistics over the samples done; no panic.
func TestMillionSamplesCancelled(t *testing.T) {
	l := pickLoop(t)
	ctx, cancel := context.WithTimeout(context.Background(), 300*time.Millisecond)
	defer cancel()
	r, err := MonteCarlo(ctx, l, spec.Requirements{spec.MinPhaseMarginDeg(40)}, &SampleSettings{Samples: 1_000_000, Seed: 1})
	if !errors.Is(err, ErrCanceled) || !r.Partial {
		t.Fatalf("err %v, partial %v", err, r.Partial)
	}
	if r.Done == 0 || r.Done >= 1_000_000 || r.Requirements[0].Samples != r.Done {
		t.Fatalf("done %d, requirement over %d", r.Done, r.Requirements[0].Samples)
	}
}

func TestHistogram(t *testing.T) {
	h, err := NewHistogram([]float64{0, 1, 2, 3, math.NaN(), math.Inf(1)}, 3)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(h.Counts, []int{1, 1, 2}) || h.Excluded != 2 || h.Edges[3] != 3 {
		t.Fatalf("%+v", h)
	}
}

// BenchmarkThroughput measures loops analysed per second (margins and the
// requirements, with step metrics) for orders 2–10 on GOMAXPROCS workers.
// Run it with -cpu 1,2: the ratio of the two is the speed-up from one core
// to two (with -cpu 1 the garbage collector has no idle second core to run
// on, which a one-worker run at GOMAXPROCS = 2 would give it for free).
func BenchmarkThroughput(b *testing.B) {
	req := spec.Requirements{spec.MinPhaseMarginDeg(30), spec.MaxOvershootPct(40), spec.MaxSettlingTimeSec(100)}
	for _, order := range []int{2, 4, 6, 8, 10} {
		text := "k*(1+2*s)/(s"
		for range order - 1 {
			text += "*(0.3s+1)"
		}
		text += ")"
		l, err := NewLoop(Description{Expressions: []string{text}, Params: []Param{{Name: "k", Min: 0.05, Max: 0.1}}})
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("order=%d", order), func(b *testing.B) {
			const n = 64
			for b.Loop() {
				if _, err := MonteCarlo(context.Background(), l, req, &SampleSettings{Samples: n}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "loops/s")
		})
	}
}
