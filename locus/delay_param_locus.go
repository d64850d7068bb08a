package locus

// The exact root locus of a loop with dead time in an affine parameter
// (issue 14, item 4 for a parameter): the branches are roots of
// P(s; p) = A0 + A1·e^(−sτ) + p·(B0 + B1·e^(−sτ)) itself, traced by the
// same tracer as DelayedTrace.

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"github.com/loopwise/loopwise/internal/quasipoly"
	"github.com/loopwise/loopwise/poly"
)

// Analyze returns the construction quantities of the exact locus of
// P(s; p) over set.Range (finite, see StableIntervals; the gain form
// A1 = B0 = 0 goes to DelayedAnalyze):
//
//   - Poles are the roots of P(·; 0) = A0 + A1·e^(−sτ) (where the branches
//     are at p = 0), Zeros the roots of B0 + B1·e^(−sτ) (where they go as
//     |p| → ∞): all of them when the function is a polynomial (A1 = 0;
//     B0 = 0 or B1 = 0), those in the view when it is a retarded
//     quasi-polynomial, else none (with a note when the computation
//     failed);
//   - the departure angle at a simple complex root s₀ of P(·; 0) is
//     arg(−b(s₀)/P′(s₀; 0)) (the direction of ds/dp), the arrival angle at
//     a simple complex root z of b is arg(−a(z)/b′(z)) (the direction of
//     s − z on the branch near z), in degrees, upper half plane;
//   - a real point σ is on the locus where p(σ) = −a(σ)/b(σ) lies in the
//     range; the segments inside the view are cut at the real roots of
//     P(·; Min), P(·; Max) and b, and at the view's real ends;
//   - break points are the real σ in the view with dp/dσ = 0, the real
//     roots of a′b − ab′ = c0 + c1·e^(−στ) + c2·e^(−2στ) (exponential
//     polynomials, isolated with certified brackets), value in the range;
//   - axis crossings and stable intervals are those of StableIntervals.
//
// The view (Locus.View) frames the rightmost roots at both ends of the
// range, the crossings and the break points, as DelayedTrace does.
// HasAsymptotes is false.
func (dp DelayedParametric) Analyze(set *Settings) (Analysis, error) {
	an, _, err := dp.analyze(set)
	return an, err
}

