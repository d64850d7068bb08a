package design

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"github.com/loopwise/loopwise/internal/rootfind"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// Range is the range of the design variable; ±Inf ends are allowed. The
// zero value means (0, +Inf).
type Range struct{ Min, Max float64 }

// Settings controls Solve and Values. A nil *Settings means the defaults;
// so does the zero value of every field.
type Settings struct {
	// Range is the range of the variable searched. If zero, (0, +Inf).
	Range Range
	// PadeOrder is the order of the Padé approximation of dead time used
	// for the closed-loop poles (stability, damping ratio, step metrics),
	// 1 to 20, as in package spec. If zero, defaults to 6.
	PadeOrder int
	// Samples is the number of values per piece of the range (between
	// stability boundaries) at which a requirement without an exact
	// boundary construction (step metrics, kinds unknown to this package)
	// is evaluated to bracket its boundaries, 4 to 1000. If zero,
	// defaults to 10.
	Samples int
}

// Interval is an interval [Lo, Hi] of the design variable with, for each
// end, what binds there in words ("phase margin = 45° at 1.2 rad/s",
// "stability boundary: closed-loop poles at ±1.4j", "end of the range").
// Ends may be ±Inf.
type Interval struct {
	Lo, Hi               float64
	LoBinding, HiBinding string
}

// Contains reports whether Lo ≤ x ≤ Hi.
func (iv Interval) Contains(x float64) bool { return iv.Lo <= x && x <= iv.Hi }

// RequirementSet is the set of values of the variable where one requirement
// holds.
type RequirementSet struct {
	// Requirement is the requirement; Key its loop-file key and Name its
	// words.
	Requirement spec.Requirement
	Key, Name   string
	// Intervals are the values where it holds, ascending and disjoint.
	Intervals []Interval
	// Method says how the ends were found: "exact" (solutions of the
	// boundary equations, see the package documentation) or "bracketing"
	// (Brent's method on the measured quantity between sampled values);
	// "not designed: …" for a requirement measured on the loop's parts
	// (spec's Requirement.NeedsLoopParts), whose Intervals are nil.
	Method string
}

// Result is the outcome of Solve.
type Result struct {
	// Variable is the variable's name ("gain" or the parameter).
	Variable string
	// Range is the range searched.
	Range Range
	// Stable are the values for which the closed loop is stable (exact,
	// from package locus; a continuous loop's dead time kept exact by
	// locus.DelayedParametric, or by its Padé approximation where that
	// refuses — StableNote says which).
	Stable []Interval
	// StableNote says how Stable treats the loop's dead time: kept exact,
	// or its Padé approximation and why; empty without dead time.
	StableNote string
	// Requirements has one set per requirement, in the order given.
	Requirements []RequirementSet
	// AllMet are the values where every requirement holds and the closed
	// loop is stable.
	AllMet []Interval
	// Suggested is the value in AllMet that maximises the smallest
	// relative slack over the requirements (see Slack); NaN when AllMet is
	// empty. SuggestedSlack is that smallest slack.
	Suggested, SuggestedSlack float64
	// Binding says in words what limits the design: the ends of AllMet and
	// the requirement with the least slack at Suggested, or, when no value
	// meets them all, the conflicting requirements and the best compromise.
	Binding string
	// Conflicts names pairs of requirements whose sets do not overlap
	// within the stable values, each set being non-empty there (empty when
	// AllMet is not; a requirement met by no stable value is named in
	// Binding instead).
	Conflicts [][2]string
	// Compromise is the value of the range (stable values first) with the
	// largest smallest slack when AllMet is empty (NaN otherwise);
	// CompromiseFailures are the requirements not met there.
	Compromise         float64
	CompromiseFailures []string
}

// Slack returns the relative slack of a verdict: (value − limit)/|limit| for
// a minimum, (limit − value)/|limit| for a maximum (|limit| replaced by 1
// when the limit is 0); +Inf for an infinite margin; −Inf when the value
// could not be measured or the requirement fails for another reason (an
// unstable loop). A requirement holds when its slack is ≥ 0.
func Slack(r spec.Result) float64 {
	if r.Err != nil || math.IsNaN(r.Value) {
		return math.Inf(-1)
	}
	sc := math.Abs(r.Limit)
	if sc == 0 {
		sc = 1
	}
	var s float64
	if isMinimum(r.Requirement) {
		s = (r.Value - r.Limit) / sc
	} else {
		s = (r.Limit - r.Value) / sc
	}
	if math.IsNaN(s) {
		s = math.Inf(-1)
	}
	if r.Pass && s < 0 {
		// A requirement kind whose name does not say "minimum" or
		// "maximum" (a kind newer than this package): the verdict decides
		// the orientation.
		s = -s
	}
	if !r.Pass && s >= 0 {
		return math.Inf(-1)
	}
	return s
}

func isMinimum(r spec.Requirement) bool { return strings.HasPrefix(r.Name(), "minimum") }

// problem carries the work of one Solve.
type problem struct {
	v        Variable
	f        frame
	rng      Range
	pade     int
	samples  int
	charLoop tf.TF // b/a with a + v·b the characteristic polynomial
	stable   []Interval
	stabC    []candidate
	// stableNote says how the stable set treats dead time ("" without).
	stableNote string
	// tangencies and wraps are the candidates shared by the phase and
	// delay margins (nil until first needed).
	tangencies, wraps []candidate
	cache             map[cacheKey]spec.Report
	// closed caches the closed loops of the direct step-metric
	// constructions (nil where they do not apply).
	closed map[float64]*closedLoop
	// halfHint, when positive, is the half period used by closedAt in
	// place of the poles' (inside a bracket, see hintedCrossing).
	halfHint float64
	// The requirements with an exact construction and the others, with
	// their indices in the caller's list.
	exact, generic       spec.Requirements
	exactIdx, genericIdx []int
	// exactMet is the set where every requirement with an exact
	// construction holds.
	exactMet []Interval
	// genericMet is the set where every bracketed requirement holds.
	genericMet []Interval
}

