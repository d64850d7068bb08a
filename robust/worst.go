package robust

import (
	"fmt"
	"math"

	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/spec"
)

// Quantity is a closed-loop quantity whose worst case over the box is sought.
type Quantity int

const (
	// PhaseMargin is the smallest phase margin, degrees.
	PhaseMargin Quantity = iota
	// GainMargin is the smallest (upper) gain margin, dB.
	GainMargin
	// DelayMargin is the smallest delay margin, seconds.
	DelayMargin
	// DampingRatio is the smallest damping ratio of the closed-loop poles
	// (with dead time in continuous time: of the dominant exact roots,
	// spec.DominantClosedLoopRoots).
	DampingRatio
	// PeakSensitivity is the largest Ms = max|1/(1 + L)|.
	PeakSensitivity
)

var quantityInfo = [...]struct{ name, key, unit string }{
	{"smallest phase margin", "phase_margin_deg", "deg"},
	{"smallest gain margin", "gain_margin_db", "dB"},
	{"smallest delay margin", "delay_margin_sec", "s"},
	{"smallest damping ratio", "damping_ratio", ""},
	{"largest peak sensitivity", "peak_sensitivity", ""},
}

// String names the quantity in words.
func (q Quantity) String() string {
	if q < 0 || int(q) >= len(quantityInfo) {
		return fmt.Sprintf("Quantity(%d)", int(q))
	}
	return quantityInfo[q].name
}

// Unit returns the quantity's unit ("deg", "dB", "s", or "" for a ratio).
func (q Quantity) Unit() string { return quantityInfo[q].unit }

// Key returns the quantity's key with its unit ("phase_margin_deg").
func (q Quantity) Key() string { return quantityInfo[q].key }

// WorstCase is the worst value of one quantity over the box.
type WorstCase struct {
	Quantity Quantity
	// Value is the worst value found, at the parameter values At (in the
	// order of Loop.Params): a value the loop really has.
	Value float64
	At    []float64
	// Bound is guaranteed for the whole box: the quantity is nowhere
	// worse than Bound (≥ Bound for a minimum, ≤ Bound for Ms). The true
	// worst lies between Bound and Value. NaN when no bound was proven
	// (the box is not proven stable, or the quantity has no bound method
	// for this loop; BoundNote says why).
	Bound     float64
	BoundNote string
}

// WorstSettings controls WorstCases and CheckRequirements. A nil
// *WorstSettings means the defaults.
type WorstSettings struct {
	// Stability is used for the stability proof; its Seed also seeds the
	// search points.
	Stability Settings
	// Points is the number of random points searched besides the centre
	// and the corners (each is then improved by a compass search). If zero,
	// defaults to 128.
	Points int
	// Bisections is the number of halvings of the interval between the
	// largest proven bound and the worst value found. If zero, defaults to 8.
	Bisections int
	// CellsPerProof limits each bound proof. If zero, defaults to 20000.
	CellsPerProof int
}

func (w *WorstSettings) withDefaults() (WorstSettings, error) {
	var out WorstSettings
	if w != nil {
		out = *w
	}
	if out.Points < 0 || out.Bisections < 0 || out.CellsPerProof < 0 {
		return out, fmt.Errorf("%w: Points, Bisections and CellsPerProof must be ≥ 0", ErrSettings)
	}
	if out.Points == 0 {
		out.Points = 128
	}
	if out.Bisections == 0 {
		out.Bisections = 8
	}
	if out.CellsPerProof == 0 {
		out.CellsPerProof = 20000
	}
	return out, nil
}

