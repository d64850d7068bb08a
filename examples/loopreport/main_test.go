package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/report"
)

// runLoop runs the program in-process with a loop file holding content
// and returns the exit status, stdout and stderr.
func runLoop(t *testing.T, content string, args ...string) (int, string, string) {
	t.Helper()
	path := filepath.Join(t.TempDir(), "loop.json")
	if err := os.WriteFile(path, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	var out, errb bytes.Buffer
	code := run(append([]string{"-loop", path}, args...), &out, &errb)
	return code, out.String(), errb.String()
}

// runJSON analyses the loop file content with -json and decodes the output.
func runJSON(t *testing.T, content string) map[string]any {
	t.Helper()
	code, out, errs := runLoop(t, content, "-json")
	if code != 0 {
		t.Fatalf("exit %d, stderr: %s", code, errs)
	}
	var d map[string]any
	if err := json.Unmarshal([]byte(out), &d); err != nil {
		t.Fatalf("output is not JSON: %v\n%s", err, out)
	}
	return d
}

func TestBadInput(t *testing.T) {
	tests := []struct {
		name    string
		content string
		want    []string // substrings of the message
	}{
		{"unparsable expression", `{"plant": "1/(s+1"}`, []string{`key "plant"`, "line 1, column 11", "column 7 of the text", "expected ')'"}},
		{"gain is text", `{"plant": "1/(s+1)", "gain": "x"}`, []string{`key "gain"`, "line 1, column 30", "want a number"}},
		{"unknown key", `{"plnt": "1/(s+1)"}`, []string{`unknown key "plnt"`, "line 1, column 2", "plant"}},
		{"not JSON", `not json`, []string{"not valid JSON", "line 1"}},
		{"trailing comma", "{\"plant\": \"1/(s+1)\",\n}", []string{"not valid JSON", "line 2, column 1"}},
		{"empty file", ``, []string{"empty"}},
		{"a list, not an object", `[1, 2]`, []string{"want a JSON object"}},
		{"plant missing", `{"controller": "2"}`, []string{`"plant" is missing`}},
		{"plant empty", `{"plant": " "}`, []string{`"plant"`, "empty"}},
		{"duplicate key", `{"plant": "1/s", "plant": "2/s"}`, []string{`"plant"`, "twice"}},
		{"unknown nested key", "{\"plant\": \"1/(s+1)\",\n \"parameter\": {\"name\": \"p\", \"value\": 1, \"rnge\": [0, 1]}}", []string{`unknown key "rnge"`, `"parameter"`, "line 2, column 41"}},
		{"unknown requirement", `{"plant": "1/(s+1)", "requirements": {"min_phase_margin": 30}}`, []string{`unknown key "min_phase_margin"`, "min_phase_margin_deg"}},
		{"requirement not a number", `{"plant": "1/(s+1)", "requirements": {"max_overshoot_pct": "ten"}}`, []string{`"requirements.max_overshoot_pct"`, "want a number"}},
		{"improper loop", `{"plant": "s^3/(s+1)"}`, []string{"improper", "numerator degree 3"}},
		{"number too large", `{"plant": "1/(s+1)", "gain": 1e999}`, []string{`key "gain"`, "not a finite number"}},
		{"NaN in an expression", `{"plant": "NaN/(s+1)"}`, []string{`key "plant"`, `unknown name "NaN"`}},
		{"NaN as a value", `{"plant": "1/(s+1)", "delay_sec": NaN}`, []string{"not valid JSON"}},
		{"unknown name in controller", `{"plant": "1/(s+1)", "controller": "k*s"}`, []string{`key "controller"`, `unknown name "k"`}},
		{"gain range reversed", `{"plant": "1/(s+1)", "gain_range": [1, 0]}`, []string{`"gain_range"`, "lower end"}},
		{"gain range too short", `{"plant": "1/(s+1)", "gain_range": [1]}`, []string{`"gain_range"`, "two numbers"}},
		{"negative delay", `{"plant": "1/(s+1)", "delay_sec": -1}`, []string{`"delay_sec"`, "zero or positive"}},
		{"unknown discretization", `{"plant": "1/(s+1)", "discretize": {"method": "euler", "sample_time_sec": 0.1}}`, []string{`"discretize.method"`, `"euler"`}},
		{"discretize without sample time", `{"plant": "1/(s+1)", "discretize": {"method": "zoh"}}`, []string{`"discretize"`, `"sample_time_sec"`}},
		{"discretize a discrete loop", `{"plant": "1/(z-0.5)", "sample_time_sec": 0.1, "discretize": {"method": "zoh", "sample_time_sec": 0.1}}`, []string{"exclude each other"}},
		{"s in a discrete loop", `{"plant": "1/(s-0.5)", "sample_time_sec": 0.1}`, []string{`key "plant"`, "variable of a discrete transfer function is z"}},
		{"bad parameter name", `{"plant": "1/(s+1)", "parameter": {"name": "s", "value": 1}}`, []string{`"parameter.name"`, "not a usable name"}},
		{"parameter without value", `{"plant": "1/(s+1)", "parameter": {"name": "p"}}`, []string{`"parameter"`, `"value"`}},
		{"zero loop", `{"plant": "0"}`, []string{"zero"}},
		{"zero gain", `{"plant": "1/(s+1)", "gain": 0}`, []string{`key "gain"`, "must not be zero"}},
		{"unused parameter", `{"plant": "1/(s+1)", "parameter": {"name": "p", "value": 1}}`, []string{`"parameter"`, "does not appear"}},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			code, out, errs := runLoop(t, test.content, "-json")
			if code != 2 {
				t.Errorf("exit status %d, want 2; stderr: %s", code, errs)
			}
			if out != "" {
				t.Errorf("stdout not empty: %q", out)
			}
			if strings.Contains(errs, "panic") || strings.Contains(errs, "goroutine ") {
				t.Errorf("stack trace on stderr: %s", errs)
			}
			if !strings.HasPrefix(errs, "loopreport: ") {
				t.Errorf("message does not start with the program name: %q", errs)
			}
			for _, w := range test.want {
				if !strings.Contains(errs, w) {
					t.Errorf("message lacks %q:\n%s", w, errs)
				}
			}
		})
	}
}

