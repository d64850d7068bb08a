package spec

// The damping ratio of a loop with dead time (issue 14): the exact
// closed-loop roots of D(s) + N(s)·e^(−sτ) = 0 over a stated set of
// dominant roots, instead of the poles of a Padé approximation.

import (
	"errors"
	"fmt"
	"math"

	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/tf"
)

// Defaults of the dominant set (see the package documentation).
const (
	// defaultDominantFactor: roots whose decay rate −Re s is at most five
	// times that of the rightmost root are judged. Common practice: the
	// rule of thumb that a pole five or more times farther from the
	// imaginary axis than the dominant ones adds little to the response.
	defaultDominantFactor = 5
	// defaultDominantCrossover: and every root decaying slower than three
	// times the highest gain crossover frequency (so that a slow real root
	// near a zero does not shrink the set to almost nothing). Common
	// practice: the loop's own transients decay at rates of the order of
	// the crossover frequency.
	defaultDominantCrossover = 3
)

// DominantRoots describes the set of exact closed-loop roots over which the
// damping ratio of a continuous loop with dead time is judged: every root
// with Re s > AbscissaRadPerSec, all found (their number counted by the
// argument principle, locus.DelayedRoots).
type DominantRoots struct {
	// Roots are the judged roots in rad/s, by decreasing real part.
	Roots []complex128
	// AbscissaRadPerSec is the abscissa σ_d of the set: the smaller of
	// Factor·Re(s₁) (s₁ the rightmost root; only when Re s₁ < 0) and
	// −CrossoverMultiple·CrossoverRadPerSec.
	AbscissaRadPerSec float64
	// RightmostRealPartRadPerSec is Re s₁, the real part of the rightmost
	// root.
	RightmostRealPartRadPerSec float64
	// CrossoverRadPerSec is the highest gain crossover frequency of the
	// loop with its exact dead time; when the loop has none, |s₁| (or
	// 1/τ when s₁ = 0).
	CrossoverRadPerSec float64
	// Factor and CrossoverMultiple are the settings used
	// (Settings.DominantFactor, Settings.DominantCrossoverMultiple).
	Factor, CrossoverMultiple float64
}

// DominantClosedLoopRoots returns the dominant exact closed-loop roots of
// the continuous loop with dead time loop (unity negative feedback), the
// set of Settings.DominantFactor and Settings.DominantCrossoverMultiple
// (nil set: the defaults 5 and 3). The set is
//
//	{ s : D(s) + N(s)·e^(−sτ) = 0, Re s > σ_d },
//	σ_d = min(F·Re s₁, −M·ω_c)   (F·Re s₁ only when Re s₁ < 0),
//
// s₁ the rightmost root and ω_c the highest gain crossover frequency
// (margins.Compute, dead time exact). Every root of the set is found: the
// roots come from locus.DelayedRoots, which counts the roots in the
// half-plane by the argument principle and refines its starting values
// until the count is matched; an unmatched count is an error. A root
// within about 1e-6 (relative) of the abscissa may fall on either side.
//
// For an unstable loop the set holds every root with Re s ≥ 0, so its
// smallest damping ratio is that of all the closed-loop roots. Errors: a
// discrete loop, a loop without dead time, a biproper loop (neutral type)
// and invalid settings wrap ErrInvalidSettings or the error of package
// locus or margins.
func DominantClosedLoopRoots(loop tf.TF, set *Settings) (DominantRoots, error) {
	F, M, err := dominantSettings(set)
	if err != nil {
		return DominantRoots{}, err
	}
	if loop.IsDiscrete() || loop.DelaySec() <= 0 {
		return DominantRoots{}, fmt.Errorf("%w: the dominant exact roots are defined for a continuous loop with dead time; %v is not one", ErrInvalidSettings, loop)
	}
	if !loop.IsStrictlyProper() {
		return DominantRoots{}, fmt.Errorf("%w: %v is biproper, and with dead time its closed loop is of neutral type, whose roots are not computed exactly", ErrInvalidSettings, loop)
	}
	e := &evaluator{loop: loop}
	return e.dominantRoots(F, M)
}

