package report

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/poly"
)

// The loop's one stability verdict.
//
// The closed loop of a rational loop (no dead time, or dead time that is an
// exact number of samples) is stable when every root of the characteristic
// polynomial P = D + N lies strictly inside the stability region: Re s < 0,
// or |z| < 1. The roots are computed from coefficients that carry rounding
// errors (from expanding the products of the loop file's factors, from the
// conversion to z, from the scaling by k), so each computed root r is only
// known to within a radius ρ(r). The verdict is trusted only where the
// distance d(r) from r to the boundary exceeds ρ(r).
//
// ρ(r) is the Newton-polygon estimate of how far a relative perturbation η
// of every coefficient can move the root (Wilkinson 1963, Rounding Errors
// in Algebraic Processes, ch. 2, for the simple root; the m-fold root moves
// by the m-th root of the perturbation): with the Taylor coefficients
// cₖ = P⁽ᵏ⁾(r)/k! and S(r) = Σ|aᵢ||r|ⁱ,
//
//	ρ(r) = min over k ≥ 1 of (η·S(r)/|cₖ|)^(1/k),
//
// the smallest displacement h at which some term cₖhᵏ of P(r + h) can be
// cancelled by the perturbation. η is 8·(n+1) units of rounding u = 2⁻⁵³,
// or the root's own backward error |P(r)|/S(r) when that is larger: the
// tolerance poly.VanishesAt uses to decide that a polynomial has a root at
// a point (tf.StaticGain, package response), so that the verdict never
// calls a loop stable whose closed loop the rest of the library treats as
// having a pole on the boundary. Where the coefficients have lost the loop
// (a 100 s and a 30 s lag under PI control converted by Tustin at 0.1 ms:
// P(1) rounds to exactly 0 although the true value is about 1e-18), ρ is
// far larger than the distance and the verdict is refused.
//
// A root with |d| ≤ ρ sits on the boundary as far as the arithmetic can
// tell. When ρ is itself at the level of rounding (below boundaryRelTol of
// the root's scale), the root is on the boundary (an exact integrator or
// undamped oscillation of the closed loop): the loop is not asymptotically
// stable, and the verdict is "unstable", as in packages margins and
// response. When ρ is larger, the loop is ill-conditioned there and the
// verdict is unknown; for a loop converted to z with a sample time so short
// that the closed-loop poles crowd at z = 1, the report refuses the loop
// (build) instead of guessing.

// boundaryRelTol separates a root on the stability boundary to within
// rounding (ρ below this fraction of the root's scale) from a root whose
// side of the boundary cannot be told (ρ above it). Common practice: a
// few hundred units of rounding for degree ≤ 50 stay far below it, while
// the √eps spread of a double root (about 1e-8) lies far above.
const boundaryRelTol = 1e-10

// verdict is the loop's one stability verdict, computed once and used by
// every section.
type verdict struct {
	// known reports whether the verdict could be made.
	known bool
	// stable is the verdict when known.
	stable bool
	// method names how: "the closed-loop poles" or "the Nyquist criterion".
	method string
	// boundary holds the roots found on the stability boundary to within
	// rounding (known && !stable then).
	boundary []complex128
	// undecided holds the roots whose side of the boundary cannot be told;
	// radius is the largest of their uncertainty radii.
	undecided []complex128
	radius    float64
	// lost is a point of the boundary at which the characteristic
	// polynomial vanishes to within the rounding of its coefficients when
	// no computed root is near it (boundaryPseudoRoot): known is false.
	lost   complex128
	isLost bool
	// distance is the smallest distance of an undecided root from the
	// boundary.
	distance float64
}

// ptr returns the verdict as a JSON value: nil when unknown.
func (v verdict) ptr() *bool {
	if !v.known {
		return nil
	}
	s := v.stable
	return &s
}