type cacheKey struct {
	x     float64
	group string
}

func newProblem(v Variable, set *Settings) (*problem, error) {
	if v.num0.IsZero() && v.num1.IsZero() {
		return nil, fmt.Errorf("%w: the zero Variable; make it with Gain, Parameter or ParameterText", ErrInvalidInput)
	}
	p := &problem{v: v, rng: Range{0, math.Inf(1)}, pade: 6, samples: 10, cache: map[cacheKey]spec.Report{}, closed: map[float64]*closedLoop{}}
	if set != nil {
		if set.Range != (Range{}) {
			p.rng = set.Range
		}
		if set.PadeOrder != 0 {
			p.pade = set.PadeOrder
		}
		if set.Samples != 0 {
			p.samples = set.Samples
		}
	}
	if math.IsNaN(p.rng.Min) || math.IsNaN(p.rng.Max) || !(p.rng.Min < p.rng.Max) {
		return nil, fmt.Errorf("%w: the range [%v, %v] of %s is empty or NaN", ErrInvalidInput, p.rng.Min, p.rng.Max, v.name)
	}
	if p.pade < 1 || p.pade > 20 {
		return nil, fmt.Errorf("%w: PadeOrder %d is outside 1…20", ErrInvalidInput, p.pade)
	}
	if p.samples < 4 || p.samples > 1000 {
		return nil, fmt.Errorf("%w: Samples %d is outside 4…1000", ErrInvalidInput, p.samples)
	}
	p.f = newFrame(v)
	a, b, err := v.rationalCharacteristic(p.pade)
	if err != nil {
		return nil, err
	}
	if p.charLoop, err = tf.FromPolys(b, a, v.ts); err != nil {
		return nil, fmt.Errorf("design: characteristic polynomial of %s: %w", v.name, err)
	}
	if err := p.stability(); err != nil {
		return nil, err
	}
	return p, nil
}

// rationalCharacteristic returns a, b with the closed-loop characteristic
// polynomial a + v·b, dead time replaced by a Padé approximation of the
// given order (continuous time) or by the exact power of z (discrete).
func (v Variable) rationalCharacteristic(order int) (a, b polyPair, err error) {
	n0, n1, d0, d1 := v.num0, v.num1, v.den0, v.den1
	if v.delay > 0 {
		pd, err := tf.PadeDelay(v.delay, order)
		if v.ts > 0 {
			pd, err = tf.FromPolys(onePoly, onePoly, v.ts)
			if err == nil {
				pd, err = pd.WithDelay(v.delay)
			}
			if err == nil {
				pd, err = pd.Pade(order)
			}
		}
		if err != nil {
			return a, b, fmt.Errorf("%w: dead time of %v s: %w", ErrUnsupported, v.delay, err)
		}
		pn, pdd := pd.Num(), pd.Den()
		n0, n1 = n0.Mul(pn), n1.Mul(pn)
		d0, d1 = d0.Mul(pdd), d1.Mul(pdd)
	}
	return d0.Add(n0), d1.Add(n1), nil
}

func (p *problem) locusRange() locus.Range { return locus.Range{Min: p.rng.Min, Max: p.rng.Max} }

// stability computes the stable intervals and labels their ends: exact
// from the characteristic polynomial (locus.Analyze), and for a continuous
// loop with dead time from the quasi-polynomial itself (delayStability).
func (p *problem) stability() error {
	if p.v.delay > 0 && p.v.ts == 0 {
		if ok := p.delayStability(); ok {
			return nil
		}
	}
	an, err := locus.Analyze(p.charLoop, &locus.Settings{Range: p.locusRange(), Variable: p.v.name})
	if err != nil {
		return fmt.Errorf("design: stability of the closed loop over %s: %w", p.v.name, err)
	}
	for _, c := range an.AxisCrossings {
		var where string
		switch {
		case c.FrequencyRadPerSec == 0:
			where = "a closed-loop pole at " + map[bool]string{false: "s = 0", true: "z = 1"}[p.v.ts > 0]
		case p.v.ts > 0 && math.Abs(c.FrequencyRadPerSec*p.v.ts-math.Pi) < 1e-12:
			where = "a closed-loop pole at z = −1"
		default:
			where = fmt.Sprintf("closed-loop poles at %s (%s rad/s)", fmtPole(c.Point), fmtNum(c.FrequencyRadPerSec))
		}
		p.stabC = append(p.stabC, candidate{c.Value, "stability boundary: " + where})
	}
	p.addStable(an.StableIntervals)
	return nil
}

// addStable appends the stable intervals with what binds at their ends.
func (p *problem) addStable(ivs []locus.Interval) {
	for _, s := range ivs {
		iv := Interval{Lo: s.Lo, Hi: s.Hi}
		iv.LoBinding = p.endLabel(s.Lo, nil)
		iv.HiBinding = p.endLabel(s.Hi, nil)
		p.stable = append(p.stable, iv)
	}
}

