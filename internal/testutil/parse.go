package testutil

import (
	"strconv"
	"testing"
)

// ParseFloat parses a reference value written as decimal text (the golden
// files keep 50-digit mpmath values as strings); the test fails on bad text.
func ParseFloat(t testing.TB, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("reference value %q: %v", s, err)
	}
	return v
}
