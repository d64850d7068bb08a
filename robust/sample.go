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
	// KeepSamples is how many samples (the first ones, indexes 0, 1, …)
	// are kept one by one in SampleResult.Values and the per-sample margin
	// slices, e.g. for histograms. The other statistics (probabilities,
	// Summary) are accumulated on the fly over every sample, so memory does
	// not grow with Samples beyond the kept ones. If zero, defaults to
	// 100 000; negative keeps none.
	KeepSamples int
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
	// Values[i] are the parameter values of sample i, for the first
	// SampleSettings.KeepSamples samples only; the per-sample margins of
	// those follow (NaN where undefined or not done; gain margin +Inf
	// without phase crossover).
	Values          [][]float64
	PhaseMarginDeg  []float64
	GainMarginDB    []float64
	DelayMarginSec  []float64
	PeakSensitivity []float64
	// Summary has the smallest and largest finite value of each margin
	// over every sample done (kept or not), with where they occur.
	Summary MarginSummaries
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
	draw := func(v []float64, i int) []float64 {
		rng := rand.New(rand.NewPCG(s.Seed, uint64(i)))
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
	draw := func(v []float64, i int) []float64 {
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
	switch {
	case out.KeepSamples == 0:
		out.KeepSamples = 100_000
	case out.KeepSamples < 0:
		out.KeepSamples = 0
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

// maxChunk is the largest number of consecutive samples a worker takes at a
// time: the shared counter is touched once per chunk, not once per sample.
// Smaller runs use smaller chunks (see chunkSize), so that the last chunks do
// not leave a core idle while another finishes a long one.
const maxChunk = 16

// chunkSize returns the chunk for total samples on workers goroutines: about
// eight chunks per worker, between 1 and maxChunk samples each.
func chunkSize(total, workers int) int {
	return max(1, min(maxChunk, total/(8*max(1, workers))))
}

// accumulator holds one worker's statistics; workers share nothing while
// they run (no mutex, no shared slice but the kept-sample prefix, written at
// distinct indexes), and the accumulators are merged in worker order at the
// end. Every merged statistic is an integer count or a minimum/maximum with
// ties broken by the lowest sample index, so the result does not depend on
// the number of workers or on the order in which samples finish.
type accumulator struct {
	done, stable, errs int
	passed             []int
	extremes           [4]MarginSummary
}

func newAccumulator(nreq int) accumulator {
	a := accumulator{passed: make([]int, nreq)}
	for k := range a.extremes {
		a.extremes[k] = MarginSummary{Min: math.NaN(), Max: math.NaN(), MinSample: -1, MaxSample: -1}
	}
	return a
}

// MarginSummaries are the streaming summaries of the four margins.
type MarginSummaries struct {
	PhaseMarginDeg, GainMarginDB, DelayMarginSec, PeakSensitivity MarginSummary
}

// MarginSummary is the streaming summary of one margin over every sample
// done: how many samples have a finite value, and the smallest and largest
// of them with the sample index and parameter values where each occurs
// (the lowest index on ties). Min and Max are NaN and the indexes −1 when
// no sample has a finite value.
type MarginSummary struct {
	Finite               int
	Min, Max             float64
	MinSample, MaxSample int
	MinAt, MaxAt         []float64
}

func (m *MarginSummary) add(x float64, i int, v []float64) {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return
	}
	m.Finite++
	if m.MinSample < 0 || x < m.Min || (x == m.Min && i < m.MinSample) {
		m.Min, m.MinSample, m.MinAt = x, i, append(m.MinAt[:0], v...)
	}
	if m.MaxSample < 0 || x > m.Max || (x == m.Max && i < m.MaxSample) {
		m.Max, m.MaxSample, m.MaxAt = x, i, append(m.MaxAt[:0], v...)
	}
}

func (m *MarginSummary) merge(o MarginSummary) {
	m.Finite += o.Finite
	if o.MinSample >= 0 && (m.MinSample < 0 || o.Min < m.Min || (o.Min == m.Min && o.MinSample < m.MinSample)) {
		m.Min, m.MinSample, m.MinAt = o.Min, o.MinSample, o.MinAt
	}
	if o.MaxSample >= 0 && (m.MaxSample < 0 || o.Max > m.Max || (o.Max == m.Max && o.MaxSample < m.MaxSample)) {
		m.Max, m.MaxSample, m.MaxAt = o.Max, o.MaxSample, o.MaxAt
	}
}

func run(ctx context.Context, l *Loop, req spec.Requirements, s SampleSettings, total int, draw func(dst []float64, i int) []float64) (SampleResult, error) {
	kept := min(total, s.KeepSamples)
	res := SampleResult{Requested: total, Seed: s.Seed,
		Values: make([][]float64, kept), PhaseMarginDeg: nanSlice(kept), GainMarginDB: nanSlice(kept),
		DelayMarginSec: nanSlice(kept), PeakSensitivity: nanSlice(kept)}
	var next, count atomic.Int64
	var mu sync.Mutex
	step := int64(max(1, total/100))
	nextReport := atomic.Int64{}
	nextReport.Store(step)
	chunk := chunkSize(total, s.Workers)
	workers := min(s.Workers, (total+chunk-1)/chunk)
	accs := make([]accumulator, workers)
	var wg sync.WaitGroup
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			acc := newAccumulator(len(req))
			defer func() { accs[w] = acc }()
			v := make([]float64, len(l.desc.Params))
			for {
				if ctx.Err() != nil {
					return
				}
				lo := int(next.Add(int64(chunk)) - int64(chunk))
				if lo >= total {
					return
				}
				hi := min(lo+chunk, total)
				for i := lo; i < hi; i++ {
					if ctx.Err() != nil {
						return
					}
					v = draw(v, i)
					acc.sample(l, req, s.Spec, i, v, &res, kept)
				}
				c := count.Add(int64(hi - lo))
				if s.Progress != nil && (c >= nextReport.Load() || c == int64(total)) {
					mu.Lock()
					if c >= nextReport.Load() || c == int64(total) {
						nextReport.Store(c + step)
						s.Progress(int(c), total)
					}
					mu.Unlock()
				}
			}
		}()
	}
	wg.Wait()
	sum := newAccumulator(len(req))
	for _, a := range accs {
		sum.done += a.done
		sum.stable += a.stable
		sum.errs += a.errs
		for k := range a.passed {
			sum.passed[k] += a.passed[k]
		}
		for k := range a.extremes {
			sum.extremes[k].merge(a.extremes[k])
		}
	}
	res.Done, res.AnalysisErrors = sum.done, sum.errs
	res.Summary = MarginSummaries{PhaseMarginDeg: sum.extremes[0], GainMarginDB: sum.extremes[1],
		DelayMarginSec: sum.extremes[2], PeakSensitivity: sum.extremes[3]}
	res.Stable = Wilson(sum.stable, res.Done)
	for k, r := range req {
		res.Requirements = append(res.Requirements, RequirementProbability{Name: r.String(), Key: r.Key(), Probability: Wilson(sum.passed[k], res.Done)})
	}
	if res.Done < total {
		res.Partial = true
		return res, fmt.Errorf("%w: %d of %d samples done: %w", ErrCanceled, res.Done, total, ctx.Err())
	}
	return res, nil
}

