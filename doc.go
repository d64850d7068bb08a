// Package loopwise is the root of a pure-Go library for the analysis of
// linear feedback loops. It holds no code: the work is done by its
// packages, which import one another downwards only.
//
//   - poly: real polynomials and their roots, multiple roots recognised.
//   - tf: transfer functions in s or z with exact dead time, text form,
//     algebra, Padé approximation and discretization.
//   - locus: root loci with every construction quantity computed exactly,
//     parameter loci, exact stable intervals and adaptive tracing.
//   - margins: gain, phase and delay margins, crossovers, peak
//     sensitivities, Nyquist stability, margins from measured data.
//   - response: time responses and exact step metrics, steady-state errors.
//   - spec: requirement checks for test rigs.
//   - chart: plots on gonum/plot (optional; nothing else imports it).
//
// Results describe a linear model; see the README for the safety caution.
package loopwise
