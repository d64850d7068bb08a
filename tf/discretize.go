package tf

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"github.com/loopwise/loopwise/internal/statespace"
	"github.com/loopwise/loopwise/poly"
)

// DiscretizeMethod selects how a continuous-time transfer function is turned
// into a discrete-time one.
type DiscretizeMethod int

const (
	// ZeroOrderHold gives the exact discrete equivalent of the plant driven
	// through a zero-order hold (step invariance): G(z) = (1 − z⁻¹)·Z{G(s)/s}.
	ZeroOrderHold DiscretizeMethod = iota
	// FirstOrderHold gives the exact discrete equivalent for inputs that are
	// linear between samples (the non-causal triangle hold; ramp
	// invariance): G(z) = (z − 1)²/(T·z)·Z{G(s)/s²}.
	FirstOrderHold
	// Tustin substitutes s = c·(z − 1)/(z + 1) with c = 2/T (the bilinear
	// transform), or c = ω₀/tan(ω₀T/2) with pre-warping at ω₀.
	Tustin
	// MatchedPoleZero maps every pole and finite zero by z = e^(sT), puts
	// the zeros at infinity at z = −1 and matches the low-frequency gain.
	MatchedPoleZero
)

// String returns the method's name in words ("zero-order hold").
func (m DiscretizeMethod) String() string {
	switch m {
	case ZeroOrderHold:
		return "zero-order hold"
	case FirstOrderHold:
		return "first-order hold"
	case Tustin:
		return "Tustin (bilinear)"
	case MatchedPoleZero:
		return "matched pole-zero"
	}
	return "DiscretizeMethod(" + strconv.Itoa(int(m)) + ")"
}

// ParseDiscretizeMethod returns the method named by text, ignoring case and
// surrounding space: "zoh", "foh", "tustin", "matched", or the names String
// returns ("zero-order hold", "first-order hold", "Tustin (bilinear)",
// "bilinear", "matched pole-zero"). Unknown names return ErrMethod.
func ParseDiscretizeMethod(text string) (DiscretizeMethod, error) {
	switch strings.ToLower(strings.TrimSpace(text)) {
	case "zoh", "zero-order hold", "zero order hold":
		return ZeroOrderHold, nil
	case "foh", "first-order hold", "first order hold":
		return FirstOrderHold, nil
	case "tustin", "bilinear", "tustin (bilinear)":
		return Tustin, nil
	case "matched", "matched pole-zero", "matched pole zero":
		return MatchedPoleZero, nil
	}
	return 0, fmt.Errorf("%w: %q (known: zoh, foh, tustin, matched)", ErrMethod, text)
}

// DiscretizeSettings holds options for Discretize. A nil *DiscretizeSettings
// means the defaults.
type DiscretizeSettings struct {
	// PrewarpRadPerSec is the frequency ω₀ in rad/s at which the Tustin
	// result matches G exactly: G_d(e^{jω₀T}) = G(jω₀). Valid range
	// 0 < ω₀ < π/T·(1 − 1.5e-8); only for the Tustin method. If zero, no pre-warping
	// (c = 2/T).
	PrewarpRadPerSec float64
}

// prewarpGuard is how far, relative to π/T, a pre-warping frequency must
// stay below π/T. The factor ω₀/tan(ω₀T/2) goes to zero there, and tan
// near π/2 amplifies the relative rounding of its argument by about
// 1/(π/2 − ω₀T/2); keeping ω₀T/2 below π/2 by √eps ≈ 1.5e-8 relative keeps
// at least half the digits of the factor. π/T itself rounded to 15 or 16
// digits (a degenerate frequency that passes the strict test) is refused.
const prewarpGuard = 0x1p-26

// delayTol is the relative tolerance within which a dead time counts as a
// whole number of sample periods: |τ/T − k| ≤ delayTol·max(1, τ/T). It
// absorbs the rounding of τ and T given in decimal (0.3/0.1 is
// 2.9999999999999996).
const delayTol = 1e-9