func TestBadCommandLine(t *testing.T) {
	var out, errb bytes.Buffer
	if code := run([]string{"-loop", filepath.Join(t.TempDir(), "missing.json")}, &out, &errb); code != 2 || !strings.Contains(errb.String(), "does not exist") {
		t.Errorf("missing file: exit %d, stderr %q", code, errb.String())
	}
	errb.Reset()
	if code := run([]string{"-loop", t.TempDir()}, &out, &errb); code != 2 || errb.Len() == 0 {
		t.Errorf("directory as loop file: exit %d, stderr %q", code, errb.String())
	}
	errb.Reset()
	if code := run([]string{"-nosuchflag"}, &out, &errb); code != 2 || !strings.Contains(errb.String(), "nosuchflag") {
		t.Errorf("unknown flag: exit %d, stderr %q", code, errb.String())
	}
	errb.Reset()
	if code := run([]string{"loop.json"}, &out, &errb); code != 2 || !strings.Contains(errb.String(), "-loop FILE") {
		t.Errorf("positional argument: exit %d, stderr %q", code, errb.String())
	}
}

func TestHelpDocumentsEveryFlagAndKey(t *testing.T) {
	var out, errb bytes.Buffer
	if code := run([]string{"-h"}, &out, &errb); code != 0 {
		t.Fatalf("-h: exit %d", code)
	}
	if errb.Len() != 0 {
		t.Errorf("-h wrote to stderr: %q", errb.String())
	}
	help := out.String()
	want := []string{"-loop", "-json", "-out", "-quiet", "-print-demo"}
	for _, k := range report.LoopKeys() {
		want = append(want, k[strings.LastIndex(k, ".")+1:])
	}
	want = append(want, "zoh", "foh", "tustin", "matched", "prewarp_rad_per_sec", "null", "Exit status")
	for _, w := range want {
		if !strings.Contains(help, w) {
			t.Errorf("-h does not mention %q", w)
		}
	}
}