func (dp DelayedParametric) analyze(set *Settings) (Analysis, Rect, error) {
	r, err := resolve(set)
	if err != nil {
		return Analysis{}, Rect{}, err
	}
	if r.variable == "gain" {
		r.variable = dp.Name
	}
	if l, ok := dp.gainForm(); ok && (math.IsInf(r.rng.Min, 0) || math.IsInf(r.rng.Max, 0)) {
		s := Settings{}
		if set != nil {
			s = *set
		}
		s.Variable = r.variable
		an, err := DelayedAnalyze(l, &s)
		return an, delayView(an), err
	}
	st, err := dp.StableIntervals(set)
	if err != nil {
		return Analysis{}, Rect{}, err
	}
	an := Analysis{Variable: r.variable, Range: r.rng, StableIntervals: st.StableIntervals, AxisCrossings: []Crossing{}, Notes: append([]string(nil), st.Notes...)}
	var pts []complex128
	for _, c := range st.Crossings {
		an.AxisCrossings = append(an.AxisCrossings, Crossing{FrequencyRadPerSec: c.FrequencyRadPerSec, Point: complex(0, c.FrequencyRadPerSec), Value: c.Value})
		pts = append(pts, complex(0, c.FrequencyRadPerSec))
	}
	nD := max(dp.A0.Degree(), dp.B0.Degree(), 2)
	for _, v := range []float64{r.rng.Min, r.rng.Max} {
		res, err := dp.quasi(v).Rightmost(nD, nil)
		if err != nil {
			return Analysis{}, Rect{}, fmt.Errorf("%w: rightmost roots at %s = %v: %v", ErrTraceFailed, dp.Name, v, err)
		}
		pts = append(pts, res.Roots...)
	}
	view := delayViewOf(pts)
	// Break points in the view's real range.
	breaks, err := dp.breakPoints(view, r.rng)
	if err != nil {
		an.Notes = append(an.Notes, fmt.Sprintf("break points not computed: %v", err))
	}
	an.BreakPoints = breaks
	if len(breaks) > 0 {
		for _, b := range breaks {
			pts = append(pts, b.Point)
		}
		view = delayViewOf(pts)
	}
	an.Branches = nD
	// Where the branches are at p = 0 and where they go.
	if q := dp.quasi(0); q.Check() == nil && len(trimmed(q.D)) > 1 {
		var roots []complex128
		var err error
		if dp.A1.IsZero() {
			roots, err = dp.A0.Roots() // P(·; 0) is a polynomial
		} else {
			roots, err = rootsInView(q, view)
		}
		if err != nil {
			an.Notes = append(an.Notes, fmt.Sprintf("roots at %s = 0 not computed: %v", dp.Name, err))
		}
		for _, s := range roots {
			an.Poles = append(an.Poles, poly.Root{Value: s, Multiplicity: 1})
			if imag(s) > 0 {
				_, b := dp.parts(s)
				_, ds := q.Eval(s)
				an.Departures = append(an.Departures, AngleAt{Point: s, AngleDeg: wrapDeg(180 / math.Pi * cmplx.Phase(-b/ds)), Multiplicity: 1})
			}
		}
	}
	qb := quasipoly.Q{D: dp.B0.Coeffs(), N: dp.B1.Coeffs(), K: 1, Tau: dp.DelaySec}
	switch {
	case dp.B0.IsZero() || dp.B1.IsZero():
		// b = B1·e^(−sτ) or B0: its zeros are those of a polynomial.
		bp := dp.B1
		if bp.IsZero() {
			bp = dp.B0
		}
		if bp.Degree() > 0 {
			rs, err := bp.Roots()
			if err == nil {
				for _, z := range rs {
					an.Zeros = append(an.Zeros, poly.Root{Value: z, Multiplicity: 1})
				}
			}
		}
	case dp.B0.Degree() > 0 && qb.Check() == nil:
		roots, err := rootsInView(qb, view)
		if err != nil {
			an.Notes = append(an.Notes, fmt.Sprintf("roots of B0 + B1·e^(−sτ) not computed: %v", err))
		}
		for _, z := range roots {
			an.Zeros = append(an.Zeros, poly.Root{Value: z, Multiplicity: 1})
		}
	}
	for _, z := range an.Zeros {
		s := z.Value
		if imag(s) <= 0 {
			continue
		}
		a, _ := dp.parts(s)
		e := cmplx.Exp(-s * complex(dp.DelaySec, 0))
		db := dp.B0.Derivative().EvalComplex(s) + (dp.B1.Derivative().EvalComplex(s)-complex(dp.DelaySec, 0)*dp.B1.EvalComplex(s))*e
		if db != 0 {
			an.Arrivals = append(an.Arrivals, AngleAt{Point: s, AngleDeg: wrapDeg(180 / math.Pi * cmplx.Phase(-a/db)), Multiplicity: 1})
		}
	}
	an.RealAxisSegments = dp.realSegments(view, r.rng)
	return an, view, nil
}

func trimmed(c []float64) []float64 {
	for len(c) > 0 && c[0] == 0 {
		c = c[1:]
	}
	return c
}

// rootsInView returns the roots of q in the view, upper half plane first
// within a conjugate pair.
func rootsInView(q quasipoly.Q, view Rect) ([]complex128, error) {
	res, err := q.Above(view.ReMin, nil)
	var out []complex128
	for _, s := range res.Roots {
		if real(s) <= view.ReMax && imag(s) >= view.ImMin && imag(s) <= view.ImMax {
			out = append(out, s)
		}
	}
	return out, err
}

// realExp returns X(σ) + Y(σ)·e^(−στ) (+ Z(σ)·e^(−2στ)) as an ExpPoly.
func realExp(tau float64, parts ...poly.Poly) quasipoly.ExpPoly {
	var e quasipoly.ExpPoly
	for i, p := range parts {
		c := make([]complex128, 0, p.Degree()+1)
		for _, v := range p.Coeffs() {
			c = append(c, complex(v, 0))
		}
		if len(c) > 0 {
			e.Terms = append(e.Terms, quasipoly.ExpTerm{C: c, Mu: complex(-float64(i)*tau, 0)})
		}
	}
	return e
}

