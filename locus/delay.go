package locus

// Exact closed-loop roots of a loop with dead time (issue 14, item 1).
// This file is new; nothing else in the package depends on it.

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

// DelayRegion says which closed-loop roots DelayedRoots returns.
type DelayRegion int

const (
	// Rightmost asks for the DelaySettings.Count rightmost roots (largest
	// real part; in discrete time, largest modulus). A conjugate pair is
	// never split, and roots tied in real part are all kept, so the result
	// may hold a few more.
	Rightmost DelayRegion = iota
	// Above asks for every root with Re s > DelaySettings.MinRealPart (in
	// discrete time, every root with |z| > DelaySettings.MinModulus).
	Above
)

// DelaySettings controls DelayedRoots. A nil *DelaySettings means the
// defaults; so does the zero value of every field.
type DelaySettings struct {
	// Region selects the roots. If zero, Rightmost.
	Region DelayRegion
	// Count is the number of rightmost roots for Region Rightmost, 1 to
	// MaxRoots. If zero, defaults to 10.
	Count int
	// MinRealPart is the abscissa σ₀ in rad/s for Region Above
	// (continuous time): every root with Re s > σ₀ is returned.
	MinRealPart float64
	// MinModulus is the radius for Region Above in discrete time: every
	// root with |z| > MinModulus is returned, ≥ 0.
	MinModulus float64
	// Tolerance is the relative accuracy to which Newton's method polishes
	// each root, in (0, 1e-6]. If zero, defaults to 1e-12.
	Tolerance float64
	// MaxRoots bounds the number of roots in the region. If zero, defaults
	// to 2000; a larger region returns an error.
	MaxRoots int
}

// DelayRoots are closed-loop roots of a loop with dead time, with the
// proof that none in the region was missed.
type DelayRoots struct {
	// Roots are the closed-loop roots, sorted by decreasing real part
	// (discrete: decreasing modulus), the upper member of a conjugate pair
	// first. Continuous: values of s in rad/s; discrete: values of z.
	Roots []complex128
	// MinRealPart is the abscissa σ₀ of the region (continuous time):
	// Roots holds every root with Re s > σ₀. For Region Rightmost it lies
	// halfway between the last returned root and the next one.
	MinRealPart float64
	// MinModulus is the radius of the region in discrete time: Roots
	// holds every root with |z| > MinModulus.
	MinModulus float64
	// RadiusBound bounds |s| for every root with Re s ≥ σ₀ (continuous
	// time): the counting contour is [σ₀, RadiusBound]×[−RadiusBound,
	// RadiusBound].
	RadiusBound float64
	// Count is the number of roots in the region counted by the argument
	// principle (continuous) or by the degree of the polynomial (discrete).
	Count int
	// CountVerified reports whether len(Roots) == Count: every root in the
	// region was found.
	CountVerified bool
	// MaxRelResidual is the largest |f(s)| over the roots relative to
	// Σ|dᵢ||s|ⁱ + |k|·|e^(−sτ)|·Σ|nᵢ||s|ⁱ (rounding level when polished).
	MaxRelResidual float64
	// DiscretisationPoints is the number of Chebyshev points of the
	// spectral discretisation that supplied the starting values (0 when
	// none was needed).
	DiscretisationPoints int
	// Gain and DelaySec echo the gain k and the dead time τ.
	Gain, DelaySec float64
	// SampleTimeSec is the sample period of a discrete loop, 0 otherwise.
	SampleTimeSec float64
}

const defaultDelayCount = 10

