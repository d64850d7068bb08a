package main

import (
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/internal/refcases"
)

// polyText writes coefficients (highest power first) as text in v.
func polyText(c []float64, v string) string {
	var terms []string
	n := len(c) - 1
	for i, x := range c {
		if x == 0 {
			continue
		}
		t := strconv.FormatFloat(x, 'g', -1, 64)
		switch p := n - i; p {
		case 0:
		case 1:
			t += "*" + v
		default:
			t += fmt.Sprintf("*%s^%d", v, p)
		}
		terms = append(terms, "("+t+")")
	}
	if len(terms) == 0 {
		return "0"
	}
	return strings.Join(terms, " + ")
}

// TestReferenceLoci runs every root-locus reference case (categories A and
// B: expected values computed with mpmath at 50 digits, see
// ../shared/refcases/README.md) through the program in-process and
// compares the stable intervals, the axis crossings and the asymptote
// centroid of the JSON output. The full comparison of every category is
// the contract check ../shared/checks/loopreport-contract; this test keeps
// the central quantities under go test.
func TestReferenceLoci(t *testing.T) {
	cases, err := refcases.ByType("root_locus")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range cases {
		t.Run(c.ID, func(t *testing.T) {
			var q struct {
				GainSign int `json:"gain_sign"`
			}
			if err := c.DecodeQuery(&q); err != nil {
				t.Fatal(err)
			}
			var want struct {
				Centroid  refcases.Number      `json:"asymptote_centroid"`
				Intervals [][2]refcases.Number `json:"stable_K_intervals"`
				Crossings []struct {
					Omega refcases.Number `json:"omega"`
					K     refcases.Number `json:"K"`
				} `json:"imag_axis_crossings"`
			}
			if err := c.Decode(&want); err != nil {
				t.Fatal(err)
			}
			lf := map[string]any{"name": c.ID}
			if c.Param != nil {
				// a + p·b = 0 written as the plant 1/(a₀sⁿ) and the
				// controller (rest of a) + p·b.
				a, b := c.Param.A, c.Param.B
				lead := make([]float64, len(a))
				lead[0] = a[0]
				rest := append([]float64{0}, a[1:]...)
				lf["plant"] = "1/(" + polyText(lead, "s") + ")"
				lf["controller"] = polyText(rest, "s") + " + p*(" + polyText(b, "s") + ")"
				rng := []any{0, nil}
				if q.GainSign < 0 {
					rng = []any{nil, 0}
				}
				lf["parameter"] = map[string]any{"name": "p", "value": float64(q.GainSign), "range": rng}
			} else {
				lf["plant"] = "(" + polyText(c.Loop.Num, "s") + ")/(" + polyText(c.Loop.Den, "s") + ")"
				if q.GainSign < 0 {
					lf["gain_range"] = []any{nil, 0}
					lf["gain"] = -0.001
				}
			}
			content, _ := json.Marshal(lf)
			d := runJSON(t, string(content))
			lo := d["locus"].(map[string]any)
			// The case's own tolerance (at least 1e-9 relative): the locus
			// package computes these quantities from exact polynomials.
			tol := c.Tolerance
			tol.Rel = math.Max(tol.Rel, 1e-9)
			tol.Abs = math.Max(tol.Abs, 1e-9)
			got := func(v any) refcases.Number {
				if v == nil {
					return refcases.Number{Null: true}
				}
				return refcases.Number{V: v.(float64)}
			}
			end := func(v any, inf float64) refcases.Number {
				if v == nil {
					return refcases.Number{V: inf}
				}
				return refcases.Number{V: v.(float64)}
			}
			if !tol.Within(got(lo["centroid"]), want.Centroid) {
				t.Errorf("centroid %v, want %v", lo["centroid"], want.Centroid)
			}
			ivs := lo["stable_intervals"].([]any)
			if len(ivs) != len(want.Intervals) {
				t.Fatalf("stable intervals %v, want %v", ivs, want.Intervals)
			}
			for i, iv := range ivs {
				pair := iv.([]any)
				if !tol.Within(end(pair[0], math.Inf(-1)), want.Intervals[i][0]) || !tol.Within(end(pair[1], math.Inf(1)), want.Intervals[i][1]) {
					t.Errorf("stable interval %v, want %v", pair, want.Intervals[i])
				}
			}
			cr := lo["axis_crossings"].([]any)
			if len(cr) != len(want.Crossings) {
				t.Fatalf("axis crossings %v, want %d", cr, len(want.Crossings))
			}
			for i, x := range cr {
				m := x.(map[string]any)
				if !tol.Within(got(m["frequency_rad_per_sec"]), want.Crossings[i].Omega) || !tol.Within(got(m["value"]), want.Crossings[i].K) {
					t.Errorf("crossing %v, want ω = %v at %v", m, want.Crossings[i].Omega, want.Crossings[i].K)
				}
			}
		})
	}
}
