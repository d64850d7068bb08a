package locus

import (
	"math"
	"slices"
	"testing"

	"github.com/loopwise/loopwise/internal/refcases"
	"github.com/loopwise/loopwise/internal/testutil"
	"github.com/loopwise/loopwise/tf"
)

// rlExpected is the "root_locus" part of a reference case; its conventions
// are those of ../shared/refcases/README.md, section Root locus.
type rlExpected struct {
	OpenLoopPoles []refcases.Complex   `json:"open_loop_poles"`
	OpenLoopZeros []refcases.Complex   `json:"open_loop_zeros"`
	Centroid      refcases.Number      `json:"asymptote_centroid"`
	AnglesDeg     []float64            `json:"asymptote_angles_deg"`
	Segments      [][2]refcases.Number `json:"real_axis_segments"`
	BreakPoints   []struct {
		S        refcases.Complex `json:"s"`
		K        float64          `json:"K"`
		Branches int              `json:"branches"`
	} `json:"break_points"`
	Departures []struct {
		Pole   refcases.Complex `json:"pole"`
		Angles []float64        `json:"angles"`
	} `json:"departure_angles_deg"`
	Arrivals []struct {
		Zero   refcases.Complex `json:"zero"`
		Angles []float64        `json:"angles"`
	} `json:"arrival_angles_deg"`
	Crossings []struct {
		Omega float64 `json:"omega"`
		K     float64 `json:"K"`
	} `json:"imag_axis_crossings"`
	CircleCrossings []struct {
		Omega float64 `json:"omega"`
		K     float64 `json:"K"`
	} `json:"unit_circle_crossings"`
	Stable [][2]refcases.Number `json:"stable_K_intervals"`
	NPoles int                  `json:"n_poles"`
	NZeros int                  `json:"n_zeros"`
}

type rlQuery struct {
	GainSign int `json:"gain_sign"`
}

// rangeForSign is the range of the refcase convention: K > 0 or K < 0.
func rangeForSign(sign int) Range {
	if sign < 0 {
		return Range{Min: math.Inf(-1), Max: 0}
	}
	return Range{}
}

