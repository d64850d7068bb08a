// Package spec checks a feedback loop against a list of requirements —
// minimum phase, gain and delay margins, maximum peak sensitivity, minimum
// damping ratio of the closed-loop poles, maximum overshoot, rise time,
// settling time and steady-state error; and, given the loop's parts
// (Settings.Loop, analysed by package closedloop), the peak deviation,
// recovery time and IAE after a load-disturbance step, the peak control
// signal after a reference step and the largest gain from measurement noise
// to the control signal — and returns one verdict per
// requirement with the measured value and a sentence in full words. It is
// meant for test rigs and continuous integration: a Go test reads
//
//	req := spec.Requirements{
//		spec.MinPhaseMarginDeg(45),
//		spec.MinGainMarginDB(6),
//		spec.MaxOvershootPct(10),
//	}
//	if err := spec.Check(loop, req).Err(); err != nil {
//		t.Fatal(err)
//	}
//
// and fails with a message that lists every requirement not met.
//
// # Conventions
//
// The loop is the loop transfer function L (in s, or in z with a sample
// period) of a unity negative-feedback loop: the closed loop from reference
// to output is L/(1 + L) and its characteristic polynomial is den(L) +
// num(L). Margins are those of package margins (phase margin in degrees,
// gain margin in dB, delay margin in seconds, peak sensitivity
// Ms = max|1/(1 + L(jω))|); step metrics are those of package response for
// the closed loop (rise time 10 % to 90 %, settling into the 2 % band,
// overshoot in per cent of the final value; common practice); the
// steady-state error is the error to a unit step, 1/(1 + Kp) with
// Kp = L(0) (0 when L has a pole at the origin).
//
// The damping ratio of a continuous closed-loop pole p is −Re(p)/|p|
// (1 for a real stable pole, negative for an unstable one, 0 for a pole on
// the imaginary axis, including p = 0). A discrete pole z is first mapped
// to s = ln(z)/T.
//
// # Dead time
//
// A continuous loop with dead time, L = N/D·e^(−sτ), has infinitely many
// closed-loop roots, the roots of D(s) + N(s)·e^(−sτ); far out they form
// chains with Re s ~ −ln|s|/τ whose damping ratio tends to 0, so "every
// closed-loop pole" is replaced by a stated set, the dominant roots: every
// exact root with
//
//	Re s > σ_d = min(F·Re s₁, −M·ω_c)   (F·Re s₁ only when Re s₁ < 0),
//
// s₁ the rightmost root and ω_c the highest gain crossover (dead time
// exact), F = Settings.DominantFactor (default 5) and
// M = Settings.DominantCrossoverMultiple (default 3). The factor 5 is
// common practice (a pole five or more times farther from the imaginary
// axis than the dominant ones adds little to the response); the crossover
// term keeps the loop's own oscillations in the set when a slow real root
// (near a zero) is rightmost. MinDampingRatio judges the smallest damping
// ratio over this set, computed from the exact roots
// (locus.DelayedRoots: Newton-polished to 1e-12 relative, and counted by
// the argument principle, so that no root of the set is missed); for an
// unstable loop the set holds every root with Re s ≥ 0. The verdict's
// message names the set (its abscissa and the number of roots); see
// DominantClosedLoopRoots. The step metrics of such a loop come from the
// exact delayed step response (response.ClosedLoopStepMetrics, the method
// of steps).
//
// Accuracy and cost: ζ over the dominant set agrees with the Lambert-W
// closed form of s + a·e^(−sτ) (mpmath, 50 digits) to 1e-11, and the
// exact step metrics with the method-of-steps closed form to 1e-9
// relative (see the tests). The exact damping check costs more than the
// Padé(6) poles it replaces, mostly in the argument-principle count:
// BenchmarkDampingDeadTime (testdata/bench_damping.txt, one run, fastest
// of three) measured 1.6 ms against 30 µs for e^(−s)/s, 0.39 ms against
// 44 µs for a PI loop on two lags, 19 ms against 64 µs for an order-6
// loop.
//
// A Padé approximation of Settings.PadeOrder replaces the dead time for the
// damping ratio and the step metrics when Settings.PadeDeadTime asks for
// it, for a biproper loop (with dead time its closed loop is of neutral
// type, which the exact analyses do not cover), and for the step metrics of
// a Settings.ReferenceToOutput (its delay structure is not the loop's);
// the message then says so and why. A whole number of sample periods of
// dead time in a discrete loop is exact (poles at z = 0).
//
// A requirement on a margin fails when the closed loop is unstable, whatever
// the margin's value: margins of an unstable loop are not safety margins.
// A quantity that cannot be measured (the step metrics of an unstable loop)
// fails its requirement, and the message says why. An infinite margin (no
// crossover) passes a minimum; a phase margin that does not exist because
// |L| < 1 at every frequency passes when the closed loop is stable.
//
// # Invariants
//
// Requirement, Requirements, Result and Report are values; Check never
// modifies its inputs and is safe for concurrent use. Check returns exactly
// one Result per Requirement, in the order given. Report.Err returns nil if
// and only if every result passes.
package spec
