package locus

// Exact stable intervals of a parameter entering a loop with dead time
// affinely where the dead time does not factor out (issue 14, items 2 and
// 4 for a parameter). This file is new; delay_param_locus.go holds the
// locus.

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"github.com/loopwise/loopwise/internal/quasipoly"
	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// DelayedParametric is the characteristic quasi-polynomial of a
// continuous loop with dead time τ in a parameter p that enters it
// affinely:
//
//	P(s; p) = A0(s) + A1(s)·e^(−sτ) + p·(B0(s) + B1(s)·e^(−sτ)),
//
// the closed loop D_p(s) + N_p(s)·e^(−sτ) = 0 of the loop N_p/D_p·e^(−sτ)
// with D_p = A0 + p·B0 and N_p = A1 + p·B1. A PI controller's integral
// gain, a lead zero or a sensor lag in series with a delayed plant give
// all four parts; a plain gain gives A1 = B0 = 0.
type DelayedParametric struct {
	// Name is the parameter.
	Name string
	// A0, A1, B0, B1 are the polynomials of P.
	A0, A1, B0, B1 poly.Poly
	// DelaySec is the dead time τ > 0.
	DelaySec float64
	// Notes records normalisations of the fit.
	Notes []string
}

// NewDelayedParametric checks and returns the quasi-polynomial
// A0 + A1·e^(−sτ) + p·(B0 + B1·e^(−sτ)). It returns ErrNotFinite for NaN or
// infinite values, ErrUnsupported for τ ≤ 0 (use Parametric) and
// ErrZeroNumerator when B0 and B1 are both zero.
func NewDelayedParametric(name string, a0, a1, b0, b1 poly.Poly, delaySec float64) (DelayedParametric, error) {
	if name == "" {
		name = "p"
	}
	for i, q := range []poly.Poly{a0, a1, b0, b1} {
		if !q.IsFinite() {
			return DelayedParametric{}, fmt.Errorf("%w: polynomial %s of the quasi-polynomial", ErrNotFinite, [...]string{"A0", "A1", "B0", "B1"}[i])
		}
	}
	if math.IsNaN(delaySec) || math.IsInf(delaySec, 0) {
		return DelayedParametric{}, fmt.Errorf("%w: dead time %v", ErrNotFinite, delaySec)
	}
	if !(delaySec > 0) {
		return DelayedParametric{}, fmt.Errorf("%w: dead time %v s: DelayedParametric needs a positive dead time (use FromParameter without one)", ErrUnsupported, delaySec)
	}
	if b0.IsZero() && b1.IsZero() {
		return DelayedParametric{}, fmt.Errorf("%w: the quasi-polynomial does not depend on %s", ErrZeroNumerator, name)
	}
	return DelayedParametric{Name: name, A0: a0, A1: a1, B0: b0, B1: b1, DelaySec: delaySec}, nil
}

// FromDelayedParameter is FromParameter for a continuous loop with dead
// time, keeping e^(−sτ) exact: loopAt(p) returns the loop N_p/D_p·e^(−sτ)
// (negative unity feedback), the same τ > 0 for every p. D_p and N_p are
// fitted as A0 + p·B0 and A1 + p·B1 from p = 0 and 1 (or 1 and 2 when the
// loop is not defined at 0) and verified at two more values (relative
// agreement 1e-9 of the coefficients), first as returned, then with D_p
// made monic. It returns ErrNotAffine when no fit holds or the dead time
// changes with p, ErrUnsupported for a discrete loop or one without dead
// time, ErrZeroNumerator when p does not enter the loop.
func FromDelayedParameter(name string, loopAt func(p float64) (tf.TF, error)) (DelayedParametric, error) {
	if loopAt == nil {
		return DelayedParametric{}, fmt.Errorf("%w: no loop function given for parameter %q", ErrInvalidSettings, name)
	}
	if name == "" {
		name = "p"
	}
	probes, loops, err := probeLoops(name, loopAt)
	if err != nil {
		return DelayedParametric{}, err
	}
	return fitDelayedAffine(name, probes, loops)
}

