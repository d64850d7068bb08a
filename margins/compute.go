package margins

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/tf"
)

// Settings tunes Compute. A nil *Settings means the defaults; the zero value
// of every field selects its default.
type Settings struct {
	// OmegaMaxRadPerSec is the upper end, in rad/s, of the search for phase
	// crossovers of a continuous-time loop with dead time (which has
	// infinitely many); those in [0, OmegaMaxRadPerSec] are listed and
	// decide the gain margins. It is ignored for rational loops, whose
	// crossovers are all found. Range: finite and ≥ 0, and small enough that
	// at most 10⁵ crossovers lie below it (about τ·ω/2π of them).
	// If zero, defaults to max(10·Ω₀, Ω₀ + 4π/τ), where τ is the dead time
	// and Ω₀ the largest of the gain crossover frequencies and the moduli of
	// the poles and zeros (1/τ when there are none): beyond Ω₀ the phase
	// falls at nearly the rate τ while |L| no longer rises in typical loops,
	// so the first crossovers past Ω₀, which are included, decide the gain
	// margin. Set it explicitly for loops with resonances far above Ω₀.
	OmegaMaxRadPerSec float64

	// SkipPeaks leaves out Ms, Mt and the bandwidth (their fields are NaN),
	// which for rational loops cost about two thirds of the time (real-root
	// problems of degree n and, on short intervals, 2n−2 in ω²): for fast
	// repeated margin checks. If false (the default), everything is
	// computed.
	SkipPeaks bool
}

// GainCrossover is a frequency where |L| = 1.
type GainCrossover struct {
	// FrequencyRadPerSec is the crossover frequency ω > 0 in rad/s.
	FrequencyRadPerSec float64
	// PhaseMarginDeg is 180° + ∠L(jω) in degrees, normalised to (−180, 180].
	PhaseMarginDeg float64
}

// PhaseCrossover is a frequency where L is real and negative.
type PhaseCrossover struct {
	// FrequencyRadPerSec is the crossover frequency ω ≥ 0 in rad/s (0 when
	// L(0) is finite and negative; π/T, the Nyquist frequency, for a
	// discrete loop with L(−1) negative).
	FrequencyRadPerSec float64
	// GainFactor is k = 1/|L(jω)|: multiplying the loop gain by k puts
	// L(jω) on −1.
	GainFactor float64
	// GainFactorDB is 20·log10(GainFactor).
	GainFactorDB float64
}