// pointValues returns the five quantities at scaled point t, with the
// worst-is-smaller sign convention applied to Ms by the caller.
func (l *Loop) pointValues(t []float64) ([5]float64, error) {
	var q [5]float64
	g, err := l.At(l.valuesOf(t))
	if err != nil {
		return q, err
	}
	m, err := margins.Compute(g, nil)
	if err != nil {
		return q, err
	}
	q[PhaseMargin], q[GainMargin], q[DelayMargin], q[PeakSensitivity] = m.PhaseMarginDeg, m.GainMarginDB, m.DelayMarginSec, m.PeakSensitivity
	var roots []complex128
	if g.DelaySec() > 0 && l.ts == 0 && g.IsStrictlyProper() {
		// The dominant exact roots, as spec judges the damping ratio with
		// dead time (a delayed loop has infinitely many roots, whose
		// damping tends to 0 far out).
		d, err := spec.DominantClosedLoopRoots(g, nil)
		if err != nil {
			return q, err
		}
		roots = d.Roots
	} else {
		ch := g
		if g.DelaySec() > 0 {
			// Discrete: whole sample periods, exact poles at z = 0;
			// continuous biproper: neutral type, Padé.
			if ch, err = g.Pade(8); err != nil {
				return q, err
			}
		}
		if roots, err = ch.CharacteristicPolynomial().Roots(); err != nil {
			return q, err
		}
	}
	q[DampingRatio] = math.Inf(1)
	for _, z := range roots {
		q[DampingRatio] = math.Min(q[DampingRatio], spec.DampingRatio(z, l.ts))
	}
	return q, nil
}

// worse reports whether a is worse than b for quantity k (NaN never is).
func worse(k Quantity, a, b float64) bool {
	if math.IsNaN(a) {
		return false
	}
	if math.IsNaN(b) {
		return true
	}
	if k == PeakSensitivity {
		return a > b
	}
	return a < b
}

// WorstCases returns, for each Quantity, the worst value found over the box
// and a guaranteed bound.
//
// The worst values come from the centre, the corners and Points random
// points, each quantity's worst point then improved by a compass search
// (step halving; a local search, so the found value may miss a narrow
// worse region — the bound covers it).
//
// The bounds are proofs by the zero-exclusion engine of Stability on a
// family widened by the margin in question (Bhattacharyya, Chapellat & Keel
// 1995, ch. 1 on zero exclusion; the margin families are common practice):
//
//	gain margin ≥ x dB  ⇔ D + κN stable for κ ∈ [1, 10^(x/20)]
//	phase margin ≥ x°   ⇔ D + e^(−jφ)N stable for |φ| ≤ x
//	delay margin ≥ x s  ⇔ D + e^(−sτ)N stable for τ ∈ [0, x]
//	Ms ≤ x              ⇔ 1 + L ≠ 0 and |1 + L| ≥ 1/x: D(1 + re^(jθ)) + N ≠ 0 for r ≤ 1/x
//	damping ≥ ζ         ⇔ no closed-loop pole on the rays s = ω·e^(±j(π/2 + asin ζ))
//
// each over the whole box, by bisection between the largest proven value and
// the worst value found. Bounds need the box proven stable; the delay margin
// needs a strictly proper loop, the damping ratio a continuous loop without
// dead time.
func WorstCases(l *Loop, set *WorstSettings) ([]WorstCase, StabilityResult, error) {
	s, err := set.withDefaults()
	if err != nil {
		return nil, StabilityResult{}, err
	}
	st, err := Stability(l, &s.Stability)
	if err != nil {
		return nil, st, err
	}
	best, at, err := l.searchWorst(s)
	if err != nil {
		return nil, st, err
	}
	out := make([]WorstCase, 5)
	for k := range out {
		q := Quantity(k)
		out[k] = WorstCase{Quantity: q, Value: best[k], At: l.valuesOf(at[k]), Bound: math.NaN()}
		if st.Verdict != StableForBox {
			out[k].BoundNote = "no bound: the box is not proven stable (" + st.Verdict.String() + ")"
			continue
		}
		out[k].Bound, out[k].BoundNote = l.bound(q, best[k], s)
	}
	return out, st, nil
}

func (l *Loop) searchWorst(s WorstSettings) ([5]float64, [5][]float64, error) {
	var best [5]float64
	var at [5][]float64
	for k := range best {
		best[k] = math.NaN()
	}
	consider := func(t []float64) error {
		v, err := l.pointValues(t)
		if err != nil {
			return err
		}
		for k := range best {
			if at[k] == nil || worse(Quantity(k), v[k], best[k]) {
				best[k], at[k] = v[k], append([]float64(nil), t...)
			}
		}
		return nil
	}
	pts := l.probePoints(s.Points, s.Stability.Seed+1)
	for _, t := range pts {
		if err := consider(t); err != nil {
			return best, at, err
		}
	}
	// Compass search from each quantity's worst point.
	n := len(l.mid)
	for k := range best {
		if at[k] == nil {
			continue
		}
		step := 0.25
		for step > 1e-3 {
			improved := false
			for i := range n {
				for _, d := range []float64{-step, step} {
					t := append([]float64(nil), at[k]...)
					t[i] = math.Max(-1, math.Min(1, t[i]+d))
					v, err := l.pointValues(t)
					if err != nil {
						continue
					}
					if worse(Quantity(k), v[k], best[k]) {
						best[k], at[k], improved = v[k], t, true
					}
				}
			}
			if !improved {
				step /= 2
			}
		}
	}
	return best, at, nil
}

