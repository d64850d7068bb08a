package report

import (
	"math"
	"testing"
)

func TestFormatting(t *testing.T) {
	tests := []struct{ got, want string }{
		{g(Number(23040)), "23040"},
		{g(Number(-0.4226497)), "−0.4226"},
		{g(Number(1.5e-7)), "1.5e-7"},
		{g(Number(math.Inf(1))), "infinite"},
		{g(Number(math.NaN())), "none"},
		{factorText([]complex128{-40, complex(-3.6, 11.45), complex(-3.6, -11.45), -2, 0}, "s"), "s·(s + 2)·(s^2 + 7.2s + 144.1)·(s + 40)"},
		{factorText([]complex128{1, 0.5}, "z"), "(z − 0.5)·(z − 1)"},
		{factoredText(2, []complex128{-1}, []complex128{0, -3}, "s", 0.5, false), "2·(s + 1)/(s·(s + 3))·e^(−0.5s)"},
		{rootList([]Complex{newComplex(complex(-1, 2)), newComplex(complex(-1, -2)), newComplex(-3)}), "−1 ± 2j, −3"},
		{intervalText(Interval{Number(math.Inf(-1)), 0}), "(−∞, 0)"},
		{ordinal(6), "6th"}, {ordinal(2), "2nd"}, {ordinal(11), "11th"},
	}
	for _, test := range tests {
		if test.got != test.want {
			t.Errorf("got %q, want %q", test.got, test.want)
		}
	}
}