// sample analyses sample i at values v into the worker's accumulator, and
// stores it in res if i is among the kept samples (each index is written by
// one worker only).
func (a *accumulator) sample(l *Loop, req spec.Requirements, set *spec.Settings, i int, v []float64, res *SampleResult, kept int) {
	a.done++
	if i < kept {
		res.Values[i] = append([]float64(nil), v...)
	}
	g, err := l.At(v)
	if err != nil {
		a.errs++
		return
	}
	m, err := margins.Compute(g, nil)
	var mp *margins.Result
	if err != nil {
		a.errs++
	} else {
		mp = &m
		if m.ClosedLoopStable {
			a.stable++
		}
		vals := [4]float64{m.PhaseMarginDeg, m.GainMarginDB, m.DelayMarginSec, m.PeakSensitivity}
		for k, x := range vals {
			a.extremes[k].add(x, i, v)
		}
		if i < kept {
			res.PhaseMarginDeg[i], res.GainMarginDB[i] = m.PhaseMarginDeg, m.GainMarginDB
			res.DelayMarginSec[i], res.PeakSensitivity[i] = m.DelayMarginSec, m.PeakSensitivity
		}
	}
	if len(req) > 0 {
		// The margins just computed serve the requirements too.
		s := spec.Settings{}
		if set != nil {
			s = *set
		}
		s.Margins = mp
		rep := spec.CheckWith(g, req, &s)
		for k, r := range rep.Results {
			if r.Pass {
				a.passed[k]++
			}
		}
	}
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
