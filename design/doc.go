// Package design answers the inverse of a requirement check: which values
// of a design variable — the loop gain, or a parameter entering the loop
// affinely — meet every requirement, exactly, and which region of a plane
// of two parameters keeps the loop stable and meets them (D-partition).
//
//	v, err := design.Gain(loop)                         // L_k = k·L
//	res, err := design.Solve(v, req, nil)               // sets per requirement, AllMet, Suggested
//	ks, err := design.Values(v, design.PhaseMarginDeg(60), nil) // every k with PM = 60°
//	pl, err := design.NewPlane("Kp", "Ki", "(Kp*s + Ki)/s", plant)
//	pr, err := design.Partition(pl, nil)                // boundaries, regions, unstable-root counts
//
// # One variable
//
// The loop is L_v = (N₀ + v·N₁)/(D₀ + v·D₁)·e^(−sτ), so the closed-loop
// characteristic polynomial is affine in v (the loops package locus
// handles). For each requirement of package spec, Solve returns the set of v
// in the range where it holds, as disjoint intervals whose ends are labelled
// with what binds there, and their intersection with the stable set.
//
// Each requirement with an exact construction has a finite set of
// candidate values at which its verdict may change; the verdict is then
// constant between neighbouring candidates and is decided by one call of
// spec.CheckWith inside each piece. The candidates are solutions of
// equations in (ω, v), never of a scan over v:
//
//   - stability: the exact stable intervals of locus.Analyze (axis
//     crossings and the degree drop);
//   - phase margin φ: L_v(jω) = e^(j(φ−180°)), i.e. U + v·W = 0 with
//     U = N₀ − e^(jθ)D₀, W = N₁ − e^(jθ)D₁; v is real where the real
//     polynomial Im(U·conj W) in ω vanishes; plus the values where a gain
//     crossover appears or disappears (|N_v|² − |D_v|² has a double root in
//     ω²) and where the phase margin wraps at 180° (L_v = 1);
//   - gain margin g dB: L_v(jω) = −10^(−g/20), at ω > 0, ω = 0 and the
//     Nyquist frequency; plus the values where a phase crossover appears or
//     disappears (a double root of Im(N_v·conj D_v)/ω in ω²);
//   - peak sensitivity Ms = m: |D_v + N_v|² − m⁻²|D_v|² = F(ω², v) has a
//     double root in ω² (F = 0 and ∂F/∂ω² = 0): the positive roots of the
//     resultant in v of the two quadratics in v, polished by Newton's
//     method on the two real equations; plus the ends of the frequency
//     axis;
//   - delay margin τ: N_v(jω)e^(−jωτ) + D_v(jω) = 0 for ω < 2π/τ, a
//     transcendental equation: its imaginary part is scanned on 4000
//     frequencies (in continuous time as three real polynomials in ω
//     combined with cos ωτ and sin ωτ) and every sign change refined by
//     Brent's method; plus the jumps of the phase margin above;
//   - damping ratio ζ (continuous time): locus.DampingCrossings;
//   - steady-state error e: (1 − e)·D_v(0) − e·N_v(0) = 0, linear in v.
//
// Discrete loops are mapped to the same form by z = (1 + w)/(1 − w). The
// positive real roots of these polynomials are isolated by
// poly.RealRootsIn (no complex roots are computed). Step metrics
// (overshoot, rise and settling time), requirement kinds this package does
// not know, the damping ratio in discrete time and the margins of loops
// with dead time have no such construction: each piece between stability
// boundaries is sampled (Settings.Samples values) and every change of the
// verdict between neighbours is located as follows. RequirementSet.Method
// says which method gave a set ("bracketing" for all of these). A sample
// is judged by response.StepMetrics (through spec.CheckWith) unless exact
// values of its step response on a grid prove every step-response verdict
// there (certify.go: the overshoot fails, the rise time holds because y
// reaches 90 % before T, the settling time fails because y is outside the
// band after T, each with a margin of 1e-9 relative) — the usual case near
// a stability boundary, where the step metrics are the most expensive.
// Pieces where the closed loop is unstable fail every exactly constructed
// kind without a check (no dead time).
//
//   - Settling time T_s ≤ T (continuous time, no dead time): T_s ≤ T
//     exactly when B = max over t ≥ T of |y − y_∞|/|y_∞| is at most the
//     band; B is continuous in the variable even where T_s jumps (where an
//     extremum of y after T touches the band), so the end is the root of
//     B − band by Brent's method, B computed from exact values of the
//     response at located extrema (jump.go): one realisation of the closed
//     loop per value, y and y′ on a grid from one zero-order-hold
//     transition, values between grid points from the grid state and one
//     short transition, the 10 % time by Newton's method safeguarded by
//     bisection, the value at an extremum from one exact evaluation (y,
//     y′, y″) at the extremum of the cubic Hermite interpolant of y′ on its
//     grid cell and the quadratic model there (Newton's method when its
//     step exceeds 1e-3 of the cell) (points.go).
//   - Rise time ≤ T (same loops): it holds exactly when the largest value
//     of y/y_∞ up to t₁₀ + T reaches 90 %; the same construction locates
//     both its continuous ends and its jumps.
//   - Overshoot (same loops): computed from the exact value of y at the
//     largest extremum; its root by Brent's method.
//   - These ends are accepted only when response.StepMetrics (through
//     spec.CheckWith) confirms them: a continuous end where the metric
//     equals the limit to 1e-10 relative, a jump where the requirement
//     holds on one side and fails on the other at 1e-6 relative.
//   - Otherwise (discrete time, dead time, no oscillating pole pair, no
//     confirmation, other kinds): Brent's method on the slack (Brent 1973)
//     to 1e-11 relative; a quantity that jumps is located by bisection to
//     1e-5 relative and the end labelled so.
//
// Right at a stability boundary the step response rings for ever and
// cannot be measured: the step-metric sets end there by the samples'
// verdict.
//
// # Slack and the suggested value
//
// The relative slack of a requirement is (value − limit)/|limit| for a
// minimum and (limit − value)/|limit| for a maximum (|limit| replaced by 1
// for a zero limit); −∞ when the value cannot be measured. The suggested
// value maximises the smallest slack over the requirements inside the set
// where all hold: the smallest slack of the exactly constructed kinds
// (cheap) is maximised first by golden-section search (Kiefer 1953) from
// the values where they were already evaluated; if the step-metric slacks
// are larger there, that is the answer, else the crossing of the two
// (Brent's method to 1e-3 of the interval, bracketed by the nearest
// values already evaluated; the sets found before say where each group's
// smallest slack is negative, which saves evaluations), or a
// golden-section search on all of them. When
// no value meets them all, the pairs of requirements whose sets do not
// overlap are named and the value with the largest smallest slack is given
// as the best compromise, with the requirements it fails. With robustness
// requirements alone (margins, Ms, damping) the slack is often largest at
// the smallest values of a gain, where the loop is slowest: add a
// performance requirement (rise or settling time, steady-state error) to
// pull the suggestion towards a useful loop.
//
// # Accuracy and speed
//
// Interval ends from the exact constructions agree with 50-digit mpmath
// references (testdata/gen_refs.py) to 1e-9 relative or better, and at
// every end the quantity measured by spec.CheckWith equals its limit to
// 1e-9 (solve_test.go, more_test.go). Bracketed ends of continuous
// quantities are polished to 1e-11 relative (or confirmed to 1e-10 of the
// limit); jumps are located to 1e-6 (confirmed on both sides) or, by
// bisection, to 1e-5. TestDirectEnds checks the directly located ends
// against plain bisection on spec.Check; TestStepBounds every certified
// sample verdict against spec.CheckWith; TestExtremumValue the extremum
// values against Newton's method on the exact y′ (1e-12 of the largest
// |y|); TestUnstableFails the verdicts assumed on unstable pieces.
//
// Measured (testdata/benchmarks.md, BenchmarkRatio, CPU time of the
// thread, side by side with the baseline in one process): the
// one-variable design of an order-10 loop with all nine requirement kinds
// costs about 28–30 times one margins.Compute plus response.StepMetrics
// of the same loop (37–38 for the code before the certificates, measured
// in the same session; 130–350 before the constructions above); for an
// order-6 PI loop whose baseline is very cheap (0.13 ms) it costs about
// 5.0–5.5 ms, 36–41 times the baseline (48–54 before). The plane of a PI
// loop of order 8 takes about 4.5 ms on one core.
//
// # Conventions
//
// Requirements are those of package spec and are judged by spec.CheckWith
// (unity negative feedback; margins of an unstable loop fail). Frequencies
// are in rad/s. The range of the variable is Settings.Range, (0, +Inf) by
// default. Dead time of a continuous loop is kept exact: the margins and
// the step metrics through spec, the stable set on the quasi-polynomial
// (locus.DelayedParametric; Result.StableNote says so), the damping ratio
// as spec's smallest damping of the dominant exact roots (bracketed on that
// metric). A Padé approximation of Settings.PadeOrder remains for the
// stable set where the exact analysis refuses (StableNote says why), for
// the plane and in discrete time only for whole sample periods (exact
// powers of z).
//
// # Invariants
//
// Inputs are never modified; results are fresh values; every function is
// safe for concurrent use. Bad input returns an error wrapping a sentinel of
// errors.go, never a panic.
//
// References:
//   - R. P. Brent, Algorithms for Minimization without Derivatives,
//     Prentice-Hall 1973, ch. 4.
//   - J. Kiefer, "Sequential minimax search for a maximum", Proc. AMS 4,
//     1953.
//   - Yu. I. Neimark, "Search for the parameter values that make an
//     automatic control system stable" (D-partition), Avtomatika i
//     Telemekhanika 9(3), 1948, from memory.
//   - J. Ackermann, Robust Control: The Parameter Space Approach, 2nd ed.,
//     Springer 2002, from memory.
package design
