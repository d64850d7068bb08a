package report

import (
	"strings"
	"testing"
)

// TestPadeLocusMarksApproximation: with "dead_time_model": "pade" the
// departure and arrival angles at the Padé approximation's own poles and
// zeros are marked, and the plant's are not. The Padé(6) approximant of
// e^(−0.4s) has 6 complex poles (3 pairs, every one with |s| > 10 here)
// and their mirror zeros; the plant's poles −2, −0.5, 0 and zero −1/3 are
// real.
func TestPadeLocusMarksApproximation(t *testing.T) {
	r, err := Analyze(&Loop{Plant: "1/((2s+1)(0.5s+1))", Controller: "1.2(1 + 1/(3s))", DelaySec: 0.4, Gain: 1, DeadTimeModel: "pade"}, nil)
	if err != nil {
		t.Fatal(err)
	}
	l := r.Locus
	if len(l.DepartureAngles) != 3 || len(l.ArrivalAngles) != 3 {
		t.Fatalf("departure %d, arrival %d angles; want 3 each (upper half plane of the Padé pairs)", len(l.DepartureAngles), len(l.ArrivalAngles))
	}
	for _, d := range append(append([]AngleAt{}, l.DepartureAngles...), l.ArrivalAngles...) {
		if !d.Approximation {
			t.Errorf("angle %+v not marked as the approximation's", d)
		}
	}
	found := false
	for _, n := range l.Notes {
		found = found || strings.Contains(n, "not the plant's")
	}
	if !found {
		t.Errorf("no note on the approximation: %q", l.Notes)
	}
	// A loop with complex plant poles and no dead time marks nothing.
	r, err = Analyze(&Loop{Plant: "1/(s(s^2+2s+5))", Gain: 1}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range r.Locus.DepartureAngles {
		if d.Approximation {
			t.Errorf("plant pole marked: %+v", d)
		}
	}
	if len(r.Locus.DepartureAngles) == 0 {
		t.Errorf("no departure angle for the plant's complex pole")
	}
}
