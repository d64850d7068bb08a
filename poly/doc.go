// Package poly provides real polynomials: arithmetic on coefficient lists,
// evaluation with error bounds (plain and compensated Horner schemes),
// derivatives, composition, an approximate greatest common divisor, and
// roots found to the accuracy the double-precision coefficients allow,
// with multiple roots recognised and reported once with their
// multiplicity.
//
// # Conventions
//
// Public constructors take coefficients the way they are written on paper,
// highest power first: New(1, 3, 2) is x² + 3x + 2. Coef(i), Ascending and
// FromAscending use the power as index. The variable is called x in this
// package; packages above call it s or z (Format takes the name).
//
// The zero polynomial (the zero value of Poly) has degree −1 and no roots;
// Roots and Monic return ErrZeroPolynomial for it. Leading zero
// coefficients are dropped on construction, so Degree is always the true
// degree.
//
// Roots are listed in the order of SortRoots: ascending real part, then
// ascending imaginary part. Real roots have an imaginary part of exactly
// zero; complex roots come in exact conjugate pairs; a multiple root is
// one Root with its Multiplicity, repeated with exactly equal values by
// Roots.
//
// u = 2⁻⁵³ is the unit roundoff of float64 and ε = 2u = 2⁻⁵² the machine
// epsilon; p̃(t) = Σ|aᵢ|tⁱ is the polynomial of absolute coefficients,
// which sets the scale of rounding errors in evaluating p at |x| = t.
// Tolerances are relative (EqualApprox: to the larger ∞-norm; GCD: to
// max(1, |root|); RootSettings.ClusterTolerance: componentwise).
//
// # Invariants
//
// A Poly is an immutable value: its coefficients are never modified after
// construction, inputs are copied on entry and slices returned by methods
// are fresh copies. A Poly is safe for concurrent use, and so is every
// function of the package (there is no global state). Constructors reject
// NaN and ±Inf coefficients with ErrNotFinite. Arithmetic (Add, Mul, ...)
// returns a plain Poly for readability; should a coefficient overflow,
// IsFinite reports false and every method that computes a number from the
// polynomial (Roots, Monic, DivMod, GCD, RootsBackwardError) returns
// ErrNotFinite instead of a wrong value. Panics are reserved for
// programmer errors documented on the method (a negative exponent, shift
// or derivative order) and for the Must helpers.
//
// # Roots
//
// RootsWithSettings (and Roots, RootsWithMultiplicity) proceeds in stages:
//
//   - exact zero roots from trailing zero coefficients; closed forms for
//     degree 1 and 2 (Kahan's fused multiply–add discriminant);
//   - from degree 3: the eigenvalues of the balanced companion matrix of
//     the polynomial with its variable scaled by an exact power of two
//     (gonum mat.Eigen; Edelman & Murakami 1995, "Polynomial roots from
//     companion matrix eigenvalues", Math. Comp. 64(210), show this
//     backward stable in the coefficients, normwise) as starting values;
//   - refinement of all roots together by the Ehrlich–Aberth iteration
//     (Aberth 1973, Math. Comp. 27(122); Gauss–Seidel order as in Bini
//     1996, Numer. Algorithms 13) with p and p′ evaluated by the
//     compensated Horner scheme (Graillat, Langlois & Louvet 2005), which
//     computes as if in twice the working precision; math/big evaluation
//     at 256 bits for the few simple roots where even that leaves more
//     than 8 ulps of uncertainty;
//   - recognition of clusters as multiple roots after Kahan (1972,
//     "Conserving confluence curbs ill-condition") and Zeng (2004,
//     Algorithm 835, ACM Trans. Math. Softw. 30(2); 2005, Math. Comp.
//     74(250)): an isolated group of m approximations is reported as one
//     m-fold root at the simple root of p⁽ᵐ⁻¹⁾ near it when a polynomial within a componentwise relative
//     distance of 8u of p has exactly that m-fold root (computed by a
//     minimum-norm least-squares solve), and the whole root set stays
//     consistent (cluster.go explains the tests);
//   - exact conjugate symmetry.
//
// Accuracy, measured in the package tests against 50-digit mpmath
// references of the same double coefficients (testdata/gen_roots.py):
// every simple root is found to within an ulp or two of the exact root of
// the double coefficients, also where those roots are very ill-conditioned
// (Wilkinson's degree-20 polynomial: all twenty roots correct to the last
// bit, where the companion eigenvalues alone are off by up to 3.6e-3
// relative); roots spanning 1e-6..1e6 are each correct to the last bit; a
// multiple root whose coefficients are exact in binary comes back exact
// (the triple root of (x+1)³(x+2)); a multiple root of inexact
// coefficients, such as (x+0.1)³(x−2) in decimal, is found to a few ulps
// of the decimal root. The normwise backward error of the root set
// (RootsBackwardError) is at most 13u on seeded random polynomials up to
// degree 50, which is the floor set by rounding the roots to float64.
//
// Limits: roots that the coefficients do not determine (Wilkinson-type
// polynomials of degree 25 and more, or distinct roots closer than a few
// times their sensitivity to a relative coefficient change of u) are
// reported as the exact roots of the double coefficients, which may differ
// wildly from the roots of the polynomial the coefficients were rounded
// from — that is the nature of the problem, not of the method. When
// several clusters of an inexact polynomial lie close together, each
// multiple root is fitted on its own, and their centres can be off by
// about 1e-11 relative (no joint fit on the pejorative manifold).
//
// # Evaluation
//
// Eval, EvalComplex and EvalWithDerivative use Horner's scheme;
// EvalWithBound adds Higham's running error bound; EvalCompensated and
// EvalComplexCompensated use the compensated scheme with an a-posteriori
// bound, accurate near roots where plain Horner loses all digits.
package poly
