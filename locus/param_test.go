package locus

import (
	"errors"
	"math"
	"testing"

	"github.com/loopwise/loopwise/internal/refcases"
	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// TestParameterReferenceCases derives a(s) and b(s) of the category-B
// reference cases from the loop as an engineer writes it (controller in
// series with the plant, parameter inside) and checks both the
// polynomials (exactly as given in the case, to 1e-12 relative: the fit is
// a difference of exact evaluations) and every expected root-locus value
// through the equivalent loop b/a.
func TestParameterReferenceCases(t *testing.T) {
	cases, err := refcases.ByType("root_locus")
	if err != nil {
		t.Fatal(err)
	}
	// The loops as written in the case titles.
	loops := map[string]struct {
		name, text string
		plant      tf.TF
	}{
		// B01: PI controller Kp + Ki/s with Kp = 2, plant 1/((s+1)(s+3)).
		"B01": {"Ki", "(2s + Ki)/s", tf.MustParse("1/((s+1)(s+3))")},
		// B02: C = 60(1 + Td s), plant 1/(s(s+1)(s+5)).
		"B02": {"Td", "60(1 + Td*s)", tf.MustParse("1/(s(s+1)(s+5))")},
		// B05: 10/((s+2)(s+p1)), the pole location as parameter.
		"B05": {"p1", "10/((s+2)(s+p1))", tf.MustParse("1")},
	}
	n := 0
	for _, c := range cases {
		if c.Param == nil {
			continue
		}
		n++
		t.Run(c.ID, func(t *testing.T) {
			l, ok := loops[c.ID]
			if !ok {
				t.Fatalf("no loop written for %s", c.ID)
			}
			par, err := FromText(l.name, l.text, l.plant)
			if err != nil {
				t.Fatal(err)
			}
			wa, _ := poly.New(c.Param.A...)
			wb, _ := poly.New(c.Param.B...)
			if !par.A.EqualApprox(wa, 1e-12) || !par.B.EqualApprox(wb, 1e-12) {
				t.Errorf("a = %v, b = %v; want %v, %v", par.A, par.B, wa, wb)
			}
			an, err := Analyze(par.Loop, &Settings{Variable: par.Name})
			if err != nil {
				t.Fatal(err)
			}
			if an.Variable != l.name {
				t.Errorf("Variable %q", an.Variable)
			}
			checkAgainstCase(t, c, an)
		})
	}
	if n != 3 {
		t.Errorf("%d parameter cases, want 3 (B01 B02 B05)", n)
	}
}

func TestFromParameter(t *testing.T) {
	plant := tf.MustParse("1/s^3")
	// The example: controller (s+1) + p(s+2) over 1/s³:
	// s³ + s + 1 + p(s + 2) = 0 (hand derivation).
	par, err := FromText("p", "(s+1) + p*(s+2)", plant)
	if err != nil {
		t.Fatal(err)
	}
	if !par.A.EqualApprox(poly.MustNew(1, 0, 1, 1), 1e-14) || !par.B.EqualApprox(poly.MustNew(1, 2), 1e-14) {
		t.Errorf("a = %v, b = %v", par.A, par.B)
	}
	// A function that scales numerator and denominator by 1 + p²: the
	// characteristic polynomial is then not affine until the denominator
	// is made monic; 10/((s+2)(s+p)) gives s² + 2s + 10 + p(s + 2).
	par, err = FromParameter("p", func(p float64) (tf.TF, error) {
		c := 1 + p*p
		return tf.New([]float64{10 * c}, []float64{c, c * (2 + p), c * 2 * p})
	})
	if err != nil {
		t.Fatal(err)
	}
	if !par.A.EqualApprox(poly.MustNew(1, 2, 10), 1e-12) || !par.B.EqualApprox(poly.MustNew(1, 2), 1e-12) {
		t.Errorf("scaled: a = %v, b = %v", par.A, par.B)
	}
	if len(par.Notes) == 0 {
		t.Error("no note about the normalisation")
	}
	// Non-affine: p² in the denominator.
	_, err = FromText("w", "1/(s^2 + w^2*s + 1)")
	if !errors.Is(err, ErrNotAffine) {
		t.Errorf("p²: err = %v, want ErrNotAffine", err)
	} else if want := `"w"`; !contains(err.Error(), want) {
		t.Errorf("error %q does not name the parameter", err)
	}
	// No dependence.
	if _, err := FromText("q", "1/(s+1)"); !errors.Is(err, ErrZeroNumerator) {
		t.Errorf("no dependence: err = %v", err)
	}
	// Undefined at p = 0: the second probe set is used. 1/(p s + 1)·1/s:
	// s + p s² ... char = p s² + s + 1 → a = s + 1, b = s².
	par, err = FromParameter("T", func(p float64) (tf.TF, error) {
		if p == 0 {
			return tf.TF{}, errors.New("T must be positive")
		}
		return tf.New([]float64{1}, []float64{p, 1, 0})
	})
	if err != nil {
		t.Fatal(err)
	}
	if !par.A.EqualApprox(poly.MustNew(1, 1), 1e-12) || !par.B.EqualApprox(poly.MustNew(1, 0, 0), 1e-12) {
		t.Errorf("T: a = %v, b = %v", par.A, par.B)
	}
	if _, err := FromParameter("x", nil); !errors.Is(err, ErrInvalidSettings) {
		t.Errorf("nil function: %v", err)
	}
	// Dead time: Padé of order 6 and a note.
	par, err = FromText("k", "k*exp(-0.1s)/(s+1)")
	if err != nil {
		t.Fatal(err)
	}
	if par.A.Degree() != 7 || len(par.Notes) == 0 {
		t.Errorf("delay: a = %v, notes %v", par.A, par.Notes)
	}
	// The parameter locus of the improper case traces (m > n: branches come
	// from infinity as T → 0).
	loc, err := Trace(tf.MustNew([]float64{1, 0, 0}, []float64{1, 1}), &Settings{Variable: "T"})
	if err != nil {
		t.Fatal(err)
	}
	if loc.Analysis.Branches != 2 || math.IsNaN(loc.View.ReMin) {
		t.Errorf("improper trace: %+v", loc.Analysis)
	}
}

func contains(s, sub string) bool {
	for i := 0; i+len(sub) <= len(s); i++ {
		if s[i:i+len(sub)] == sub {
			return true
		}
	}
	return false
}
