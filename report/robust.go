package report

import (
	"context"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/robust"
	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// UncertainParameter is one entry of the loop file's "uncertain" key: a
// parameter of the expressions and its range; the analysis at one point
// (margins, step, ...) uses the middle of the range.
type UncertainParameter struct {
	// Name is the parameter's name in the expressions.
	Name string
	// Range is [low, high], finite, low ≤ high.
	Range [2]float64
	// Distribution is "uniform" (the default) or "normal" (centred,
	// standard deviation a sixth of the range, truncated to it), used by
	// the Monte Carlo estimate only.
	Distribution string
}

// defaultSamples is the number of Monte Carlo samples without "samples".
const defaultSamples = 1000

// robustSeed is the Monte Carlo seed (reported in the JSON).
const robustSeed = 1

// uncertainKey reads "uncertain": {"g": {"range": [0.8, 1.2], "distribution": "normal"}, ...}.
var uncertainKey = loopKey{name: "uncertain", decode: func(v keyValue, lf *Loop) error {
	params, err := v.fields(nil)
	if err != nil {
		return err
	}
	if len(params) == 0 {
		return badInput("key %q %s: no parameter; give at least one {\"name\": {\"range\": [low, high]}}", v.f.key, at(v.data, v.f.valOff))
	}
	for _, p := range params {
		name := strings.TrimPrefix(p.f.key, "uncertain.")
		if !validName(name) {
			return badInput("key %q %s: %q is not a usable name; use letters, digits and '_', starting with a letter, and not s, z or exp", p.f.key, at(p.data, p.f.keyOff), name)
		}
		u := UncertainParameter{Name: name, Distribution: "uniform"}
		fs, err := p.fields([]string{"range", "distribution"})
		if err != nil {
			return err
		}
		hasRange := false
		for _, f := range fs {
			switch strings.TrimPrefix(f.f.key, p.f.key+".") {
			case "range":
				if err := decodeRange(f.data, f.f, f.f.key, &u.Range); err != nil {
					return err
				}
				if math.IsInf(u.Range[0], 0) || math.IsInf(u.Range[1], 0) || u.Range[0] > u.Range[1] {
					return badInput("key %q %s: the range [%g, %g] must be finite with low ≤ high", f.f.key, at(f.data, f.f.valOff), u.Range[0], u.Range[1])
				}
				hasRange = true
			case "distribution":
				if err := f.text(&u.Distribution); err != nil {
					return err
				}
				if _, err := robust.ParseDistribution(u.Distribution); err != nil {
					return badInput("key %q %s: %q is not a distribution; use \"uniform\" or \"normal\"", f.f.key, at(f.data, f.f.valOff), u.Distribution)
				}
			}
		}
		if !hasRange {
			return badInput("key %q %s: \"range\": [low, high] is required", p.f.key, at(p.data, p.f.valOff))
		}
		lf.Uncertain = append(lf.Uncertain, u)
	}
	return nil
}}

// samplesKey reads "samples": N, the number of Monte Carlo samples.
var samplesKey = loopKey{name: "samples", decode: func(v keyValue, lf *Loop) error {
	var n float64
	if err := v.number(&n); err != nil {
		return err
	}
	if n != math.Trunc(n) || n < 1 || n > 1e7 {
		return badInput("key %q %s: want a whole number of samples from 1 to 10000000, got %g", v.f.key, at(v.data, v.f.valOff), n)
	}
	lf.Samples = int(n)
	return nil
}}

// uncertainMidpoints adds the middle of each uncertain range to the
// parameter values used to read the expressions (build.go's buildAt), so
// that every other section analyses the loop at the centre of the box.
func (lf *Loop) uncertainMidpoints(params map[string]float64) map[string]float64 {
	if len(lf.Uncertain) == 0 {
		return params
	}
	out := map[string]float64{}
	for k, v := range params {
		out[k] = v
	}
	for _, u := range lf.Uncertain {
		out[u.Name] = u.Range[0] + (u.Range[1]-u.Range[0])/2
	}
	return out
}

// RobustResult is the "robust" section: the loop over every value of its
// uncertain parameters.
type RobustResult struct {
	// Verdict is "stable for the whole box", "unstable at a point" or
	// "undecided".
	Verdict string `json:"verdict"`
	// Method names the theorem and test used.
	Method string `json:"method"`
	// Dependence is how the characteristic polynomial depends on the
	// parameters ("affine", "multilinear", ...).
	Dependence string `json:"dependence"`
	// Counterexample is the unstable point; null unless the verdict is
	// "unstable at a point".
	Counterexample *RobustCounterexample `json:"counterexample"`
	// UnprovenBoxes are the sub-boxes left unproven when undecided.
	UnprovenBoxes []RobustBox `json:"unproven_boxes"`
	// WorstCase lists the worst margins over the box.
	WorstCase []RobustWorstCase `json:"worst_case"`
	// Requirements are the robust verdicts of the loop file's requirements.
	Requirements []RobustRequirement `json:"requirements"`
	// MonteCarlo is the sampled estimate; null when it could not run.
	MonteCarlo *RobustMonteCarlo `json:"monte_carlo"`

	loop *robust.Loop
	mc   robust.SampleResult
	req  spec.Requirements
}

// RobustCounterexample is a parameter point with an unstable closed loop.
type RobustCounterexample struct {
	Parameters    map[string]Number `json:"parameters"`
	UnstableRoots []Complex         `json:"unstable_roots"`
}

// RobustBox is a sub-box of the parameter ranges.
type RobustBox struct {
	Min map[string]Number `json:"min"`
	Max map[string]Number `json:"max"`
}

// RobustWorstCase is the worst value of one quantity over the box.
type RobustWorstCase struct {
	// Quantity says it in words ("smallest phase margin").
	Quantity string `json:"quantity"`
	// Unit of Value and Bound ("deg", "dB", "s", "" for a ratio).
	Unit string `json:"unit"`
	// Value is the worst value found, at the parameters At.
	Value Number `json:"value"`
	// Bound holds for the whole box (≥ for a margin, ≤ for Ms); null
	// when none was proven (BoundNote says why).
	Bound     Number            `json:"bound"`
	BoundNote string            `json:"bound_note"`
	At        map[string]Number `json:"at"`
}

// RobustRequirement is the robust verdict on one requirement.
type RobustRequirement struct {
	Name string `json:"name"`
	// Verdict is "met for the whole box", "violated at a point" or
	// "undecided".
	Verdict string `json:"verdict"`
	// At is the violating point; null otherwise.
	At      map[string]Number `json:"at"`
	Message string            `json:"message"`
}

// RobustMonteCarlo is the sampled estimate over the distributions.
type RobustMonteCarlo struct {
	Samples int    `json:"samples"`
	Seed    uint64 `json:"seed"`
	// Partial reports a run that stopped early; the estimates are over
	// the samples done.
	Partial           bool                `json:"partial"`
	StableProbability RobustProbability   `json:"stable_probability"`
	PassProbability   []RobustProbability `json:"pass_probability"`
}

// RobustProbability is an estimate with its 95 % Wilson interval.
type RobustProbability struct {
	Name     string `json:"name"`
	Estimate Number `json:"estimate"`
	Low      Number `json:"low"`
	High     Number `json:"high"`
}

func (lf *Loop) robustDescription() (robust.Description, error) {
	d := robust.Description{SampleTimeSec: lf.SampleTimeSec}
	if dz := lf.Discretize; dz != nil {
		// Only the Tustin map keeps the coefficients polynomial in the
		// parameters; robust.NewLoop says why the others are refused.
		method, err := tf.ParseDiscretizeMethod(dz.Method)
		if err != nil {
			return d, err
		}
		d.Discretize = &robust.Discretization{SampleTimeSec: dz.SampleTimeSec, Method: method, PrewarpRadPerSec: dz.PrewarpRadPerSec}
	}
	d.Expressions = []string{strconv.FormatFloat(lf.Gain, 'g', -1, 64)}
	for _, e := range []string{lf.Controller, lf.Plant, lf.Sensor} {
		if strings.TrimSpace(e) != "" {
			d.Expressions = append(d.Expressions, e)
		}
	}
	if lf.DelaySec > 0 {
		if lf.SampleTimeSec > 0 {
			return d, fmt.Errorf("the loop in z has a \"delay_sec\"; write the delay as a power of z for the robust analysis")
		}
		d.Expressions = append(d.Expressions, fmt.Sprintf("exp(-%s*s)", strconv.FormatFloat(lf.DelaySec, 'g', -1, 64)))
	}
	for _, u := range lf.Uncertain {
		dist, _ := robust.ParseDistribution(u.Distribution)
		d.Params = append(d.Params, robust.Param{Name: u.Name, Min: u.Range[0], Max: u.Range[1], Distribution: dist})
	}
	if p := lf.Parameter; p != nil {
		d.Params = append(d.Params, robust.Param{Name: p.Name, Min: p.Value, Max: p.Value})
	}
	return d, nil
}

func namedValues(l *robust.Loop, v []float64) map[string]Number {
	out := map[string]Number{}
	for i, p := range l.Params() {
		if p.Min != p.Max { // the locus parameter, fixed, is left out
			out[p.Name] = Number(v[i])
		}
	}
	return out
}

// robustStage proves the loop over the uncertain parameters' box.
func (a *analysis) robustStage() {
	lf := a.m.file
	if len(lf.Uncertain) == 0 {
		return
	}
	d, err := lf.robustDescription()
	if err != nil {
		a.warn("robust: %s; the robust keys are null", err)
		return
	}
	l, err := robust.NewLoop(d)
	if err != nil {
		a.warn("robust: %s; the robust keys are null", short(err))
		return
	}
	a.fraction("robust: proving stability and worst cases over the box", 0)
	worst, st, err := robust.WorstCases(l, nil)
	if err != nil {
		a.warn("robust: %s; the robust keys are null", short(err))
		return
	}
	r := &RobustResult{Verdict: st.Verdict.String(), Method: st.Method, Dependence: l.Class().String(),
		UnprovenBoxes: []RobustBox{}, WorstCase: []RobustWorstCase{}, Requirements: []RobustRequirement{}, loop: l}
	if ce := st.Counterexample; ce != nil {
		r.Counterexample = &RobustCounterexample{Parameters: namedValues(l, ce.Values), UnstableRoots: complexList(ce.UnstableRoots)}
	}
	for _, b := range st.UnprovenBoxes {
		r.UnprovenBoxes = append(r.UnprovenBoxes, RobustBox{Min: namedValues(l, b.Min), Max: namedValues(l, b.Max)})
	}
	for _, w := range worst {
		r.WorstCase = append(r.WorstCase, RobustWorstCase{Quantity: w.Quantity.String(), Unit: w.Quantity.Unit(),
			Value: Number(w.Value), Bound: Number(w.Bound), BoundNote: w.BoundNote, At: namedValues(l, w.At)})
	}
	for _, q := range lf.Requirements {
		if s, err := spec.ByKey(q.Key, q.Limit); err == nil {
			r.req = append(r.req, s)
		}
	}
	set := &spec.Settings{PadeOrder: padeOrder}
	if len(r.req) > 0 {
		a.fraction("robust: requirements over the box", 0.3)
		res, err := robust.CheckRequirements(l, r.req, set, nil)
		if err != nil {
			a.warn("robust: requirements over the box: %s", short(err))
		}
		for _, q := range res {
			rr := RobustRequirement{Name: q.Requirement.String(), Verdict: q.Verdict.String(), Message: q.Message}
			if q.At != nil {
				rr.At = namedValues(l, q.At)
			}
			r.Requirements = append(r.Requirements, rr)
		}
		if !a.m.unitySensor {
			a.warn("robust: the sensor is not 1; the step-response requirements over the box are judged on L/(1 + L)")
		}
	}
	n := lf.Samples
	if n == 0 {
		n = defaultSamples
	}
	mc, err := robust.MonteCarlo(context.Background(), l, r.req, &robust.SampleSettings{Samples: n, Seed: robustSeed, Spec: set,
		Progress: func(done, total int) {
			a.fraction(fmt.Sprintf("robust: Monte Carlo, %d of %d samples", done, total), 0.3+0.7*float64(done)/float64(total))
		}})
	if err != nil && !mc.Partial {
		a.warn("robust: Monte Carlo: %s; the monte_carlo key is null", short(err))
	} else {
		r.mc = mc
		m := &RobustMonteCarlo{Samples: mc.Done, Seed: mc.Seed, Partial: mc.Partial, PassProbability: []RobustProbability{},
			StableProbability: RobustProbability{Name: "closed loop stable", Estimate: Number(mc.Stable.Estimate), Low: Number(mc.Stable.Low), High: Number(mc.Stable.High)}}
		for _, p := range mc.Requirements {
			m.PassProbability = append(m.PassProbability, RobustProbability{Name: p.Name, Estimate: Number(p.Estimate), Low: Number(p.Low), High: Number(p.High)})
		}
		r.MonteCarlo = m
	}
	a.rep.Robust = r
}

func atText(m map[string]Number) string {
	var parts []string
	for _, k := range sortedKeys(m) {
		parts = append(parts, k+" = "+g(m[k]))
	}
	return strings.Join(parts, ", ")
}

func sortedKeys(m map[string]Number) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	for i := 1; i < len(keys); i++ {
		for j := i; j > 0 && keys[j] < keys[j-1]; j-- {
			keys[j], keys[j-1] = keys[j-1], keys[j]
		}
	}
	return keys
}

