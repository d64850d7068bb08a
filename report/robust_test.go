package report

import (
	"errors"
	"strings"
	"testing"
)

// The robust section end to end: the loop file's keys, the verdict, the
// worst cases, the robust requirements and the Monte Carlo estimate, and the
// nominal analysis at the centre of the box.
func TestRobustSection(t *testing.T) {
	_, err := ReadLoop("axis.json", []byte(`{
  "plant": "9*g/(s^2 (m s + 1))", "controller": "(0.4 + 0.3 s)/(1 + 0.01 s)",
  "uncertain": {"g": {"range": [0.8, 1.2]}, "m": {"range": [0.05, 0.08], "distribution": "normal"}},
  "samples": 200,
  "requirements": {"min_phase_margin_deg": 45, "min_phase_margin_deg": 50}}`))
	if err == nil {
		t.Fatal("a key given twice was accepted")
	}
	lf, err := ReadLoop("axis.json", []byte(`{
  "plant": "9*g/(s^2 (m s + 1))", "controller": "(0.4 + 0.3 s)/(1 + 0.01 s)",
  "uncertain": {"g": {"range": [0.8, 1.2]}, "m": {"range": [0.05, 0.08], "distribution": "normal"}},
  "samples": 200,
  "requirements": {"min_phase_margin_deg": 50}}`))
	if err != nil {
		t.Fatal(err)
	}
	var stages []string
	rep, err := Analyze(lf, &Settings{Progress: func(p Progress) { stages = append(stages, p.Stage) }})
	if err != nil {
		t.Fatal(err)
	}
	r := rep.Robust
	if r == nil {
		t.Fatalf("no robust section; warnings %v", rep.Warnings)
	}
	if r.Verdict != "stable for the whole box" || r.Counterexample != nil || len(r.WorstCase) != 5 {
		t.Fatalf("%+v", r)
	}
	// The phase margin 50° is met at the centre but not at g = 0.8, m = 0.08
	// (48.8°): the robust verdict must say so, with the point.
	if len(r.Requirements) != 1 || r.Requirements[0].Verdict != "violated at a point" || r.Requirements[0].At["m"] != 0.08 {
		t.Fatalf("requirements %+v", r.Requirements)
	}
	if !rep.Requirements[0].Pass {
		t.Fatal("the nominal loop (centre of the box) should pass 50°")
	}
	if m := r.MonteCarlo; m == nil || m.Samples != 200 || m.Seed != 1 || len(m.PassProbability) != 1 || !(m.PassProbability[0].Low < m.PassProbability[0].Estimate) {
		t.Fatalf("monte carlo %+v", r.MonteCarlo)
	}
	if !strings.Contains(strings.Join(stages, "\n"), "robust: Monte Carlo") {
		t.Fatal("no progress line for the Monte Carlo run")
	}
	var tab []string
	for _, tb := range tables(rep) {
		tab = append(tab, tb.title)
	}
	if !strings.Contains(strings.Join(tab, "|"), "Robustness over the uncertain parameters") {
		t.Fatalf("tables %v", tab)
	}
}

func TestRobustKeysRejected(t *testing.T) {
	for _, test := range []struct{ file, want string }{
		{`{"plant": "g/(s+1)", "uncertain": {"g": {"range": [2, 1]}}}`, "low ≤ high"},
		{`{"plant": "g/(s+1)", "uncertain": {"g": {"range": [1, 2], "distribution": "poisson"}}}`, "not a distribution"},
		{`{"plant": "g/(s+1)", "uncertain": {"g": {}}}`, "range"},
		{`{"plant": "g/(s+1)", "uncertain": {}}`, "no parameter"},
		{`{"plant": "g/(s+1)", "uncertain": {"g": {"range": [1, 2]}}, "samples": 0.5}`, "whole number"},
		{`{"plant": "g/(s+1)", "uncertain": {"exp": {"range": [1, 2]}}}`, "not a usable name"},
	} {
		_, err := ReadLoop("bad.json", []byte(test.file))
		if !errors.Is(err, ErrBadInput) || !strings.Contains(err.Error(), test.want) {
			t.Errorf("%s: %v, want %q", test.file, err, test.want)
		}
	}
	// A parameter that appears in no expression: the robust keys are null
	// with a warning, the rest of the report stands.
	lf, err := ReadLoop("unused.json", []byte(`{"plant": "2/(s+1)", "uncertain": {"g": {"range": [1, 2]}}}`))
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Analyze(lf, nil)
	if err != nil {
		t.Fatal(err)
	}
	if rep.Robust != nil || !strings.Contains(strings.Join(rep.Warnings, " "), "appears in no expression") {
		t.Fatalf("robust %+v, warnings %v", rep.Robust, rep.Warnings)
	}
}

// "discretize" with uncertain parameters: the Tustin map keeps the
// coefficients polynomial in the parameters, so the box is proven in z
// (the same verdict as in s: the map sends the left half plane onto the
// unit disc); a hold is refused with the reason and the robust keys are null.
func TestRobustDiscretize(t *testing.T) {
	const loop = `{"plant": "9*g/(s^2 (m s + 1))", "controller": "(0.4 + 0.3 s)/(1 + 0.01 s)",
  "uncertain": {"g": {"range": [0.8, 1.2]}, "m": {"range": [0.05, 0.08]}}, "samples": 50,
  "discretize": {"method": "%s", "sample_time_sec": 0.005}}`
	lf, err := ReadLoop("tustin.json", []byte(strings.Replace(loop, "%s", "tustin", 1)))
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Analyze(lf, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r := rep.Robust; r == nil || r.Verdict != "stable for the whole box" || !strings.Contains(r.Method, "bilinear map") {
		t.Fatalf("robust %+v, warnings %v", rep.Robust, rep.Warnings)
	}
	lf, err = ReadLoop("zoh.json", []byte(strings.Replace(loop, "%s", "zoh", 1)))
	if err != nil {
		t.Fatal(err)
	}
	rep, err = Analyze(lf, nil)
	if err != nil {
		t.Fatal(err)
	}
	if w := strings.Join(rep.Warnings, " "); rep.Robust != nil || !strings.Contains(w, "not polynomials in the parameters") || !strings.Contains(w, "Tustin") {
		t.Fatalf("robust %+v, warnings %v", rep.Robust, rep.Warnings)
	}
}
