package refcases

import (
	"bytes"
	"os"
	"testing"
)

// TestCopyMatchesShared checks that the embedded copy equals the shared
// reference file when the repository sits beside ../shared (as in CI).
func TestCopyMatchesShared(t *testing.T) {
	shared, err := os.ReadFile("../../../shared/refcases/cases.json")
	if err != nil {
		t.Skipf("shared reference cases not beside the repository: %v", err)
	}
	if !bytes.Equal(shared, casesJSON) {
		t.Fatal("internal/refcases/cases.json differs from ../shared/refcases/cases.json; copy the shared file again")
	}
}

func TestLoad(t *testing.T) {
	all, err := All()
	if err != nil {
		t.Fatal(err)
	}
	if len(all) < 30 {
		t.Fatalf("got %d cases, want at least 30", len(all))
	}
	rl, err := ByType("root_locus")
	if err != nil {
		t.Fatal(err)
	}
	var exp struct {
		Centroid Number    `json:"asymptote_centroid"`
		Poles    []Complex `json:"open_loop_poles"`
	}
	if err := rl[0].Decode(&exp); err != nil {
		t.Fatal(err)
	}
	if rl[0].ID != "A01" || exp.Centroid.V != -1 || len(exp.Poles) != 3 {
		t.Fatalf("A01 decoded as %+v", exp)
	}
}
