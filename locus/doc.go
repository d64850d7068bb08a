// Package locus computes root loci exactly: the construction quantities of
// Evans' rules (poles and zeros with multiplicity, real-axis segments,
// asymptotes, departure and arrival angles, break points, crossings of the
// stability boundary), the exact set of stable values, point queries, and
// branches traced by predictor–corrector continuation. Parameter loci
// a(s) + p·b(s) = 0, for any parameter that enters the characteristic
// polynomial affinely, are derived automatically (FromParameter, FromText).
//
//	an, err := locus.Analyze(loop, nil)             // construction quantities
//	loc, err := locus.Trace(loop, nil)              // branches, view rectangle
//	k, poles, err := locus.ValueAt(loop, s, nil)    // magnitude condition at s
//	pts, err := locus.DampingCrossings(loop, 0.5, nil)
//	par, err := locus.FromText("Td", "60(1+Td*s)", plant) // then Analyze(par.Loop, ...)
//
// # Conventions
//
// The characteristic equation is a(x) + k·b(x) = 0 in x = s (continuous
// time) or x = z (discrete time). For a loop k·L = k·N/D under negative
// feedback, a = D and b = N; for a parameter locus a and b come from
// FromParameter and the loop passed to Analyze or Trace is b/a, with
// Settings.Variable naming the parameter. The range of k is
// Settings.Range, (0, +Inf) by default; Range{Min: math.Inf(-1), Max: 0}
// gives the complementary locus, and finite ranges are allowed. Stable
// means every closed-loop root has Re < 0 (continuous) or |z| < 1
// (discrete). Angles are in degrees, frequencies in rad/s; in discrete time
// the boundary is the unit circle, z = e^(jθ) with θ ∈ [0, π] and
// ω = θ/T.
//
// The definitions follow the Conventions section of the project's
// reference cases (shared/refcases/README.md), so that results compare
// directly:
//
//   - Real-axis segments are the maximal closed intervals of real σ with
//     −a(σ)/b(σ) in the range; pieces touching at a multiple pole or zero
//     are merged.
//   - Asymptotes: centroid (Σpoles − Σzeros)/(n − m); angles in [0, 360),
//     (2q+1)·180°/|n−m| when k·b₀/a₀ > 0 and q·360°/|n−m| otherwise. With
//     deg b > deg a the branches come from infinity as k → 0 and the same
//     formulas hold.
//   - Departure angles: for every pole with Im > 0 and every real multiple
//     pole, one angle per branch, μ·θ ≡ ∠(−σ·b₀/a₀) + Σ∠(p − zᵢ) −
//     Σ∠(p − pⱼ), normalised to (−180, 180] and ascending; arrival angles
//     likewise at zeros. Conjugate poles' angles are the negatives.
//   - Break points: roots of a′·b − a·b′ that are neither poles nor zeros,
//     at which k = −a/b is real and in range (complex break points
//     included, with their conjugates), each with the number of branches
//     meeting there (multiplicity + 1).
//   - Crossings: every ω ≥ 0 with a(jω) + k·b(jω) = 0 for k in the open
//     range, ω = 0 included; open-loop poles and zeros on the boundary are
//     not crossings.
//   - Stable intervals: the exact set of k in the range for which the closed
//     loop is stable, as open intervals whose ends are crossing values, the
//     value where the degree of a + k·b drops, and the range ends.
//
// Dead time e^(−sT) is replaced in Analyze and Trace by a diagonal Padé
// approximation of order Settings.PadeOrder (6 if zero) and a note in
// Analysis.Notes records it; in discrete time a dead time of whole sample
// periods is written exactly as a power of z (a fractional one is
// ErrUnsupported). The exact analyses keep e^(−sT): DelayedRoots (closed-
// loop roots counted by the argument principle), DelayedStableGains and
// DelayedStableDelays (stable gains and dead times), DelayedAnalyze and
// DelayedTrace (the locus in the gain), and DelayedParametric (a parameter
// entering affinely where the dead time does not factor out:
// D-decomposition along the imaginary axis).
//
// # Methods and accuracy
//
// Everything is computed from the polynomials, without a grid. Roots come
// from package poly (companion eigenvalues refined by the Aberth iteration
// with compensated residuals), with multiple roots recognised there (see
// poly.RootsWithSettings). Crossings are the real roots of the even polynomial
// Im(a(jω)·conj b(jω))/ω in ω² (after the bilinear map z = (1+w)/(1−w) in
// discrete time), polished by Newton's method on the two real equations in
// (ω, k). Break points are the roots of the expanded a′b − ab′, each simple
// one polished by Newton's method on the unexpanded form (a, a′, b, b′ by
// the compensated Horner scheme, then a math/big residual with the
// derivatives' coefficients formed exactly); k is stationary there, so its
// error is second order, and it is evaluated by the compensated scheme.
// Stability of each piece between critical values is decided by the Routh
// array (Routh 1877; Hurwitz 1895) up to degree 40; above it, or when a
// pivot is near zero, by the closed-loop roots, whose verdict is accepted
// only when the Weierstrass inclusion disc of every root (Braess & Hadeler
// 1973), widened to cover the rounding of the coefficients of a + k·b as
// they are formed, stays off the stability boundary — otherwise the
// analysis returns ErrIllConditioned instead of a verdict (1/(s+1)^n for
// n = 100 to 500: near the n-fold pole the closed-loop roots are so
// sensitive that a change of one rounding unit in the coefficients can
// move them across the axis). Against
// 50-digit references (the reference cases, testdata/golden.py and
// testdata/breaks_highorder.py) crossing values agree to 4e-16, break points
// and their values to 4u (orders 12 to 24; the expanded roots alone were
// 1.2e-7 off at order 24); departure angles within the 1e-6 degrees tested.
//
// Trace follows every root by predictor–corrector continuation (Allgower &
// Georg 2003) between consecutive special values (range ends, k = 0, break
// points, the degree drop), with the crossings as exact waypoints inside
// the pieces; break points and multiple poles are left along their Puiseux
// directions, towards ±∞ the variable is changed to log k; see trace.go and
// branch.go for the details. Each root is followed with its own step, set
// by its own chord, turn and predictor error (cubic Hermite predictor from
// the last two points and tangents ds/dk = −b/(a′ + k·b′), Newton
// corrector), so a slow branch is not sampled at the pace of the fastest
// one. Every traced point satisfies |a(s) + k·b(s)| ≤
// 1e-9·(Σ|aᵢ||s|ⁱ + |k|·Σ|bᵢ||s|ⁱ) (a and b with the roots they share
// divided out; those are returned as constant branches). A piece is
// accepted only when no branch can have jumped onto another: the two half
// traces of a piece, each started from an independent root computation,
// must meet one to one and unambiguously at its middle, and the branches
// towards an end must each reach their own limit or leave the extent disc
// apart (a branch that jumps follows the other from there on, so two
// branches would end together). Otherwise the piece is traced again in
// lockstep, where every correction must be small against the distance to
// every other root at the same value, unless both lie within the rounding
// noise of an ill-conditioned cluster, where double precision cannot tell
// them apart (TraceStats.Retraced counts such pieces). When the lockstep
// step size underflows in such a cluster, the trace decides branch
// identity on the full root set instead: it computes every root at a
// slightly larger value, polishes them by Newton's method, pairs them with
// the current roots by nearest-set matching, and continues from there
// with a step that keeps each chord within its limit and each residual
// below 1e-10 (TraceStats.RootSolves counts these root computations; the
// locus carries a note). On the ill-conditioned order-18 family of
// TestIllConditionedOrder18 this leaves 26 of 480 traces ending in an
// error (33 before), 4 with a residual above 1e-9 and 24 with a chord
// above the limit inside the view (55 before); at most 64 restarts per
// piece bound its cost.
//
// # Performance
//
// BenchmarkTrace and BenchmarkBaselineGrid compare, side by side in one
// run, the trace with the naive baseline a Go engineer writes by hand
// (2000 log-spaced gains over the same span, companion-matrix eigenvalues
// from gonum at each, branches matched to the nearest root of the previous
// gain) on a deterministic family of loops of order 4, 8, 12, 16 and 24
// (mixed real and complex poles, some unstable; n/4 zeros). Measured on a
// shared, heavily loaded 2-core machine, one run of 5 iterations
// (testdata/benchmarks.txt; read the ratios to within a factor of 2):
//
//	order               4      8     12     16     24
//	speed-up          54×   101×    34×    29×    57×
//	points, trace     412    592   1037   1530   4643
//	points, grid     8000  16000  24000  32000  48000
//	deviation, trace  2.0e-4 1.5e-4 1.6e-4 1.7e-4 1.2e-4
//	deviation, grid   5.8e-3 1.9e-4 4.4e-4 2.4e-4 7.2e-4
//
// The deviation is the largest distance from the middle of a chord to the
// exact locus, relative to the view scale (a second-order level-set
// estimate, so no reference trace is needed). Neither method showed a
// branch swap on this family under the independent continuation check.
// The grid's interpolated crossing gains are off by 5e-6 to 7e-5 and its
// break gains by 1 % to 2 %.
//
// The project's harness (../shared/perf/compare) asks instead for the
// trace at the largest ChordTolerance whose largest chord inside its own
// window (±1.5·max|pole, zero|) is no longer than the grid's. Its full run
// (testdata/harness_full.md, wall clock on a 2-core machine shared by eight
// engineers, load average 5 to 7) gives 53× to 90× (family orders 2 to 24
// and the two textbook loops; 53× at order 2, 60× at order 4, where the
// largest tolerance of the harness's ladder, 0.02, already leaves the
// trace's chord below the grid's), special points exact to 4.3e-15, no
// branch swaps, Trace complete at orders 40 and 60 (there the per-branch
// traces of 6 and 9 pieces are inconclusive and those pieces are traced
// again in lockstep: 17682 and 23406 points), and Analyze growing as n^3.3 from order 24 to
// 40 and n^2.8 from 40 to 60 in that run. Analyze now grows as n^2.8
// from order 24 to 60 (it was n^3.3): per BenchmarkAnalyzeGrowthExponent,
// which alternates the harness's order-24 and order-60 loops on the
// thread CPU clock, 1.7 ms and 22 ms against 1.7 ms and 35 ms before
// (testdata/analyze_growth.txt); the full harness run of 2026-12-06
// (testdata/perf_harness_full.txt at the repository root) measured
// 1.70 ms and 23.0 ms, n^2.84, with the trace 53× the grid or better. Two changes did it: a piece of the range
// where a coefficient of a + k·b certainly has the wrong sign is unstable
// without its roots (Stodola's condition; above degree 40 the Routh array
// is not trusted and each piece used to cost a root solve), and the
// break-point polynomial is solved without cluster recognition unless
// two of its roots lie close together where −a/b is real (the
// recognition's backward-error checks in math/big were a fifth of the
// time at order 60). What remains at order 60 is the eigenvalues of the
// degree-118 break-point polynomial (about half; complex break points
// need every root, so real-root isolation alone cannot replace it), the
// poles and zeros, and the real roots of a + k·b at the range ends, whose
// clustered negative roots defeat certified isolation at orders 40 and 60
// (it falls back to the eigenvalues). Each root is followed with its own step, so
// the points go where a branch moves (1360 points at order 8 against 4816
// with one common step for all roots); the time goes to Newton evaluations
// of a + k·b (one to two per step; real roots in real arithmetic), to one
// eigenvalue solve per special value and, from order 12 on, to Analyze
// (about 40 % of a trace: the roots of the degree-(n+m−1) break-point
// polynomial).
//
// # Invariants
//
// Inputs are never modified; results are fresh values; every function is
// safe for concurrent use. Bad input (b ≡ 0, NaN or infinite values, an
// empty range, a non-affine parameter, a point off the locus) returns an
// error matching a sentinel of errors.go, never a panic.
package locus