func robustTables(r *Report) []table {
	rb := r.Robust
	if rb == nil {
		return nil
	}
	rows := []row{{"verdict", rb.Verdict}, {"method", rb.Method}, {"dependence on the parameters", rb.Dependence}}
	if ce := rb.Counterexample; ce != nil {
		var roots []string
		for _, z := range ce.UnstableRoots {
			roots = append(roots, fmt.Sprintf("%s%+gj", g(z.Re), float64(z.Im)))
		}
		rows = append(rows, row{"unstable at", atText(ce.Parameters) + " (closed-loop roots " + strings.Join(roots, ", ") + ")"})
	}
	for i, b := range rb.UnprovenBoxes {
		rows = append(rows, row{fmt.Sprintf("unproven box %d", i+1), atText(b.Min) + " to " + atText(b.Max)})
	}
	for _, w := range rb.WorstCase {
		v := strings.TrimSpace(g(w.Value) + " " + w.Unit)
		rel := "≥"
		if strings.HasPrefix(w.Quantity, "largest") {
			rel = "≤"
		}
		bound := w.BoundNote
		if !math.IsNaN(float64(w.Bound)) {
			bound = "guaranteed " + rel + " " + strings.TrimSpace(g(w.Bound)+" "+w.Unit) + " over the box"
		}
		rows = append(rows, row{w.Quantity, v + " at " + atText(w.At) + "; " + bound})
	}
	out := []table{{title: "Robustness over the uncertain parameters", rows: rows}}
	if len(rb.Requirements) > 0 {
		var req []row
		for _, q := range rb.Requirements {
			v := q.Verdict
			if q.At != nil {
				v += " (" + atText(q.At) + ")"
			}
			req = append(req, row{q.Name, v})
		}
		out = append(out, table{title: "Requirements over the whole box", rows: req})
	}
	if m := rb.MonteCarlo; m != nil {
		title := fmt.Sprintf("Monte Carlo over %d samples (seed %d)", m.Samples, m.Seed)
		if m.Partial {
			title += ", partial"
		}
		mr := []row{{m.StableProbability.Name, probText(m.StableProbability)}}
		for _, p := range m.PassProbability {
			mr = append(mr, row{p.Name, probText(p)})
		}
		out = append(out, table{title: title, rows: mr})
	}
	return out
}