// rootRadius returns ρ(r) for the root r of p (see the comment at the top
// of the file). The polynomial is first rescaled exactly, by powers of two,
// to q(x) = p(2ᵏx)/2ᴱ with the root near modulus 1 and the largest
// coefficient near 1, so that no sum overflows (a root at 1e154 of a
// polynomial with coefficients up to 1e308); ρ scales back by 2ᵏ.
func rootRadius(p poly.Poly, r complex128) float64 {
	n := p.Degree()
	if n < 1 {
		return 0
	}
	q, x, k := rescaled(p, r)
	ax := cmplx.Abs(x)
	s := 0.0
	for i := n; i >= 0; i-- {
		s = s*ax + math.Abs(q[i])
	}
	if s == 0 {
		return 0
	}
	eta := 8 * float64(n+1) * 0x1p-53
	// Taylor coefficients at x by repeated synthetic division (Horner's
	// shift): afterwards taylor[j] = q⁽ʲ⁾(x)/j!.
	taylor := make([]complex128, n+1)
	for i := range q {
		taylor[i] = complex(q[i], 0)
	}
	for j := 0; j < n; j++ {
		for i := n - 1; i >= j; i-- {
			taylor[i] += x * taylor[i+1]
		}
	}
	eta = math.Max(eta, cmplx.Abs(taylor[0])/s)
	rho := math.Inf(1)
	for j := 1; j <= n; j++ {
		if cj := cmplx.Abs(taylor[j]); cj > 0 {
			rho = math.Min(rho, math.Pow(eta*s/cj, 1/float64(j)))
		}
	}
	return math.Ldexp(rho, k)
}

// judgePoles makes the verdict from the roots of the characteristic
// polynomial p, in s or (discrete) in z.
func judgePoles(p poly.Poly, roots []complex128, discrete bool) verdict {
	v := verdict{known: true, stable: true, method: "the closed-loop poles"}
	for _, r := range roots {
		d, scale := -real(r), math.Max(cmplx.Abs(r), 1)
		if discrete {
			d, scale = 1-cmplx.Abs(r), 1
		}
		rho := rootRadius(p, r)
		switch {
		case d > rho:
			// strictly inside
		case d < -rho:
			v.stable = false
		case rho <= boundaryRelTol*scale:
			v.stable = false
			v.boundary = append(v.boundary, r)
		default:
			if len(v.undecided) == 0 || math.Abs(d) < v.distance {
				v.distance = math.Abs(d)
			}
			v.undecided = append(v.undecided, r)
			v.radius = math.Max(v.radius, rho)
		}
	}
	if v.stable && len(v.undecided) > 0 {
		// A root surely outside decides "unstable" whatever the
		// undecided ones do; otherwise the verdict is unknown.
		v.known, v.stable = false, false
	}
	if v.known && len(v.boundary) == 0 {
		// ρ linearises about each computed root, which fails when the
		// coefficients have lost the loop altogether: the computed roots
		// of (s + 1)⁵⁰⁰ + 1 scatter into the right half-plane although
		// every true root has Re s < 0. Such a polynomial nearly vanishes
		// on the boundary itself, relative to its coefficients.
		if w, ok := boundaryPseudoRoot(p, roots, discrete); ok {
			v.known, v.stable = false, false
			v.lost, v.isLost = w, true
		}
	}
	return v
}

// boundaryPseudoRoot looks for a point b of the stability boundary (the
// imaginary axis, or the unit circle) at which |P(b)| ≤ η·S(|b|), η as in
// rootRadius: a relative change of the coefficients by η then makes b a
// root, so no computation in double precision can tell on which side of
// the boundary the roots lie (Wilkinson 1963, ch. 2: the roots of the
// perturbed polynomials fill the pseudo-zero set, which then touches the
// boundary). It tries b = 0 (z = 1), z = −1, and the boundary points
// nearest to and level with each computed root: a necessary test that
// catches the lost cases without a search, and never turns a boundary
// root (already judged) into an unknown verdict.
func boundaryPseudoRoot(p poly.Poly, roots []complex128, discrete bool) (complex128, bool) {
	n := p.Degree()
	if n < 1 {
		return 0, false
	}
	eta := 8 * float64(n+1) * 0x1p-53
	var pts []complex128
	if discrete {
		pts = append(pts, 1, -1)
		for _, r := range roots {
			if r != 0 {
				pts = append(pts, r/complex(cmplx.Abs(r), 0))
			}
		}
	} else {
		pts = append(pts, 0)
		for _, r := range roots {
			pts = append(pts, complex(0, math.Abs(imag(r))), complex(0, cmplx.Abs(r)))
		}
	}
	for _, b := range pts {
		if rel := relativeValue(p, b); rel <= eta {
			return b, true
		}
	}
	return 0, false
}