// prove reports whether the quantity is no worse than x over the box.
func (l *Loop) prove(q Quantity, x float64, cells int) bool {
	f := l.family()
	switch q {
	case PhaseMargin:
		r := x * math.Pi / 180
		f.rot = interval{-r, r}
	case GainMargin:
		f.gain = interval{1, math.Pow(10, x/20)}
	case DelayMargin:
		if l.ts > 0 || degree(f.num) >= degree(f.den) {
			return false
		}
		f.delay = interval{0, x}
	case PeakSensitivity:
		if x <= 1 {
			return false
		}
		f.disk = interval{0, 1 / x}
		f.theta = interval{-math.Pi, math.Pi}
	case DampingRatio:
		if l.ts > 0 || !l.tau.isZero() || x <= -1 || x >= 1 {
			return false
		}
		f.ray = math.Pi/2 + math.Asin(x)
	}
	low, ok, _ := f.leadBound(2000)
	if !ok {
		return false
	}
	st, _, _ := f.zeroExclusion(f.frequencyBound(low), cells, nil, nil)
	return st == proven
}

func (l *Loop) bound(q Quantity, worst float64, s WorstSettings) (float64, string) {
	switch {
	case q == DelayMargin && (l.ts > 0 || degree(l.num) >= degree(l.den)):
		return math.NaN(), "no bound: the delay margin bound needs a strictly proper continuous loop"
	case q == DampingRatio && (l.ts > 0 || !l.tau.isZero()):
		return math.NaN(), "no bound: the damping bound needs a continuous loop without dead time"
	case math.IsNaN(worst):
		return math.NaN(), "no bound: the quantity does not exist at the worst point"
	}
	cells := s.CellsPerProof
	if q == PeakSensitivity {
		// smallest M ≥ worst with Ms ≤ M proven: bisect r = 1/M in (0, 1/worst]
		if math.IsInf(worst, 1) {
			return math.NaN(), "no bound: Ms is infinite at the worst point"
		}
		if l.prove(q, worst*(1+1e-6), cells) {
			return worst * (1 + 1e-6), "proven at the worst value found"
		}
		lo, hi := 0.0, 1/worst // r proven at lo (r → 0: stability), not at hi
		proved := false
		for range s.Bisections {
			m := (lo + hi) / 2
			if l.prove(q, 1/m, cells) {
				lo, proved = m, true
			} else {
				hi = m
			}
		}
		if !proved {
			return math.NaN(), "no bound proven within the cell limit"
		}
		return 1 / lo, fmt.Sprintf("proven by zero exclusion; gap to the worst found after %d bisections", s.Bisections)
	}
	hi := worst
	note := ""
	if math.IsInf(hi, 1) {
		hi = map[Quantity]float64{PhaseMargin: 180, GainMargin: 60, DelayMargin: 1e3, DampingRatio: 1}[q]
		note = fmt.Sprintf(" (capped at %g)", hi)
	}
	if hi <= 0 {
		return math.NaN(), "no bound: the worst value found is not positive"
	}
	if q == DampingRatio && hi >= 1 {
		hi = 1 - 1e-9
	}
	if l.prove(q, hi*(1-1e-6), cells) {
		return hi * (1 - 1e-6), "proven at the worst value found" + note
	}
	lo := 0.0
	proved := false
	for range s.Bisections {
		m := (lo + hi) / 2
		if l.prove(q, m, cells) {
			lo, proved = m, true
		} else {
			hi = m
		}
	}
	if !proved {
		return math.NaN(), "no bound proven within the cell limit"
	}
	return lo, fmt.Sprintf("proven by zero exclusion; gap to the worst found after %d bisections%s", s.Bisections, note)
}

// RequirementVerdict is the robust verdict on one requirement.
type RequirementVerdict int