// breakPoints returns the real break points in the view with value in rng.
func (dp DelayedParametric) breakPoints(view Rect, rng Range) ([]BreakPoint, error) {
	tau := dp.DelaySec
	a0d, a1d, b0d, b1d := dp.A0.Derivative(), dp.A1.Derivative(), dp.B0.Derivative(), dp.B1.Derivative()
	c0 := a0d.Mul(dp.B0).Sub(dp.A0.Mul(b0d))
	c1 := a0d.Mul(dp.B1).Add(a1d.Sub(dp.A1.Scale(tau)).Mul(dp.B0)).Sub(dp.A0.Mul(b1d.Sub(dp.B1.Scale(tau)))).Sub(dp.A1.Mul(b0d))
	c2 := a1d.Mul(dp.B1).Sub(dp.A1.Mul(b1d))
	h := realExp(tau, c0, c1, c2)
	if len(h.Terms) == 0 {
		return nil, nil
	}
	xs, err := h.Roots(view.ReMin, view.ReMax, 1e-13*(view.ReMax-view.ReMin))
	if err != nil {
		return nil, err
	}
	var out []BreakPoint
	for _, x := range xs {
		a, b := dp.parts(complex(x, 0))
		if b == 0 {
			continue
		}
		p := -real(a) / real(b)
		if rng.Contains(p) {
			out = append(out, BreakPoint{Point: complex(x, 0), Value: p, Branches: 2})
		}
	}
	return out, nil
}

// realSegments returns the parts of the real axis inside the view on which
// p(σ) = −a(σ)/b(σ) lies in rng.
func (dp DelayedParametric) realSegments(view Rect, rng Range) []Interval {
	cuts := []float64{view.ReMin, view.ReMax}
	w := 1e-13 * (view.ReMax - view.ReMin)
	for _, f := range []quasipoly.ExpPoly{
		realExp(dp.DelaySec, dp.dAt(rng.Min), dp.nAt(rng.Min)),
		realExp(dp.DelaySec, dp.dAt(rng.Max), dp.nAt(rng.Max)),
		realExp(dp.DelaySec, dp.B0, dp.B1),
	} {
		if len(f.Terms) == 0 {
			continue
		}
		xs, err := f.Roots(view.ReMin, view.ReMax, w)
		if err != nil && !errors.Is(err, quasipoly.ErrTangent) {
			continue
		}
		cuts = append(cuts, xs...)
	}
	sort.Float64s(cuts)
	var out []Interval
	for i := 0; i+1 < len(cuts); i++ {
		lo, hi := cuts[i], cuts[i+1]
		if !(hi > lo) {
			continue
		}
		a, b := dp.parts(complex(0.5*(lo+hi), 0))
		if b == 0 {
			continue
		}
		if p := -real(a) / real(b); rng.Contains(p) {
			if n := len(out); n > 0 && out[n-1].Hi == lo {
				out[n-1].Hi = hi
			} else {
				out = append(out, Interval{lo, hi})
			}
		}
	}
	return out
}

// Trace returns the exact root locus of P(s; p) over set.Range inside a
// view that frames the dominant region (see Analyze): the roots in the
// view at 160 evenly spaced values, the crossing values and the break
// values, refined where a root moves more than 2 % of the view between
// neighbours (the tracer of DelayedTrace), joined by straight lines. Every
// root in the view is found at each value (argument principle). The gain
// form with an unbounded range goes to DelayedTrace.
//
// Errors: as StableIntervals; ErrTraceFailed when the roots at some value
// cannot be counted.
func (dp DelayedParametric) Trace(set *Settings) (Locus, error) {
	r, err := resolve(set)
	if err != nil {
		return Locus{}, err
	}
	if math.IsInf(r.rng.Min, 0) || math.IsInf(r.rng.Max, 0) {
		l, ok := dp.gainForm()
		if !ok {
			return Locus{}, fmt.Errorf("%w: the range [%g, %g] of %s is unbounded; give a finite Settings.Range", ErrUnsupported, r.rng.Min, r.rng.Max, dp.Name)
		}
		s := *set
		if s.Variable == "" {
			s.Variable = dp.Name
		}
		return DelayedTrace(l, &s)
	}
	an, view, err := dp.analyze(set)
	if err != nil {
		return Locus{}, err
	}
	lo, hi := r.rng.Min, r.rng.Max
	tr := newDelayTracer(view, dp.quasi, func(a, b float64) float64 { return 0.5 * (a + b) })
	return tr.trace(an, lo, hi, func(u float64) float64 { return lo + (hi-lo)*u }, r, dp.DelaySec)
}
