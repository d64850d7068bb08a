// Package robust analyses feedback loops whose plant, controller, sensor or
// dead time depend on uncertain parameters with known ranges, and gives
// guarantees, not samples: a proof that the closed loop is stable for every
// parameter value in the box (or a verified unstable point, or "undecided"
// with the unproven sub-boxes), the worst phase, gain and delay margins,
// damping ratio and peak sensitivity over the box with guaranteed bounds,
// the robust verdict of every spec requirement, and Monte Carlo and grid
// sweeps at scale with confidence intervals.
//
//	l, err := robust.NewLoop(robust.Description{
//		Expressions: []string{"9*g/(s^2 (m s + 1))", "0.4 + 0.3 s"},
//		Params: []robust.Param{{Name: "g", Min: 0.8, Max: 1.2}, {Name: "m", Min: 0.05, Max: 0.08}},
//	})
//	st, err := robust.Stability(l, nil)           // proof, counterexample or undecided
//	worst, st, err := robust.WorstCases(l, nil)   // worst value, its point, a guaranteed bound
//	mc, err := robust.MonteCarlo(ctx, l, req, &robust.SampleSettings{Samples: 10000, Seed: 1})
//
// # Conventions
//
// The loop transfer function L is the series product of the expressions,
// read by tf.ParseWith with the parameter values; the closed loop is the
// unity negative-feedback loop L/(1 + L) with characteristic function
// den + num·e^(−sτ). Parameters are given by name and closed range; the
// scaled parameter t = (p − mid)/radius ∈ [−1, 1] is used inside. Margins
// are those of package margins (phase margin in degrees, gain margin in dB,
// delay margin in seconds, Ms absolute), requirements those of package spec.
//
// # Methods
//
// The coefficients of N and D are recovered as exact polynomials in the
// parameters (NewLoop: Chebyshev-grid interpolation, verified at further
// points) and classified (Class). Stability then uses, by class, Kharitonov's
// theorem with exact rational Routh arrays, the edge theorem, or zero
// exclusion of the value set on a subdivided box with outward-rounded
// interval arithmetic — see Stability for the sources. Discrete loops are
// mapped exactly to the axis by the bilinear map (poly.CircleToAxis), which
// keeps the class of dependence. A loop written in s and converted to z
// (Description.Discretize) is supported for the Tustin method, whose
// substitution s = c(z − 1)/(z + 1) is a fixed linear map of the recovered
// coefficients, so they stay polynomial in the parameters; the holds and
// the matched pole-zero map (exponentials of parameter-dependent poles) are
// refused with ErrUnsupported rather than proven on an approximation.
// Bounds on margins come from the same engine applied to families widened
// by the margin (WorstCases).
//
// # Speed
//
// BenchmarkThroughput (raw output in testdata/bench_throughput.txt) runs
// MonteCarlo with margins and step-metric requirements. On the idle shared
// 2-core machine (load average 0.4) one core analysed about 6000 loops/s at
// order 2 and 1200 at order 10, and two cores gave only 1.16× to 1.26×: the
// step metrics of package response allocated 0.5–1.3 MB per loop and the
// garbage collector serialised the workers (this package's workers share no
// lock or slice on the sample path). StepMetrics now reuses its buffers
// (19× to 40× less allocation per loop, results bit-identical), margins
// allocate 35–60 % less, and each sample computes the margins once (they
// serve the requirements through spec.Settings.Margins). Measured wall-clock
// on the 2-core machine, as the median of 10 interleaved 1-core/2-core pairs
// per order in one process (testdata/speedup.sh, testdata/speedup.txt),
// three runs on 2026-12-06: 1.77–1.85, 1.79–1.85 and 1.76–1.86 over
// orders 2–10 (the goal of ≥ 1.8 is met at most orders and missed by a few
// hundredths at some, within the spread between runs); with the garbage
// collector off the same pairs give 1.94–1.96, so what remains is the
// collector's share.
// MonteCarlo streams its statistics: 10⁶ samples (stability and margins,
// order 2) ran to completion in 33 MB resident memory
// (testdata/million.txt). A stability proof of the pick-and-place example
// (two parameters, edge theorem) takes about a millisecond; worst cases
// with bounds about 0.4 s.
//
// # Invariants
//
// A verdict "stable for the whole box" or "met for the whole box" is a proof
// about the recovered coefficient polynomials; "unstable at a point" and
// "violated at a point" carry a point at which the loop read by the parser
// has been checked (closed-loop roots, spec.CheckWith). Nothing is ever
// guessed: beyond the cell limits the answer is Undecided. Loops are
// immutable and every function is safe for concurrent use. Sampling results
// do not depend on the number of workers.
package robust