func fitDelayedAffine(name string, probes [4]float64, loops [4]tf.TF) (DelayedParametric, error) {
	tau := loops[0].DelaySec()
	for _, l := range loops {
		if l.IsDiscrete() {
			return DelayedParametric{}, fmt.Errorf("%w: FromDelayedParameter is for continuous loops", ErrUnsupported)
		}
		if l.DelaySec() != tau {
			return DelayedParametric{}, fmt.Errorf("%w: the dead time of the loop changes with %s", ErrNotAffine, name)
		}
	}
	if !(tau > 0) {
		return DelayedParametric{}, fmt.Errorf("%w: the loop has no dead time; use FromParameter", ErrUnsupported)
	}
	worst := 0.0
	for _, monic := range []bool{false, true} {
		var d, n [4]poly.Poly
		for i, l := range loops {
			d[i], n[i] = l.Den(), l.Num()
			if monic {
				d[i], n[i] = d[i].Scale(1/d[i].Lead()), n[i].Scale(1/d[i].Lead())
			}
		}
		fit := func(c [4]poly.Poly) (a, b poly.Poly, misfit float64) {
			p0, p1 := probes[0], probes[1]
			b = c[1].Sub(c[0]).Scale(1 / (p1 - p0))
			a = c[0].Sub(b.Scale(p0))
			for i := 2; i < 4; i++ {
				pred := a.Add(b.Scale(probes[i]))
				sc := math.Max(c[i].NormInf(), math.Max(a.NormInf(), math.Abs(probes[i])*b.NormInf()))
				if sc == 0 {
					continue
				}
				misfit = math.Max(misfit, pred.Sub(c[i]).NormInf()/sc)
			}
			return cleanPoly(a), cleanPoly(b), misfit
		}
		a0, b0, m0 := fit(d)
		a1, b1, m1 := fit(n)
		// The fit is relative to each part; the two share the scale of D.
		if m := math.Max(m0, m1); !(m <= 1e-9) {
			if !monic {
				worst = m
			}
			continue
		}
		dp, err := NewDelayedParametric(name, a0, a1, b0, b1, tau)
		if err != nil {
			return DelayedParametric{}, err
		}
		if monic {
			dp.Notes = append(dp.Notes, "numerator and denominator of the loop were scaled to a monic denominator at each value of "+name)
		}
		return dp, nil
	}
	return DelayedParametric{}, fmt.Errorf("%w: parameter %q: the loop N/D·e^(−sτ) does not have D and N affine in %s (relative misfit %.3g)", ErrNotAffine, name, name, worst)
}

// dAt and nAt return D_p = A0 + p·B0 and N_p = A1 + p·B1.
func (dp DelayedParametric) dAt(p float64) poly.Poly { return dp.A0.Add(dp.B0.Scale(p)) }
func (dp DelayedParametric) nAt(p float64) poly.Poly { return dp.A1.Add(dp.B1.Scale(p)) }

// quasi returns P(·; p) as the quasi-polynomial D_p + 1·N_p·e^(−sτ).
func (dp DelayedParametric) quasi(p float64) quasipoly.Q {
	return quasipoly.Q{D: dp.dAt(p).Coeffs(), N: dp.nAt(p).Coeffs(), K: 1, Tau: dp.DelaySec}
}

// At returns the loop N_p/D_p·e^(−sτ) whose closed loop under unity
// negative feedback has the characteristic function P(s; p).
func (dp DelayedParametric) At(p float64) (tf.TF, error) {
	if math.IsNaN(p) || math.IsInf(p, 0) {
		return tf.TF{}, fmt.Errorf("%w: %s = %v", ErrNotFinite, dp.Name, p)
	}
	d := dp.dAt(p)
	if d.IsZero() {
		return tf.TF{}, fmt.Errorf("%w: A0 + %s·B0 vanishes at %s = %v", ErrDegenerate, dp.Name, dp.Name, p)
	}
	l, err := tf.FromPolys(dp.nAt(p), d, 0)
	if err != nil {
		return tf.TF{}, err
	}
	return l.WithDelay(dp.DelaySec)
}