// delayStability computes the stable intervals of a continuous loop with
// dead time τ on its quasi-polynomial
//
//	D_x(s) + N_x(s)·e^(−sτ) = den0 + x·den1 + (num0 + x·num1)·e^(−sτ),
//
// e^(−sτ) exact: locus.DelayedParametric (D-decomposition along the
// imaginary axis; the loop gain over an unbounded range goes to
// locus.DelayedStableGains). It returns false, with p.stableNote saying
// why, where that analysis refuses (a neutral-type loop, an unbounded range
// of a parameter that is not a gain, a range reaching the value where the
// degree of D_x drops); the caller then uses the Padé approximation.
func (p *problem) delayStability() bool {
	dp, err := locus.NewDelayedParametric(p.v.name, p.v.den0, p.v.num0, p.v.den1, p.v.num1, p.v.delay)
	if err == nil {
		var st locus.DelayParamStability
		if st, err = dp.StableIntervals(&locus.Settings{Range: p.locusRange(), Variable: p.v.name}); err == nil {
			for _, c := range st.Crossings {
				where := "a closed-loop root at s = 0"
				if c.FrequencyRadPerSec > 0 {
					where = fmt.Sprintf("closed-loop roots at ±%sj (%s rad/s), dead time exact", fmtNum(c.FrequencyRadPerSec), fmtNum(c.FrequencyRadPerSec))
				}
				p.stabC = append(p.stabC, candidate{c.Value, "stability boundary: " + where})
			}
			p.addStable(st.StableIntervals)
			p.stableNote = fmt.Sprintf("dead time of %s s exact (D-decomposition of the quasi-polynomial)", fmtNum(p.v.delay))
			return true
		}
	}
	p.stableNote = fmt.Sprintf("dead time of %s s by its Padé approximation of order %d: the exact analysis refused (%v)", fmtNum(p.v.delay), p.pade, err)
	return false
}

// sameValue reports whether x and y agree to 1e-9 relative.
func sameValue(x, y float64) bool {
	return x == y || math.Abs(x-y) <= 1e-9*math.Max(1e-300, math.Max(math.Abs(x), math.Abs(y)))
}

// endLabel names what binds at x: one of own (the requirement's
// candidates), a stability boundary, a range end, or a degree drop.
func (p *problem) endLabel(x float64, own []candidate) string {
	if x == p.rng.Min || x == p.rng.Max {
		return "end of the range"
	}
	for _, c := range own {
		if sameValue(c.value, x) {
			return c.label
		}
	}
	for _, c := range p.stabC {
		if sameValue(c.value, x) {
			return c.label
		}
	}
	if x == p.rng.Min || x == p.rng.Max {
		return "end of the range"
	}
	if math.IsInf(x, 0) {
		return "unbounded"
	}
	a, b, _ := p.v.rationalCharacteristic(p.pade)
	if deg := max(a.Degree(), b.Degree()); deg >= 0 && sameValue(-a.Coef(deg)/b.Coef(deg), x) {
		return "stability boundary: a closed-loop pole at infinity (the degree of the characteristic polynomial drops)"
	}
	return ""
}

// eval checks the requirements at x, cached.
func (p *problem) eval(x float64, group string, req spec.Requirements) spec.Report {
	k := cacheKey{x, group}
	if r, ok := p.cache[k]; ok {
		return r
	}
	l, err := p.v.LoopAt(x)
	var rep spec.Report
	if err != nil {
		for _, r := range req {
			rep.Results = append(rep.Results, spec.Result{Requirement: r, Name: r.Name(), Limit: r.Limit(), Value: math.NaN(), Err: err})
		}
	} else {
		rep = spec.CheckWith(l, req, &spec.Settings{PadeOrder: p.pade})
	}
	p.cache[k] = rep
	return rep
}

// evalAll returns the verdicts on every requirement at x, in the caller's
// order, from the two cached groups.
func (p *problem) evalAll(x float64, n int) []spec.Result {
	out := make([]spec.Result, n)
	if len(p.exact) > 0 {
		for i, r := range p.eval(x, "exact", p.exact).Results {
			out[p.exactIdx[i]] = r
		}
	}
	if len(p.generic) > 0 {
		for i, r := range p.eval(x, "generic", p.generic).Results {
			out[p.genericIdx[i]] = r
		}
	}
	return out
}

// groupMin returns the smallest slack at x over the requirements of one
// group (+Inf for an empty group).
func (p *problem) groupMin(x float64, group string) float64 {
	req := p.exact
	if group == "generic" {
		req = p.generic
	}
	best := math.Inf(1)
	if len(req) == 0 {
		return best
	}
	for _, r := range p.eval(x, group, req).Results {
		best = math.Min(best, Slack(r))
	}
	return best
}

