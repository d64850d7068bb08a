// Package layers holds the test that enforces the import layering of
// loopwise (see DEVELOPERS.md): internal ← poly ← tf ← {locus, margins,
// response} ← {chart, spec} ← examples. It has no code of its own.
package layers