func TestPrintDemoIsALoopFile(t *testing.T) {
	var out, errb bytes.Buffer
	if code := run([]string{"-print-demo"}, &out, &errb); code != 0 {
		t.Fatalf("exit %d", code)
	}
	if _, err := report.ReadLoop("demo", out.Bytes()); err != nil {
		t.Fatalf("the printed demo is not a valid loop file: %v", err)
	}
}

// documented lists every key of the JSON output documented in README.md
// and the issue, section by section.
var documented = map[string][]string{
	"open_loop":    {"poles", "zeros", "static_gain"},
	"closed_loop":  {"poles", "stable"},
	"locus":        {"variable", "centroid", "asymptote_angles_deg", "real_axis_segments", "departure_angles", "arrival_angles", "break_points", "axis_crossings", "stable_intervals"},
	"margins":      {"gain_margin", "gain_margin_db", "phase_crossover_rad_per_sec", "lower_gain_margin", "phase_margin_deg", "gain_crossover_rad_per_sec", "delay_margin_sec", "peak_sensitivity", "peak_sensitivity_rad_per_sec", "closed_loop_stable", "gain_crossovers", "phase_crossovers"},
	"step":         {"rise_time_sec", "settling_time_sec", "overshoot_pct", "undershoot_pct", "peak", "peak_time_sec", "final_value"},
	"steady_state": {"system_type", "position_constant", "velocity_constant", "acceleration_constant", "step_error", "ramp_error", "parabola_error"},
}

func isComplex(v any) bool {
	m, ok := v.(map[string]any)
	if !ok || len(m) != 2 {
		return false
	}
	_, re := m["re"].(float64)
	_, im := m["im"].(float64)
	return re && im
}

// isInterval reports whether v is [lo, hi] with numbers or null.
func isInterval(v any) bool {
	l, ok := v.([]any)
	if !ok || len(l) != 2 {
		return false
	}
	for _, x := range l {
		if _, ok := x.(float64); !ok && x != nil {
			return false
		}
	}
	return true
}

func TestJSONSchema(t *testing.T) {
	var out, errb bytes.Buffer
	if code := run([]string{"-json"}, &out, &errb); code != 0 {
		t.Fatalf("demo -json: exit %d: %s", code, errb.String())
	}
	var d map[string]any
	if err := json.Unmarshal(out.Bytes(), &d); err != nil {
		t.Fatalf("not JSON: %v", err)
	}
	for section, keys := range documented {
		s, ok := d[section].(map[string]any)
		if !ok {
			t.Errorf("section %q missing or not an object", section)
			continue
		}
		for _, k := range keys {
			if _, ok := s[k]; !ok {
				t.Errorf("key %s.%s missing", section, k)
			}
		}
	}
	for _, k := range []string{"requirements", "warnings"} {
		if _, ok := d[k].([]any); !ok {
			t.Errorf("key %q missing or not a list", k)
		}
	}
	if _, ok := d["discrete_loop"]; ok {
		t.Errorf("discrete_loop present without discretize")
	}
	// Types of the documented values.
	ol := d["open_loop"].(map[string]any)
	for _, k := range []string{"poles", "zeros"} {
		for _, p := range ol[k].([]any) {
			if !isComplex(p) {
				t.Errorf("open_loop.%s entry %v is not {re, im}", k, p)
			}
		}
	}
	for _, p := range d["closed_loop"].(map[string]any)["poles"].([]any) {
		if !isComplex(p) {
			t.Errorf("closed_loop.poles entry %v is not {re, im}", p)
		}
	}
	if _, ok := d["closed_loop"].(map[string]any)["stable"].(bool); !ok {
		t.Errorf("closed_loop.stable is not a bool")
	}
	lo := d["locus"].(map[string]any)
	if lo["variable"] != "gain" {
		t.Errorf("locus.variable = %v, want gain", lo["variable"])
	}
	for _, k := range []string{"real_axis_segments", "stable_intervals"} {
		for _, iv := range lo[k].([]any) {
			if !isInterval(iv) {
				t.Errorf("locus.%s entry %v is not [lo, hi]", k, iv)
			}
		}
	}
	for _, a := range lo["departure_angles"].([]any) {
		m := a.(map[string]any)
		if !isComplex(m["pole"]) {
			t.Errorf("departure angle %v lacks a complex pole", a)
		}
		if _, ok := m["angle_deg"].(float64); !ok {
			t.Errorf("departure angle %v lacks angle_deg", a)
		}
	}
	for _, b := range lo["break_points"].([]any) {
		m := b.(map[string]any)
		if !isComplex(m["s"]) {
			t.Errorf("break point %v lacks a complex s", b)
		}
		if _, ok := m["value"].(float64); !ok {
			t.Errorf("break point %v lacks value", b)
		}
	}
	for _, c := range lo["axis_crossings"].([]any) {
		m := c.(map[string]any)
		for _, k := range []string{"frequency_rad_per_sec", "value"} {
			if _, ok := m[k].(float64); !ok {
				t.Errorf("axis crossing %v lacks %s", c, k)
			}
		}
	}
	mg := d["margins"].(map[string]any)
	for _, k := range []string{"gain_crossovers", "phase_crossovers"} {
		for _, c := range mg[k].([]any) {
			m := c.(map[string]any)
			for _, f := range []string{"frequency_rad_per_sec", "margin"} {
				if _, ok := m[f]; !ok {
					t.Errorf("margins.%s entry %v lacks %s", k, c, f)
				}
			}
		}
	}
	reqs := d["requirements"].([]any)
	if len(reqs) == 0 {
		t.Fatalf("the demo states requirements, the report has none")
	}
	for _, r := range reqs {
		m := r.(map[string]any)
		for _, f := range []string{"name", "limit", "value", "pass", "message"} {
			if _, ok := m[f]; !ok {
				t.Errorf("requirement %v lacks %s", r, f)
			}
		}
	}
}

