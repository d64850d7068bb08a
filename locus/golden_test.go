package locus

import (
	"encoding/json"
	"math"
	"os"
	"testing"

	"github.com/loopwise/loopwise/internal/testutil"
	"github.com/loopwise/loopwise/tf"
)

type goldenFile struct {
	CondStable struct {
		Num, Den  []float64
		Crossings []struct{ Omega, K float64 }
		Stable    [][2]any
		Breaks    []struct {
			S [2]float64
			K float64
		} `json:"break_points"`
	} `json:"conditionally_stable"`
	Discrete struct {
		Num, Den   []float64
		SampleTime float64                             `json:"sample_time"`
		Crossings  []struct{ Theta, Omega, K float64 } `json:"circle_crossings"`
		Stable     [][2]any
		Breaks     []struct {
			S [2]float64
			K float64
		} `json:"break_points"`
	} `json:"discrete"`
}

func loadGolden(t *testing.T) goldenFile {
	t.Helper()
	b, err := os.ReadFile("testdata/golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g goldenFile
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	return g
}

func num(v any) float64 {
	switch x := v.(type) {
	case float64:
		return x
	case string:
		if x == "inf" {
			return math.Inf(1)
		}
	}
	return math.NaN()
}

// TestGolden checks a conditionally stable loop (two stable gain
// intervals) and a discrete-time loop against the mpmath references of
// testdata/golden.py (60 digits, exact Routh array). Tolerance 1e-10
// relative: crossings and break points are polished roots of exact
// polynomials, stable-interval ends are crossing values.
func TestGolden(t *testing.T) {
	g := loadGolden(t)
	const tol = 1e-10
	t.Run("conditionally-stable", func(t *testing.T) {
		an, err := Analyze(tf.MustNew(g.CondStable.Num, g.CondStable.Den), nil)
		if err != nil {
			t.Fatal(err)
		}
		if len(an.AxisCrossings) != len(g.CondStable.Crossings) {
			t.Fatalf("crossings %+v, want %+v", an.AxisCrossings, g.CondStable.Crossings)
		}
		for i, w := range g.CondStable.Crossings {
			c := an.AxisCrossings[i]
			if !testutil.Close(c.FrequencyRadPerSec, w.Omega, tol, 0) || !testutil.Close(c.Value, w.K, tol, 0) {
				t.Errorf("crossing %d: %+v, want %+v", i, c, w)
			}
		}
		if len(an.StableIntervals) != 2 || len(g.CondStable.Stable) != 2 {
			t.Fatalf("stable intervals %v, want %v", an.StableIntervals, g.CondStable.Stable)
		}
		for i, w := range g.CondStable.Stable {
			s := an.StableIntervals[i]
			if !testutil.Close(s.Lo, num(w[0]), tol, 0) || !testutil.Close(s.Hi, num(w[1]), tol, 0) {
				t.Errorf("interval %d: %v, want %v", i, s, w)
			}
		}
		if len(an.BreakPoints) != len(g.CondStable.Breaks) {
			t.Fatalf("break points %+v, want %+v", an.BreakPoints, g.CondStable.Breaks)
		}
		for i, w := range g.CondStable.Breaks {
			b := an.BreakPoints[i]
			if !testutil.CloseComplex(b.Point, complex(w.S[0], w.S[1]), tol, 1e-12) || !testutil.Close(b.Value, w.K, tol, 0) {
				t.Errorf("break point %d: %+v, want %+v", i, b, w)
			}
		}
	})
	t.Run("discrete", func(t *testing.T) {
		d := g.Discrete
		an, err := Analyze(mustDiscrete(d.Num, d.Den, d.SampleTime), nil)
		if err != nil {
			t.Fatal(err)
		}
		if !an.Discrete || an.SampleTimeSec != d.SampleTime {
			t.Errorf("Discrete %v, SampleTimeSec %v", an.Discrete, an.SampleTimeSec)
		}
		if len(an.AxisCrossings) != len(d.Crossings) {
			t.Fatalf("crossings %+v, want %+v", an.AxisCrossings, d.Crossings)
		}
		for i, w := range d.Crossings {
			c := an.AxisCrossings[i]
			if !testutil.Close(c.FrequencyRadPerSec, w.Omega, tol, 0) || !testutil.Close(c.Value, w.K, tol, 0) {
				t.Errorf("crossing %d: %+v, want %+v", i, c, w)
			}
			if math.Abs(math.Hypot(real(c.Point), imag(c.Point))-1) > 1e-15 {
				t.Errorf("crossing point %v not on the unit circle", c.Point)
			}
		}
		if len(an.StableIntervals) != len(d.Stable) {
			t.Fatalf("stable %v, want %v", an.StableIntervals, d.Stable)
		}
		for i, w := range d.Stable {
			s := an.StableIntervals[i]
			if !testutil.Close(s.Lo, num(w[0]), tol, 0) || !testutil.Close(s.Hi, num(w[1]), tol, 0) {
				t.Errorf("interval %d: %v, want %v", i, s, w)
			}
		}
		for i, w := range d.Breaks {
			b := an.BreakPoints[i]
			if !testutil.CloseComplex(b.Point, complex(w.S[0], w.S[1]), tol, 1e-12) || !testutil.Close(b.Value, w.K, tol, 0) {
				t.Errorf("break point %d: %+v, want %+v", i, b, w)
			}
		}
	})
}