// Discretize returns the discrete-time equivalent of the continuous-time g
// with sample period sampleTimeSec > 0, numerator and denominator in z,
// the denominator monic (its leading coefficient is exactly 1). set may be
// nil.
//
// Methods and what they return (n = deg D, m = deg N):
//
//   - ZeroOrderHold: step invariance, exact. The poles are e^{pᵢT}, mapped
//     from the poles of g. The numerator comes from a scaled, balanced
//     companion realisation (A, B, C, D) of g, the hold integrals
//     Φ = e^{AT}, Γ = ∫₀ᵀe^{Aη}dη·B read off one matrix exponential of a
//     block matrix (Van Loan, IEEE Trans. Automatic Control 23(3), 1978;
//     gonum mat.Exp), and the values of den(z)·C(zI − Φ)⁻¹Γ at n points of
//     the unit circle turned into coefficients by an inverse discrete
//     Fourier transform (unitary, so well conditioned). For a strictly
//     proper g the numerator has degree n − 1 (the zero zⁿ coefficient is
//     dropped), for a biproper g degree n. Accuracy: numerator coefficients
//     within 1.3e-14 of the largest one on the reference cases of the tests
//     (sixth order, fast sampling included), where the route through
//     charpoly(Φ − ΓC) − charpoly(Φ) loses up to 7.6e-4 at T = 0.001 s
//     because the numerator is then about Tⁿ times smaller than the
//     polynomials subtracted.
//   - FirstOrderHold: ramp invariance with the triangle hold of Franklin,
//     Powell & Workman, Digital Control of Dynamic Systems, 3rd ed., §6.3
//     (from memory): with Γ₁ = ∫₀ᵀe^{Aη}dη·B and Γ₂ = (1/T)∫₀ᵀe^{Aη}(T − η)dη·B,
//     the discrete model is (Φ, Γ₁ + (Φ − I)Γ₂, C, D + CΓ₂). The numerator
//     has degree n.
//   - Tustin: s = c(z − 1)/(z + 1), c = 2/T, or c = ω₀/tan(ω₀T/2) with
//     set.PrewarpRadPerSec = ω₀; numerator and denominator of degree
//     max(n, m). Improper g is accepted here (the result is proper in z).
//   - MatchedPoleZero: poles and finite zeros map by z = e^{sT}; the n − m
//     zeros at infinity go to z = −1 (Franklin, Powell & Workman, §6.3.3,
//     from memory); the gain matches lim s^ℓ·G(s) as s → 0 to
//     lim ((z − 1)/T)^ℓ·G_d(z) as z → 1, where ℓ is the number of poles
//     minus zeros at s = 0 (the static gain when ℓ = 0).
//
// Dead time τ: a whole number k of sample periods (within delayTol) becomes
// k extra poles at z = 0 (the factor z⁻ᵏ) for every method. A fractional
// remainder is kept exactly by the two holds, which stay exact for their
// input classes: with τ = dT + θ, 0 < θ < T, the delayed input changes its
// segment at θ within each period, so the hold integrals split at θ (the
// modified z-transform for the zero-order hold:
// G_d(z) = z^{−d−1}·[C(zI − Φ)⁻¹(ΦΓ_b + Γ_a) + CΓ_b + D] with
// Γ_b = Γ₁(T − θ), Γ_a = Φ(T − θ)Γ₁(θ); for the triangle hold
// x[k+1] = Φx[k] + P·u[j−1] + Q·u[j] + R·u[j+1], j = k − d, with P, Q, R
// from the hold integrals over θ and T − θ), and the result has d + 1
// poles at z = 0.
// Tustin and MatchedPoleZero return ErrFractionalDelay for a fractional
// dead time (approximate it with Pade first if that is acceptable). The
// result has DelaySec 0.
//
// Limit of the coefficient form: with fast sampling the poles e^{pT}
// crowd near z = 1 and the coefficients of the denominator determine its
// value there, den(1) = ∏(1 − e^{pᵢT}), only to about ε·‖den‖₁ (‖den‖₁
// up to 2ⁿ). The low-frequency behaviour of the result then carries a
// relative error of about ε·2ⁿ/∏|pᵢT| whatever method computed the
// coefficients: for 1/(s+1)⁶ at T = 0.005 s, rounding the exact
// denominator coefficients to float64 moves den(1) by 20 % (computed with
// mpmath), and the static gain of the result is 0.87 instead of 1; at
// T = 0.05 s these errors are 9e-8 and 2e-7. Keep ∏|pᵢT| well above
// 1e-10, or split high-order models into sections.
//
// Errors: ErrDomainMismatch when g is already discrete; ErrSampleTime for
// sampleTimeSec ≤ 0 and ErrNotFinite for a non-finite one; ErrMethod for an
// unknown method, or pre-warping with a method other than Tustin;
// ErrFrequency for a pre-warping frequency outside (0, π/T); ErrImproper
// for an improper g (except Tustin); ErrFractionalDelay as above;
// ErrNumerical when ‖A·T‖₁ of the realisation exceeds 1e9 for the holds
// (the matrix exponential would lose more than about 1e-7 relative
// accuracy) or an eigenvalue or linear solve fails.
func (g TF) Discretize(sampleTimeSec float64, method DiscretizeMethod, set *DiscretizeSettings) (TF, error) {
	T := sampleTimeSec
	if g.IsDiscrete() {
		return TF{}, fmt.Errorf("%w: g is already discrete (sample period %v s)", ErrDomainMismatch, g.ts)
	}
	if math.IsNaN(T) || math.IsInf(T, 0) {
		return TF{}, fmt.Errorf("%w: sample period %v", ErrNotFinite, T)
	}
	if !(T > 0) {
		return TF{}, fmt.Errorf("%w: discretization needs a positive sample period, got %v s", ErrSampleTime, T)
	}
	if method < ZeroOrderHold || method > MatchedPoleZero {
		return TF{}, fmt.Errorf("%w: %v", ErrMethod, method)
	}
	var s DiscretizeSettings
	if set != nil {
		s = *set
	}
	w0 := s.PrewarpRadPerSec
	if w0 != 0 {
		if method != Tustin {
			return TF{}, fmt.Errorf("%w: pre-warping applies to the Tustin method only, not %v", ErrMethod, method)
		}
		if math.IsNaN(w0) || math.IsInf(w0, 0) {
			return TF{}, fmt.Errorf("%w: pre-warping frequency %v", ErrNotFinite, w0)
		}
		if w0 < 0 || w0*T >= math.Pi*(1-prewarpGuard) {
			return TF{}, fmt.Errorf("%w: pre-warping frequency %v rad/s must lie in (0, π/T) = (0, %v) rad/s, below π/T by more than a relative %.1g (the pre-warping factor ω₀/tan(ω₀T/2) vanishes at π/T)", ErrFrequency, w0, math.Pi/T, prewarpGuard)
		}
	}
	// Whole sample periods of dead time, and the fractional remainder θ.
	k, theta := splitDelay(g.delay, T)
	if theta != 0 && method != ZeroOrderHold && method != FirstOrderHold {
		return TF{}, fmt.Errorf("%w: dead time %v s is %v sample periods of %v s; %v keeps only whole periods (the zero- and first-order holds keep any dead time)", ErrFractionalDelay, g.delay, g.delay/T, T, method)
	}
	if method != Tustin && !g.IsProper() {
		return TF{}, fmt.Errorf("%w: %v needs a proper transfer function, numerator degree %d > denominator degree %d", ErrImproper, method, g.num.Degree(), g.Den().Degree())
	}
	if g.IsZero() {
		return TF{num: poly.Poly{}, den: poly.Constant(1), ts: T}, nil
	}
	var num, den poly.Poly
	var err error
	switch method {
	case ZeroOrderHold, FirstOrderHold:
		num, den, err = holdEquivalent(g.num, g.Den(), T, theta, method == FirstOrderHold)
		if theta != 0 {
			k++ // the fractional-delay forms carry one more period: z^{−d−1}
		}
	case Tustin:
		c := 2 / T
		if w0 != 0 {
			c = w0 / math.Tan(w0*T/2)
		}
		num, den = bilinear(g.num, g.Den(), c)
	case MatchedPoleZero:
		num, den, err = matched(g.num, g.Den(), T)
	}
	if err != nil {
		return TF{}, err
	}
	lead := den.Lead()
	num, den = num.Scale(1/lead), den.Scale(1/lead)
	den, _ = den.Monic() // leading coefficient exactly 1
	den = den.ShiftUp(k)
	return FromPolys(num, den, T)
}

