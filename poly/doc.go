// Package poly provides real polynomials: exact arithmetic on coefficient
// lists, evaluation with error bounds, derivatives, composition, an
// approximate greatest common divisor, and roots found to the accuracy the
// double-precision coefficients allow, with multiple roots recognised.
//
// # Conventions
//
// Public constructors take coefficients the way they are written on paper,
// highest power first: New(1, 3, 2) is x² + 3x + 2. Coef(i) and the
// internal storage use the power as index. The variable is called x in this
// package; packages above call it s or z.
//
// The zero polynomial has degree −1 and no roots. Leading zero coefficients
// are dropped on construction, so Degree is always the true degree.
//
// # Invariants
//
// A Poly is an immutable value: its coefficients are never modified after
// construction, inputs are copied on entry and slices returned by methods are
// fresh copies. A Poly is safe for concurrent use. Constructors reject NaN and
// ±Inf coefficients with ErrNotFinite. Arithmetic (Add, Mul, ...) returns a
// plain Poly for readability; should a coefficient overflow, IsFinite reports
// false and every method that computes a number from the polynomial (Roots,
// Monic, DivMod, GCD) returns ErrNotFinite instead of a wrong value.
//
// # Roots
//
// Roots combines the eigenvalues of the balanced companion matrix (through
// gonum's mat.Eigen; Edelman & Murakami 1995 show this is backward stable in
// the coefficients) with Newton refinement whose residual is evaluated by the
// compensated Horner scheme (Graillat, Langlois & Louvet 2005), and with
// cluster recognition for multiple roots (after Zeng 2004 and Kahan 1972).
// See the Roots method for details and the accuracy obtained.
package poly