const (
	// MetForBox: proven for every parameter value in the box.
	MetForBox RequirementVerdict = iota
	// ViolatedAtPoint: spec.Check fails at a point of the box.
	ViolatedAtPoint
	// RequirementUndecided: neither proven nor violated at a searched point.
	RequirementUndecided
)

// String returns the verdict in words.
func (v RequirementVerdict) String() string {
	switch v {
	case MetForBox:
		return "met for the whole box"
	case ViolatedAtPoint:
		return "violated at a point"
	case RequirementUndecided:
		return "undecided"
	}
	return fmt.Sprintf("RequirementVerdict(%d)", int(v))
}

// RequirementResult is the robust verdict on one spec requirement.
type RequirementResult struct {
	Requirement spec.Requirement
	Verdict     RequirementVerdict
	// At is the violating point (ViolatedAtPoint), in the order of
	// Loop.Params; Value the value measured there. For a steady-state
	// error met for the whole box, Value is the proven bound on |e|;
	// otherwise NaN.
	At    []float64
	Value float64
	// Message says how the verdict was reached.
	Message string
}

// boundQuantity maps a requirement key to the quantity with a proof method
// and converts the limit.
var boundQuantity = map[string]Quantity{
	"min_phase_margin_deg": PhaseMargin,
	"min_gain_margin_db":   GainMargin,
	"min_delay_margin_sec": DelayMargin,
	"max_peak_sensitivity": PeakSensitivity,
	"min_damping_ratio":    DampingRatio,
}

// CheckRequirements gives the robust version of each requirement: violated at
// a point (spec.CheckWith fails at one of the searched points of WorstCases:
// centre, corners, random and compass-search points), met for the whole box
// (the box is proven stable and the requirement's limit proven by the
// zero-exclusion families of WorstCases — margins, Ms and damping ratio), or
// undecided. The steady-state error to a unit step is rational in the
// parameters and is bounded over the box by interval arithmetic
// (steadyStateBound: met for the whole box when |e| ≤ limit is proven, Value
// then being the proven bound). Step-response metrics (overshoot, rise and
// settling time) get no guarantee: they are not rational functions of the
// parameters and no enclosure of the time response is computed here, so
// they are either violated at a point or undecided with the searched points
// met. Requirements measured on the loop's parts (spec's
// Requirement.NeedsLoopParts: load disturbance, control signal, noise) are
// undecided with that reason: the uncertain loop is one transfer function.
func CheckRequirements(l *Loop, req spec.Requirements, specSet *spec.Settings, set *WorstSettings) ([]RequirementResult, error) {
	s, err := set.withDefaults()
	if err != nil {
		return nil, err
	}
	st, err := Stability(l, &s.Stability)
	if err != nil {
		return nil, err
	}
	out := make([]RequirementResult, len(req))
	// The load-disturbance, control-signal and noise requirements are
	// measured on the loop's parts, which an uncertain loop given by its
	// expressions does not separate (and a Settings.Loop would hold the
	// parts of one loop, not of each point): they stay undecided.
	var judged spec.Requirements
	var index []int
	for k, r := range req {
		out[k] = RequirementResult{Requirement: r, Verdict: RequirementUndecided, Value: math.NaN()}
		if r.NeedsLoopParts() {
			out[k].Message = "undecided: not judged over the box: this requirement is measured on the plant and the controller apart, and the uncertain loop is one transfer function of the parameters"
			continue
		}
		judged = append(judged, r)
		index = append(index, k)
	}
	pts := l.probePoints(s.Points, s.Stability.Seed+1)
	if _, at, err := l.searchWorst(s); err == nil {
		pts = append(pts, at[:]...)
	}
	if st.Counterexample != nil {
		pts = append([][]float64{l.scaledOf(st.Counterexample.Values)}, pts...)
	}
	pending := len(judged)
	for _, t := range pts {
		if pending == 0 || t == nil {
			break
		}
		g, err := l.At(l.valuesOf(t))
		if err != nil {
			return nil, err
		}
		rep := spec.CheckWith(g, judged, specSet)
		for j, res := range rep.Results {
			k := index[j]
			if !res.Pass && out[k].Verdict != ViolatedAtPoint {
				out[k].Verdict, out[k].At, out[k].Value = ViolatedAtPoint, l.valuesOf(t), res.Value
				out[k].Message = "violated at a point: " + res.Message
				pending--
			}
		}
	}
	for k, r := range req {
		if out[k].Verdict == ViolatedAtPoint || r.NeedsLoopParts() {
			continue
		}
		q, ok := boundQuantity[r.Key()]
		switch {
		case st.Verdict != StableForBox:
			out[k].Message = "undecided: the box is not proven stable (" + st.Verdict.String() + ")"
		case r.Key() == "max_steady_state_error":
			if proved, b := l.steadyStateBound(r.Limit(), s.CellsPerProof); proved {
				out[k].Verdict, out[k].Value = MetForBox, b
				out[k].Message = fmt.Sprintf("met for the whole box: |e| ≤ %.6g proven by interval arithmetic on D(0)/(D(0) + N(0)) over the box", b)
			} else {
				out[k].Message = fmt.Sprintf("undecided: met at %d searched points, bound not proven within %d sub-boxes", len(pts), s.CellsPerProof)
			}
		case !ok:
			out[k].Message = fmt.Sprintf("undecided: met at %d searched points; no guarantee is given for step-response metrics (overshoot, rise, settling): they are not rational in the parameters and have no enclosure method here", len(pts))
		case l.prove(q, r.Limit(), s.CellsPerProof):
			out[k].Verdict = MetForBox
			out[k].Message = "met for the whole box: proven by zero exclusion over the box"
		default:
			out[k].Message = fmt.Sprintf("undecided: met at %d searched points, not proven within %d cells", len(pts), s.CellsPerProof)
		}
	}
	return out, nil
}