// Result holds the crossovers, margins, sensitivity peaks and closed-loop
// verdict of a loop. "Does not exist" is NaN and "infinite" is +Inf, as
// documented on each field.
type Result struct {
	// GainCrossovers lists every gain crossover, ascending in frequency.
	GainCrossovers []GainCrossover
	// PhaseCrossovers lists every phase crossover (with dead time: those up
	// to the search limit OmegaMaxRadPerSec), ascending in frequency. It is
	// empty when L(jω) is real at every frequency (an even loop such as k/s²
	// or k/(s² + 1), whose phase crossovers fill whole bands; its closed loop
	// is unstable at every gain, its characteristic polynomial being even or
	// odd).
	PhaseCrossovers []PhaseCrossover

	// GainMargin is the smallest gain factor k > 1 among the phase
	// crossovers: the factor by which the loop gain can rise before the
	// closed loop reaches the stability boundary. +Inf when there is none;
	// NaN when L(jω) is real at every frequency (see PhaseCrossovers).
	GainMargin float64
	// GainMarginDB is 20·log10(GainMargin); +Inf when GainMargin is.
	GainMarginDB float64
	// PhaseCrossoverRadPerSec is the frequency of GainMargin in rad/s; NaN
	// when GainMargin is +Inf.
	PhaseCrossoverRadPerSec float64

	// LowerGainMargin is the largest gain factor k < 1 among the phase
	// crossovers: the factor by which the loop gain can fall before the
	// boundary, for loops that need a minimum gain. NaN when there is none.
	LowerGainMargin float64
	// LowerGainMarginDB is 20·log10(LowerGainMargin) (negative); NaN when
	// there is none.
	LowerGainMarginDB float64
	// LowerPhaseCrossoverRadPerSec is the frequency of LowerGainMargin in
	// rad/s; NaN when there is none.
	LowerPhaseCrossoverRadPerSec float64

	// PhaseMarginDeg is the smallest phase margin over the gain crossovers,
	// in degrees in (−180, 180]; NaN without a gain crossover.
	PhaseMarginDeg float64
	// GainCrossoverRadPerSec is the frequency of PhaseMarginDeg in rad/s;
	// NaN without a gain crossover.
	GainCrossoverRadPerSec float64

	// DelayMarginSec is the smallest additional dead time that destabilises
	// the closed loop: the minimum over the gain crossovers of φ/ω, φ the
	// phase margin in radians wrapped to [0, 2π). +Inf without a gain
	// crossover; NaN when the closed loop is unstable. For discrete loops it
	// is in seconds, not rounded to whole samples.
	DelayMarginSec float64
	// DelayMarginRadPerSec is the gain crossover frequency that sets
	// DelayMarginSec, in rad/s; NaN when DelayMarginSec is +Inf or NaN.
	DelayMarginRadPerSec float64

	// PeakSensitivity is Ms = max over ω ≥ 0 of |1/(1 + L)| (discrete:
	// ω ∈ [0, π/T]); +Inf when 1 + L vanishes on the axis.
	PeakSensitivity float64
	// PeakSensitivityRadPerSec is the frequency of Ms in rad/s; +Inf when
	// the maximum is only approached as ω → ∞. A smooth maximum locates its
	// frequency to about √eps relative only.
	PeakSensitivityRadPerSec float64
	// PeakComplementarySensitivity is Mt = max |L/(1 + L)|.
	PeakComplementarySensitivity float64
	// PeakComplementarySensitivityRadPerSec is the frequency of Mt in rad/s;
	// +Inf when only approached as ω → ∞.
	PeakComplementarySensitivityRadPerSec float64

	// BandwidthRadPerSec is the closed-loop bandwidth: the lowest frequency
	// at which |T(jω)| = |L/(1 + L)| has fallen to |T(0)|/√2 (3 dB below
	// its zero-frequency value; common practice). NaN when T(0) is zero or
	// infinite, or |T| never falls that far.
	BandwidthRadPerSec float64

	// ClosedLoopStable reports whether the unity negative-feedback loop is
	// stable (every closed-loop pole with Re s < 0, discrete |z| < 1).
	ClosedLoopStable bool
	// ClosedLoopUnstablePoles is the number Z of closed-loop poles with
	// Re s ≥ 0 (discrete |z| ≥ 1), counted by multiplicity; −1 means
	// infinitely many (a loop with dead time and |L(∞)| ≥ 1).
	ClosedLoopUnstablePoles int
	// OpenLoopUnstablePoles is the number P of poles of L with Re s > 0
	// (discrete |z| > 1).
	OpenLoopUnstablePoles int
	// StabilityMethod is "closed-loop poles" (rational loops: roots of
	// den + num) or "Nyquist criterion" (loops with dead time, and measured
	// data).
	StabilityMethod string

	// OmegaMaxRadPerSec is the search limit used for the phase crossovers
	// of a loop with dead time, in rad/s; +Inf for rational loops (every
	// crossover found), and the highest measured frequency for FromMeasured.
	OmegaMaxRadPerSec float64

	// SkipPeaks leaves out Ms, Mt and the bandwidth (their fields are NaN),
	// which for rational loops cost about two thirds of the time (real-root
	// problems of degree n and, on short intervals, 2n−2 in ω²): for fast
	// repeated margin checks. If false (the default), everything is
	// computed.
	SkipPeaks bool
}

// Stability method names, the values of Result.StabilityMethod.
const (
	MethodClosedLoopPoles = "closed-loop poles"
	MethodNyquist         = "Nyquist criterion"
)

func checkSettings(set *Settings) (Settings, error) {
	if set == nil {
		return Settings{}, nil
	}
	s := *set
	if math.IsNaN(s.OmegaMaxRadPerSec) || math.IsInf(s.OmegaMaxRadPerSec, 0) || s.OmegaMaxRadPerSec < 0 {
		return s, fmt.Errorf("%w: OmegaMaxRadPerSec = %v, want finite and ≥ 0", ErrBadSettings, s.OmegaMaxRadPerSec)
	}
	return s, nil
}