// Roots returns the exact closed-loop roots at p, as DelayedRoots does for
// the loop At(p) at gain 1.
func (dp DelayedParametric) Roots(p float64, set *DelaySettings) (DelayRoots, error) {
	l, err := dp.At(p)
	if err != nil {
		return DelayRoots{}, err
	}
	return DelayedRoots(l, 1, set)
}

// gainForm reports whether P is D + p·N·e^(−sτ) (A1 = B0 = 0): the
// parameter is a loop gain, and the gain functions apply to B1/A0.
func (dp DelayedParametric) gainForm() (tf.TF, bool) {
	if !dp.A1.IsZero() || !dp.B0.IsZero() {
		return tf.TF{}, false
	}
	l, err := tf.FromPolys(dp.B1, dp.A0, 0)
	if err != nil {
		return tf.TF{}, false
	}
	l, err = l.WithDelay(dp.DelaySec)
	return l, err == nil
}

// DelayParamPiece is an open interval of the parameter between
// consecutive crossing values, with the number of closed-loop roots in
// Re s > 0, the same at every value inside.
type DelayParamPiece struct {
	// Lo and Hi are the ends.
	Lo, Hi float64
	// SampleValue is the interior value at which the roots were counted.
	SampleValue float64
	// UnstableRoots is the number of roots with Re s > 0 there (argument
	// principle, see DelayedRoots).
	UnstableRoots int
}

// DelayParamStability is the exact stable set of a parameter of a loop
// with dead time (DelayedParametric.StableIntervals).
type DelayParamStability struct {
	// Crossings in the range, sorted by value; Value is the parameter.
	Crossings []DelayCrossing
	// Pieces cover the range between crossings, ascending (nil for the
	// unbounded ranges of the gain form, which DelayedStableGains
	// handles).
	Pieces []DelayParamPiece
	// StableIntervals are the open intervals of the range with every
	// closed-loop root in Re s < 0.
	StableIntervals []Interval
	// Range is the range searched.
	Range Range
	// MaxCrossingFrequencyRadPerSec is Ω: no root lies on the imaginary
	// axis above jΩ for any value in the range (see StableIntervals).
	MaxCrossingFrequencyRadPerSec float64
	// DelaySec echoes τ.
	DelaySec float64
	// Notes record special situations.
	Notes []string
}