// DelayedRoots returns closed-loop roots of the loop gain·N/D·e^(−s·τ)
// under negative feedback, τ = loop.DelaySec(): the roots of the
// quasi-polynomial
//
//	D(s) + gain·N(s)·e^(−sτ) = 0,
//
// exactly, not those of a Padé approximation. A loop without dead time is
// allowed (the roots of D + gain·N).
//
// Method (continuous time): starting values are the eigenvalues of a
// Chebyshev collocation of the infinitesimal generator of the delay
// equation (Breda, Maset & Vermiglio 2005; gonum mat.Eigen), reduced to
// the n states of D's companion form and the history of the one delayed
// signal; each is polished by Newton's method on the exact quasi-polynomial
// to set.Tolerance relative (1e-12 by default). The number of roots with
// Re s > σ₀ is counted by the argument principle on a rectangle that
// provably encloses them (see DelayRoots.RadiusBound), with steps short
// enough that no turn of the argument can be missed; the discretisation is
// refined until the count matches (CountVerified).
//
// Discrete time: a dead time of d whole sample periods gives the
// polynomial z^d·D(z) + gain·N(z), whose roots come from package poly.
//
// Special cases are:
//   - deg N ≥ deg D with dead time (a biproper loop): the equation is of
//     neutral type, with a chain of infinitely many roots near
//     Re s = ln|gain·n_m/d_n|/τ; ErrUnsupported.
//   - a fractional dead time in discrete time: ErrUnsupported.
//
// Errors wrap ErrNotFinite, ErrInvalidSettings, ErrUnsupported,
// ErrZeroNumerator; a region whose roots were counted but not all found
// returns the partial result and an error wrapping ErrTraceFailed.
func DelayedRoots(loop tf.TF, gain float64, set *DelaySettings) (DelayRoots, error) {
	var s DelaySettings
	if set != nil {
		s = *set
	}
	if math.IsNaN(gain) || math.IsInf(gain, 0) {
		return DelayRoots{}, fmt.Errorf("%w: gain %v", ErrNotFinite, gain)
	}
	if err := s.check(); err != nil {
		return DelayRoots{}, err
	}
	if loop.Num().IsZero() {
		return DelayRoots{}, fmt.Errorf("%w: loop %v", ErrZeroNumerator, loop)
	}
	if loop.IsDiscrete() {
		return discreteDelayedRoots(loop, gain, s)
	}
	q := quasipoly.Q{D: loop.Den().Coeffs(), N: loop.Num().Coeffs(), K: gain, Tau: loop.DelaySec()}
	if err := q.Check(); err != nil {
		if errors.Is(err, quasipoly.ErrNeutral) {
			return DelayRoots{}, fmt.Errorf("%w: loop %v with dead time has deg N = %d ≥ deg D = %d: the closed loop is of neutral type (a chain of infinitely many roots near Re s = ln|k·n_m/d_n|/τ); its roots are not computed", ErrUnsupported, loop, loop.Num().Degree(), loop.Den().Degree())
		}
		return DelayRoots{}, fmt.Errorf("%w: %v", ErrNotFinite, err)
	}
	qs := &quasipoly.Settings{Tol: s.Tolerance, MaxRoots: s.MaxRoots}
	var res quasipoly.Result
	var err error
	if s.Region == Above {
		res, err = q.Above(s.MinRealPart, qs)
	} else {
		res, err = q.Rightmost(s.Count, qs)
	}
	out := DelayRoots{
		Roots:                res.Roots,
		MinRealPart:          res.Abscissa,
		RadiusBound:          res.Radius,
		Count:                res.Count,
		CountVerified:        res.Verified,
		MaxRelResidual:       res.MaxResidual,
		DiscretisationPoints: res.Size,
		Gain:                 gain,
		DelaySec:             q.Tau,
	}
	if err != nil {
		switch {
		case errors.Is(err, quasipoly.ErrTooMany):
			return out, fmt.Errorf("%w: %v (raise the root limit or the abscissa)", ErrInvalidSettings, err)
		case errors.Is(err, quasipoly.ErrBudget):
			return out, fmt.Errorf("%w: %v", ErrTraceFailed, err)
		case errors.Is(err, quasipoly.ErrOnContour) && s.Region == Above:
			return out, fmt.Errorf("%w: %v (move the abscissa off the root)", ErrInvalidSettings, err)
		}
		return out, fmt.Errorf("%w: roots of %v with gain %v: %v", ErrTraceFailed, loop, gain, err)
	}
	return out, nil
}

