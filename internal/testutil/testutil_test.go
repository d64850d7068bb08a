package testutil

import (
	"math"
	"testing"
)

func TestMatchMultiset(t *testing.T) {
	d, ok := MatchMultiset([]complex128{3, 1 + 1i, 1 - 1i}, []complex128{1 - 1i, 1 + 1i, 3.5})
	if !ok || d[0] != 0 || d[1] != 0 || d[2] != 0.5 {
		t.Fatalf("got %v %v", d, ok)
	}
	if _, ok := MatchMultiset([]complex128{1}, nil); ok {
		t.Fatal("length mismatch accepted")
	}
}

func TestClose(t *testing.T) {
	if !Close(1+1e-10, 1, 1e-9, 0) || Close(1.1, 1, 1e-9, 0) || !Close(math.Inf(1), math.Inf(1), 0, 0) || Close(math.NaN(), 0, 1, 1) {
		t.Fatal("Close disagrees with its definition")
	}
	if AngleDiffDeg(179, -179) != 2 {
		t.Fatal("AngleDiffDeg does not wrap")
	}
}
