// Package statespace builds well-conditioned state-space realisations of
// single-input single-output transfer functions and their exact sampled
// (hold) equivalents. It is internal: the realisation is a numerical tool
// shared by the analysis packages, not a public model type.
//
// # Conventions
//
// Coefficients are highest power first, as written on paper. A Model is
// x' = A·x + B·u, y = C·x + D·u in continuous time, or
// x[k+1] = A·x[k] + B·u[k], y[k] = C·x[k] + D·u[k] when the same
// coefficients are read as polynomials in z. Times are in seconds.
//
// The realisation is the controllable companion form of num/den made
// well conditioned by two diagonal similarity transformations: first a
// frequency scaling of the state by powers of ρ (a bound on the largest root
// modulus of den), then Parlett–Reinsch balancing (Parlett & Reinsch,
// "Balancing a matrix for calculation of eigenvalues and eigenvectors",
// Numer. Math. 13, 1969) as implemented by gonum's LAPACK Dgebal. Both
// transformations are diagonal, so the companion state is recovered exactly
// by x_companion = diag(Scale)·x.
//
// # Invariants
//
// Inputs are never modified; a Model owns its slices and matrix. Every
// entry of a returned Model is finite.
package statespace