// searchInterval returns the value in iv with the largest smallest slack F
// = min(E, G), E over the requirements with an exact construction (cheap:
// margins and poles) and G over the bracketed ones (a step response each).
// E is maximised first by golden-section search (Kiefer 1953) from six
// samples; where G ≥ E at that maximum it is the maximum of F too (F ≤ E
// everywhere). Otherwise, when a value already evaluated inside iv (or the
// outer sample where E is smaller) has G > E, the two cross between it and
// the maximum of E, and the crossing (Brent's method on G − E to 1e-3 of
// the interval's width) is the maximum of F when E
// and G are monotone there (the usual case: one end bound by each group);
// the best of the values tried is returned. Without such a value, F is
// maximised by golden-section search from the values evaluated inside or a
// few samples (the only search when every requirement has an exact
// construction: F is cheap then). Infinite intervals are only sampled.
func (p *problem) searchInterval(iv Interval, F func(float64) float64) (float64, float64) {
	finite := !math.IsInf(iv.Lo, 0) && !math.IsInf(iv.Hi, 0)
	bx, bs := math.NaN(), math.Inf(-1)
	try := func(x float64) {
		if s := F(x); s > bs || math.IsNaN(bx) {
			bx, bs = x, s
		}
	}
	if finite && len(p.exact) > 0 && len(p.generic) > 0 {
		E := func(x float64) float64 { return p.groupMin(x, "exact") }
		// The values where the exact group has been evaluated already
		// (the midpoints of its pieces, see solveExact) serve as the
		// samples when there are enough of them.
		xs := p.evaluatedIn(iv.Lo, iv.Hi, "exact")
		if len(xs) < 5 {
			xs = samplesIn(iv.Lo, iv.Hi, 6)
		}
		// Where the best sample meets the exact requirements but not the
		// bracketed ones, F = G < 0 ≤ E there and the maximum of F lies
		// at the crossing of G and E located below, whatever the exact
		// maximum of E: the golden-section refinement is skipped.
		iters := 8
		if v0, x0, s0 := sampleThenGolden(E, xs, iv, 0); s0 >= 0 && outside(p.genericMet, x0) && len(p.genericMet) > 0 {
			_ = v0
			iters = 0
		}
		vals, xe, se := sampleThenGolden(E, xs, iv, iters)
		// G(xe) < 0 ≤ E(xe) when the sets of the bracketed requirements
		// exclude xe: the step response there (often a slow one, at the
		// low end of the range) is then not computed unless no nearer
		// bracket of the crossing is found below.
		ge, geKnown := math.NaN(), !(se >= 0 && outside(p.genericMet, xe))
		if geKnown {
			ge = p.groupMin(xe, "generic")
			if ge >= se {
				return xe, se
			}
			try(xe)
		}
		// A value evaluated inside with G > E brackets a crossing; if
		// there is none, the outer sample where E is smaller is tried.
		probe := xs[len(xs)-1]
		if vals[0] < vals[len(vals)-1] {
			probe = xs[0]
		}
		h := func(x float64) float64 { return p.groupMin(x, "generic") - E(x) }
		// The sets of the exact requirements give the sign of E without
		// evaluating it: E ≥ 0 inside the set where they all hold, E < 0
		// outside. A value outside with G ≥ 0 has G > E for sure; the
		// nearest such value to the maximum of E is tried first.
		cands := append(p.evaluatedIn(iv.Lo, iv.Hi, "generic"), probe)
		sure := func(x float64) bool {
			return p.cached(x, "generic") && p.groupMin(x, "generic") >= 0 && p.outsideExactMet(x)
		}
		slices.SortStableFunc(cands, func(a, b float64) int {
			sa, sb := sure(a), sure(b)
			switch {
			case sa && sb:
				return cmp.Compare(math.Abs(a-xe), math.Abs(b-xe))
			case sa:
				return -1
			case sb:
				return 1
			}
			return 0
		})
		for _, x := range cands {
			// Where the exact requirements all hold and a bracketed one
			// fails, G − E < 0 without evaluating E.
			if p.inExactMet(x) && p.cached(x, "generic") && p.groupMin(x, "generic") < 0 {
				continue
			}
			if hx := h(x); hx > 0 && x != xe {
				a, fa := xe, math.NaN()
				if !geKnown {
					// The values evaluated between xe and x, nearest x
					// first, narrow the bracket [xe, x] of G − E.
					for _, y := range p.evaluatedBetween(xe, x) {
						if hy := h(y); hy < 0 {
							a, fa = y, hy
							break
						} else if hy > 0 {
							x, hx = y, hy
						}
					}
				}
				if math.IsNaN(fa) {
					if !geKnown {
						ge = p.groupMin(xe, "generic")
						try(xe)
					}
					fa = ge - se
				}
				xc := rootfind.Brent(h, a, x, fa, hx, 1e-3*(iv.Hi-iv.Lo)/math.Max(math.Abs(xe), 1e-300))
				try(x)
				try(xc)
				return bx, bs
			}
		}
	}
	xs := p.evaluated(iv.Lo, iv.Hi)
	if len(xs) < 3 {
		xs = append(xs, samplesIn(iv.Lo, iv.Hi, 5)...)
		slices.Sort(xs)
	}
	iters := 5
	if !finite {
		iters = 0
	}
	_, x, s := sampleThenGolden(F, xs, iv, iters)
	if s > bs || math.IsNaN(bx) {
		bx, bs = x, s
	}
	return bx, bs
}

// sampleThenGolden evaluates f at xs (ascending, inside iv) and refines
// the best sample by golden-section search with iters steps between its
// neighbours (the ends of iv beyond the first and last sample); iters = 0
// keeps the best sample. It returns the sampled values and the best point.
func sampleThenGolden(f func(float64) float64, xs []float64, iv Interval, iters int) (vals []float64, x, fx float64) {
	vals = make([]float64, len(xs))
	for j, x := range xs {
		vals[j] = f(x)
	}
	j := argmax(vals)
	lo, hi := iv.Lo, iv.Hi
	if j > 0 {
		lo = xs[j-1]
	}
	if j+1 < len(xs) {
		hi = xs[j+1]
	}
	if iters == 0 {
		return vals, xs[j], vals[j]
	}
	x, fx = golden(f, lo, hi, xs[j], vals[j], iters)
	return vals, x, fx
}

// evaluatedIn returns the values strictly inside (lo, hi) at which the
// group has been evaluated, ascending.
func (p *problem) evaluatedIn(lo, hi float64, group string) []float64 {
	var out []float64
	for k := range p.cache {
		if k.group == group && k.x > lo && k.x < hi {
			out = append(out, k.x)
		}
	}
	slices.Sort(out)
	return out
}

// outsideExactMet reports whether x lies outside the set where every
// requirement with an exact construction holds, farther than 1e-9
// relative from its ends.
func (p *problem) outsideExactMet(x float64) bool { return outside(p.exactMet, x) }

// outside reports whether x lies outside every interval of set, farther
// than 1e-9 relative from their ends.
func outside(set []Interval, x float64) bool {
	for _, iv := range set {
		if iv.Contains(x) || sameValue(x, iv.Lo) || sameValue(x, iv.Hi) {
			return false
		}
	}
	return true
}

// evaluatedBetween returns the values strictly between a and b at which
// the bracketed group has been evaluated, nearest b first.
func (p *problem) evaluatedBetween(a, b float64) []float64 {
	out := p.evaluatedIn(math.Min(a, b), math.Max(a, b), "generic")
	slices.SortFunc(out, func(u, v float64) int { return cmp.Compare(math.Abs(u-b), math.Abs(v-b)) })
	return out
}

func (p *problem) cached(x float64, group string) bool {
	_, ok := p.cache[cacheKey{x, group}]
	return ok
}