// StableIntervals returns the exact stable values of the parameter in
// set.Range (which must be finite, except for the gain form A1 = B0 = 0,
// handed to DelayedStableGains).
//
// Method: D-decomposition along the imaginary axis (Neimark 1948; for
// delay equations Stépán 1989, ch. 2, from memory). A root crosses the
// axis at s = jω only where p(ω) = −a(jω)/b(jω) is real, a = A0 + A1·E,
// b = B0 + B1·E, E = e^(−jωτ), that is where the exponential polynomial
//
//	g(ω) = Im(a·conj b) = Im(A0·B0* + A1·B1*) + Im(A0·B1*·e^(jωτ)) + Im(A1·B0*·e^(−jωτ))
//
// vanishes (conj on the axis). The frequencies are bounded: a crossing at
// ω with value p needs |D_p(jω)| = |N_p(jω)|, and |D_p|² − |N_p|² =
// Σ c_k(p)·ω^k with c_k quadratic in p; with m = min over the range of the
// leading c_2n(p) = (lead of D_p)² and M_k = max over the range of
// |c_k(p)|, no crossing lies beyond the positive root Ω of m·ω^2n −
// Σ M_k·ω^k (a retarded P: deg A1, deg B1 < n = max(deg A0, deg B0)).
// Every root of g in (0, Ω] is isolated in a certified bracket
// (quasipoly.ExpPoly.Roots: exclusion and monotonicity tests from
// derivative bounds) and polished by Brent's method; the value p(ω) =
// −Re(a/b) follows. The crossing at s = 0 has p = −P_A(0)/P_B(0). The
// direction of a crossing is the sign of Re ds/dp = Re(−b/∂P/∂s). The
// number of roots in Re s > 0 is counted by the argument principle at the
// midpoint of each piece between crossings.
//
// Special cases are:
//   - the leading coefficient of A0 + p·B0 vanishes in the closed range:
//     ErrUnsupported (the degree drops there and crossings can accumulate;
//     give a range that excludes that value).
//   - deg A1 or deg B1 ≥ n: neutral type for some p; ErrUnsupported.
//   - an unbounded range: the gain form goes to DelayedStableGains,
//     otherwise ErrUnsupported.
//   - P(0; p) = 0 for every p: a root at s = 0 for every value; no stable
//     interval (a note says so).
//   - a double root of g (a tangential crossing): ErrTraceFailed. The
//     root of g at ω = 0 may be of any odd order up to 11 (a parameter
//     multiplying s², such as a mass): no root lies in (0, δ] by the
//     Taylor bound of quasipoly.ExpPoly.RootsAfterZero.
//
// References:
//   - Yu. I. Neimark, "On the determination of the values of the
//     parameters for which an automatic control system is stable",
//     Avtomatika i Telemekhanika 9(3), 190–203, 1948 (D-decomposition).
//   - G. Stépán, Retarded Dynamical Systems: Stability and Characteristic
//     Functions, Longman 1989.
func (dp DelayedParametric) StableIntervals(set *Settings) (DelayParamStability, error) {
	r, err := resolve(set)
	if err != nil {
		return DelayParamStability{}, err
	}
	rng := r.rng
	out := DelayParamStability{Range: rng, DelaySec: dp.DelaySec}
	if math.IsInf(rng.Min, 0) || math.IsInf(rng.Max, 0) {
		l, ok := dp.gainForm()
		if !ok {
			return out, fmt.Errorf("%w: the range [%g, %g] of %s is unbounded; with the dead time not a factor of the %s-part, give a finite Settings.Range", ErrUnsupported, rng.Min, rng.Max, dp.Name, dp.Name)
		}
		st, err := DelayedStableGains(l, set)
		if err != nil {
			return out, err
		}
		out.Crossings, out.StableIntervals = st.Crossings, st.StableIntervals
		out.MaxCrossingFrequencyRadPerSec = math.Inf(1) // not bounded: see DelayedStableGains.ProvedBeyond
		out.Notes = append(out.Notes, "unbounded range: the parameter is a loop gain, handled by DelayedStableGains")
		return out, nil
	}
	omega, err := dp.frequencyBound(rng)
	if err != nil {
		return out, err
	}
	out.MaxCrossingFrequencyRadPerSec = omega
	// s = 0.
	pa0, pb0 := dp.A0.Eval(0)+dp.A1.Eval(0), dp.B0.Eval(0)+dp.B1.Eval(0)
	if pa0 == 0 && pb0 == 0 {
		out.Notes = append(out.Notes, fmt.Sprintf("P(0; %s) = 0 for every %s: a closed-loop root at s = 0 for every value, so no value is stable", dp.Name, dp.Name))
		out.Pieces = []DelayParamPiece{}
		return out, nil
	}
	var all []DelayCrossing
	if pb0 != 0 {
		p := -pa0 / pb0
		if p == 0 {
			p = 0 // not −0
		}
		all = append(all, DelayCrossing{Value: p, FrequencyRadPerSec: 0, Direction: dp.direction(0, p)})
	}
	ws, err := dp.crossingFrequencies(omega)
	if err != nil {
		return out, err
	}
	for _, w := range ws {
		s := complex(0, w)
		a, b := dp.parts(s)
		if cmplx.Abs(b) <= 1e-14*cmplx.Abs(a) {
			continue // p = ∞
		}
		p := -real(a / b)
		all = append(all, DelayCrossing{Value: p, FrequencyRadPerSec: w, Direction: dp.direction(w, p)})
	}
	sort.SliceStable(all, func(i, j int) bool { return all[i].Value < all[j].Value })
	for _, c := range all {
		if c.Value > rng.Min && c.Value < rng.Max {
			out.Crossings = append(out.Crossings, c)
		}
	}
	cuts := []float64{rng.Min}
	for _, c := range out.Crossings {
		if c.Value != cuts[len(cuts)-1] {
			cuts = append(cuts, c.Value)
		}
	}
	cuts = append(cuts, rng.Max)
	for i := 0; i+1 < len(cuts); i++ {
		lo, hi := cuts[i], cuts[i+1]
		v := lo + (hi-lo)/2
		n, err := dp.unstableAt(v)
		if err != nil {
			return out, err
		}
		out.Pieces = append(out.Pieces, DelayParamPiece{Lo: lo, Hi: hi, SampleValue: v, UnstableRoots: n})
		if n == 0 {
			out.StableIntervals = append(out.StableIntervals, Interval{Lo: lo, Hi: hi})
		}
	}
	// The counts of neighbouring pieces must differ by the crossings
	// between them (two roots for ω > 0, one at s = 0).
	for i := 0; i+1 < len(out.Pieces); i++ {
		c := out.Pieces[i].Hi
		jump := 0
		for _, x := range out.Crossings {
			if x.Value == c {
				m := 2
				if x.FrequencyRadPerSec == 0 {
					m = 1
				}
				jump += m * x.Direction
			}
		}
		if out.Pieces[i].UnstableRoots+jump != out.Pieces[i+1].UnstableRoots {
			out.Notes = append(out.Notes, fmt.Sprintf("at %s = %.12g the root counts %d and %d on either side differ from what the crossing directions give (%+d): a tangential crossing or roots within rounding of the axis", dp.Name, c, out.Pieces[i].UnstableRoots, out.Pieces[i+1].UnstableRoots, jump))
		}
	}
	return out, nil
}

