// Package crosscheck holds tests that compare the analysis packages with one
// another where their results must agree exactly: the gain margins of
// package margins against the stable gain intervals of package locus, and
// the stability verdicts of both. It has no code of its own; being a test of
// several siblings, it is the one place below the examples where locus and
// margins meet.
package crosscheck
