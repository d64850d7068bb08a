package robust

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"
	"sync/atomic"

	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/spec"
)

// SampleSettings controls MonteCarlo and Grid. A nil *SampleSettings means
// the defaults.
type SampleSettings struct {
	// Samples is the number of Monte Carlo samples, 1 to 10⁸. If zero,
	// defaults to 1000. Grid ignores it.
	Samples int
	// Seed selects the pseudo-random streams: sample i is drawn from its own
	// stream rand.NewPCG(Seed, i), so results do not depend on Workers.
	Seed uint64
	// Workers is the number of goroutines; if zero, runtime.GOMAXPROCS(0).
	Workers int
	// Progress, if not nil, is called with the number of samples done and
	// the total, at most about every 1 % of the work; calls are serialised.
	Progress func(done, total int)
	// Spec is passed to spec.CheckWith for every sample.
	Spec *spec.Settings
}

// Probability is an estimated probability with its Wilson score interval
// at 95 % confidence (E. B. Wilson, 1927, "Probable inference, the law of
// succession, and statistical inference", JASA 22(158)).
type Probability struct {
	Passed, Samples int
	// Estimate is Passed/Samples.
	Estimate float64
	// Low and High bound the 95 % Wilson interval.
	Low, High float64
}

// Wilson returns the estimate of k successes in n trials with its 95 %
// Wilson score interval; n = 0 gives NaN bounds.
func Wilson(k, n int) Probability {
	p := Probability{Passed: k, Samples: n, Estimate: math.NaN(), Low: math.NaN(), High: math.NaN()}
	if n <= 0 {
		return p
	}
	const z = 1.959963984540054 // 97.5 % point of the standard normal
	fn := float64(n)
	ph := float64(k) / fn
	den := 1 + z*z/fn
	center := (ph + z*z/(2*fn)) / den
	half := z / den * math.Sqrt(ph*(1-ph)/fn+z*z/(4*fn*fn))
	p.Estimate, p.Low, p.High = ph, math.Max(0, center-half), math.Min(1, center+half)
	return p
}

// RequirementProbability is the probability of meeting one requirement.
type RequirementProbability struct {
	Name string
	Key  string
	Probability
}

// SampleResult holds a Monte Carlo or grid sweep.
type SampleResult struct {
	// Requested is the number of samples asked for, Done the number
	// analysed. Partial reports a run stopped by its context: every
	// statistic is then over the Done samples only.
	Requested, Done int
	Partial         bool
	Seed            uint64
	// Stable is the probability of a stable closed loop.
	Stable Probability
	// Requirements has one entry per requirement, in order.
	Requirements []RequirementProbability
	// Values[i] are the parameter values of sample i; the per-sample
	// margins follow (NaN where undefined or not done; gain margin +Inf
	// without phase crossover).
	Values          [][]float64
	PhaseMarginDeg  []float64
	GainMarginDB    []float64
	DelayMarginSec  []float64
	PeakSensitivity []float64
	// AnalysisErrors counts samples whose analysis returned an error
	// (counted as failing every requirement).
	AnalysisErrors int
}

// MonteCarlo draws Samples parameter points from the distributions of the
// parameters and, for each, computes the margins (margins.Compute) and checks
// the requirements (spec.CheckWith), on all cores. The result is the same for
// a seed whatever the number of workers. Cancelling ctx stops the work: the
// partial result is returned with an error wrapping ErrCanceled.
func MonteCarlo(ctx context.Context, l *Loop, req spec.Requirements, set *SampleSettings) (SampleResult, error) {
	s, err := set.withDefaults()
	if err != nil {
		return SampleResult{}, err
	}
	draw := func(i int) []float64 {
		rng := rand.New(rand.NewPCG(s.Seed, uint64(i)))
		v := make([]float64, len(l.desc.Params))
		for k, p := range l.desc.Params {
			v[k] = drawParam(rng, p)
		}
		return v
	}
	return run(ctx, l, req, s, s.Samples, draw)
}

// Grid analyses the full grid of pointsPerParam evenly spaced values of
// every parameter (ends included), in the same way as MonteCarlo.
func Grid(ctx context.Context, l *Loop, req spec.Requirements, pointsPerParam int, set *SampleSettings) (SampleResult, error) {
	s, err := set.withDefaults()
	if err != nil {
		return SampleResult{}, err
	}
	n := len(l.desc.Params)
	total := 1
	for range n {
		if pointsPerParam < 2 || total > 1e8/pointsPerParam {
			return SampleResult{}, fmt.Errorf("%w: %d points per parameter for %d parameters (want ≥ 2 and at most 10⁸ points)", ErrSettings, pointsPerParam, n)
		}
		total *= pointsPerParam
	}
	draw := func(i int) []float64 {
		v := make([]float64, n)
		for k, p := range l.desc.Params {
			j := i % pointsPerParam
			i /= pointsPerParam
			v[k] = p.Min + (p.Max-p.Min)*float64(j)/float64(pointsPerParam-1)
		}
		return v
	}
	return run(ctx, l, req, s, total, draw)
}