// parts returns a(s) = A0 + A1·e^(−sτ) and b(s) = B0 + B1·e^(−sτ).
func (dp DelayedParametric) parts(s complex128) (a, b complex128) {
	e := cmplx.Exp(-s * complex(dp.DelaySec, 0))
	return dp.A0.EvalComplex(s) + dp.A1.EvalComplex(s)*e, dp.B0.EvalComplex(s) + dp.B1.EvalComplex(s)*e
}

// direction returns the sign of Re ds/dp at the root s = jω of P(·; p).
func (dp DelayedParametric) direction(w, p float64) int {
	s := complex(0, w)
	_, b := dp.parts(s)
	_, ds := dp.quasi(p).Eval(s)
	if ds == 0 {
		return 0
	}
	return sgn(real(-b / ds))
}

// unstableAt counts the roots of P(·; p) with Re s > 0.
func (dp DelayedParametric) unstableAt(p float64) (int, error) {
	q := dp.quasi(p)
	if err := q.Check(); err != nil {
		return 0, fmt.Errorf("%w: %s = %v: %v", ErrUnsupported, dp.Name, p, err)
	}
	c, _, err := q.Count(0)
	if err != nil {
		return 0, fmt.Errorf("%w: counting the roots at %s = %v: %v", ErrTraceFailed, dp.Name, p, err)
	}
	return c, nil
}