// inExactMet reports whether x lies strictly inside the set where every
// requirement with an exact construction holds (their ends excluded to
// 1e-9 relative).
func (p *problem) inExactMet(x float64) bool {
	for _, iv := range p.exactMet {
		if x > iv.Lo && x < iv.Hi && !sameValue(x, iv.Lo) && !sameValue(x, iv.Hi) {
			return true
		}
	}
	return false
}

// evaluated returns the values in (lo, hi) already evaluated for both
// groups, ascending.
func (p *problem) evaluated(lo, hi float64) []float64 {
	var out []float64
	for k := range p.cache {
		if k.x > lo && k.x < hi && (len(p.exact) == 0 || k.group == "exact") {
			if _, ok := p.cache[cacheKey{k.x, "generic"}]; ok || len(p.generic) == 0 {
				out = append(out, k.x)
			}
		}
	}
	slices.Sort(out)
	return slices.Compact(out)
}

// midpoint returns a representative inner value of (lo, hi).
func midpoint(lo, hi float64) float64 {
	switch {
	case math.IsInf(lo, -1) && math.IsInf(hi, 1):
		return 1
	case math.IsInf(hi, 1):
		return lo + math.Max(1, math.Abs(lo))
	case math.IsInf(lo, -1):
		return hi - math.Max(1, math.Abs(hi))
	case lo > 0 && hi > 4*lo:
		return math.Sqrt(lo * hi)
	case hi < 0 && lo < 4*hi:
		return -math.Sqrt(lo * hi)
	}
	return lo + (hi-lo)/2
}

// samplesIn returns n values inside (lo, hi): geometric over wide positive
// spans, twelve decades beyond a finite end for an infinite end, linear
// otherwise. No value lies closer to a finite end than half a step: near a
// stability boundary the step response rings for very long, and the
// status there is that of the boundary's neighbourhood anyway.
func samplesIn(lo, hi float64, n int) []float64 {
	var out []float64
	switch {
	case math.IsInf(lo, -1) && math.IsInf(hi, 1):
		for i := range n {
			t := -6 + 12*float64(i)/float64(n-1)
			out = append(out, math.Copysign(math.Pow(10, math.Abs(t)-4), t))
		}
	case math.IsInf(hi, 1):
		s := math.Max(1, math.Abs(lo))
		for i := range n {
			out = append(out, lo+s*math.Pow(10, -6+12*float64(i)/float64(n-1)))
		}
	case math.IsInf(lo, -1):
		s := math.Max(1, math.Abs(hi))
		for i := range n {
			out = append(out, hi-s*math.Pow(10, 6-12*float64(i)/float64(n-1)))
		}
	case lo > 0 && hi > 20*lo:
		for i := range n {
			out = append(out, lo*math.Pow(hi/lo, (float64(i)+0.5)/float64(n)))
		}
	default:
		for i := range n {
			out = append(out, lo+(hi-lo)*(float64(i)+0.5)/float64(n))
		}
	}
	slices.Sort(out)
	return slices.Compact(out)
}

// Solve returns, for each requirement, the exact set of values of the
// variable in the range where it holds, the set where all hold (and the
// loop is stable), and a suggested value. See the package documentation for
// the methods. Requirements of kinds this package has no boundary
// construction for (new kinds of package spec) are bracketed on the value
// spec.CheckWith measures. Requirements measured on the loop's parts
// (spec's Requirement.NeedsLoopParts) are not designed: the variable's loop
// is one transfer function; their set has Method notDesigned and nil
// Intervals, and Binding names them.
func Solve(v Variable, req spec.Requirements, set *Settings) (Result, error) {
	// Requirements measured on the loop's parts (load disturbance, control
	// signal, noise) cannot be judged on L_x alone: they are listed with
	// no set and left out of AllMet and the suggestion, and Binding says so.
	var judged spec.Requirements
	var skipped []string
	for _, r := range req {
		if r.NeedsLoopParts() {
			skipped = append(skipped, r.Key())
			continue
		}
		judged = append(judged, r)
	}
	res, err := solve(v, judged, set)
	if err != nil || len(skipped) == 0 {
		return res, err
	}
	all := make([]RequirementSet, 0, len(req))
	j := 0
	for _, r := range req {
		if r.NeedsLoopParts() {
			all = append(all, RequirementSet{Requirement: r, Key: r.Key(), Name: r.Name(), Method: notDesigned})
			continue
		}
		all = append(all, res.Requirements[j])
		j++
	}
	res.Requirements = all
	res.Binding += fmt.Sprintf(" (not designed: %s, measured on the plant and the controller apart, which the variable's loop transfer function does not separate)", strings.Join(skipped, ", "))
	return res, nil
}

// notDesigned is the Method of a requirement left out of the design (see
// Solve): its Intervals are nil.
const notDesigned = "not designed: measured on the loop's parts"

// solve is Solve for requirements judged on L_x.
func solve(v Variable, req spec.Requirements, set *Settings) (Result, error) {
	p, err := newProblem(v, set)
	if err != nil {
		return Result{}, err
	}
	for _, r := range req {
		if r.Key() == "" || math.IsNaN(r.Limit()) || math.IsInf(r.Limit(), 0) {
			return Result{}, fmt.Errorf("%w: requirement %q has no valid kind or a non-finite limit", ErrInvalidInput, r.String())
		}
	}
	res := Result{Variable: v.name, Range: p.rng, Stable: p.stable, StableNote: p.stableNote, Suggested: math.NaN(), SuggestedSlack: math.NaN(), Compromise: math.NaN()}
	res.Requirements = make([]RequirementSet, len(req))
	own := make([][]candidate, len(req))
	var all []candidate
	for i, r := range req {
		res.Requirements[i] = RequirementSet{Requirement: r, Key: r.Key(), Name: r.Name()}
		c, ok := p.exactCandidates(r)
		if ok {
			p.exact = append(p.exact, r)
			p.exactIdx = append(p.exactIdx, i)
			own[i] = c
			all = append(all, c...)
			res.Requirements[i].Method = "exact"
		} else {
			p.generic = append(p.generic, r)
			p.genericIdx = append(p.genericIdx, i)
			res.Requirements[i].Method = "bracketing"
		}
	}
	if len(p.exact) > 0 {
		p.solveExact(p.exact, p.exactIdx, own, all, &res)
		p.exactMet = []Interval{{Lo: math.Inf(-1), Hi: math.Inf(1)}}
		for _, i := range p.exactIdx {
			p.exactMet = intersectSets(p.exactMet, res.Requirements[i].Intervals)
		}
	}
	if len(p.generic) > 0 {
		p.solveGeneric(p.generic, p.genericIdx, &res)
		p.genericMet = []Interval{{Lo: math.Inf(-1), Hi: math.Inf(1)}}
		for _, i := range p.genericIdx {
			p.genericMet = intersectSets(p.genericMet, res.Requirements[i].Intervals)
		}
	}
	p.intersect(&res)
	p.suggest(req, &res)
	return res, nil
}