// splitDelay writes τ = k·T + θ with k whole and 0 ≤ θ < T; θ is set to 0
// when τ/T is within delayTol of a whole number (then k is that number).
func splitDelay(tau, T float64) (k int, theta float64) {
	if tau == 0 {
		return 0, 0
	}
	q := tau / T
	r := math.Round(q)
	if math.Abs(q-r) <= delayTol*math.Max(1, q) {
		return int(r), 0
	}
	f := math.Floor(q)
	return int(f), tau - f*T
}

// holdEquivalent returns the zero- or first-order-hold equivalent of the
// proper num/den; θ > 0 is a fractional dead time (0 < θ < T), for which
// the caller adds one more period of delay. The denominator is monic:
// ∏(z − e^{pᵢT}). The realisation and hold integrals come from
// internal/statespace (scaled, balanced companion form; Van Loan 1978 block
// exponential through gonum's mat.Exp).
func holdEquivalent(num, den poly.Poly, T, theta float64, firstOrder bool) (poly.Poly, poly.Poly, error) {
	if num.Degree() > den.Degree() {
		return poly.Poly{}, poly.Poly{}, fmt.Errorf("%w: numerator degree %d above denominator degree %d", ErrImproper, num.Degree(), den.Degree())
	}
	m, err := statespace.FromTransferFunction(num.Coeffs(), den.Coeffs())
	if err != nil {
		return poly.Poly{}, poly.Poly{}, statespaceErr(err)
	}
	n := m.Order()
	if n == 0 {
		return poly.Constant(m.D), poly.Constant(1), nil
	}
	poles, err := den.Roots()
	if err != nil {
		return poly.Poly{}, poly.Poly{}, fmt.Errorf("%w: poles: %v", ErrNumerical, err)
	}
	zp := make([]complex128, len(poles))
	for i, p := range poles {
		zp[i] = cmplx.Exp(p * complex(T, 0))
		if cmplx.IsInf(zp[i]) || cmplx.IsNaN(zp[i]) {
			return poly.Poly{}, poly.Poly{}, fmt.Errorf("%w: e^(pT) overflows for the pole %v with T = %v s", ErrNotFinite, p, T)
		}
	}
	dz, err := poly.FromRoots(zp)
	if err != nil {
		return poly.Poly{}, poly.Poly{}, fmt.Errorf("%w: mapped poles: %v", ErrNumerical, err)
	}
	if !dz.IsFinite() {
		return poly.Poly{}, poly.Poly{}, fmt.Errorf("%w: e^(pT) overflows for a pole p with T = %v s", ErrNotFinite, T)
	}
	// gonum's mat.Exp does not return for a matrix with infinite entries,
	// and its scaling and squaring loses about 0.13·ε·‖AT‖₁ relative
	// accuracy (measured on a/(s+a): 3e-14 at aT = 700, 2.9e-11 at 1e6,
	// 2.4e-7 at 1e10, 3 % at 1e15), so ‖AT‖ is checked before any
	// exponential.
	norm := scaledNorm(m, T)
	if math.IsNaN(norm) || math.IsInf(norm, 0) {
		return poly.Poly{}, poly.Poly{}, fmt.Errorf("%w: the state matrix times the sample period %v s overflows float64 (poles too fast for this period)", ErrNotFinite, T)
	}
	if norm > maxExpNorm {
		return poly.Poly{}, poly.Poly{}, fmt.Errorf("%w: ‖A·T‖ = %.3g exceeds %.0e: poles this fast relative to the sample period %v s would lose more than about 1e-7 of relative accuracy in the matrix exponential; they settle within a small fraction of a period, so remove them from the model (keep their static gain) or sample faster", ErrNumerical, norm, maxExpNorm, T)
	}
	var gamma []float64
	d := m.D
	e1 := 0.0 // coefficient of an extra z·den(z) term in the numerator
	var phi *mat.Dense
	switch {
	case firstOrder && theta != 0:
		// Triangle hold with a fractional dead time θ (d whole periods
		// are applied by the caller): the delayed input over one period
		// lies on the segment u[j−1]→u[j] for the first θ seconds and on
		// u[j]→u[j+1] for the remaining L = T − θ (j = k − d). With the
		// hold integrals Γ₁(t), Γ₂(t) over t = θ and t = L:
		//   x[k+1] = Φx[k] + P·u[j−1] + Q·u[j] + R·u[j+1],
		//   P = (θ/T)Φ(L)(Γ₁(θ) − Γ₂(θ)),
		//   Q = Φ(L)((L/T)Γ₁(θ) + (θ/T)Γ₂(θ)) + Γ₁(L) − (L/T)Γ₂(L),
		//   R = (L/T)Γ₂(L),
		//   y[k] = Cx[k] + D((θ/T)u[j−1] + (L/T)u[j]),
		// so G_d = z^{−d−1}[C(zI − Φ)⁻¹(P + ΦQ + Φ²R) + CQ + CΦR + Dθ/T
		// + (CR + DL/T)·z].
		L := T - theta
		phiL, g1L, g2L, err := m.FirstOrderHold(L)
		if err != nil {
			return poly.Poly{}, poly.Poly{}, statespaceErr(err)
		}
		phiT, g1T, g2T, err := m.FirstOrderHold(theta)
		if err != nil {
			return poly.Poly{}, poly.Poly{}, statespaceErr(err)
		}
		phi = mat.NewDense(n, n, nil)
		phi.Mul(phiL, phiT)
		a, b := theta/T, L/T
		P := make([]float64, n)
		Q := make([]float64, n)
		R := make([]float64, n)
		for i := 0; i < n; i++ {
			var p, q float64
			for j := 0; j < n; j++ {
				p += phiL.At(i, j) * (g1T[j] - g2T[j])
				q += phiL.At(i, j) * (b*g1T[j] + a*g2T[j])
			}
			P[i] = a * p
			Q[i] = q + g1L[i] - b*g2L[i]
			R[i] = b * g2L[i]
		}
		phiR := mulVec(phi, R)
		phiQR := mulVec(phi, addVec(Q, phiR)) // ΦQ + Φ²R
		gamma = addVec(P, phiQR)
		d = dot(m.C, Q) + dot(m.C, phiR) + m.D*a
		e1 = dot(m.C, R) + m.D*b
	case firstOrder:
		// Triangle hold: x[k+1] = Φx[k] + Γ₁u[k] + Γ₂(u[k+1] − u[k]). With
		// w[k] = x[k] − Γ₂u[k]: w[k+1] = Φw[k] + (Γ₁ + (Φ − I)Γ₂)u[k] and
		// y[k] = Cw[k] + (D + CΓ₂)u[k].
		var g1, g2 []float64
		phi, g1, g2, err = m.FirstOrderHold(T)
		if err != nil {
			return poly.Poly{}, poly.Poly{}, statespaceErr(err)
		}
		gamma = make([]float64, n)
		for i := 0; i < n; i++ {
			v := g1[i] - g2[i]
			for j := 0; j < n; j++ {
				v += phi.At(i, j) * g2[j]
			}
			gamma[i] = v
			d += m.C[i] * g2[i]
		}
	case theta != 0:
		// Modified z-transform: over each period the held input switches
		// at θ. Γ_b = Γ(T − θ), Γ_a = Φ(T − θ)·Γ(θ); with the extra period
		// of delay, G_d = z^{−d−1}[C(zI − Φ)⁻¹(ΦΓ_b + Γ_a) + CΓ_b + D].
		phiB, gB, err := m.ZeroOrderHold(T - theta)
		if err != nil {
			return poly.Poly{}, poly.Poly{}, statespaceErr(err)
		}
		phiA, gA0, err := m.ZeroOrderHold(theta)
		if err != nil {
			return poly.Poly{}, poly.Poly{}, statespaceErr(err)
		}
		phi = mat.NewDense(n, n, nil)
		phi.Mul(phiB, phiA)
		gamma = make([]float64, n)
		for i := 0; i < n; i++ {
			var v float64
			for j := 0; j < n; j++ {
				v += phi.At(i, j)*gB[j] + phiB.At(i, j)*gA0[j]
			}
			gamma[i] = v
			d += m.C[i] * gB[i]
		}
	default:
		phi, gamma, err = m.ZeroOrderHold(T)
		if err != nil {
			return poly.Poly{}, poly.Poly{}, statespaceErr(err)
		}
	}
	if !finiteMatrix(phi) || !finiteSlice(gamma) || math.IsNaN(d) || math.IsInf(d, 0) {
		return poly.Poly{}, poly.Poly{}, fmt.Errorf("%w: the matrix exponential overflows (poles too fast or unstable for T = %v s)", ErrNotFinite, T)
	}
	nz, err := discreteNumerator(phi, gamma, m.C, d, dz, zp)
	if err != nil {
		return poly.Poly{}, poly.Poly{}, err
	}
	if e1 != 0 {
		nz = nz.Add(dz.ShiftUp(1).Scale(e1))
	}
	return nz, dz, nil
}