func (s *SampleSettings) withDefaults() (SampleSettings, error) {
	var out SampleSettings
	if s != nil {
		out = *s
	}
	if out.Samples < 0 || out.Samples > 1e8 || out.Workers < 0 {
		return out, fmt.Errorf("%w: Samples %d (want 0 to 10⁸) and Workers %d (want ≥ 0)", ErrSettings, out.Samples, out.Workers)
	}
	if out.Samples == 0 {
		out.Samples = 1000
	}
	if out.Workers == 0 {
		out.Workers = runtime.GOMAXPROCS(0)
	}
	return out, nil
}

func drawParam(rng *rand.Rand, p Param) float64 {
	if p.Min == p.Max {
		return p.Min
	}
	if p.Distribution == Normal {
		sigma := p.Sigma
		if sigma == 0 {
			sigma = (p.Max - p.Min) / 6
		}
		for range 1000 {
			v := p.Mid() + sigma*rng.NormFloat64()
			if v >= p.Min && v <= p.Max {
				return v
			}
		}
	}
	return p.Min + (p.Max-p.Min)*rng.Float64()
}

type sampleOut struct {
	stable bool
	pass   []bool
	err    bool
}

func run(ctx context.Context, l *Loop, req spec.Requirements, s SampleSettings, total int, draw func(int) []float64) (SampleResult, error) {
	res := SampleResult{Requested: total, Seed: s.Seed,
		Values: make([][]float64, total), PhaseMarginDeg: nanSlice(total), GainMarginDB: nanSlice(total),
		DelayMarginSec: nanSlice(total), PeakSensitivity: nanSlice(total)}
	outs := make([]sampleOut, total)
	done := make([]bool, total)
	var next, count atomic.Int64
	var mu sync.Mutex
	step := int64(max(1, total/100))
	var wg sync.WaitGroup
	for range min(s.Workers, total) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				if ctx.Err() != nil {
					return
				}
				i := int(next.Add(1) - 1)
				if i >= total {
					return
				}
				v := draw(i)
				res.Values[i] = v
				o := sampleOut{pass: make([]bool, len(req))}
				g, err := l.At(v)
				if err != nil {
					o.err = true
				} else {
					m, err := margins.Compute(g, nil)
					if err != nil {
						o.err = true
					} else {
						o.stable = m.ClosedLoopStable
						res.PhaseMarginDeg[i], res.GainMarginDB[i] = m.PhaseMarginDeg, m.GainMarginDB
						res.DelayMarginSec[i], res.PeakSensitivity[i] = m.DelayMarginSec, m.PeakSensitivity
					}
					if len(req) > 0 {
						rep := spec.CheckWith(g, req, s.Spec)
						for k, r := range rep.Results {
							o.pass[k] = r.Pass
						}
					}
				}
				outs[i] = o
				done[i] = true
				if c := count.Add(1); s.Progress != nil && (c%step == 0 || c == int64(total)) {
					mu.Lock()
					s.Progress(int(c), total)
					mu.Unlock()
				}
			}
		}()
	}
	wg.Wait()
	passed := make([]int, len(req))
	stable := 0
	for i, o := range outs {
		if !done[i] {
			continue
		}
		res.Done++
		if o.err {
			res.AnalysisErrors++
		}
		if o.stable {
			stable++
		}
		for k, p := range o.pass {
			if p {
				passed[k]++
			}
		}
	}
	res.Stable = Wilson(stable, res.Done)
	for k, r := range req {
		res.Requirements = append(res.Requirements, RequirementProbability{Name: r.String(), Key: r.Key(), Probability: Wilson(passed[k], res.Done)})
	}
	if res.Done < total {
		res.Partial = true
		return res, fmt.Errorf("%w: %d of %d samples done: %w", ErrCanceled, res.Done, total, ctx.Err())
	}
	return res, nil
}

func nanSlice(n int) []float64 {
	s := make([]float64, n)
	for i := range s {
		s[i] = math.NaN()
	}
	return s
}

// Histogram counts values in equal bins.
type Histogram struct {
	// Edges has len(Counts)+1 bin edges, ascending.
	Edges  []float64
	Counts []int
	// Excluded counts values left out: NaN (undefined) and ±Inf.
	Excluded int
}

// NewHistogram bins the finite values into bins equal bins spanning their
// range (bins ≥ 1; a single distinct value gives one bin of width 1 around
// it).
func NewHistogram(values []float64, bins int) (Histogram, error) {
	if bins < 1 {
		return Histogram{}, fmt.Errorf("%w: %d bins", ErrSettings, bins)
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	h := Histogram{Counts: make([]int, bins)}
	for _, v := range values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			h.Excluded++
			continue
		}
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	if lo > hi {
		h.Edges = make([]float64, bins+1)
		return h, nil
	}
	if lo == hi {
		lo, hi = lo-0.5, hi+0.5
	}
	h.Edges = make([]float64, bins+1)
	for k := range h.Edges {
		h.Edges[k] = lo + (hi-lo)*float64(k)/float64(bins)
	}
	for _, v := range values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			continue
		}
		k := min(int((v-lo)/(hi-lo)*float64(bins)), bins-1)
		h.Counts[k]++
	}
	return h, nil
}
