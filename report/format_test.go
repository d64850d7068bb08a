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

// TestTypeset checks the one number format of the outputs (issue 11, item
// 19): the minus sign U+2212, exponents as 1e308, a no-break space before
// a unit.
func TestTypeset(t *testing.T) {
	for _, test := range []struct{ in, want string }{
		{"pole -2.802 ± 10.96j", "pole −2.802 ± 10.96j"},
		{"the phase margin is -13° at 1.8 rad/s", "the phase margin is −13° at 1.8\u00a0rad/s"},
		{"limit -1e+308; (-1,-2)", "limit −1e308; (−1,−2)"},
		{"1.5e-07 s", "1.5e−7\u00a0s"},
		{"0.9202 % and 10 dB", "0.9202\u00a0% and 10\u00a0dB"},
		{"step-response, degree-500, s - 1, z^-1, 3 samples", "step-response, degree-500, s - 1, z^−1, 3 samples"},
	} {
		if got := typeset(test.in); got != test.want {
			t.Errorf("typeset(%q) = %q, want %q", test.in, got, test.want)
		}
	}
	if got := gUnit(Number(0.92), "%"); got != "0.92\u00a0%" {
		t.Errorf("gUnit(0.92, %%) = %q", got)
	}
}
