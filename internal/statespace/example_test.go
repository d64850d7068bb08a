package statespace_test

import (
	"fmt"
	"log"

	"github.com/loopwise/loopwise/internal/statespace"
)

// The exact zero-order-hold equivalent of 2/(s + 1) at T = 0.1 s:
// Φ = e^(−0.1), and C·Γ = 2(1 − e^(−0.1)), the gain of one held sample.
func ExampleModel_ZeroOrderHold() {
	m, err := statespace.FromTransferFunction([]float64{2}, []float64{1, 1})
	if err != nil {
		log.Fatal(err)
	}
	phi, gamma, err := m.ZeroOrderHold(0.1)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("Φ = %.6f, CΓ = %.6f\n", phi.At(0, 0), m.C[0]*gamma[0])
	// Output:
	// Φ = 0.904837, CΓ = 0.190325
}