// breakpoints returns the sorted distinct values of cs inside the range,
// with the range ends and the stability ends.
func (p *problem) breakpoints(cs []candidate) []float64 {
	xs := []float64{p.rng.Min, p.rng.Max}
	for _, c := range cs {
		if c.value > p.rng.Min && c.value < p.rng.Max && !math.IsNaN(c.value) {
			xs = append(xs, c.value)
		}
	}
	for _, s := range p.stable {
		xs = append(xs, s.Lo, s.Hi)
	}
	slices.Sort(xs)
	out := xs[:1]
	for _, x := range xs[1:] {
		if !sameValue(x, out[len(out)-1]) {
			out = append(out, x)
		}
	}
	return out
}

func (p *problem) solveExact(req spec.Requirements, idx []int, own [][]candidate, all []candidate, res *Result) {
	xs := p.breakpoints(all)
	pass := make([][]bool, len(req))
	for j := 0; j+1 < len(xs); j++ {
		x := midpoint(xs[j], xs[j+1])
		if p.v.delay == 0 && !p.isStable(x) {
			// Every kind with an exact construction fails where the
			// closed loop is unstable (spec: margins, damping ratio and
			// steady-state error of an unstable loop fail), and without
			// dead time the stable set of locus is exact: no check.
			for i := range req {
				pass[i] = append(pass[i], false)
			}
			continue
		}
		rep := p.eval(x, "exact", req)
		for i := range req {
			pass[i] = append(pass[i], rep.Results[i].Pass)
		}
	}
	for i := range req {
		k := idx[i]
		res.Requirements[k].Intervals = p.runs(xs, pass[i], own[k])
	}
}

// runs merges consecutive passing pieces [xs[j], xs[j+1]] into intervals.
func (p *problem) runs(xs []float64, pass []bool, own []candidate) []Interval {
	var out []Interval
	for j := 0; j < len(pass); j++ {
		if !pass[j] {
			continue
		}
		lo := xs[j]
		for j+1 < len(pass) && pass[j+1] {
			j++
		}
		hi := xs[j+1]
		out = append(out, Interval{Lo: lo, Hi: hi, LoBinding: p.endLabel(lo, own), HiBinding: p.endLabel(hi, own)})
	}
	return out
}

// solveGeneric brackets the boundaries of requirements without an exact
// construction: the range is cut at the stability boundaries, each piece
// sampled, and every change between met and not met between neighbouring
// samples refined by Brent's method on the slack to 1e-12 relative.
func (p *problem) solveGeneric(req spec.Requirements, idx []int, res *Result) {
	xs := p.breakpoints(nil)
	// Step metrics need a stable loop: their unstable pieces are not
	// sampled (spec fails them there) unless another kind is bracketed.
	stepOnly := true
	for _, r := range req {
		if k := r.Key(); k != keyOvershoot && k != keyRiseTime && k != keySettling {
			stepOnly = false
		}
	}
	var samples []float64
	for j := 0; j+1 < len(xs); j++ {
		if stepOnly && !p.isStable(midpoint(xs[j], xs[j+1])) {
			continue
		}
		samples = append(samples, samplesIn(xs[j], xs[j+1], p.samples)...)
	}
	// Samples whose verdicts are certain without the step metrics
	// (certify.go) are judged by slack bounds; every other value by the
	// step metrics.
	bounds := map[float64][]float64{}
	for _, x := range samples {
		if b, ok := p.stepBounds(req, x); ok {
			bounds[x] = b
		}
	}
	for i := range req {
		slack := func(x float64) float64 {
			s := Slack(p.eval(x, "generic", req).Results[i])
			return math.Max(-1e100, math.Min(1e100, s))
		}
		sampleSlack := func(x float64) float64 {
			if b, ok := bounds[x]; ok {
				return b[i]
			}
			return slack(x)
		}
		var ivs []Interval
		start := math.NaN()
		startLabel := ""
		prevX := math.NaN()
		prevS := 0.0
		for j, x := range samples {
			s := sampleSlack(x)
			// A breakpoint (stability boundary) between samples ends a run.
			if j > 0 {
				if b, ok := breakBetween(xs, prevX, x); ok && !math.IsNaN(start) {
					ivs = append(ivs, Interval{Lo: start, Hi: b, LoBinding: startLabel, HiBinding: p.endLabel(b, nil)})
					start = math.NaN()
					prevS = -1
				}
			}
			met := s >= 0
			if met && math.IsNaN(start) {
				if j == 0 || prevS < 0 && !sameSegment(xs, prevX, x) {
					b := pieceStart(xs, x)
					start, startLabel = b, p.endLabel(b, nil)
				} else {
					start, startLabel = p.bracketEnd(req, i, slack, prevX, x, prevS, s)
				}
			} else if !met && !math.IsNaN(start) {
				e, label := p.bracketEnd(req, i, slack, prevX, x, prevS, s)
				ivs = append(ivs, Interval{Lo: start, Hi: e, LoBinding: startLabel, HiBinding: label})
				start = math.NaN()
			}
			prevX, prevS = x, s
		}
		if !math.IsNaN(start) {
			b := pieceEnd(xs, prevX)
			ivs = append(ivs, Interval{Lo: start, Hi: b, LoBinding: startLabel, HiBinding: p.endLabel(b, nil)})
		}
		res.Requirements[idx[i]].Intervals = mergeTouching(ivs)
	}
}