func (s *DelaySettings) check() error {
	if s.Region != Rightmost && s.Region != Above {
		return fmt.Errorf("%w: unknown DelaySettings.Region %d", ErrInvalidSettings, s.Region)
	}
	if s.Count == 0 {
		s.Count = defaultDelayCount
	}
	if s.MaxRoots == 0 {
		s.MaxRoots = 2000
	}
	if s.Count < 0 || s.MaxRoots < 0 || s.Count > s.MaxRoots {
		return fmt.Errorf("%w: DelaySettings.Count %d must be in [1, MaxRoots = %d]", ErrInvalidSettings, s.Count, s.MaxRoots)
	}
	for _, v := range []float64{s.MinRealPart, s.MinModulus, s.Tolerance} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%w: DelaySettings value %v", ErrNotFinite, v)
		}
	}
	if s.Tolerance < 0 || s.Tolerance > 1e-6 {
		return fmt.Errorf("%w: DelaySettings.Tolerance %v must be in (0, 1e-6]", ErrInvalidSettings, s.Tolerance)
	}
	if s.MinModulus < 0 {
		return fmt.Errorf("%w: DelaySettings.MinModulus %v is negative", ErrInvalidSettings, s.MinModulus)
	}
	return nil
}

// wholeDelaySamples returns the dead time of a discrete loop in whole
// samples, or ErrUnsupported for a fractional one.
func wholeDelaySamples(loop tf.TF) (int, error) {
	T, d := loop.SampleTimeSec(), loop.DelaySec()
	q := d / T
	r := math.Round(q)
	if math.Abs(q-r) > 1e-9*math.Max(1, q) {
		return 0, fmt.Errorf("%w: dead time %v s is %v sample periods of %v s; a fractional sampled delay is not handled here", ErrUnsupported, d, q, T)
	}
	return int(r), nil
}

func discreteDelayedRoots(loop tf.TF, gain float64, s DelaySettings) (DelayRoots, error) {
	d, err := wholeDelaySamples(loop)
	if err != nil {
		return DelayRoots{}, err
	}
	shift := make([]float64, d+1)
	shift[0] = 1
	zd, _ := poly.New(shift...)
	c := loop.Den().Mul(zd).Add(loop.Num().Scale(gain))
	if c.IsZero() {
		return DelayRoots{}, fmt.Errorf("%w: z^%d·D + %v·N", ErrDegenerate, d, gain)
	}
	roots, err := c.Roots()
	if err != nil {
		return DelayRoots{}, fmt.Errorf("%w: roots of z^%d·D + k·N: %v", ErrTraceFailed, d, err)
	}
	sort.SliceStable(roots, func(i, j int) bool {
		ai, aj := cmplx.Abs(roots[i]), cmplx.Abs(roots[j])
		if ai != aj {
			return ai > aj
		}
		return imag(roots[i]) > imag(roots[j])
	})
	out := DelayRoots{Gain: gain, DelaySec: loop.DelaySec(), SampleTimeSec: loop.SampleTimeSec(), CountVerified: true}
	var keep []complex128
	if s.Region == Above {
		for _, r := range roots {
			if cmplx.Abs(r) > s.MinModulus {
				keep = append(keep, r)
			}
		}
		out.MinModulus = s.MinModulus
	} else {
		k := min(s.Count, len(roots))
		for k < len(roots) && (imag(roots[k-1]) > 0 || cmplx.Abs(roots[k-1])-cmplx.Abs(roots[k]) <= 1e-12*cmplx.Abs(roots[k-1])) {
			k++
		}
		keep = roots[:k]
		if k < len(roots) {
			out.MinModulus = 0.5 * (cmplx.Abs(roots[k-1]) + cmplx.Abs(roots[k]))
		}
	}
	out.Roots = keep
	out.Count = len(keep)
	for _, r := range keep {
		v := c.EvalComplex(r)
		sc := 0.0
		for _, a := range c.Coeffs() {
			sc = sc*cmplx.Abs(r) + math.Abs(a)
		}
		if sc > 0 {
			out.MaxRelResidual = math.Max(out.MaxRelResidual, cmplx.Abs(v)/sc)
		}
	}
	return out, nil
}
