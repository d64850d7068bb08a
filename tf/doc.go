// Package tf provides transfer functions of single-input single-output
// linear time-invariant systems: rational functions N/D in s (continuous
// time) or z (discrete time), with an exact dead time. It offers
// construction from coefficients, zeros–poles–gain, state-space models and
// text; block algebra (series, parallel, feedback); queries (poles, zeros,
// static gain, evaluation on the imaginary axis or the unit circle); Padé
// approximation of dead time; and discretization.
//
// # Conventions
//
// Coefficients are given highest power first, as written on paper:
// New([]float64{1, 2}, []float64{1, 3, 2}) is (s + 2)/(s² + 3s + 2).
// A sample period of 0 marks a continuous-time transfer function in s; a
// positive sample period (seconds) marks a discrete-time one in z. Dead time
// is in seconds and multiplies the rational part as e^(−s·T).
// Frequencies are in rad/s. Feedback is negative unless the name says
// otherwise: Feedback(G, H) = G/(1 + G·H).
//
// The text form reads numbers (2, 0.5, 1e-3), the variable s (or z), the
// operators + − * / and ^ with integer exponents, parentheses, implicit
// multiplication (10(s+1)/(s(s+5)^2), 2.5s), exp(−T·s) for dead time (T in
// seconds, in both domains), and named parameters where the caller
// supplies them. String prints this form and Parse reads it back to the
// same value.
//
// Dead time is kept exactly by evaluation, series connection and
// FrequencyResponse. Operations whose result would not be rational times
// one dead time (feedback around a delay, sums of different delays) return
// ErrDelayInLoop; Pade replaces the dead time by a rational approximation
// of stated order. In discrete time a dead time of k·T is the factor z^(−k).
//
// Discretize follows the conventions of the project's reference cases:
// numerator and denominator in z, highest power first, the denominator
// monic; the zero-order-hold numerator of a strictly proper G of order n
// has degree n − 1 (its zero z^n coefficient is dropped); Tustin uses
// s = c(z − 1)/(z + 1) with c = 2/T, or c = ω₀/tan(ω₀T/2) when pre-warped
// at ω₀. Whole sample periods of dead time become poles at z = 0; a
// fractional remainder is kept exactly by the zero- and first-order holds
// (the modified z-transform) and is an error (ErrFractionalDelay) for Tustin
// and matched pole–zero.
//
// FromStateSpace reads single-input single-output models ẋ = Ax + Bu,
// y = Cx + Du given as gonum matrices.
//
// # Invariants
//
// A TF is an immutable value, safe for concurrent use; inputs are copied on
// entry. Its denominator is never zero, every coefficient, the dead time and
// the sample period are finite, and the dead time and sample period are
// non-negative. Numerator and denominator are kept as given (leading zeros
// dropped, no common factors cancelled, no normalisation), so a value prints
// the way it was written; EqualApprox compares the normalised forms, and
// Normalized and Minimal give the monic and the cancelled forms.
// The zero value of TF is the continuous-time zero transfer function 0/1.
package tf