// isStable reports whether x lies in a stable interval.
func (p *problem) isStable(x float64) bool {
	for _, s := range p.stable {
		if x > s.Lo && x < s.Hi {
			return true
		}
	}
	return false
}

// breakBetween returns a breakpoint strictly between a and b.
func breakBetween(xs []float64, a, b float64) (float64, bool) {
	for _, x := range xs {
		if x > a && x < b {
			return x, true
		}
	}
	return 0, false
}

func sameSegment(xs []float64, a, b float64) bool {
	_, ok := breakBetween(xs, a, b)
	return !ok
}

// pieceStart returns the largest breakpoint ≤ x; pieceEnd the smallest ≥ x.
func pieceStart(xs []float64, x float64) float64 {
	i := sort.SearchFloat64s(xs, x)
	if i > 0 {
		return xs[i-1]
	}
	return xs[0]
}

func pieceEnd(xs []float64, x float64) float64 {
	i := sort.SearchFloat64s(xs, x)
	if i < len(xs) {
		return xs[i]
	}
	return xs[len(xs)-1]
}

func mergeTouching(ivs []Interval) []Interval {
	var out []Interval
	for _, iv := range ivs {
		if n := len(out); n > 0 && sameValue(out[n-1].Hi, iv.Lo) {
			out[n-1].Hi, out[n-1].HiBinding = iv.Hi, iv.HiBinding
			continue
		}
		out = append(out, iv)
	}
	return out
}

// refine returns the point between a and b where the slack f changes sign.
// Brent's method (Brent 1973) first locates it to 1e-5 relative; where the
// slack at both ends of its last bracket is small (|f| ≤ 1e-3, the quantity
// is continuous) a second Brent run on that bracket polishes it to 1e-11
// relative. Either run stops at a value where the slack is within
// slackResolved of zero. Where the slack is not small, the quantity jumps
// past its limit there (the settling time when the last exit from the band
// moves to another extremum) and the jump is located to 1e-5 relative.
func (p *problem) refine(f func(float64) float64, a, b, fa, fb float64) float64 {
	// Record the evaluations to recover the final bracket of the first run.
	lo, hi, flo, fhi := a, b, fa, fb
	done := false
	rec := func(x float64) float64 {
		v := f(x)
		if settled(v) == 0 {
			done = true
			return 0
		}
		if (v < 0) == (flo < 0) {
			if math.Abs(x-hi) < math.Abs(lo-hi) {
				lo, flo = x, v
			}
		} else if math.Abs(x-lo) < math.Abs(hi-lo) {
			hi, fhi = x, v
		}
		return v
	}
	x := rootfind.Brent(rec, a, b, fa, fb, 1e-5)
	if done {
		return x
	}
	if math.Abs(flo) > 1e-3 || math.Abs(fhi) > 1e-3 {
		return x
	}
	return rootfind.Brent(func(x float64) float64 { return settled(f(x)) }, lo, hi, flo, fhi, 1e-11)
}

// slackResolved is the slack below which a bracketed end is final: the
// quantity equals its limit to 1e-12 relative, about the accuracy of the
// step metrics themselves (1e-13), so a further bracketing step would
// only move the end within that accuracy.
const slackResolved = 1e-12

// settled returns 0 for a slack within slackResolved of zero, which ends
// Brent's method at that value.
func settled(v float64) float64 {
	if math.Abs(v) <= slackResolved {
		return 0
	}
	return v
}

func brent(f func(float64) float64, a, b, fa, fb float64) float64 {
	return rootfind.Brent(f, a, b, fa, fb, 1e-14)
}

// boundLabel describes a bracketed end: the quantity equals its limit
// there, or it jumps past it.
func (p *problem) boundLabel(req spec.Requirements, i int, x float64) string {
	r := p.eval(x, "generic", req).Results[i]
	lim := r.Limit
	if !math.IsNaN(r.Value) && math.Abs(r.Value-lim) <= 1e-6*math.Max(math.Abs(lim), 1e-12) {
		return strings.TrimPrefix(strings.TrimPrefix(r.Name, "minimum "), "maximum ") + " = " + fmtNum(lim) + unitSuffix(r.Requirement)
	}
	return jumpLabel(r.Requirement)
}

// jumpLabel says that the requirement's quantity jumps past its limit.
func jumpLabel(r spec.Requirement) string {
	return fmt.Sprintf("%s jumps past its limit %s%s", strings.TrimPrefix(strings.TrimPrefix(r.Name(), "minimum "), "maximum "), fmtNum(r.Limit()), unitSuffix(r))
}

// bracketEnd locates the end of a requirement's set between a and b (the
// slack f changes sign there): for the settling time on its continuous
// excess over the band (windowEnd), else by refine; it
// returns the end and what binds there.
func (p *problem) bracketEnd(req spec.Requirements, i int, f func(float64) float64, a, b, fa, fb float64) (float64, string) {
	xp, xf := a, b
	if fa < 0 {
		xp, xf = b, a
	}
	if x, label, ok := p.windowEnd(req, i, f, xp, xf); ok {
		return x, label
	}
	if x, label, ok := p.directEnd(req, i, f, xp, xf); ok {
		return x, label
	}
	// fa, fb may be bounds (certify.go): Brent's method needs the values
	// (cached where the samples were measured).
	ea, eb := f(a), f(b)
	if (ea < 0) != (fa < 0) || (eb < 0) != (fb < 0) {
		ea, eb = fa, fb
	}
	e := p.refine(f, a, b, ea, eb)
	return e, p.boundLabel(req, i, e)
}