// checkAgainstCase compares an Analysis with the expected values of a
// reference case. Tolerances: the case's own (rel/abs, 1e-9 for the
// root-locus cases, justified in the README: 50-digit references stored
// with 17 digits, double-precision exact methods); angles and points to
// 1e-6 as the main program's checker requires, which is looser than 1e-9.
func checkAgainstCase(t *testing.T, c refcases.Case, an Analysis) {
	t.Helper()
	var want rlExpected
	if err := c.Decode(&want); err != nil {
		t.Fatal(err)
	}
	tol := c.Tolerance
	near := func(got, w float64) bool { return testutil.Close(got, w, tol.Rel, tol.Abs) }
	var gp, gz []complex128
	for _, r := range an.Poles {
		for range r.Multiplicity {
			gp = append(gp, r.Value)
		}
	}
	for _, r := range an.Zeros {
		for range r.Multiplicity {
			gz = append(gz, r.Value)
		}
	}
	cmpSet := func(name string, got []complex128, want []refcases.Complex, tolAbs float64) {
		w := make([]complex128, len(want))
		for i, v := range want {
			w[i] = complex128(v)
		}
		d, ok := testutil.MatchMultiset(got, w)
		if !ok {
			t.Errorf("%s: got %d values %v, want %d %v", name, len(got), got, len(w), w)
			return
		}
		for i, x := range d {
			if x > tolAbs {
				t.Errorf("%s: %v off by %g", name, w[i], x)
			}
		}
	}
	// Multiple roots (A14) can only be located to about eps^(1/3) unless
	// clustered; 1e-6 covers that and the 1e-6 point check of the checker.
	cmpSet("poles", gp, want.OpenLoopPoles, 1e-6)
	cmpSet("zeros", gz, want.OpenLoopZeros, 1e-6)
	if an.Branches != max(want.NPoles, want.NZeros) {
		t.Errorf("branches %d, want %d", an.Branches, max(want.NPoles, want.NZeros))
	}
	if want.Centroid.Null != !an.HasAsymptotes {
		t.Errorf("HasAsymptotes %v, want centroid %v", an.HasAsymptotes, want.Centroid)
	} else if an.HasAsymptotes && !near(an.CentroidReal, want.Centroid.V) {
		t.Errorf("centroid %v, want %v", an.CentroidReal, want.Centroid.V)
	}
	if len(an.AsymptoteAnglesDeg) != len(want.AnglesDeg) {
		t.Errorf("asymptote angles %v, want %v", an.AsymptoteAnglesDeg, want.AnglesDeg)
	} else {
		for i := range want.AnglesDeg {
			if math.Abs(an.AsymptoteAnglesDeg[i]-want.AnglesDeg[i]) > 1e-9 {
				t.Errorf("asymptote angles %v, want %v", an.AsymptoteAnglesDeg, want.AnglesDeg)
			}
		}
	}
	if len(an.RealAxisSegments) != len(want.Segments) {
		t.Errorf("segments %v, want %v", an.RealAxisSegments, want.Segments)
	} else {
		for i, s := range want.Segments {
			g := an.RealAxisSegments[i]
			if !tol.Within(refcases.Number{V: g.Lo}, s[0]) || !tol.Within(refcases.Number{V: g.Hi}, s[1]) {
				t.Errorf("segment %d: %v, want %v", i, g, s)
			}
		}
	}
	if len(an.BreakPoints) != len(want.BreakPoints) {
		t.Errorf("break points %+v, want %+v", an.BreakPoints, want.BreakPoints)
	} else {
		for _, w := range want.BreakPoints {
			found := false
			for _, g := range an.BreakPoints {
				if testutil.CloseComplex(g.Point, complex128(w.S), 0, 1e-6) {
					found = true
					if !near(g.Value, w.K) || g.Branches != w.Branches {
						t.Errorf("break point %v: value %v branches %d, want %v %d", w.S, g.Value, g.Branches, w.K, w.Branches)
					}
				}
			}
			if !found {
				t.Errorf("break point %v missing from %+v", w.S, an.BreakPoints)
			}
		}
	}
	checkAngles := func(name string, got []AngleAt, want map[complex128][]float64) {
		n := 0
		for _, ws := range want {
			n += len(ws)
		}
		if len(got) != n {
			t.Errorf("%s: got %+v, want %v", name, got, want)
			return
		}
		for pt, ws := range want {
			var gs []float64
			for _, g := range got {
				if testutil.CloseComplex(g.Point, pt, 0, 1e-6) {
					gs = append(gs, g.AngleDeg)
				}
			}
			slices.Sort(gs)
			if len(gs) != len(ws) {
				t.Errorf("%s at %v: got %v, want %v", name, pt, gs, ws)
				continue
			}
			for i := range ws {
				// 1e-6 degrees: the checker's tolerance for angles.
				if testutil.AngleDiffDeg(gs[i], ws[i]) > 1e-6 {
					t.Errorf("%s at %v: got %v, want %v", name, pt, gs, ws)
				}
			}
		}
	}
	dw := map[complex128][]float64{}
	for _, d := range want.Departures {
		dw[complex128(d.Pole)] = d.Angles
	}
	checkAngles("departures", an.Departures, dw)
	aw := map[complex128][]float64{}
	for _, d := range want.Arrivals {
		aw[complex128(d.Zero)] = d.Angles
	}
	checkAngles("arrivals", an.Arrivals, aw)
	cw := want.Crossings
	if an.Discrete {
		cw = want.CircleCrossings
	}
	if len(an.AxisCrossings) != len(cw) {
		t.Errorf("crossings %+v, want %+v", an.AxisCrossings, cw)
	} else {
		for i, w := range cw {
			g := an.AxisCrossings[i]
			if !near(g.FrequencyRadPerSec, w.Omega) || !near(g.Value, w.K) {
				t.Errorf("crossing %d: %v at %v, want %v at %v", i, g.Value, g.FrequencyRadPerSec, w.K, w.Omega)
			}
		}
	}
	if len(an.StableIntervals) != len(want.Stable) {
		t.Errorf("stable intervals %v, want %v", an.StableIntervals, want.Stable)
	} else {
		for i, s := range want.Stable {
			g := an.StableIntervals[i]
			if !tol.Within(refcases.Number{V: g.Lo}, s[0]) || !tol.Within(refcases.Number{V: g.Hi}, s[1]) {
				t.Errorf("stable interval %d: %v, want %v", i, g, s)
			}
		}
	}
}

// TestReferenceCases checks every root-locus reference case (A01 A02 A03
// A05 A07 A08 A09 A10 A12 A14 A16 B01 B02 B05; sources in each case:
// Ogata 5th ed., Nise 6th/7th ed., Dorf & Bishop 12th ed., Kuo &
// Golnaraghi 8th ed., from memory, values recomputed with mpmath).
func TestReferenceCases(t *testing.T) {
	cases, err := refcases.ByType("root_locus")
	if err != nil {
		t.Fatal(err)
	}
	if len(cases) < 14 {
		t.Fatalf("only %d root-locus cases", len(cases))
	}
	for _, c := range cases {
		t.Run(c.ID, func(t *testing.T) {
			var q rlQuery
			if err := c.DecodeQuery(&q); err != nil {
				t.Fatal(err)
			}
			loop, err := tf.NewDiscrete(c.Loop.Num, c.Loop.Den, c.Loop.SampleTime)
			if err != nil {
				t.Fatal(err)
			}
			an, err := Analyze(loop, &Settings{Range: rangeForSign(q.GainSign)})
			if err != nil {
				t.Fatal(err)
			}
			checkAgainstCase(t, c, an)
		})
	}
}
