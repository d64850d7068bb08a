package tf

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestParse(t *testing.T) {
	tests := []struct {
		text     string
		num, den []float64 // expected, highest power first (hand expansion)
		delay    float64
	}{
		{"1/(s+1)", []float64{1}, []float64{1, 1}, 0},
		{"10(s+1)/(s(s+5)^2)", []float64{10, 10}, []float64{1, 10, 25, 0}, 0},
		{"2.5s", []float64{2.5, 0}, []float64{1}, 0},
		{"1e-3/(s+1e3)", []float64{1e-3}, []float64{1, 1e3}, 0},
		{"2E+2 s", []float64{200, 0}, []float64{1}, 0},
		{"(s+1)(s-1)", []float64{1, 0, -1}, []float64{1}, 0},
		{"-s^2 + 3*s - 2", []float64{-1, 3, -2}, []float64{1}, 0},
		{"s^-2", []float64{1}, []float64{1, 0, 0}, 0},
		{"1/(1/s)", []float64{1, 0}, []float64{1}, 0},
		{"(s+1)/(s+2) + 1", []float64{2, 3}, []float64{1, 2}, 0},
		{"2/(s+1)*exp(-0.5s)", []float64{2}, []float64{1, 1}, 0.5},
		{"exp(-0.2*s)*exp(-0.3*s)/(s+1)", []float64{1}, []float64{1, 1}, 0.5},
		{"exp(-s)^2", []float64{1}, []float64{1}, 2},
		{"(s+1)exp(-0.1s) + exp(-0.1s)", []float64{1, 2}, []float64{1}, 0.1},
		{"  4 / ( s ^ 2 + 2 s + 4 ) ", []float64{4}, []float64{1, 2, 4}, 0},
		{"3", []float64{3}, []float64{1}, 0},
		{"0/(s+1)", []float64{0}, []float64{1, 1}, 0},
		{"0*exp(-s) + 1/(s+1)", []float64{1}, []float64{1, 1}, 0}, // a zero term adds no dead time
		{"1/(s+1) - 0*exp(-s)", []float64{1}, []float64{1, 1}, 0},
	}
	for _, test := range tests {
		t.Run(test.text, func(t *testing.T) {
			g, err := Parse(test.text)
			if err != nil {
				t.Fatal(err)
			}
			want := MustNew(test.num, test.den)
			want, _ = want.WithDelay(test.delay)
			if !g.EqualApprox(want, 1e-15) {
				t.Errorf("got %v, want %v", g, want)
			}
		})
	}
}

func TestParseWithParams(t *testing.T) {
	g, err := ParseWith("(1+Ti*s)/(1+0.1s) * Kp", &ParseSettings{Params: map[string]float64{"Ti": 0.5, "Kp": 2}})
	if err != nil {
		t.Fatal(err)
	}
	if want := MustNew([]float64{1, 2}, []float64{0.1, 1}); !g.EqualApprox(want, 1e-15) {
		t.Errorf("got %v, want %v", g, want)
	}
	// Unknown names list the defined ones.
	_, err = ParseWith("a*s", &ParseSettings{Params: map[string]float64{"b": 1, "c": 2}})
	if !errors.Is(err, ErrSyntax) || !strings.Contains(err.Error(), "b, c") {
		t.Errorf("unknown parameter: %v", err)
	}
	if _, err := ParseWith("s", &ParseSettings{Params: map[string]float64{"s": 1}}); err == nil {
		t.Error("parameter named s accepted")
	}
	if _, err := ParseWith("a", &ParseSettings{Params: map[string]float64{"a": math.NaN()}}); !errors.Is(err, ErrNotFinite) {
		t.Errorf("NaN parameter: %v", err)
	}
}

func TestParseDiscrete(t *testing.T) {
	g, err := ParseDiscrete("0.18127/(z - 0.81873)", 0.1)
	if err != nil {
		t.Fatal(err)
	}
	if !g.IsDiscrete() || g.SampleTimeSec() != 0.1 || g.Variable() != "z" {
		t.Errorf("got %v with T = %v", g, g.SampleTimeSec())
	}
	if _, err := ParseDiscrete("1/(s+1)", 0.1); !errors.Is(err, ErrSyntax) {
		t.Errorf("s in discrete text: %v", err)
	}
	if _, err := Parse("1/(z+1)"); !errors.Is(err, ErrSyntax) {
		t.Errorf("z in continuous text: %v", err)
	}
	for _, ts := range []float64{0, -1, math.NaN()} {
		if _, err := ParseDiscrete("z", ts); err == nil {
			t.Errorf("sample period %v accepted", ts)
		}
	}
}

