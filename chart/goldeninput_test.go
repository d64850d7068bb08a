package chart_test

import (
	"math"
	"math/cmplx"
	"sort"
	"testing"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// logGrid returns n points from lo to hi, evenly spaced in log.
func logGrid(lo, hi float64, n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = lo * math.Pow(hi/lo, float64(i)/float64(n-1))
	}
	return out
}

// sweptLocus builds a locus.Locus from the exact construction quantities
// (locus.Analyze) and branches made of the exact closed-loop poles
// (locus.ClosedLoopPoles) on a fixed logarithmic grid of values, each pole
// joined to the nearest pole of the previous value. It is coarser than
// locus.Trace but fixed, which is what a golden image needs.
func sweptLocus(t *testing.T, loop tf.TF, set *locus.Settings) locus.Locus {
	t.Helper()
	a, err := locus.Analyze(loop, set)
	if err != nil {
		t.Fatal(err)
	}
	values := append([]float64{0}, logGrid(1e-4, 1e5, 900)...)
	// Near a break point the poles move like the square root of the value
	// offset: sample densely on both sides of each one.
	for _, bp := range a.BreakPoints {
		for _, e := range logGrid(1e-8, 0.5, 80) {
			values = append(values, bp.Value*(1-e), bp.Value*(1+e))
		}
	}
	sort.Float64s(values)
	var branches []locus.Branch
	for _, v := range values {
		roots, err := locus.ClosedLoopPoles(loop, v)
		if err != nil {
			t.Fatal(err)
		}
		if branches == nil {
			for i, r := range roots {
				branches = append(branches, locus.Branch{Index: i, Points: []locus.Point{{Value: v, S: r}}})
			}
			continue
		}
		// Greedy matching by distance, smallest first.
		type pair struct {
			b, r int
			d    float64
		}
		var pairs []pair
		for bi, b := range branches {
			last := b.Points[len(b.Points)-1].S
			for ri, r := range roots {
				pairs = append(pairs, pair{bi, ri, cmplx.Abs(r - last)})
			}
		}
		sort.SliceStable(pairs, func(i, j int) bool { return pairs[i].d < pairs[j].d })
		usedB, usedR := map[int]bool{}, map[int]bool{}
		for _, p := range pairs {
			if usedB[p.b] || usedR[p.r] {
				continue
			}
			usedB[p.b], usedR[p.r] = true, true
			branches[p.b].Points = append(branches[p.b].Points, locus.Point{Value: v, S: roots[p.r]})
		}
	}
	return locus.Locus{Analysis: a, Branches: branches}
}

// sampledStep samples the exact step response on a fixed grid of n+1
// points up to endSec (response.Simulate of a unit step).
func sampledStep(t *testing.T, sys tf.TF, endSec float64, n int) response.Response {
	t.Helper()
	ts := make([]float64, n+1)
	u := make([]float64, n+1)
	for i := range ts {
		ts[i] = endSec * float64(i) / float64(n)
		u[i] = 1
	}
	if sys.IsDiscrete() {
		T := sys.SampleTimeSec()
		n = int(math.Round(endSec / T))
		ts, u = ts[:0], u[:0]
		for i := 0; i <= n; i++ {
			ts = append(ts, float64(i)*T)
			u = append(u, 1)
		}
	}
	r, err := response.Simulate(sys, ts, u, nil)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// goldenCases are the figures compared with testdata/*_golden.png.
func goldenCases() []figureCase {
	locusCase := func(name string, loop func() (tf.TF, *locus.Settings), set *chart.LocusSettings) figureCase {
		return figureCase{name: name, build: func(t *testing.T) *chart.Figure {
			l, s := loop()
			f, err := chart.RootLocus(sweptLocus(t, l, s), set)
			if err != nil {
				t.Fatal(err)
			}
			return f
		}}
	}
	grid := logGrid(0.05, 200, 400)
	return append([]figureCase{
		locusCase("locus_continuous", func() (tf.TF, *locus.Settings) { return servoLoop(), nil },
			&chart.LocusSettings{PlaneSettings: chart.PlaneSettings{Grid: true}, Mark: &chart.LocusMark{Value: 20}}),
		locusCase("locus_detail", func() (tf.TF, *locus.Settings) { return stageLoop(), nil },
			&chart.LocusSettings{PlaneSettings: chart.PlaneSettings{Detail: true}}),
		locusCase("locus_discrete", func() (tf.TF, *locus.Settings) { return digitalLoop(), nil },
			&chart.LocusSettings{Mark: &chart.LocusMark{Value: 2}}),
		locusCase("locus_parameter", func() (tf.TF, *locus.Settings) {
			pm := must(locus.FromText("Td", "4(1+Td*s)", tf.MustParse("1/(s(s+1)(s+3))")))
			return pm.Loop, &locus.Settings{Variable: pm.Name}
		}, &chart.LocusSettings{Mark: &chart.LocusMark{Value: 0.5}}),
		{name: "polezero_discrete", build: func(t *testing.T) *chart.Figure {
			return must(chart.PoleZero(must(tf.ParseDiscrete("(z-0.5)(z+0.3)/((z-0.9)(z^2-1.2z+0.72)(z+0.5))", 0.05)), &chart.PlaneSettings{Grid: true}))
		}},
		{name: "frequency_continuous", build: func(t *testing.T) *chart.Figure {
			l := scaledServo()
			return must(chart.FrequencyResponse(must(margins.FrequencyResponse(l, grid)), ptr(must(margins.Compute(l, nil))), nil))
		}},
		{name: "nyquist_continuous", build: func(t *testing.T) *chart.Figure {
			l := scaledServo()
			r := must(margins.FrequencyResponse(l, grid))
			var n margins.Nyquist
			for i := len(grid) - 1; i >= 0; i-- {
				n.MirrorFrequencyRadPerSec = append(n.MirrorFrequencyRadPerSec, -grid[i])
				n.Mirror = append(n.Mirror, cmplx.Conj(r.Value[i]))
			}
			n.PositiveFrequencyRadPerSec, n.Positive = grid, r.Value
			return must(chart.Nyquist(n, ptr(must(margins.Compute(l, nil))), nil))
		}},
		{name: "step_continuous", build: func(t *testing.T) *chart.Figure {
			cl := must(scaledServo().ClosedLoop())
			return must(chart.StepResponse(sampledStep(t, cl, 12, 600), ptr(must(response.StepMetrics(cl, nil))), nil))
		}},
		{name: "step_discrete", build: func(t *testing.T) *chart.Figure {
			cl := must(digitalLoop().ClosedLoop())
			return must(chart.StepResponse(sampledStep(t, cl, 4, 0), ptr(must(response.StepMetrics(cl, nil))), nil))
		}},
	}, robustGoldenCases()...) // robust_test.go
}

func ptr[T any](v T) *T { return &v }
