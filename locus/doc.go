// Package locus computes root loci exactly: the construction quantities of
// Evans' rules (poles and zeros with multiplicity, real-axis segments,
// asymptotes, departure and arrival angles, break points, crossings of the
// stability boundary), the exact set of stable values, point queries, and
// branches traced by predictor–corrector continuation. Parameter loci
// a(s) + p·b(s) = 0 for any parameter that enters the characteristic
// polynomial affinely are derived automatically (FromParameter).
//
// # Conventions
//
// The characteristic equation is a(x) + k·b(x) = 0 in x = s (continuous
// time) or x = z (discrete time). For a loop k·L = k·N/D under negative
// feedback, a = D and b = N; for a parameter locus a and b come from
// FromParameter and the loop passed to Analyze or Trace is b/a. The range of
// k is Settings.Range, (0, +Inf) by default; negative ranges give the
// complementary locus. Stable means every closed-loop root has Re < 0
// (continuous) or |z| < 1 (discrete). Angles are in degrees, frequencies in
// rad/s (discrete: ω = θ/T for z = e^(jθ), θ ∈ [0, π]).
//
// The definitions follow the Conventions section of the project's reference
// cases (shared/refcases/README.md): break points are roots of
// a′·b − a·b′ that are neither poles nor zeros and at which k = −a/b is real
// and in range, each with the number of branches meeting there; departure
// angles are listed for poles with Im > 0 and real multiple poles, one per
// branch, normalised to (−180, 180]; open-loop poles and zeros on the
// boundary are not crossings; stable intervals are open and their ends come
// from crossings and from the value where the degree of a + k·b drops.
//
// Dead time e^(−sT) is replaced by a diagonal Padé approximation of order
// Settings.PadeOrder (6 if zero) and a note records it; in discrete time a
// dead time of whole sample periods is written exactly as a power of z.
//
// # Invariants
//
// Inputs are never modified; results are fresh values; every function is
// safe for concurrent use. Bad input (b ≡ 0, NaN or infinite values, an
// empty range, a non-affine parameter, a point off the locus) returns an
// error matching a sentinel of errors.go, never a panic.
package locus