// Compute returns the crossovers, gain, phase and delay margins, peak
// sensitivities, closed-loop bandwidth and closed-loop stability of the
// loop transfer function L in a unity negative-feedback loop. L may be
// continuous (with or without dead time) or discrete (with a dead time of
// whole samples).
//
// Without dead time, the gain crossovers are the positive real roots of
// |N(jω)|² − |D(jω)|² and the phase crossovers those of Im(N·conj D), both
// polynomials in ω²; the roots (real-root isolation by Descartes' rule and
// continued fractions, poly.RealRootsIn) are polished by Newton's method on
// the directly evaluated L, so frequencies and margins are accurate to a
// few ulps of the conditioning of the crossover, and no crossover can be
// missed between grid points. Discrete loops are mapped to such
// polynomials exactly by the bilinear substitution z = (1+w)/(1−w). With
// dead time, the gain crossovers are unchanged and the phase crossovers
// are found by the guaranteed search of delayPhaseCrossovers (monotone
// pieces, Brent 1973); zeros of L on the axis are points where L = 0 and
// the phase jumps, and are cut out like poles.
//
// Ms and Mt are the largest of |S| and |T| at the stationary points, the
// roots of P′Q − PQ′ for |S|² = P/Q inside the level set above the best
// value found (rational loops; see the package documentation), or found by
// golden-section refinement (Kiefer 1953) of the local maxima of a scan
// with dead time: 60 points per decade and at most π/(16τ) apart, up to
// where |L| ≤ 10⁻³; the frequency of a peak is then good to about √eps.
// Closed-loop stability: the Routh array of den + num with a running error
// bound, the winding count along the axis, or its roots (rational loops);
// with dead time, the Nyquist criterion counted from the exact phase
// crossovers (see the package documentation).
//
// Errors: ErrZeroLoop, ErrImproper, ErrDegenerate, ErrIllPosed,
// ErrUnsupported, ErrBadSettings.
//
// Special cases are:
//
//	no phase crossover with k > 1: GainMargin = GainMarginDB = +Inf
//	no gain crossover: PhaseMarginDeg = NaN, DelayMarginSec = +Inf
//	closed loop unstable: DelayMarginSec = NaN
//	pole of L on the imaginary axis: handled by indentation (L = ∞ there)
//	zero of L on the imaginary axis: L = 0 there, no crossover; allowed with dead time
func Compute(loop tf.TF, set *Settings) (Result, error) {
	s, err := checkSettings(set)
	if err != nil {
		return Result{}, err
	}
	lp, err := newLoop(loop)
	if err != nil {
		return Result{}, err
	}
	if err := lp.checkWellPosed(); err != nil {
		return Result{}, err
	}
	if lp.tau > 0 {
		if err := lp.ensureRoots(); err != nil {
			return Result{}, err
		}
	}
	if err := lp.countOpenLoop(); err != nil {
		return Result{}, err
	}
	gains, err := lp.gainCrossovers()
	if err != nil {
		return Result{}, err
	}
	lp.dropNegligibleDelay(gains)
	var res Result
	res.OmegaMaxRadPerSec = math.Inf(1)
	for _, w := range gains {
		res.GainCrossovers = append(res.GainCrossovers, GainCrossover{FrequencyRadPerSec: w, PhaseMarginDeg: phaseMarginDeg(lp.value(w))})
	}

	var cs []crossing
	lo, hi := lp.endpointCrossings()
	if lo != nil {
		cs = append(cs, *lo)
	}
	var crossFn func(wmax float64) ([]crossing, error)
	if lp.tau == 0 {
		rc, err := lp.rationalPhaseCrossovers()
		if err != nil {
			return Result{}, err
		}
		cs = append(cs, rc...)
		crossFn = func(float64) ([]crossing, error) { return rc, nil }
	} else {
		wmax := s.OmegaMaxRadPerSec
		if wmax == 0 {
			wmax = lp.defaultOmegaMax(gains)
		}
		res.OmegaMaxRadPerSec = wmax
		dc, err := lp.delayPhaseCrossovers(wmax)
		if err != nil {
			return Result{}, err
		}
		cs = append(cs, dc...)
		crossFn = func(we float64) ([]crossing, error) {
			if we <= wmax {
				return dc, nil
			}
			return lp.delayPhaseCrossovers(we)
		}
	}
	if hi != nil {
		cs = append(cs, *hi)
	}
	for _, c := range cs {
		res.PhaseCrossovers = append(res.PhaseCrossovers, PhaseCrossover{FrequencyRadPerSec: c.w, GainFactor: c.k, GainFactorDB: 20 * math.Log10(c.k)})
	}
	res.setGainMargins()
	if lp.even {
		res.GainMargin, res.GainMarginDB = math.NaN(), math.NaN()
	}
	res.setPhaseMargin()

	// Closed-loop stability.
	if lp.tau == 0 {
		z, p, err := lp.closedLoopPoles()
		if err != nil {
			return Result{}, err
		}
		res.ClosedLoopUnstablePoles, res.OpenLoopUnstablePoles = z, p
		res.StabilityMethod = MethodClosedLoopPoles
	} else {
		res.StabilityMethod = MethodNyquist
		res.OpenLoopUnstablePoles = lp.openUnstable
		if cmplx.Abs(lp.limitAtInfinity()) >= 1 {
			res.ClosedLoopUnstablePoles = -1
		} else {
			z, p, err := lp.encirclementCount(gains, crossFn)
			if err != nil {
				return Result{}, err
			}
			res.ClosedLoopUnstablePoles, res.OpenLoopUnstablePoles = z, p
		}
	}
	res.ClosedLoopStable = res.ClosedLoopUnstablePoles == 0
	res.setDelayMargin()

	// Sensitivity peaks and bandwidth.
	switch {
	case s.SkipPeaks:
		res.PeakSensitivity, res.PeakSensitivityRadPerSec = math.NaN(), math.NaN()
		res.PeakComplementarySensitivity, res.PeakComplementarySensitivityRadPerSec = math.NaN(), math.NaN()
		res.BandwidthRadPerSec = math.NaN()
	case lp.tau == 0:
		res.PeakSensitivity, res.PeakSensitivityRadPerSec = lp.rationalPeak(false, gains)
		res.PeakComplementarySensitivity, res.PeakComplementarySensitivityRadPerSec = lp.rationalPeak(true, gains)
		res.BandwidthRadPerSec = lp.rationalBandwidth()
	default:
		if err := lp.delayPeaks(&res, gains); err != nil {
			return Result{}, err
		}
	}
	return res, nil
}

