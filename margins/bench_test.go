package margins

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// baselineResult holds what the grid baseline estimates.
type baselineResult struct {
	gainCrossovers []float64
	phaseMargins   []float64
	phaseCrossover []float64
	gainFactors    []float64
	gm, gmOmega    float64
	pm, pmOmega    float64
}

// baselineGrid is the naive method the issue names as the baseline: L on a
// 10⁴-point log-spaced grid from 1e-3 to 1e3 rad/s, sign changes of |L|dB
// and of the unwrapped phase + 180° (mod 360°) detected between grid
// points, crossings placed by linear interpolation in log ω.
func baselineGrid(g tf.TF) baselineResult {
	const n = 10000
	num, den := g.Num(), g.Den()
	var r baselineResult
	var prevU, prevDB, prevPh float64
	for i := range n {
		u := math.Log(1e-3) + float64(i)*(math.Log(1e6)/float64(n-1))
		w := math.Exp(u)
		s := complex(0, w)
		l := num.EvalComplex(s) / den.EvalComplex(s)
		db := 20 * math.Log10(cmplx.Abs(l))
		ph := cmplx.Phase(l) * 180 / math.Pi
		if i > 0 {
			ph = prevPh + math.Remainder(ph-prevPh, 360)
			if (db < 0) != (prevDB < 0) {
				t := prevDB / (prevDB - db)
				uc := prevU + t*(u-prevU)
				pc := prevPh + t*(ph-prevPh)
				r.gainCrossovers = append(r.gainCrossovers, math.Exp(uc))
				r.phaseMargins = append(r.phaseMargins, wrap180(180+pc))
			}
			// Phase crossings of −180° + 360°k.
			a, b := prevPh+180, ph+180
			ka, kb := math.Floor(a/360), math.Floor(b/360)
			if ka != kb {
				level := 360 * math.Max(ka, kb)
				t := (level - a) / (b - a)
				uc := prevU + t*(u-prevU)
				dbc := prevDB + t*(db-prevDB)
				r.phaseCrossover = append(r.phaseCrossover, math.Exp(uc))
				r.gainFactors = append(r.gainFactors, math.Pow(10, -dbc/20))
			}
		}
		prevU, prevDB, prevPh = u, db, ph
	}
	r.gm, r.gmOmega = math.Inf(1), math.NaN()
	for i, k := range r.gainFactors {
		if k > 1 && k < r.gm {
			r.gm, r.gmOmega = k, r.phaseCrossover[i]
		}
	}
	r.pm, r.pmOmega = math.NaN(), math.NaN()
	for i, p := range r.phaseMargins {
		if !(p >= r.pm) {
			r.pm, r.pmOmega = p, r.gainCrossovers[i]
		}
	}
	return r
}

var benchOrders = []int{2, 4, 8, 12, 16, 20, 24}

func familyLoop(b *testing.B, order int) tf.TF {
	for _, g := range loadGolden(b) {
		if g.Order == order {
			return g.tf(b)
		}
	}
	b.Fatalf("no family loop of order %d in testdata/refs.json", order)
	return tf.TF{}
}

var sinkResult Result
var sinkBaseline baselineResult

// BenchmarkCompute times Compute (every crossover, margins, stability by
// closed-loop poles, Ms, Mt, bandwidth) on the benchmark family; run it
// side by side with BenchmarkBaselineGrid:
//
//	go test -run '^$' -bench 'Compute|BaselineGrid|Crossovers' -benchtime 200x ./margins/
func BenchmarkCompute(b *testing.B) {
	for _, n := range benchOrders {
		g := familyLoop(b, n)
		b.Run(fmt.Sprintf("order=%d", n), func(b *testing.B) {
			for b.Loop() {
				r, err := Compute(g, nil)
				if err != nil {
					b.Fatal(err)
				}
				sinkResult = r
			}
		})
	}
}