func unitSuffix(r spec.Requirement) string {
	u := r.Unit()
	switch u {
	case "":
		return ""
	case "°", "%":
		if u == "%" {
			return " %"
		}
		return u
	}
	return " " + u
}

// intersect forms AllMet: the stable set intersected with every
// requirement's set.
func (p *problem) intersect(res *Result) {
	cur := slices.Clone(p.stable)
	for _, rs := range res.Requirements {
		cur = intersectSets(cur, rs.Intervals)
	}
	res.AllMet = cur
}

func intersectSets(a, b []Interval) []Interval {
	var out []Interval
	for _, x := range a {
		for _, y := range b {
			lo, hi := x.Lo, x.Hi
			ll, hl := x.LoBinding, x.HiBinding
			if y.Lo > lo || (y.Lo == lo && y.LoBinding != "" && ll == "end of the range") {
				lo, ll = y.Lo, y.LoBinding
			}
			if y.Hi < hi || (y.Hi == hi && y.HiBinding != "" && hl == "end of the range") {
				hi, hl = y.Hi, y.HiBinding
			}
			if lo < hi {
				out = append(out, Interval{lo, hi, ll, hl})
			}
		}
	}
	return out
}

// suggest picks the value with the largest smallest slack.
func (p *problem) suggest(req spec.Requirements, res *Result) {
	if len(req) == 0 {
		return
	}
	minSlack := func(x float64) (float64, string) {
		best, which := math.Inf(1), ""
		for _, r := range p.evalAll(x, len(req)) {
			if s := Slack(r); s < best || which == "" {
				best, which = s, r.Name
			}
		}
		return best, which
	}
	search := func(ivs []Interval) (float64, float64) {
		bx, bs := math.NaN(), math.Inf(-1)
		for _, iv := range ivs {
			x, s := p.searchInterval(iv, func(x float64) float64 { v, _ := minSlack(x); return v })
			if s > bs {
				bx, bs = x, s
			}
		}
		return bx, bs
	}
	if len(res.AllMet) > 0 {
		x, s := search(res.AllMet)
		res.Suggested, res.SuggestedSlack = x, s
		_, which := minSlack(x)
		var ends []string
		for _, iv := range res.AllMet {
			ends = append(ends, fmt.Sprintf("[%s, %s] (lower end: %s; upper end: %s)", fmtNum(iv.Lo), fmtNum(iv.Hi), orNone(iv.LoBinding), orNone(iv.HiBinding)))
		}
		res.Binding = fmt.Sprintf("every requirement holds for %s in %s; the suggested value %s = %s leaves a relative slack of at least %s, least on the %s",
			res.Variable, strings.Join(ends, " and "), res.Variable, fmtNum(x), fmtSlack(s), which)
		return
	}
	var empty []string
	for _, rs := range res.Requirements {
		if len(intersectSets(p.stable, rs.Intervals)) == 0 {
			empty = append(empty, rs.Requirement.String())
		}
	}
	for i := range res.Requirements {
		for j := i + 1; j < len(res.Requirements); j++ {
			a, b := res.Requirements[i], res.Requirements[j]
			ab := intersectSets(p.stable, a.Intervals)
			if len(ab) == 0 || len(intersectSets(p.stable, b.Intervals)) == 0 {
				continue // an empty set is reported on its own
			}
			if len(intersectSets(ab, b.Intervals)) == 0 {
				res.Conflicts = append(res.Conflicts, [2]string{a.Requirement.String(), b.Requirement.String()})
			}
		}
	}
	where := p.stable
	if len(where) == 0 {
		where = []Interval{{Lo: p.rng.Min, Hi: p.rng.Max}}
	}
	x, _ := search(where)
	res.Compromise = x
	if !math.IsNaN(x) {
		for _, r := range p.evalAll(x, len(req)) {
			if !r.Pass {
				res.CompromiseFailures = append(res.CompromiseFailures, r.Requirement.String())
			}
		}
	}
	var conf []string
	for _, c := range res.Conflicts {
		conf = append(conf, c[0]+" against "+c[1])
	}
	var why []string
	if len(empty) > 0 {
		why = append(why, "no stable value meets "+strings.Join(empty, ", nor "))
	}
	if len(conf) > 0 {
		why = append(why, "these pairs exclude each other: "+strings.Join(conf, "; "))
	}
	if len(why) == 0 {
		why = append(why, "each pair overlaps, but not all of them at once")
	}
	switch {
	case len(p.stable) == 0:
		res.Binding = fmt.Sprintf("no value of %s in the range gives a stable closed loop", res.Variable)
	default:
		res.Binding = fmt.Sprintf("no value of %s in the range meets every requirement: %s; the best compromise %s = %s fails %s",
			res.Variable, strings.Join(why, "; "), res.Variable, fmtNum(x), strings.Join(res.CompromiseFailures, ", "))
	}
}

func orNone(s string) string {
	if s == "" {
		return "—"
	}
	return s
}

func fmtSlack(s float64) string {
	if math.IsInf(s, 1) {
		return "infinite"
	}
	return fmt.Sprintf("%.3g %%", 100*s)
}

func argmax(v []float64) int {
	j := 0
	for i, x := range v {
		if x > v[j] {
			j = i
		}
	}
	return j
}

// golden maximises f on [lo, hi] by golden-section search (Kiefer 1953)
// with iters steps, and returns the best of its result and the known point
// (x0, f0).
func golden(f func(float64) float64, lo, hi, x0, f0 float64, iters int) (float64, float64) {
	x, fx := rootfind.GoldenMax(f, lo, hi, iters, 0)
	if fx > f0 {
		return x, fx
	}
	return x0, f0
}