// TestJSONNulls checks that quantities that are infinite or do not exist
// are null, never a string or a huge number.
func TestJSONNulls(t *testing.T) {
	// 1/(s(s+1)): no phase crossover, so the gain margin is infinite, and a
	// type-1 loop has an infinite position constant.
	d := runJSON(t, `{"plant": "1/(s*(s+1))"}`)
	mg := d["margins"].(map[string]any)
	for _, k := range []string{"gain_margin", "gain_margin_db", "phase_crossover_rad_per_sec", "lower_gain_margin"} {
		if mg[k] != nil {
			t.Errorf("margins.%s = %v, want null", k, mg[k])
		}
	}
	ss := d["steady_state"].(map[string]any)
	if ss["position_constant"] != nil || ss["parabola_error"] != nil {
		t.Errorf("steady_state position_constant %v, parabola_error %v; want null (infinite)", ss["position_constant"], ss["parabola_error"])
	}
	if ss["step_error"] != 0.0 {
		t.Errorf("steady_state.step_error = %v, want 0", ss["step_error"])
	}
	if d["open_loop"].(map[string]any)["static_gain"] != nil {
		t.Errorf("open_loop.static_gain of an integrating loop = %v, want null", d["open_loop"].(map[string]any)["static_gain"])
	}
}

// TestUnstableLoopStillReports checks that a loop whose closed loop is
// unstable gets a report with warnings and null step keys, and exit 0.
func TestUnstableLoopStillReports(t *testing.T) {
	// K/(s(s+1)(s+2)) is stable for K < 6 (Ogata, Modern Control
	// Engineering, 5th ed., Example 6-1, from memory); K = 10 is not.
	d := runJSON(t, `{"plant": "1/(s*(s+1)*(s+2))", "gain": 10, "requirements": {"max_overshoot_pct": 20}}`)
	if st := d["closed_loop"].(map[string]any)["stable"]; st != false {
		t.Errorf("closed_loop.stable = %v, want false", st)
	}
	for k, v := range d["step"].(map[string]any) {
		if v != nil {
			t.Errorf("step.%s = %v for an unstable loop, want null", k, v)
		}
	}
	warnings := d["warnings"].([]any)
	joined := ""
	for _, w := range warnings {
		joined += w.(string) + "\n"
	}
	if !strings.Contains(joined, "unstable") {
		t.Errorf("warnings do not say the closed loop is unstable:\n%s", joined)
	}
	r := d["requirements"].([]any)[0].(map[string]any)
	if r["pass"] != false || r["value"] != nil || !strings.Contains(r["message"].(string), "unstable") {
		t.Errorf("requirement on an unstable loop: %v", r)
	}
}