// BenchmarkComputeMarginsOnly times Compute with SkipPeaks: the crossovers,
// margins and closed-loop verdict, i.e. what the grid baseline estimates.
func BenchmarkComputeMarginsOnly(b *testing.B) {
	for _, n := range benchOrders {
		g := familyLoop(b, n)
		b.Run(fmt.Sprintf("order=%d", n), func(b *testing.B) {
			for b.Loop() {
				r, err := Compute(g, &Settings{SkipPeaks: true})
				if err != nil {
					b.Fatal(err)
				}
				sinkResult = r
			}
		})
	}
}

// BenchmarkBaselineGrid times the 10⁴-point grid baseline.
func BenchmarkBaselineGrid(b *testing.B) {
	for _, n := range benchOrders {
		g := familyLoop(b, n)
		b.Run(fmt.Sprintf("order=%d", n), func(b *testing.B) {
			for b.Loop() {
				sinkBaseline = baselineGrid(g)
			}
		})
	}
}

// TestBaselineAccuracy reports the errors of Compute and of the grid
// baseline against the mpmath references of the benchmark family (run with
// -v to see them), and checks that Compute meets the 1e-12 target and that
// the baseline is a faithful implementation (its errors are those of linear
// interpolation on the grid, below 1e-2 dB and 1e-3°, and it finds the same
// crossovers in its range).
func TestBaselineAccuracy(t *testing.T) {
	worst := struct{ gmDB, pm, w, ourGM, ourPM, ourW float64 }{}
	for _, g := range loadGolden(t) {
		if g.Order == 0 {
			continue
		}
		l := g.tf(t)
		res, err := Compute(l, nil)
		if err != nil {
			t.Fatal(err)
		}
		base := baselineGrid(l)
		gmDB := math.Abs(20*math.Log10(base.gm) - 20*math.Log10(g.GM.V))
		pm := math.Abs(base.pm - g.PMDeg.V)
		w := math.Max(relErr(base.pmOmega, g.PMOmega), relErr(base.gmOmega, g.GMOmega))
		if math.IsInf(g.GM.V, 1) {
			gmDB = 0
			w = relErr(base.pmOmega, g.PMOmega)
		}
		ourGM := math.Abs(res.GainMarginDB - 20*math.Log10(g.GM.V))
		if math.IsInf(g.GM.V, 1) && math.IsInf(res.GainMarginDB, 1) {
			ourGM = 0
		}
		ourPM := math.Abs(res.PhaseMarginDeg - g.PMDeg.V)
		ourW := math.Max(relErr(res.GainCrossoverRadPerSec, g.PMOmega), relErr(res.PhaseCrossoverRadPerSec, g.GMOmega))
		t.Logf("order %2d: grid |ΔGM| %.2e dB |ΔPM| %.2e° |Δω|/ω %.2e   exact |ΔGM| %.2e dB |ΔPM| %.2e° |Δω|/ω %.2e",
			g.Order, gmDB, pm, w, ourGM, ourPM, ourW)
		if gmDB > 1e-2 || pm > 1e-3 || w > 1e-3 {
			t.Errorf("order %d: baseline errors larger than linear interpolation on the grid allows", g.Order)
		}
		if ourGM > 1e-11 || ourPM > 1e-10 || ourW > 1e-12 {
			t.Errorf("order %d: Compute misses the 1e-12 target", g.Order)
		}
		worst.gmDB, worst.pm, worst.w = math.Max(worst.gmDB, gmDB), math.Max(worst.pm, pm), math.Max(worst.w, w)
		worst.ourGM, worst.ourPM, worst.ourW = math.Max(worst.ourGM, ourGM), math.Max(worst.ourPM, ourPM), math.Max(worst.ourW, ourW)
	}
	t.Logf("worst: grid %.2e dB %.2e° %.2e rel; exact %.2e dB %.2e° %.2e rel", worst.gmDB, worst.pm, worst.w, worst.ourGM, worst.ourPM, worst.ourW)
}