// maxExpNorm bounds ‖A·T‖₁ for the hold equivalents: at the bound the
// measured relative error of gonum's mat.Exp on a first-order lag is about
// 2e-8 (0.13·ε·‖AT‖₁).
const maxExpNorm = 1e9

// scaledNorm returns the larger of the 1-norm of A·t and max |B·t| (NaN or
// +Inf when they overflow).
func scaledNorm(m statespace.Model, t float64) float64 {
	n := m.Order()
	norm := 0.0
	for j := 0; j < n; j++ {
		col := 0.0
		for i := 0; i < n; i++ {
			col += math.Abs(m.A.At(i, j) * t)
		}
		norm = math.Max(norm, col)
	}
	for i := 0; i < n; i++ {
		if v := math.Abs(m.B[i] * t); v > norm || math.IsNaN(v) {
			norm = v
		}
	}
	return norm
}

func mulVec(a *mat.Dense, v []float64) []float64 {
	n := len(v)
	out := make([]float64, n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			out[i] += a.At(i, j) * v[j]
		}
	}
	return out
}

func addVec(a, b []float64) []float64 {
	out := make([]float64, len(a))
	for i := range a {
		out[i] = a[i] + b[i]
	}
	return out
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}

// statespaceErr maps an internal/statespace error onto this package's
// sentinels.
func statespaceErr(err error) error {
	switch {
	case errors.Is(err, statespace.ErrImproper):
		return fmt.Errorf("%w: %v", ErrImproper, err)
	case errors.Is(err, statespace.ErrNotFinite):
		return fmt.Errorf("%w: %v", ErrNotFinite, err)
	case errors.Is(err, statespace.ErrSampleTime):
		return fmt.Errorf("%w: %v", ErrSampleTime, err)
	}
	return fmt.Errorf("%w: %v", ErrNumerical, err)
}