func num(t *testing.T, v any) float64 {
	t.Helper()
	f, ok := v.(float64)
	if !ok {
		t.Fatalf("%v is not a number", v)
	}
	return f
}

func closeTo(got, want, rel float64) bool { return math.Abs(got-want) <= rel*math.Abs(want)+1e-12 }

// TestPublishedExample checks documented values against a published
// worked example: the root locus of K/(s(s+1)(s+2)) in Ogata, Modern
// Control Engineering, 5th ed., Example 6-1 (from memory): asymptotes
// from −1 at ±60° and 180°, break-away point −0.4226 at K = 0.3849,
// imaginary-axis crossing at ω = √2 with K = 6, stable for 0 < K < 6; and
// at K = 1 the gain margin 6 (15.56 dB) at √2 rad/s, which follows from
// the crossing.
func TestPublishedExample(t *testing.T) {
	d := runJSON(t, `{"name": "Ogata Example 6-1", "plant": "1/(s*(s+1)*(s+2))"}`)
	const rel = 1e-9 // exact quantities from the locus and margins packages; the book prints 4 digits, checked at that precision below
	lo := d["locus"].(map[string]any)
	if c := num(t, lo["centroid"]); !closeTo(c, -1, rel) {
		t.Errorf("centroid %v, want −1", c)
	}
	angles := lo["asymptote_angles_deg"].([]any)
	if len(angles) != 3 || !closeTo(num(t, angles[0]), 60, rel) || !closeTo(num(t, angles[1]), 180, rel) || !closeTo(num(t, angles[2]), 300, rel) {
		t.Errorf("asymptote angles %v, want 60, 180, 300", angles)
	}
	bps := lo["break_points"].([]any)
	if len(bps) != 1 {
		t.Fatalf("break points %v, want one", bps)
	}
	bp := bps[0].(map[string]any)
	s := num(t, bp["s"].(map[string]any)["re"])
	// Book: −0.4226 and 0.3849 (4 digits); exact: −1 + 1/√3 and 2/(3√3).
	if math.Abs(s-(-0.4226)) > 5e-5 || !closeTo(s, -1+1/math.Sqrt(3), rel) {
		t.Errorf("break-away point %v, want −0.4226 (−1 + 1/√3)", s)
	}
	if k := num(t, bp["value"]); math.Abs(k-0.3849) > 5e-5 || !closeTo(k, 2/(3*math.Sqrt(3)), rel) {
		t.Errorf("break-away gain %v, want 0.3849 (2/(3√3))", k)
	}
	cr := lo["axis_crossings"].([]any)
	if len(cr) != 1 {
		t.Fatalf("axis crossings %v, want one", cr)
	}
	c := cr[0].(map[string]any)
	if w, k := num(t, c["frequency_rad_per_sec"]), num(t, c["value"]); !closeTo(w, math.Sqrt2, rel) || !closeTo(k, 6, rel) {
		t.Errorf("crossing ω = %v at K = %v, want √2 at 6", w, k)
	}
	iv := lo["stable_intervals"].([]any)
	if len(iv) != 1 || num(t, iv[0].([]any)[0]) != 0 || !closeTo(num(t, iv[0].([]any)[1]), 6, rel) {
		t.Errorf("stable intervals %v, want [[0, 6]]", iv)
	}
	mg := d["margins"].(map[string]any)
	if gm := num(t, mg["gain_margin"]); !closeTo(gm, 6, rel) {
		t.Errorf("gain margin %v, want 6", gm)
	}
	if db := num(t, mg["gain_margin_db"]); !closeTo(db, 20*math.Log10(6), rel) {
		t.Errorf("gain margin %v dB, want 20·log10(6)", db)
	}
	if w := num(t, mg["phase_crossover_rad_per_sec"]); !closeTo(w, math.Sqrt2, rel) {
		t.Errorf("phase crossover %v rad/s, want √2", w)
	}
}

