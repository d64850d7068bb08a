package poly_test

import (
	"fmt"
	"log"

	"github.com/loopwise/loopwise/poly"
)

// A characteristic polynomial with three identical first-order filter
// stages (a triple pole at s = −2) and a lightly damped pair: the triple
// root comes back as one root of multiplicity 3, not three scattered
// points, and the pair as an exact conjugate pair.
func Example() {
	filters := poly.MustNew(1, 2).Pow(3)  // (s + 2)³
	resonance := poly.MustNew(1, 0.4, 25) // s² + 0.4s + 25
	p := filters.Mul(resonance)
	fmt.Println("p(s) =", p.Format("s"))

	roots, err := p.RootsWithMultiplicity()
	if err != nil {
		log.Fatal(err)
	}
	for _, r := range roots {
		fmt.Printf("root %.4g, multiplicity %d\n", r.Value, r.Multiplicity)
	}

	// Roots repeats a multiple root with exactly equal values.
	all, err := p.Roots()
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(len(all), "roots; the triple root is repeated exactly:", all[0] == all[1] && all[1] == all[2])

	// The normwise backward error of the root set, in units of 2⁻⁵³.
	eta, err := p.RootsBackwardError(all)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("backward error below 10·2⁻⁵³:", eta <= 10*0x1p-53)
	// Output:
	// p(s) = s^5 + 6.4*s^4 + 39.4*s^3 + 162.8*s^2 + 303.2*s + 200
	// root (-2+0i), multiplicity 3
	// root (-0.2-4.996i), multiplicity 1
	// root (-0.2+4.996i), multiplicity 1
	// 5 roots; the triple root is repeated exactly: true
	// backward error below 10·2⁻⁵³: true
}

// Evaluating near a root, where plain Horner's scheme loses most digits,
// the compensated scheme returns the value as if computed in twice the
// working precision, with a rigorous error bound.
func ExamplePoly_EvalCompensated() {
	// (x − 1)⁷ expanded; at x = 1.001 its value is 1e-21 to 12 digits
	// (1.001 is not exact in binary).
	p := poly.MustNew(1, -1).Pow(7)
	x := 1.001
	plain := p.Eval(x)
	v, bound := p.EvalCompensated(x)
	fmt.Printf("plain Horner: %.3e\n", plain)
	fmt.Printf("compensated:  %.6e (error bound %.1e)\n", v, bound)
	// Output:
	// plain Horner: -1.998e-15
	// compensated:  1.000000e-21 (error bound 2.5e-29)
}
