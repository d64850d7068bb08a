package words

import (
	"math"
	"testing"

	"github.com/loopwise/loopwise/poly"
)

func TestFormats(t *testing.T) {
	tests := []struct {
		name, got, want string
	}{
		{"point", Point(complex(-3.6, -3.7)), "-3.6 - 3.7j"},
		{"real point", Point(-2), "-2"},
		{"pair once", Points([]complex128{-40, complex(-3.597, 3.67), complex(-3.597, -3.67)}), "-40, -3.597 ± 3.67j"},
		{"no points", Points(nil), "none"},
		{"roots", Roots([]poly.Root{{Value: 0, Multiplicity: 2}, {Value: -1, Multiplicity: 1}}), "0 (double), -1"},
		{"polynomial", Polynomial(poly.MustNew(1, -1.951229424500714, 0.951229424500714), "z"), "z^2 - 1.95123 z + 0.951229"},
		{"leading minus", Polynomial(poly.MustNew(-2.5, 0, 1), "s"), "-2.5 s^2 + 1"},
		{"constant", Polynomial(poly.MustNew(3), "s"), "3"},
		{"interval", Interval(45.87, 299.3, "Kc", "A/m"), "45.87 < Kc < 299.3 A/m"},
		{"open interval", Interval(0, math.Inf(1), "k", "(factor)"), "k > 0 (factor)"},
		{"infinite margin", GainMargin(math.Inf(1), math.Inf(1), math.NaN()), "infinite (the phase never reaches −180°)"},
		{"margin", GainMargin(2.554, 8.146, 195.6), "2.554 (+8.15 dB) at 195.6 rad/s"},
		{"milliseconds", Seconds(0.3582), "358.2 ms"},
		{"seconds", Seconds(53.97), "53.97 s"},
	}
	for _, tt := range tests {
		if tt.got != tt.want {
			t.Errorf("%s: got %q, want %q", tt.name, tt.got, tt.want)
		}
	}
}