// negligibleDelayTol bounds ω·τ at the loop's highest characteristic
// frequency for a dead time to be left out: 2⁻⁵⁶, an eighth of the
// rounding unit of float64.
const negligibleDelayTol = 0x1p-56

// dropNegligibleDelay sets the dead time of a strictly proper continuous
// loop to zero when it cannot change any result in float64. With W the
// largest of the pole and zero moduli and the gain crossovers, |L| < 1 and
// falls at least like W/ω above W, and |e^(−jωτ) − 1| ≤ ωτ, so the delay
// perturbs L by at most about |L(jω)|·ωτ ≤ W·τ at every frequency: with
// W·τ ≤ negligibleDelayTol this is below the rounding of L itself
// (common practice: a perturbation below the unit roundoff). Every
// crossover, margin and peak is then that of the rational loop, computed
// exactly by the rational methods instead of on a frequency grid reaching
// ω ≈ π/τ (1e300 rad/s for τ = 1e-300 s).
func (lp *loop) dropNegligibleDelay(gains []float64) {
	if lp.tau == 0 || lp.an.Degree() >= lp.ad.Degree() {
		return
	}
	_, w := lp.characteristicScale()
	if len(gains) > 0 {
		w = math.Max(w, gains[len(gains)-1])
	}
	if w > 0 && w*lp.tau <= negligibleDelayTol {
		lp.tau = 0
	}
}

