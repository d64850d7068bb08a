package locus

import (
	"cmp"
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// ClosedLoopPoles returns the roots of a + value·b for the loop b/a (dead
// time replaced by the default Padé approximation of order 6), repeated by
// multiplicity, in the order of poly.SortRoots. It returns ErrNotFinite for
// a NaN or infinite value and ErrDegenerate when a + value·b ≡ 0.
func ClosedLoopPoles(loop tf.TF, value float64) ([]complex128, error) {
	p, err := queryProblem(loop, nil, value)
	if err != nil {
		return nil, err
	}
	return p.closedLoop(value)
}

func queryProblem(loop tf.TF, set *Settings, value float64) (*problem, error) {
	if math.IsNaN(value) || math.IsInf(value, 0) {
		return nil, fmt.Errorf("%w: value %v", ErrNotFinite, value)
	}
	r, err := resolve(set)
	if err != nil {
		return nil, err
	}
	return newProblem(loop, r)
}

func (p *problem) closedLoop(k float64) ([]complex128, error) {
	c := p.charPoly(k)
	if c.IsZero() {
		return nil, fmt.Errorf("%w: a + %v·b vanishes for %s = %v", ErrDegenerate, k, p.variable, k)
	}
	rs, err := c.RootsWithMultiplicity()
	if err != nil {
		return nil, fmt.Errorf("locus: closed-loop poles at %s = %v: %w", p.variable, k, err)
	}
	var out []complex128
	for _, r := range rs {
		for range r.Multiplicity {
			out = append(out, r.Value)
		}
	}
	return out, nil
}

// ValueAt returns the value k that puts a closed-loop pole at s (the
// magnitude condition k = −a(s)/b(s)) and all closed-loop poles for that k.
// The point must satisfy the angle condition: the phase of −a(s)/b(s) must
// be that of a real number within set.PointTolerance radians, and k must lie
// in set.Range; otherwise it returns an error matching ErrNotOnLocus that
// gives the phase error. An open-loop zero (k = ∞) is not on the locus.
func ValueAt(loop tf.TF, s complex128, set *Settings) (value float64, poles []complex128, err error) {
	if cmplx.IsNaN(s) || cmplx.IsInf(s) {
		return 0, nil, fmt.Errorf("%w: point %v", ErrNotFinite, s)
	}
	r, err := resolve(set)
	if err != nil {
		return 0, nil, err
	}
	p, err := newProblem(loop, r)
	if err != nil {
		return 0, nil, err
	}
	av, bv := p.a.EvalComplex(s), p.b.EvalComplex(s)
	scale := p.magnitude(s, 0)
	if cabs(bv) <= 1e3*0x1p-53*absEval(p.b, cabs(s)) {
		return 0, nil, fmt.Errorf("%w: %v is an open-loop zero (the %s would be infinite)", ErrNotOnLocus, fmtC(s), p.variable)
	}
	k := -av / bv
	var kv float64
	if cabs(av) <= 1e3*0x1p-53*scale {
		kv = 0
	} else {
		ph := cmplx.Phase(k) // 0 for k > 0, ±π for k < 0
		dev := math.Min(math.Abs(ph), math.Pi-math.Abs(ph))
		if dev > r.pointTol {
			return 0, nil, fmt.Errorf("%w: at %v the angle condition is off by %.3g rad (tolerance %.3g)", ErrNotOnLocus, fmtC(s), dev, r.pointTol)
		}
		kv = cabs(k)
		if math.Abs(ph) > math.Pi/2 {
			kv = -kv
		}
	}
	if !p.rng.Contains(kv) {
		return 0, nil, fmt.Errorf("%w: %v needs %s = %v, outside the range [%v, %v]", ErrNotOnLocus, fmtC(s), p.variable, kv, p.rng.Min, p.rng.Max)
	}
	poles, err = p.closedLoop(kv)
	return kv, poles, err
}

// DampingPoint is a point where the locus meets the line of constant
// damping ratio ζ, s = ωn·(−ζ + j√(1−ζ²)).
type DampingPoint struct {
	// Value is the locus variable there.
	Value float64
	// Point is the closed-loop pole on the line (Im ≥ 0).
	Point complex128
	// NaturalFrequencyRadPerSec is ωn = |Point|.
	NaturalFrequencyRadPerSec float64
	// Poles are all closed-loop poles for Value.
	Poles []complex128
	// PadeRelativeError is, for a loop with dead time T, the relative error
	// |R(s)·e^(sT) − 1| of the Padé approximant R of e^(−sT) at Point: how
	// far the approximated characteristic equation is from the true one
	// there (0 without dead time). Points where it exceeds
	// MaxPadeRelativeError are left out.
	PadeRelativeError float64
	// Approximate reports that the point comes from a Padé approximation
	// of the loop's dead time (a closed-loop pole of the approximated
	// loop, valid to about PadeRelativeError), not from the exact loop.
	Approximate bool
}

// MaxPadeRelativeError is the largest relative error |R(s)·e^(sT) − 1| of
// the Padé approximant R of a dead time at a point s for which
// DampingCrossings reports the point: 0.01, about 0.6° of phase and 1 % of
// magnitude of the delay factor. Beyond it the approximant's poles and
// zeros, not the dead time, shape the locus (common practice: a Padé
// approximant of order n is accurate for |sT| up to about n).
const MaxPadeRelativeError = 0.01

// DampingCrossings returns the values in set.Range at which the locus meets
// the line of damping ratio zeta (0 ≤ ζ < 1) in the upper half plane,
// ascending in ωn. Substituting s = r·d, d = −ζ + j√(1−ζ²), the condition
// that −a/b be real is a real polynomial in r,
// Σ_{i,j} a_i·b_j·sin((i−j)·∠d)·r^(i+j) = 0, whose positive real roots are
// polished by Newton's method on a(r·d) + k·b(r·d) = 0 in (r, k). The origin
// is not reported. It returns ErrUnsupported in discrete time (the constant-ζ
// curve in z is a spiral, not a line) and ErrInvalidSettings for ζ outside
// [0, 1).
//
// With dead time T the locus is that of the loop with e^(−sT) replaced by
// its Padé approximant of order Settings.PadeOrder; a point is reported
// only where the approximant is within MaxPadeRelativeError of e^(−sT)
// (relative), and is marked Approximate with its PadeRelativeError, which
// also bounds (to first order) its relative distance to the exact point.
// For a 20 ms delay, for example, order 2 keeps the ζ = 0.5 point at
// ωn = 8.43 rad/s and drops the one near 300 rad/s that the approximant's
// own poles and zeros create; order 6 keeps both, the far one within 4e-4
// of the exact point.
func DampingCrossings(loop tf.TF, zeta float64, set *Settings) ([]DampingPoint, error) {
	if !(zeta >= 0 && zeta < 1) {
		return nil, fmt.Errorf("%w: damping ratio %v is outside [0, 1)", ErrInvalidSettings, zeta)
	}
	r, err := resolve(set)
	if err != nil {
		return nil, err
	}
	p, err := newProblem(loop, r)
	if err != nil {
		return nil, err
	}
	if p.discrete {
		return nil, fmt.Errorf("%w: damping-ratio lines are defined for continuous-time loops only", ErrUnsupported)
	}
	d := complex(-zeta, math.Sqrt(1-zeta*zeta))
	phi := cmplx.Phase(d)
	c := make([]float64, p.n+p.m+1)
	for i := 0; i <= p.n; i++ {
		for j := 0; j <= p.m; j++ {
			c[i+j] += p.a.Coef(i) * p.b.Coef(j) * math.Sin(float64(i-j)*phi)
		}
	}
	im, _ := poly.FromAscending(c)
	var out []DampingPoint
	if im.Degree() < 1 {
		return nil, nil
	}
	rs, err := im.RootsWithMultiplicity()
	if err != nil {
		return nil, err
	}
	for _, root := range rs {
		v := root.Value
		if !(real(v) > 0 && math.Abs(imag(v)) <= 1e-6*real(v)) {
			continue
		}
		rr, k, ok := p.polishOnRay(real(v), d)
		if !ok || rr <= 0 || k == 0 || !(p.rng.Min < k && k < p.rng.Max) {
			continue
		}
		poles, err := p.closedLoop(k)
		if err != nil {
			return nil, err
		}
		pt := DampingPoint{Value: k, Point: complex(rr, 0) * d, NaturalFrequencyRadPerSec: rr, Poles: poles}
		if T := loop.DelaySec(); T != 0 && !loop.IsDiscrete() {
			pe, err := padeRelativeError(T, r.padeOrder, pt.Point)
			if err != nil {
				return nil, err
			}
			if !(pe <= MaxPadeRelativeError) {
				continue // outside the validity of the approximation
			}
			pt.PadeRelativeError, pt.Approximate = pe, true
		}
		out = append(out, pt)
	}
	slices.SortFunc(out, func(x, y DampingPoint) int {
		return cmp.Compare(x.NaturalFrequencyRadPerSec, y.NaturalFrequencyRadPerSec)
	})
	return out, nil
}

// polishOnRay refines (r, k) with a(r·d) + k·b(r·d) = 0 by Newton's method.
func (p *problem) polishOnRay(r float64, d complex128) (float64, float64, bool) {
	x := complex(r, 0) * d
	av, bv := p.a.EvalComplex(x), p.b.EvalComplex(x)
	if bv == 0 {
		return r, 0, false
	}
	k := real(-av / bv)
	rel := func(r, k float64) (complex128, float64) {
		x := complex(r, 0) * d
		f, _ := p.eval(x, k)
		return f, cabs(f) / p.magnitude(x, k)
	}
	f, e := rel(r, k)
	for range 8 {
		x := complex(r, 0) * d
		_, df := p.eval(x, k)
		fr, fk := df*d, p.b.EvalComplex(x)
		det := real(fr)*imag(fk) - imag(fr)*real(fk)
		if det == 0 {
			break
		}
		dr := (-real(f)*imag(fk) + imag(f)*real(fk)) / det
		dk := (-real(fr)*imag(f) + imag(fr)*real(f)) / det
		nf, ne := rel(r+dr, k+dk)
		if !(ne < e) {
			break
		}
		r, k, f, e = r+dr, k+dk, nf, ne
	}
	if p.atPoleOrZero(complex(r, 0) * d) {
		return r, k, false
	}
	return r, k, e <= 1e-9
}

// PoleSensitivity is a closed-loop pole and its derivative with respect to
// the locus variable.
type PoleSensitivity struct {
	// Pole is the closed-loop pole.
	Pole complex128
	// DsDValue is ds/dk = −b(s)/(a′(s) + k·b′(s)); complex infinity at a
	// multiple pole (a break point), where the pole is not differentiable.
	DsDValue complex128
}

// PoleSensitivities returns every closed-loop pole for value with its
// sensitivity ds/dk, from the implicit function theorem on a(s) + k·b(s) =
// 0. Errors as for ClosedLoopPoles.
func PoleSensitivities(loop tf.TF, value float64) ([]PoleSensitivity, error) {
	p, err := queryProblem(loop, nil, value)
	if err != nil {
		return nil, err
	}
	c := p.charPoly(value)
	if c.IsZero() {
		return nil, fmt.Errorf("%w: a + %v·b vanishes", ErrDegenerate, value)
	}
	rs, err := c.RootsWithMultiplicity()
	if err != nil {
		return nil, err
	}
	var out []PoleSensitivity
	for _, r := range rs {
		for range r.Multiplicity {
			ds := cmplx.Inf()
			if r.Multiplicity == 1 {
				_, df := p.eval(r.Value, value)
				if df != 0 {
					ds = -p.b.EvalComplex(r.Value) / df
				}
			}
			out = append(out, PoleSensitivity{Pole: r.Value, DsDValue: ds})
		}
	}
	return out, nil
}

// padeRelativeError returns |R(s)·e^(sT) − 1| for the Padé approximant R
// of e^(−sT) of the given order.
func padeRelativeError(T float64, order int, s complex128) (float64, error) {
	r, err := tf.PadeDelay(T, order)
	if err != nil {
		return 0, fmt.Errorf("locus: dead time %v s: %w", T, err)
	}
	return cabs(r.Eval(s)*cmplx.Exp(s*complex(T, 0)) - 1), nil
}