// TestSecondOrderStep checks the step keys against the closed-form
// second-order formulas (Ogata, Modern Control Engineering, 5th ed.,
// Sec. 5-3, from memory): the loop ωn²/(s(s + 2ζωn)) closes to
// ωn²/(s² + 2ζωn s + ωn²), with overshoot 100·exp(−ζπ/√(1−ζ²)) and peak
// time π/(ωn√(1−ζ²)).
func TestSecondOrderStep(t *testing.T) {
	zeta, wn := 0.5, 2.0
	d := runJSON(t, `{"plant": "4/(s*(s+2))"}`)
	st := d["step"].(map[string]any)
	wantOS := 100 * math.Exp(-zeta*math.Pi/math.Sqrt(1-zeta*zeta))
	wantTp := math.Pi / (wn * math.Sqrt(1-zeta*zeta))
	const rel = 1e-9 // response locates events to about 1e-13 relative
	if os := num(t, st["overshoot_pct"]); !closeTo(os, wantOS, rel) {
		t.Errorf("overshoot %v %%, want %v", os, wantOS)
	}
	if tp := num(t, st["peak_time_sec"]); !closeTo(tp, wantTp, rel) {
		t.Errorf("peak time %v s, want %v", tp, wantTp)
	}
	if p := num(t, st["peak"]); !closeTo(p, 1+wantOS/100, rel) {
		t.Errorf("peak %v, want %v", p, 1+wantOS/100)
	}
	if f := num(t, st["final_value"]); f != 1 {
		t.Errorf("final value %v, want 1", f)
	}
	if u := num(t, st["undershoot_pct"]); u != 0 {
		t.Errorf("undershoot %v, want 0", u)
	}
}

// TestDiscretizedLoop checks discrete_loop against the zero-order-hold
// equivalent of 1/(s(s+1)) at T = 1 s, ((e⁻¹)z + 1 − 2e⁻¹)/((z − 1)(z − e⁻¹))
// (Ogata, Discrete-Time Control Systems, 2nd ed., Ch. 3, from memory; the
// closed form follows from the partial fractions of 1/(s²(s+1))).
func TestDiscretizedLoop(t *testing.T) {
	d := runJSON(t, `{"plant": "1/(s*(s+1))", "discretize": {"method": "zoh", "sample_time_sec": 1}}`)
	dl, ok := d["discrete_loop"].(map[string]any)
	if !ok {
		t.Fatalf("discrete_loop missing")
	}
	e := math.Exp(-1)
	wantNum := []float64{e, 1 - 2*e}
	wantDen := []float64{1, -(1 + e), e}
	gotNum, gotDen := dl["num"].([]any), dl["den"].([]any)
	for len(gotNum) > len(wantNum) && num(t, gotNum[0]) == 0 {
		gotNum = gotNum[1:]
	}
	if len(gotNum) != 2 || len(gotDen) != 3 {
		t.Fatalf("discrete loop %v / %v, want degrees 1 and 2", gotNum, gotDen)
	}
	const rel = 1e-12 // tf documents a few units of 1e-15 relative
	for i := range wantNum {
		if !closeTo(num(t, gotNum[i]), wantNum[i], rel) {
			t.Errorf("num[%d] = %v, want %v", i, gotNum[i], wantNum[i])
		}
	}
	for i := range wantDen {
		if !closeTo(num(t, gotDen[i]), wantDen[i], rel) {
			t.Errorf("den[%d] = %v, want %v", i, gotDen[i], wantDen[i])
		}
	}
	// Everything else is analysed in z: the open-loop poles are 1 and e⁻¹.
	poles := d["open_loop"].(map[string]any)["poles"].([]any)
	if len(poles) != 2 {
		t.Fatalf("open-loop poles %v", poles)
	}
}