// dominantSettings returns F and M from set, checked.
func dominantSettings(set *Settings) (F, M float64, err error) {
	F, M = defaultDominantFactor, defaultDominantCrossover
	if set != nil && set.DominantFactor != 0 {
		F = set.DominantFactor
	}
	if set != nil && set.DominantCrossoverMultiple != 0 {
		M = set.DominantCrossoverMultiple
	}
	if !(F > 1 && F <= 1000) {
		return 0, 0, fmt.Errorf("%w: DominantFactor %v is outside (1, 1000]", ErrInvalidSettings, F)
	}
	if !(M > 0 && M <= 1000) {
		return 0, 0, fmt.Errorf("%w: DominantCrossoverMultiple %v is outside (0, 1000]", ErrInvalidSettings, M)
	}
	return F, M, nil
}

// dominantRoots computes the dominant set of e.loop (continuous, with dead
// time, strictly proper).
func (e *evaluator) dominantRoots(F, M float64) (DominantRoots, error) {
	out := DominantRoots{Factor: F, CrossoverMultiple: M}
	first, err := locus.DelayedRoots(e.loop, 1, &locus.DelaySettings{Region: locus.Rightmost, Count: 1})
	if err == nil && (len(first.Roots) == 0 || !first.CountVerified) {
		err = fmt.Errorf("the rightmost root was not found (count %d, %d roots)", first.Count, len(first.Roots))
	}
	if err != nil {
		return out, fmt.Errorf("exact closed-loop roots of %v: %w", e.loop, err)
	}
	s1 := first.Roots[0]
	alpha := real(s1)
	out.RightmostRealPartRadPerSec = alpha
	m, err := e.getMargins()
	if err != nil {
		return out, err
	}
	wc := 0.0
	for _, c := range m.GainCrossovers {
		wc = math.Max(wc, c.FrequencyRadPerSec)
	}
	if !(wc > 0) || math.IsInf(wc, 0) {
		wc = math.Hypot(real(s1), imag(s1))
		if wc == 0 {
			wc = 1 / e.loop.DelaySec()
		}
	}
	out.CrossoverRadPerSec = wc
	sigma := -M * wc
	if alpha < 0 {
		sigma = math.Min(sigma, F*alpha)
	}
	var res locus.DelayRoots
	for try := 0; ; try++ {
		out.AbscissaRadPerSec = sigma
		res, err = locus.DelayedRoots(e.loop, 1, &locus.DelaySettings{Region: locus.Above, MinRealPart: sigma})
		if err != nil && errors.Is(err, locus.ErrInvalidSettings) && try == 0 {
			// A root on the abscissa (or too many roots): move the
			// abscissa left by 1e-6 relative and try once more.
			sigma -= 1e-6 * math.Abs(sigma)
			continue
		}
		break
	}
	if err == nil && !res.CountVerified {
		err = fmt.Errorf("%w: the argument principle counts %d roots with Re s > %s rad/s but %d were found", locus.ErrTraceFailed, res.Count, num(sigma), len(res.Roots))
	}
	if err != nil {
		return out, fmt.Errorf("exact closed-loop roots of %v with Re s > %s rad/s: %w", e.loop, num(sigma), err)
	}
	out.Roots = res.Roots
	return out, nil
}

// describe says in words which roots were judged.
func (d DominantRoots) describe() string {
	n := len(d.Roots)
	which := fmt.Sprintf("the %d exact closed-loop roots", n)
	if n == 1 {
		which = "the one exact closed-loop root"
	}
	bound := fmt.Sprintf("%s × the highest gain crossover %s rad/s", num(d.CrossoverMultiple), num(d.CrossoverRadPerSec))
	if d.RightmostRealPartRadPerSec < 0 && d.Factor*d.RightmostRealPartRadPerSec <= -d.CrossoverMultiple*d.CrossoverRadPerSec {
		bound = fmt.Sprintf("%s × the rightmost real part %s rad/s", num(d.Factor), num(d.RightmostRealPartRadPerSec))
	}
	return fmt.Sprintf("dead time exact: %s with Re s > %s rad/s (%s), every one found (counted by the argument principle); the roots farther left are not judged",
		which, num(d.AbscissaRadPerSec), bound)
}