// relativeValue returns |P(x)|/S(|x|), S(t) = Σ|aᵢ|tⁱ, evaluated on the
// rescaled polynomial (rescaled) so that neither overflows.
func relativeValue(p poly.Poly, x complex128) float64 {
	q, y, _ := rescaled(p, x)
	ay := cmplx.Abs(y)
	var v complex128
	s := 0.0
	for i := len(q) - 1; i >= 0; i-- {
		v = v*y + complex(q[i], 0)
		s = s*ay + math.Abs(q[i])
	}
	if s == 0 {
		return math.Inf(1)
	}
	return cmplx.Abs(v) / s
}

// rescaled returns the ascending coefficients of q(y) = p(2ᵏy)/2ᴱ and
// y = x/2ᵏ, with 2ᵏ near |x| and E the largest binary exponent of
// aᵢ·2^(i·k): exact scalings by powers of two that bring the point near
// modulus 1 and the largest coefficient near 1.
func rescaled(p poly.Poly, x complex128) (q []float64, y complex128, k int) {
	if ax := cmplx.Abs(x); ax > 0 && !math.IsInf(ax, 0) {
		k = math.Ilogb(ax)
	}
	a := p.Ascending()
	e := math.MinInt
	for i, c := range a {
		if c != 0 {
			e = max(e, math.Ilogb(c)+i*k)
		}
	}
	q = make([]float64, len(a))
	for i, c := range a {
		q[i] = math.Ldexp(c, i*k-e)
	}
	return q, x / complex(math.Ldexp(1, k), 0), k
}

// crowdsAtOne reports whether, for a loop converted to z, the verdict is
// lost to the sample time, and says why: the verdict is unknown, or it
// rests on poles on the unit circle within √eps of z = 1, where a
// continuous pole p lands at e^(pT) ≈ 1 + pT whatever its side of the
// imaginary axis.
func (v verdict) crowdsAtOne() (bool, string) {
	if !v.known && len(v.undecided) > 0 {
		return true, v.undecidedText(true)
	}
	for _, r := range v.boundary {
		if cmplx.Abs(r-1) <= 0x1p-26 {
			return true, fmt.Sprintf("a closed-loop pole lies at z = 1 to within rounding (its distance from 1 is %s), where a stable and an unstable continuous pole look alike", g(Number(cmplx.Abs(r-1))))
		}
	}
	return false, ""
}

// words says the verdict and how it was reached, for the summary.
func (v verdict) words() string {
	switch {
	case !v.known:
		return "not determined"
	case v.stable:
		return "stable"
	}
	return "unstable"
}

// undecidedText describes the undecided poles for a warning.
func (v verdict) undecidedText(discrete bool) string {
	what := count(len(v.undecided), "1 closed-loop pole lies", "closed-loop poles lie")
	return fmt.Sprintf("%s within %s of %s, closer than the uncertainty of the computed poles (%s, from the rounding of the characteristic polynomial's coefficients) allows to tell", what, g(Number(v.distance)), boundaryName(discrete), g(Number(v.radius)))
}

// boundaryName names the stability boundary: the imaginary axis in s, the
// unit circle in z.
func boundaryName(discrete bool) string {
	if discrete {
		return "the unit circle"
	}
	return "the imaginary axis"
}

// count returns one for n = 1 and "n many" otherwise.
func count(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return fmt.Sprintf("%d %s", n, many)
}
