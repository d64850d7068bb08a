package locus

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// TestStableIntervalBinomial: k/(s+1)ⁿ closes into (s+1)ⁿ + k, whose roots
// −1 + k^(1/n)·e^(iπ(2j+1)/n) reach the imaginary axis first at
// k = 1/cos(π/n)ⁿ (closed form), so the stable interval is (0, 1/cos(π/n)ⁿ).
// For n = 500 the 500-fold pole is only known to about ε^(1/500) in double
// precision: the analysis must be an error, never an empty "never stable"
// answer (issue 11 item 2; it used to return no stable interval and no
// error). n = 200 returned no stable interval and no error until the
// inclusion discs covered the rounding of the coefficients of a + k·b
// (issue 12).
func TestStableIntervalBinomial(t *testing.T) {
	for _, n := range []int{10, 20, 30} {
		g, err := tf.Parse(fmt.Sprintf("1/(s+1)^%d", n))
		if err != nil {
			t.Fatal(err)
		}
		an, err := Analyze(g, nil)
		if err != nil {
			t.Fatalf("n = %d: %v", n, err)
		}
		want := 1 / math.Pow(math.Cos(math.Pi/float64(n)), float64(n))
		if len(an.StableIntervals) != 1 || an.StableIntervals[0].Lo != 0 || math.Abs(an.StableIntervals[0].Hi-want) > 1e-12*want {
			t.Errorf("n = %d: stable intervals %v, want (0, %.16g)", n, an.StableIntervals, want)
		}
	}
	// Higher orders: the exact answer or ErrIllConditioned, never a
	// wrong or empty answer without an error.
	orders := []int{50, 60, 100, 200}
	if !testing.Short() {
		orders = append(orders, 500) // about 20 s
	}
	for _, n := range orders {
		g, err := tf.Parse(fmt.Sprintf("1/(s+1)^%d", n))
		if err != nil {
			t.Fatal(err)
		}
		an, err := Analyze(g, nil)
		if errors.Is(err, ErrIllConditioned) {
			continue
		}
		want := 1 / math.Pow(math.Cos(math.Pi/float64(n)), float64(n))
		if err != nil || len(an.StableIntervals) != 1 || math.Abs(an.StableIntervals[0].Hi-want) > 1e-9*want {
			t.Errorf("n = %d: stable intervals %v, err %v; want (0, %.16g) or ErrIllConditioned", n, an.StableIntervals, err, want)
		}
	}
}

// TestAnalysisNotPossible: loops whose locus cannot be formed are errors
// naming the cause (issue 11 item 2).
func TestAnalysisNotPossible(t *testing.T) {
	g, err := tf.Parse("exp(-1e300s)/(s+1)")
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Analyze(g, nil); err == nil {
		t.Error("exp(-1e300s)/(s+1): no error")
	}
	for _, text := range []string{"Kd^2/((s+1)(s+2))", "exp(-Kd*s)/(s+1)", "1/(s^2+Kd^2*s+1)"} {
		_, err := FromText("Kd", text)
		if !errors.Is(err, ErrNotAffine) {
			t.Errorf("%s: err %v, want ErrNotAffine", text, err)
			continue
		}
		if !strings.Contains(err.Error(), "Kd") {
			t.Errorf("%s: error %q does not name the parameter", text, err)
		}
	}
}
