// Package closedloop forms every closed-loop transfer function of the
// standard feedback loop and the metrics a control engineer signs a loop
// off with beyond the reference step: how far a load disturbance pushes
// the output and how fast it recovers, how hard the actuator is driven,
// how much measurement noise reaches it, and the integrated error.
//
// The loop (see Loop) is
//
//	u = k·C·(F·r − (H·y + n)),   y = G·(u + d) + dₒ,   e = r − y,
//
// with L = k·C·G·H. Of forms the twelve functions from the inputs r, d,
// dₒ, n to the outputs y, e, u once from the parts' polynomials, minimal,
// with the cancelled pole–zero pairs listed, and decides internal
// stability on the uncancelled characteristic polynomial, so that an
// unstable plant pole cancelled by a controller zero is reported in every
// function (Function.HiddenModes, Function.InternallyStable) and every
// metric returns ErrInternallyUnstable.
//
// # Conventions
//
//   - Steps are unit steps applied at t = 0; times are in seconds from the
//     step; frequencies in rad/s; peaks are ratios, not dB.
//   - Step metrics are located on the exact response: the augmented state
//     (x, ∫y, ∫∫y, 1) is advanced by one matrix exponential per grid step
//     and evaluated exactly between grid points, and extrema, zero
//     crossings and band crossings are found by Brent's method to a few
//     ulps; values then carry the realisation's rounding (about 1e-13
//     relative for the orders of interest).
//   - The recovery band after a load-disturbance step defaults to 2 % of the
//     peak deviation (common practice, by analogy with the 2 % settling band
//     of a reference step).
//   - A residual offset is a result (StepDeviation.FinalValue), never an
//     error; with a residual offset the integral criteria are +Inf.
//   - ISE and the H2 norms come from Lyapunov equations on the realisation
//     (the Lyapunov form of the quadratic integral); IAE and ITAE sum the
//     exact running integrals between the located zero crossings, with the
//     exact tail beyond the horizon and a stated bound.
//   - Discrete loops: the responses are the sample sequences read as held
//     (piecewise-constant) signals; integrals are those of the held signal
//     (T·Σ|e[k]|, T·Σe[k]²), the H2 norm is per sample, and "high
//     frequency" means the Nyquist frequency π/T.
//   - Dead time: exact in every frequency-domain quantity (FrequencyResponse
//     and Peak evaluate the parts with their dead time) and in the time
//     metrics of a continuous loop (StepDeviation, ControlEffort,
//     ErrorIntegrals and StepResponse use the exact response of the delay
//     equation, response.ClosedLoopStep, with stability from the exact
//     rightmost root, locus.DelayedRoots; see delayed.go). The rational
//     Function.TF, the characteristic polynomial, ClosedLoopPoles and the
//     H2 norms of NoiseGains carry the Padé approximant of order
//     Settings.PadeOrder (default 8) in place of the loop's dead time
//     (Functions.DelayApproximated says so). InternallyStable and
//     UnstablePoles are decided on the exact quasi-polynomial (its
//     rightmost root with the argument-principle count of
//     locus.DelayedRoots, or stability for every dead time by
//     locus.DelayedStableDelays when the roots are too many to count;
//     Functions.StabilityExact says so), not on the Padé polynomial, whose
//     verdict can be wrong near a stability limit; only a biproper loop
//     (neutral type) or a case with no proof keeps the Padé verdict. A
//     dead time of the prefilter alone is kept exactly as a shift. In
//     discrete time a dead time of whole samples is exact (poles at z = 0).
//     With dead time, ControlEffort.InitialValue is the value just after
//     the step has passed the function's own dead time (the controller's
//     and the prefilter's), u(0+) when they have none.
//
// # Invariants
//
// Inputs are never modified; Functions is immutable after Of and safe for
// concurrent use.
package closedloop