// scaledOf maps parameter values to scaled t.
func (l *Loop) scaledOf(v []float64) []float64 {
	t := make([]float64, len(v))
	for i := range v {
		if l.rad[i] > 0 {
			t[i] = (v[i] - l.mid[i]) / l.rad[i]
		}
	}
	return t
}

// steadyStateBound tries to prove |e| ≤ limit over the whole box for the
// steady-state error to a unit step, e = 1/(1 + L(0)) = D(0)/(D(0) + N(0))
// (continuous; dead time does not change L(0)) or D(1)/(D(1) + N(1))
// (discrete), a rational function of the parameters. With the box proven
// stable, a denominator D(0) (D(1)) that is the zero polynomial means an
// integrator in every loop of the box: e = 0 exactly. Otherwise D(0) and
// N(0) are enclosed by outward-rounded interval arithmetic on sub-boxes,
// bisected (widest parameter first) until every sub-box gives
// |e| ≤ limit with D + N excluding zero, or maxCells sub-boxes are used.
// It returns whether the limit is proven and the largest proven |e| bound.
func (l *Loop) steadyStateBound(limit float64, maxCells int) (bool, float64) {
	at := func(ps []mpoly) mpoly {
		if l.ts == 0 {
			if len(ps) == 0 {
				return mpoly{}
			}
			return ps[0]
		}
		w := make([]float64, len(ps))
		for k := range w {
			w[k] = 1
		}
		return combine(ps, w, len(l.mid))
	}
	d, n := at(l.den), at(l.num)
	if d.isZero() {
		return true, 0
	}
	box := make([]interval, len(l.mid))
	for i := range box {
		box[i] = interval{-1, 1}
	}
	queue := [][]interval{box}
	worst := 0.0
	for cells := 0; len(queue) > 0; cells++ {
		if cells >= maxCells {
			return false, math.NaN()
		}
		c := queue[len(queue)-1]
		queue = queue[:len(queue)-1]
		di, ni := d.evalInterval(c), n.evalInterval(c)
		si := di.add(ni)
		if !si.contains0() {
			q := []float64{di.lo / si.lo, di.lo / si.hi, di.hi / si.lo, di.hi / si.hi}
			m := 0.0
			for _, x := range q {
				m = math.Max(m, math.Abs(x))
			}
			m = up(up(m)) // the quotients are rounded to nearest: widen
			if m <= limit {
				worst = math.Max(worst, m)
				continue
			}
		}
		k := 0
		for i := range c {
			if c[i].width() > c[k].width() {
				k = i
			}
		}
		if c[k].width() < 1e-9 {
			return false, math.NaN()
		}
		a, b := append([]interval(nil), c...), append([]interval(nil), c...)
		a[k].hi, b[k].lo = c[k].mid(), c[k].mid()
		queue = append(queue, a, b)
	}
	return true, worst
}