// frequencyBound returns Ω (see StableIntervals) for the finite range.
func (dp DelayedParametric) frequencyBound(rng Range) (float64, error) {
	n := max(dp.A0.Degree(), dp.B0.Degree())
	if n < 1 {
		return 0, fmt.Errorf("%w: A0 + %s·B0 is constant: no finite roots without dead time to anchor the quasi-polynomial", ErrUnsupported, dp.Name)
	}
	if dp.A1.Degree() >= n || dp.B1.Degree() >= n {
		return 0, fmt.Errorf("%w: the delayed part A1 + %s·B1 has degree ≥ %d = deg(A0 + %s·B0): the closed loop is of neutral type for some %s (infinitely many roots near a vertical line), which is not handled", ErrUnsupported, dp.Name, n, dp.Name, dp.Name)
	}
	la, lb := dp.A0.Coef(n), dp.B0.Coef(n)
	if lb != 0 {
		if ps := -la / lb; ps >= rng.Min && ps <= rng.Max {
			if ps == 0 {
				ps = 0 // not −0
			}
			return 0, fmt.Errorf("%w: the leading coefficient of A0 + %s·B0 vanishes at %s = %.12g inside the range [%g, %g]: the degree drops there and crossings can accumulate; give a range that excludes it", ErrUnsupported, dp.Name, dp.Name, ps, rng.Min, rng.Max)
		}
	}
	ar, ai := partsOnAxis(dp.A0)
	br, bi := partsOnAxis(dp.B0)
	cr, ci := partsOnAxis(dp.A1)
	er, ei := partsOnAxis(dp.B1)
	F0 := ar.Mul(ar).Add(ai.Mul(ai)).Sub(cr.Mul(cr)).Sub(ci.Mul(ci))
	F1 := ar.Mul(br).Add(ai.Mul(bi)).Sub(cr.Mul(er)).Sub(ci.Mul(ei))
	F2 := br.Mul(br).Add(bi.Mul(bi)).Sub(er.Mul(er)).Sub(ei.Mul(ei))
	c := func(k int, p float64) float64 { return F0.Coef(k) + 2*p*F1.Coef(k) + p*p*F2.Coef(k) }
	maxAbs := func(k int) float64 {
		m := math.Max(math.Abs(c(k, rng.Min)), math.Abs(c(k, rng.Max)))
		if f2 := F2.Coef(k); f2 != 0 {
			if v := -F1.Coef(k) / f2; v > rng.Min && v < rng.Max {
				m = math.Max(m, math.Abs(c(k, v)))
			}
		}
		return m
	}
	lead := math.Min(c(2*n, rng.Min), c(2*n, rng.Max)) // (la + p·lb)², no zero inside
	M := make([]float64, 2*n)
	for k := range M {
		M[k] = maxAbs(k)
	}
	h := func(w float64) float64 {
		v := 0.0
		for k := 2*n - 1; k >= 0; k-- {
			v = v*w + M[k]
		}
		return lead*math.Pow(w, float64(2*n)) - v
	}
	return 1.01 * quasipoly.PositiveRoot(h), nil
}

// onAxis returns X(jω) as a polynomial in ω with complex coefficients,
// highest power first, conjugated when conj is true.
func onAxis(x poly.Poly, conj bool) []complex128 {
	n := x.Degree()
	if n < 0 {
		return nil
	}
	out := make([]complex128, n+1)
	jk := complex(1, 0)
	for k := 0; k <= n; k++ {
		v := complex(x.Coef(k), 0) * jk
		if conj {
			v = cmplx.Conj(v)
		}
		out[n-k] = v
		jk *= 1i
	}
	return out
}

// cmul multiplies two complex polynomials, highest power first.
func cmul(a, b []complex128) []complex128 {
	if len(a) == 0 || len(b) == 0 {
		return nil
	}
	out := make([]complex128, len(a)+len(b)-1)
	for i, x := range a {
		for j, y := range b {
			out[i+j] += x * y
		}
	}
	return out
}

func cadd(a, b []complex128) []complex128 {
	if len(a) < len(b) {
		a, b = b, a
	}
	out := append([]complex128(nil), a...)
	off := len(a) - len(b)
	for i, y := range b {
		out[off+i] += y
	}
	return out
}

// crossingFrequencies returns the roots ω in (0, Ω] of g (see
// StableIntervals).
func (dp DelayedParametric) crossingFrequencies(omega float64) ([]float64, error) {
	a0, a1 := onAxis(dp.A0, false), onAxis(dp.A1, false)
	b0c, b1c := onAxis(dp.B0, true), onAxis(dp.B1, true)
	tau := complex(dp.DelaySec, 0)
	g := quasipoly.ExpPoly{Imag: true, Terms: []quasipoly.ExpTerm{
		{C: cadd(cmul(a0, b0c), cmul(a1, b1c))},
		{C: cmul(a0, b1c), Mu: 1i * tau},
		{C: cmul(a1, b0c), Mu: -1i * tau},
	}}
	ws, err := g.RootsAfterZero(omega, 1e-13*omega)
	if err != nil {
		if errors.Is(err, quasipoly.ErrTangent) {
			return nil, fmt.Errorf("%w: crossing frequencies of %s: %v (a tangential crossing)", ErrTraceFailed, dp.Name, err)
		}
		return nil, fmt.Errorf("%w: crossing frequencies of %s: %v", ErrTraceFailed, dp.Name, err)
	}
	out := ws[:0]
	for _, w := range ws {
		if w > 0 {
			out = append(out, w)
		}
	}
	return out, nil
}