func finiteSlice(v []float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

func finiteMatrix(a mat.Matrix) bool {
	r, c := a.Dims()
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			if v := a.At(i, j); math.IsNaN(v) || math.IsInf(v, 0) {
				return false
			}
		}
	}
	return true
}

// bilinear substitutes s = c(z − 1)/(z + 1) in num/den and clears the
// denominators (z + 1)^q, q = max(deg num, deg den). Both polynomials are
// divided by c^q first (the ratio is unchanged) so that high orders with a
// short sample period do not overflow.
func bilinear(num, den poly.Poly, c float64) (poly.Poly, poly.Poly) {
	q := max(num.Degree(), den.Degree())
	zm1 := poly.MustNew(1, -1) // z − 1
	zp1 := poly.MustNew(1, 1)  // z + 1
	sub := func(p poly.Poly) poly.Poly {
		var out poly.Poly
		for i := 0; i <= p.Degree(); i++ {
			a := p.Coef(i)
			if a == 0 {
				continue
			}
			// a·c^{i−q}·(z − 1)^i·(z + 1)^{q−i}
			f := a * math.Pow(c, float64(i-q))
			out = out.Add(zm1.Pow(i).Mul(zp1.Pow(q - i)).Scale(f))
		}
		return out
	}
	return sub(num), sub(den)
}