// TestParseErrors checks that every error says where (column) and what was
// expected; columns are 1-based in the message, offsets 0-based.
func TestParseErrors(t *testing.T) {
	tests := []struct {
		text   string
		offset int
		msg    string // a fragment of the message
		want   error
	}{
		{"", 0, "expected a number", ErrSyntax},
		{"(s+1", 4, "expected ')'", ErrSyntax},
		{"s+", 2, "end of text", ErrSyntax},
		{"2**s", 2, "expected a number", ErrSyntax},
		{"s^1.5", 2, "whole-number exponent", ErrSyntax},
		{"s^x", 2, "whole-number exponent", ErrSyntax},
		{"s^1001", 2, "larger than", ErrSyntax},
		{"(s^300)^2", 8, "degree above", ErrSyntax},
		{"1/0", 1, "division by zero", ErrSyntax},
		{"s/(s-s)", 1, "division by zero", ErrSyntax},
		{"k*s", 0, "unknown name", ErrSyntax},
		{"s $ 2", 2, `"$"`, ErrSyntax},
		{"s)", 1, "end of the text", ErrSyntax},
		{"exp(s)", 0, "dead time", ErrSyntax},
		{"exp(-s*s)", 0, "dead time", ErrSyntax},
		{"exp -s", 4, "expected '('", ErrSyntax},
		{"exp(-s)+1", 7, "different dead times", ErrSyntax},
		{"1/exp(-s)", 0, "", ErrNegativeDelay},
		{"1e308*1e308", 0, "", ErrNotFinite},
		{"exp(-1e308*s)*exp(-1e308*s)", 0, "", ErrNotFinite},
		{"0^-1", 3, "negative power of zero", ErrSyntax},
		{"2 3", 2, "two numbers side by side", ErrSyntax},
		{"s^2 3", 4, "two numbers side by side", ErrSyntax},
		{"1/(1e-200*1e-200*s)", 1, "division by zero", ErrSyntax}, // the product underflows to 0
	}
	for _, test := range tests {
		t.Run(test.text, func(t *testing.T) {
			_, err := Parse(test.text)
			if !errors.Is(err, test.want) {
				t.Fatalf("got %v, want %v", err, test.want)
			}
			if !strings.Contains(err.Error(), test.msg) {
				t.Errorf("message %q lacks %q", err, test.msg)
			}
			var se *SyntaxError
			if errors.As(err, &se) && se.Offset != test.offset {
				t.Errorf("offset %d, want %d (%v)", se.Offset, test.offset, err)
			}
		})
	}
	long := strings.Repeat("1+", maxTextLen)
	if _, err := Parse(long); !errors.Is(err, ErrSyntax) {
		t.Errorf("long text: %v", err)
	}
}

// TestStringRoundTrip: String prints the text form that parses back to an
// equal value (exactly: numbers are printed in the shortest form that reads
// back to the same float64, and parsing multiplies only by 1).
func TestStringRoundTrip(t *testing.T) {
	texts := []string{
		"10(s+1)/(s(s+5)^2)",
		"-0.1s^3 + 1e-7s - 3e20",
		"1/(2s+1)*exp(-0.123456789s)",
		"0.1/(s^2+0.30000000000000004s+1e-300)",
		"0",
		"-1",
		"1/(-s+1)",
	}
	for _, text := range texts {
		g := MustParse(text)
		back, err := Parse(g.String())
		if err != nil {
			t.Fatalf("%q → %q: %v", text, g.String(), err)
		}
		if !back.Num().Equal(g.Num()) || !back.Den().Equal(g.Den()) || back.DelaySec() != g.DelaySec() {
			t.Errorf("%q → %q → %v", text, g.String(), back)
		}
	}
	gd, _ := NewDiscrete([]float64{0.5, -0.25}, []float64{1, -1.5, 0.7}, 0.01)
	gd, _ = gd.WithDelay(0.03)
	back, err := ParseDiscrete(gd.String(), 0.01)
	if err != nil || !back.Num().Equal(gd.Num()) || !back.Den().Equal(gd.Den()) || back.DelaySec() != gd.DelaySec() {
		t.Errorf("discrete %q → %v, %v", gd.String(), back, err)
	}
}

// FuzzParse: the parser never panics, every error is a known sentinel, and
// whatever parses prints to text that parses back to the same value.
func FuzzParse(f *testing.F) {
	for _, s := range []string{
		"10(s+1)/(s(s+5)^2)", "2.5s", "1e-3/(s+1)", "exp(-0.5s)/(s+1)", "s^-2",
		"(s+1)(s-1)", "-s", "((((s))))", "1/(1/s)", "2e", "s^999", ")(", "exp(", "1..2",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, text string) {
		g, err := Parse(text)
		if err != nil {
			if !errors.Is(err, ErrSyntax) && !errors.Is(err, ErrNotFinite) && !errors.Is(err, ErrZeroDenominator) && !errors.Is(err, ErrNegativeDelay) {
				t.Fatalf("Parse(%q): unexpected error kind %v", text, err)
			}
			return
		}
		if !g.Num().IsFinite() || !g.Den().IsFinite() || g.Den().IsZero() || math.IsNaN(g.DelaySec()) || math.IsInf(g.DelaySec(), 0) || g.DelaySec() < 0 {
			t.Fatalf("Parse(%q) = %v breaks the invariants", text, g)
		}
		back, err := Parse(g.String())
		if err != nil {
			t.Fatalf("Parse(%q) = %q does not parse back: %v", text, g.String(), err)
		}
		if !back.Num().Equal(g.Num()) || !back.Den().Equal(g.Den()) || back.DelaySec() != g.DelaySec() {
			t.Fatalf("round trip %q → %q → %q", text, g.String(), back.String())
		}
	})
}

// FuzzStringRoundTrip builds a transfer function from fuzzed coefficients
// and checks that String → Parse gives the same value exactly.
func FuzzStringRoundTrip(f *testing.F) {
	f.Add(1.0, 2.0, 0.0, 1.0, 3.0, 2.0, 0.5)
	f.Add(-1e-300, 0.0, 5e20, 0.1, 0.0, -7.25, 0.0)
	f.Fuzz(func(t *testing.T, n0, n1, n2, d0, d1, d2, delay float64) {
		g, err := New([]float64{n0, n1, n2}, []float64{d0, d1, d2})
		if err != nil {
			return // NaN/Inf or zero denominator: rejected, fine
		}
		if g, err = g.WithDelay(delay); err != nil {
			return
		}
		back, err := Parse(g.String())
		if err != nil {
			t.Fatalf("%q does not parse: %v", g.String(), err)
		}
		if !back.Num().Equal(g.Num()) || !back.Den().Equal(g.Den()) || back.DelaySec() != g.DelaySec() {
			t.Fatalf("round trip %q → %q", g.String(), back.String())
		}
	})
}