func probText(p RobustProbability) string {
	return fmt.Sprintf("%s (95 %% interval %s to %s)", g(p.Estimate), g(p.Low), g(p.High))
}

// robustPlots draws the Nyquist band of the box and the margin histograms
// with plots' add (plots.go).
func (a *analysis) robustPlots(add func(title, file, caption string, draw func() (*chart.Figure, error))) {
	rb := a.rep.Robust
	if rb == nil || rb.loop == nil {
		return
	}
	add("Nyquist curves over the uncertain parameters", "robust-nyquist",
		"Nyquist curves of L at the centre, the corners and random points of the parameter box (positive frequencies), the guaranteed envelope that contains every curve of the box over the frequency range shown, the unit circle and the critical point −1.",
		func() (*chart.Figure, error) {
			b, err := robust.NyquistBandOf(rb.loop, nil)
			if err != nil {
				return nil, err
			}
			return chart.RobustNyquist(b, nil)
		})
	if rb.MonteCarlo == nil {
		return
	}
	add("Margins over the Monte Carlo samples", "robust-histograms",
		"Histograms of the phase margin, gain margin, delay margin and peak sensitivity over the Monte Carlo samples, with the loop file's limits as dashed lines.",
		func() (*chart.Figure, error) { return chart.MarginHistograms(rb.mc, rb.req, 24, nil) })
}

// robustSection analyses the loop over its uncertain parameters (package
// robust). It runs last: it is the slowest and uses no other section.
var robustSection = section{stage: "robust", keys: []loopKey{uncertainKey, samplesKey}, run: (*analysis).robustStage, tables: robustTables}