// matched returns the matched pole–zero equivalent of the proper num/den.
func matched(num, den poly.Poly, T float64) (poly.Poly, poly.Poly, error) {
	zs, err := num.Roots()
	if err != nil {
		return poly.Poly{}, poly.Poly{}, fmt.Errorf("%w: zeros: %v", ErrNumerical, err)
	}
	ps, err := den.Roots()
	if err != nil {
		return poly.Poly{}, poly.Poly{}, fmt.Errorf("%w: poles: %v", ErrNumerical, err)
	}
	// Roots at s = 0 are exact zeros from trailing zero coefficients; they
	// map to z = 1 and are kept apart for the gain matching.
	var zz, pz []complex128 // mapped roots other than s = 0
	a, b := 0, 0            // zeros and poles at s = 0
	for _, z := range zs {
		if z == 0 {
			a++
			continue
		}
		zz = append(zz, cmplx.Exp(z*complex(T, 0)))
	}
	for _, p := range ps {
		if p == 0 {
			b++
			continue
		}
		pz = append(pz, cmplx.Exp(p*complex(T, 0)))
	}
	for range den.Degree() - num.Degree() {
		zz = append(zz, -1)
	}
	n1, err := poly.FromRoots(zz)
	if err != nil {
		return poly.Poly{}, poly.Poly{}, fmt.Errorf("%w: mapped zeros: %v", ErrNumerical, err)
	}
	d1, err := poly.FromRoots(pz)
	if err != nil {
		return poly.Poly{}, poly.Poly{}, fmt.Errorf("%w: mapped poles: %v", ErrNumerical, err)
	}
	// Continuous low-frequency value of s^ℓ·G: N₁(0)/D₁(0) with the s = 0
	// roots removed (they are trailing zero coefficients).
	nc := num.Coef(a)
	dc := den.Coef(b)
	n1v, d1v := n1.Eval(1), d1.Eval(1)
	if n1v == 0 || d1v == 0 || !n1.IsFinite() || !d1.IsFinite() {
		return poly.Poly{}, poly.Poly{}, fmt.Errorf("%w: a pole or zero maps onto z = 1 (on the imaginary axis at a multiple of the sampling frequency 2π/T = %v rad/s), so the low-frequency gain cannot be matched", ErrNumerical, 2*math.Pi/T)
	}
	l := b - a
	k := nc / dc * math.Pow(T, float64(l)) * d1v / n1v
	zm1 := poly.MustNew(1, -1)
	nz := n1.Mul(zm1.Pow(a)).Scale(k)
	dz := d1.Mul(zm1.Pow(b))
	return nz, dz, nil
}