// TestParameterLocus checks that a parameter loop's locus is in the
// parameter. The PI loop Ki/s + 2 around 1/((s+1)(s+3)) has the
// characteristic polynomial s(s+1)(s+3) + 2s + Ki = s³ + 4s² + 5s + Ki, so
// by Routh's criterion it is stable for 0 < Ki < 20, crossing the
// imaginary axis at ω = √5 (hand derivation).
func TestParameterLocus(t *testing.T) {
	d := runJSON(t, `{"plant": "1/((s+1)*(s+3))", "controller": "2 + Ki/s",
		"parameter": {"name": "Ki", "value": 4, "range": [0, null]}}`)
	lo := d["locus"].(map[string]any)
	if lo["variable"] != "Ki" {
		t.Errorf("locus variable %v, want Ki", lo["variable"])
	}
	iv := lo["stable_intervals"].([]any)
	if len(iv) != 1 || num(t, iv[0].([]any)[0]) != 0 || !closeTo(num(t, iv[0].([]any)[1]), 20, 1e-9) {
		t.Errorf("stable intervals %v, want [[0, 20]]", iv)
	}
	cr := lo["axis_crossings"].([]any)
	if len(cr) != 1 || !closeTo(num(t, cr[0].(map[string]any)["frequency_rad_per_sec"]), math.Sqrt(5), 1e-9) {
		t.Errorf("axis crossings %v, want one at √5", cr)
	}
	// At Ki = 4 (inside the interval) the closed loop is stable.
	if st := d["closed_loop"].(map[string]any)["stable"]; st != true {
		t.Errorf("closed loop at Ki = 4: stable = %v, want true", st)
	}
}

func TestDemoReport(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "report")
	var out, errb bytes.Buffer
	if code := run([]string{"-out", dir}, &out, &errb); code != 0 {
		t.Fatalf("demo: exit %d: %s", code, errb.String())
	}
	summary := out.String()
	for _, w := range []string{"Winding tension loop", "phase margin", "Requirements:", "Caution", "index.html"} {
		if !strings.Contains(summary, w) {
			t.Errorf("summary lacks %q", w)
		}
	}
	for _, f := range []string{"index.html", "summary.md", "report.json"} {
		if st, err := os.Stat(filepath.Join(dir, f)); err != nil || st.Size() == 0 {
			t.Errorf("%s missing or empty", f)
		}
	}
	for _, p := range []string{"root-locus", "frequency-response", "nyquist", "step-response", "pole-zero-map"} {
		for _, ext := range []string{".svg", ".png"} {
			st, err := os.Stat(filepath.Join(dir, p+ext))
			if err != nil || st.Size() < 4000 {
				t.Errorf("plot %s%s missing or too small", p, ext)
			}
		}
	}
	html, err := os.ReadFile(filepath.Join(dir, "index.html"))
	if err != nil {
		t.Fatal(err)
	}
	page := string(html)
	if n := strings.Count(page, "<svg"); n < 5 {
		t.Errorf("index.html inlines %d SVG plots, want 5", n)
	}
	// Self-contained: no scripts, style sheets, images or fonts loaded from
	// elsewhere (the SVG namespace URI is a name, not a download).
	for _, bad := range []string{"<script", "<link", "<img", "src=", "url(http", "@import"} {
		if strings.Contains(page, bad) {
			t.Errorf("index.html refers to an external asset: contains %q", bad)
		}
	}
	for _, w := range []string{"Requirements", "not met", "linear model", "Margins at k"} {
		if !strings.Contains(page, w) {
			t.Errorf("index.html lacks %q", w)
		}
	}
	md, _ := os.ReadFile(filepath.Join(dir, "summary.md"))
	if !strings.Contains(string(md), "![") || !strings.Contains(string(md), "## Safety") {
		t.Errorf("summary.md lacks plots or the safety section")
	}
}

// TestJSONDoesNotWriteReport checks that -json alone writes no folder.
func TestJSONDoesNotWriteReport(t *testing.T) {
	dir := t.TempDir()
	wd, _ := os.Getwd()
	if err := os.Chdir(dir); err != nil {
		t.Fatal(err)
	}
	defer os.Chdir(wd)
	var out, errb bytes.Buffer
	if code := run([]string{"-json"}, &out, &errb); code != 0 {
		t.Fatalf("exit %d", code)
	}
	if _, err := os.Stat(filepath.Join(dir, "loopreport-out")); err == nil {
		t.Errorf("-json wrote loopreport-out")
	}
}