// checkWellPosed rejects loops with 1 + L(∞) = 0 (continuous) or a closed
// loop that is not causal (discrete).
func (lp *loop) checkWellPosed() error {
	if lp.num.Degree() == lp.den.Degree() && lp.tau == 0 && lp.num.Lead() == -lp.den.Lead() {
		return fmt.Errorf("%w: leading coefficients %v and %v cancel in den + num", ErrIllPosed, lp.num.Lead(), lp.den.Lead())
	}
	return nil
}

// closedLoopPoles counts the roots of den + num with Re ≥ 0 (|z| ≥ 1).
// A root is counted as on the boundary when within 8 ulps of it relative
// to its modulus.
func (lp *loop) closedLoopPoles() (z, p int, err error) {
	ch := lp.den.Add(lp.num)
	if !lp.discrete() {
		if rhp, zero, ok := countRightHalfPlane(ch); ok {
			return rhp + zero, lp.openUnstable, nil
		}
	}
	rs, err := ch.Roots()
	if err != nil {
		return 0, 0, fmt.Errorf("margins: closed-loop poles: %w", err)
	}
	for _, r := range rs {
		if lp.discrete() {
			if cmplx.Abs(r) >= 1-8*eps {
				z++
			}
		} else if real(r) >= -8*eps*cmplx.Abs(r) {
			z++
		}
	}
	return z, lp.openUnstable, nil
}

// defaultOmegaMax derives the dead-time search limit documented on
// Settings.OmegaMaxRadPerSec.
func (lp *loop) defaultOmegaMax(gains []float64) float64 {
	_, w0 := lp.characteristicScale()
	if len(gains) > 0 {
		w0 = math.Max(w0, gains[len(gains)-1])
	}
	if w0 == 0 {
		w0 = 1 / lp.tau
	}
	return math.Max(10*w0, w0+4*math.Pi/lp.tau)
}

// phaseMarginDeg returns 180° + ∠l in degrees, normalised to (−180, 180].
func phaseMarginDeg(l complex128) float64 {
	return wrap180(180 + cmplx.Phase(l)*180/math.Pi)
}

// wrap180 maps degrees to (−180, 180].
func wrap180(a float64) float64 {
	a = math.Mod(a, 360)
	if a > 180 {
		a -= 360
	} else if a <= -180 {
		a += 360
	}
	return a
}

func (r *Result) setGainMargins() {
	r.GainMargin, r.GainMarginDB, r.PhaseCrossoverRadPerSec = math.Inf(1), math.Inf(1), math.NaN()
	r.LowerGainMargin, r.LowerGainMarginDB, r.LowerPhaseCrossoverRadPerSec = math.NaN(), math.NaN(), math.NaN()
	for _, c := range r.PhaseCrossovers {
		switch {
		case c.GainFactor > 1 && c.GainFactor < r.GainMargin:
			r.GainMargin, r.GainMarginDB, r.PhaseCrossoverRadPerSec = c.GainFactor, c.GainFactorDB, c.FrequencyRadPerSec
		case c.GainFactor < 1 && !(c.GainFactor <= r.LowerGainMargin):
			r.LowerGainMargin, r.LowerGainMarginDB, r.LowerPhaseCrossoverRadPerSec = c.GainFactor, c.GainFactorDB, c.FrequencyRadPerSec
		}
	}
}

func (r *Result) setPhaseMargin() {
	r.PhaseMarginDeg, r.GainCrossoverRadPerSec = math.NaN(), math.NaN()
	for _, g := range r.GainCrossovers {
		if !(g.PhaseMarginDeg >= r.PhaseMarginDeg) {
			r.PhaseMarginDeg, r.GainCrossoverRadPerSec = g.PhaseMarginDeg, g.FrequencyRadPerSec
		}
	}
}

func (r *Result) setDelayMargin() {
	r.DelayMarginSec, r.DelayMarginRadPerSec = math.NaN(), math.NaN()
	if !r.ClosedLoopStable {
		return
	}
	r.DelayMarginSec = math.Inf(1)
	for _, g := range r.GainCrossovers {
		phi := math.Mod(g.PhaseMarginDeg+360, 360) * math.Pi / 180
		if d := phi / g.FrequencyRadPerSec; d < r.DelayMarginSec {
			r.DelayMarginSec, r.DelayMarginRadPerSec = d, g.FrequencyRadPerSec
		}
	}
}
