// Package refcases loads the shared reference cases (a copy of
// ../shared/refcases/cases.json, embedded) for tests: loops with expected
// values computed at 50 significant digits with mpmath and stored with 17.
// The format and conventions are documented in ../shared/refcases/README.md;
// the test in this package checks that the embedded copy matches the shared
// file whenever that file is present.
package refcases

import (
	_ "embed"
	"encoding/json"
	"fmt"
	"math"
	"strings"
)

//go:embed cases.json
var casesJSON []byte

// Case is one reference case. Expected is left raw: each test decodes the
// part it checks into its own struct, using Number and Complex fields.
type Case struct {
	ID         string          `json:"id"`
	Category   string          `json:"category"`
	Title      string          `json:"title"`
	Source     string          `json:"source"`
	Provenance string          `json:"provenance"`
	Loop       *Loop           `json:"loop"`
	Param      *Param          `json:"param"`
	Poly       *PolyInput      `json:"poly"`
	Query      json.RawMessage `json:"query"`
	Expected   json.RawMessage `json:"expected"`
	Tolerance  Tolerance       `json:"tolerance"`
}

// Loop is L(s) = K·Num/Den·e^(−s·Delay), coefficients highest power first;
// SampleTime > 0 marks a loop in z.
type Loop struct {
	Num        []float64 `json:"num"`
	Den        []float64 `json:"den"`
	Delay      float64   `json:"delay"`
	SampleTime float64   `json:"sample_time"`
}

// Param is the parameter form a(s) + p·b(s) of category B.
type Param struct {
	Name string    `json:"name"`
	A    []float64 `json:"a"`
	B    []float64 `json:"b"`
}

// PolyInput is the polynomial of category E, highest power first.
type PolyInput struct {
	Coeffs []float64 `json:"coeffs"`
}

// Tolerance is the suggested acceptance |got − want| ≤ Abs + Rel·|want|.
type Tolerance struct {
	Rel float64 `json:"rel"`
	Abs float64 `json:"abs"`
	// OmegaOfPeakRel is the relative tolerance for frequencies of flat
	// maxima (Ms, Mt), when given.
	OmegaOfPeakRel float64 `json:"omega_of_peak_rel"`
	// AbsPerRoot gives, for category E, one absolute tolerance per root.
	AbsPerRoot []float64 `json:"abs_per_root"`
}

// Within reports whether got matches want under the tolerance; infinities
// must match exactly and a null want matches only a null got.
func (t Tolerance) Within(got, want Number) bool {
	if want.Null || got.Null {
		return want.Null == got.Null
	}
	if math.IsInf(want.V, 0) || math.IsInf(got.V, 0) {
		return want.V == got.V
	}
	return math.Abs(got.V-want.V) <= t.Abs+t.Rel*math.Abs(want.V)
}

// Number is an expected real value: a JSON number, "inf", "-inf", or null
// ("does not exist").
type Number struct {
	V    float64
	Null bool
}

// UnmarshalJSON reads a number, "inf", "-inf" or null.
func (n *Number) UnmarshalJSON(b []byte) error {
	s := strings.TrimSpace(string(b))
	switch s {
	case "null":
		*n = Number{Null: true, V: math.NaN()}
		return nil
	case `"inf"`:
		*n = Number{V: math.Inf(1)}
		return nil
	case `"-inf"`:
		*n = Number{V: math.Inf(-1)}
		return nil
	}
	var v float64
	if err := json.Unmarshal(b, &v); err != nil {
		return fmt.Errorf("refcases: number %s: %w", s, err)
	}
	*n = Number{V: v}
	return nil
}

// Complex is an expected complex value stored as [re, im].
type Complex complex128

// UnmarshalJSON reads [re, im].
func (c *Complex) UnmarshalJSON(b []byte) error {
	var p [2]float64
	if err := json.Unmarshal(b, &p); err != nil {
		return fmt.Errorf("refcases: complex %s: %w", b, err)
	}
	*c = Complex(complex(p[0], p[1]))
	return nil
}

// All returns every case, in file order.
func All() ([]Case, error) {
	var cs []Case
	if err := json.Unmarshal(casesJSON, &cs); err != nil {
		return nil, fmt.Errorf("refcases: %w", err)
	}
	return cs, nil
}

// ByType returns the cases whose query type is typ ("root_locus",
// "margins", "step_metrics", "time_samples", "steady_state_errors",
// "poly_roots", "zoh", "tustin").
func ByType(typ string) ([]Case, error) {
	all, err := All()
	if err != nil {
		return nil, err
	}
	var out []Case
	for _, c := range all {
		var q struct {
			Type string `json:"type"`
		}
		if err := json.Unmarshal(c.Query, &q); err != nil {
			return nil, fmt.Errorf("refcases: %s query: %w", c.ID, err)
		}
		if q.Type == typ {
			out = append(out, c)
		}
	}
	return out, nil
}

// Decode unmarshals the case's expected values into v.
func (c Case) Decode(v any) error {
	if err := json.Unmarshal(c.Expected, v); err != nil {
		return fmt.Errorf("refcases: %s expected: %w", c.ID, err)
	}
	return nil
}

// DecodeQuery unmarshals the case's query into v.
func (c Case) DecodeQuery(v any) error {
	if err := json.Unmarshal(c.Query, v); err != nil {
		return fmt.Errorf("refcases: %s query: %w", c.ID, err)
	}
	return nil
}