func TestProgressLine(t *testing.T) {
	var b bytes.Buffer
	p := &progress{w: &b, live: true}
	p.show(report.Progress{Stage: "root locus", Step: 1, Steps: 2})
	p.step("margins")
	p.done()
	s := b.String()
	if !strings.Contains(s, "[1/2] root locus") || !strings.Contains(s, "[2/2] margins") || !strings.HasSuffix(s, "\r") {
		t.Errorf("progress output %q", s)
	}
	var q bytes.Buffer
	newProgress(&q, false).step("x")
	if q.Len() != 0 {
		t.Errorf("progress writes to a non-terminal: %q", q.String())
	}
}

// collectKeys adds every object key in v to keys.
func collectKeys(v any, keys map[string]bool) {
	switch x := v.(type) {
	case map[string]any:
		for k, e := range x {
			keys[k] = true
			collectKeys(e, keys)
		}
	case []any:
		for _, e := range x {
			collectKeys(e, keys)
		}
	}
}

// TestReadmeDocumentsEveryKey checks that README.md names every key the
// program reads or writes.
func TestReadmeDocumentsEveryKey(t *testing.T) {
	readme, err := os.ReadFile("README.md")
	if err != nil {
		t.Fatal(err)
	}
	doc := string(readme)
	keys := map[string]bool{}
	for _, content := range []string{
		"", // the demo
		`{"plant": "1/(s*(s+1))", "discretize": {"method": "tustin", "sample_time_sec": 0.1, "prewarp_rad_per_sec": 1}}`,
		`{"plant": "1/((s+1)*(s+3))", "controller": "2 + Ki/s", "parameter": {"name": "Ki", "value": 4, "range": [0, null]}}`,
		`{"plant": "(s+1)/(s*(s^2+s+4))", "delay_sec": 0.1}`,
	} {
		var d map[string]any
		if content == "" {
			var out, errb bytes.Buffer
			if code := run([]string{"-json"}, &out, &errb); code != 0 {
				t.Fatal(errb.String())
			}
			if err := json.Unmarshal(out.Bytes(), &d); err != nil {
				t.Fatal(err)
			}
		} else {
			d = runJSON(t, content)
		}
		collectKeys(d, keys)
	}
	for _, k := range report.LoopKeys() {
		keys[k[strings.LastIndex(k, ".")+1:]] = true
	}
	for k := range keys {
		if !strings.Contains(doc, "`"+k+"`") && !strings.Contains(doc, `"`+k+`"`) && !strings.Contains(doc, "."+k) {
			t.Errorf("README.md does not document the key %q", k)
		}
	}
}

func TestHTMLEscapesTheLoopFile(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "r")
	code, _, errs := runLoop(t, `{"name": "<script>alert(1)</script>", "description": "a & b", "plant": "1/(s+1)"}`, "-out", dir)
	if code != 0 {
		t.Fatal(errs)
	}
	page, err := os.ReadFile(filepath.Join(dir, "index.html"))
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(string(page), "<script>") {
		t.Errorf("the loop name reached index.html unescaped")
	}
	if !strings.Contains(string(page), "&lt;script&gt;") {
		t.Errorf("the loop name is missing from index.html")
	}
}

// TestReportFolderHasNoStalePlots checks that a second run into the same
// folder removes the plots it could not draw this time.
func TestReportFolderHasNoStalePlots(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "r")
	var out, errb bytes.Buffer
	if code := run([]string{"-out", dir}, &out, &errb); code != 0 {
		t.Fatal(errb.String())
	}
	// Unstable at K = 10 (Ogata, Example 6-1, from memory): no step plot.
	if code, _, errs := runLoop(t, `{"plant": "1/(s*(s+1)*(s+2))", "gain": 10}`, "-out", dir); code != 0 {
		t.Fatal(errs)
	}
	if _, err := os.Stat(filepath.Join(dir, "step-response.svg")); err == nil {
		t.Errorf("the demo's step plot is still in the folder")
	}
	if _, err := os.Stat(filepath.Join(dir, "root-locus.svg")); err != nil {
		t.Errorf("root-locus.svg missing: %v", err)
	}
}
