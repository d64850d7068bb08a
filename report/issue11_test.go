package report

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/google/go-cmp/cmp"

	"github.com/loopwise/loopwise/poly"
)

// analyzeText reads the loop file content and analyses it without plots.
func analyzeText(t *testing.T, content string) *Report {
	t.Helper()
	lf, err := ReadLoop("test.json", []byte(content))
	if err != nil {
		t.Fatalf("ReadLoop: %v", err)
	}
	r, err := Analyze(lf, nil)
	if err != nil {
		t.Fatalf("Analyze: %v", err)
	}
	return r
}

// jsonOf returns the JSON form of r decoded into maps.
func jsonOf(t *testing.T, r *Report) map[string]any {
	t.Helper()
	b, err := r.JSON()
	if err != nil {
		t.Fatal(err)
	}
	var d map[string]any
	if err := json.Unmarshal(b, &d); err != nil {
		t.Fatal(err)
	}
	return d
}

func joined(ws []string) string { return strings.Join(ws, "\n") }

// TestFailedLocusIsNull checks issue 11, item 2: a locus analysis that
// cannot be done leaves its keys null and says why, while [] means
// "computed: there is none". The parameter range is the loop file's.
func TestFailedLocusIsNull(t *testing.T) {
	for _, test := range []struct{ name, loop, why string }{
		{"parameter squared", `{"plant": "1/(s+1)", "controller": "p^2", "parameter": {"name": "p", "value": 1}}`, "cannot be formed"},
		{"parameter in the dead time", `{"plant": "exp(-p*s)/(s+1)", "parameter": {"name": "p", "value": 1}}`, "cannot be formed"},
		{"degree 500", `{"plant": "1/(s+1)^500"}`, "root locus"},
		{"dead time 1e300 s", `{"plant": "exp(-1e300s)/(s+1)"}`, "root locus"},
	} {
		t.Run(test.name, func(t *testing.T) {
			if testing.Short() && test.name == "degree 500" {
				t.Skip("the whole report on a degree-500 loop takes about a minute (seconds per root solve); skipped with -short")
			}
			r := analyzeText(t, test.loop)
			lo := jsonOf(t, r)["locus"].(map[string]any)
			for _, k := range []string{"stable_intervals", "axis_crossings", "break_points", "real_axis_segments", "asymptote_angles_deg"} {
				if v, ok := lo[k]; !ok || v != nil {
					t.Errorf("locus.%s = %v, want null", k, v)
				}
			}
			if !strings.Contains(joined(r.Warnings), test.why) {
				t.Errorf("warnings do not say why (%q):\n%s", test.why, joined(r.Warnings))
			}
			if r.Loop.Parameter != nil {
				// No "range": [0, ∞) for a positive value (the documented
				// default), not [null, null].
				if diff := cmp.Diff(Interval{0, Number(math.Inf(1))}, r.Locus.Range); diff != "" {
					t.Errorf("locus range (-want +got):\n%s", diff)
				}
			}
			var b bytes.Buffer
			if err := r.WriteSummary(&b); err != nil {
				t.Fatal(err)
			}
			if !strings.Contains(b.String(), "not computed") {
				t.Errorf("the summary does not say the locus was not computed:\n%s", b.String())
			}
		})
	}
	// K/(s − 1)²: s² − 2s + 1 + K has a negative coefficient for every K,
	// so by Routh's criterion no K > 0 stabilises it (hand derivation):
	// computed, and empty.
	r := analyzeText(t, `{"plant": "1/(s-1)^2"}`)
	if iv := jsonOf(t, r)["locus"].(map[string]any)["stable_intervals"]; !cmp.Equal(iv, []any{}) {
		t.Errorf("stable_intervals of K/(s−1)² = %v, want []", iv)
	}
}

// TestVerdictRefusesUndecidableSampling checks issue 11, item 3: the loop
// 1/(s(s+1)) sampled at 1e-12 s has closed-loop poles 1 − 0.5e-12 ±
// 0.87e-12j (z = e^(pT) with p = −0.5 ± 0.87j, the roots of s² + s + 1),
// while the rounding of its characteristic polynomial's coefficients
// (about 1e-16 relative) moves a near-double root by about √1e-16 = 1e-8:
// double precision cannot tell the side of the unit circle, and the loop
// is refused with a message that names the key.
func TestVerdictRefusesUndecidableSampling(t *testing.T) {
	for _, content := range []string{
		`{"plant":"1/(s*(s+1))","discretize":{"method":"zoh","sample_time_sec":1e-12}}`,
		`{"plant":"1/(s+1)","discretize":{"method":"zoh","sample_time_sec":1e-300}}`,
	} {
		lf, err := ReadLoop("t.json", []byte(content))
		if err != nil {
			t.Fatal(err)
		}
		_, err = Analyze(lf, nil)
		if !errors.Is(err, ErrBadInput) || !strings.Contains(err.Error(), `"discretize.sample_time_sec"`) || !strings.Contains(err.Error(), "cannot tell") {
			t.Errorf("%s: err = %v, want a bad-input error naming discretize.sample_time_sec", content, err)
		}
	}
}

// TestOneVerdict checks issue 11, item 3 on sampled loops that double
// precision can judge: the closed_loop, margins and step sections agree,
// and the gain margin equals the end of the stable gain interval. The loop
// is the zero-order-hold equivalent of 1/(s(s+1)) at T = 1 s, whose
// characteristic polynomial z² + (Ka − 1 − e⁻¹)z + e⁻¹ + Kb, a = e⁻¹,
// b = 1 − 2e⁻¹, loses stability when its constant term reaches 1 (Jury's
// test; the other conditions hold up to K ≈ 26): K = (1 − e⁻¹)/(1 − 2e⁻¹)
// = 2.392 (hand derivation).
func TestOneVerdict(t *testing.T) {
	e := math.Exp(-1)
	kc := (1 - e) / (1 - 2*e)
	for _, test := range []struct {
		gain   float64
		stable bool
	}{{1, true}, {2.3, true}, {2.5, false}, {10, false}} {
		content := `{"plant":"1/(s*(s+1))","discretize":{"method":"zoh","sample_time_sec":1},"gain":` + jsonNumber(test.gain) + `}`
		r := analyzeText(t, content)
		cl, mg := r.ClosedLoop.Stable, r.Margins.ClosedLoopStable
		if cl == nil || mg == nil || *cl != test.stable || *mg != test.stable {
			t.Errorf("k = %g: closed_loop.stable %v, margins.closed_loop_stable %v, want %v", test.gain, cl, mg, test.stable)
		}
		if stepDone := !math.IsNaN(float64(r.Step.FinalValue)); stepDone != test.stable {
			t.Errorf("k = %g: step computed %v for a loop that is stable %v", test.gain, stepDone, test.stable)
		}
		ivs := r.Locus.StableIntervals
		if len(ivs) != 1 || math.Abs(float64(ivs[0][1])/kc-1) > 1e-9 {
			t.Errorf("k = %g: stable intervals %v, want [0, %.6g]", test.gain, ivs, kc)
		}
		if test.stable {
			// The gain margin is the factor to the end of the interval.
			if gm := float64(r.Margins.GainMargin) * test.gain; math.Abs(gm/kc-1) > 1e-9 {
				t.Errorf("k = %g: gain margin × k = %v, want %v", test.gain, gm, kc)
			}
		}
	}
}

func jsonNumber(x float64) string { b, _ := json.Marshal(x); return string(b) }

// TestBoundaryPoleIsUnstable checks the verdict for closed-loop poles on
// the stability boundary: 1/s² closes to s² + 1 with poles ±j, an
// undamped oscillation (not asymptotically stable), and every section says
// so.
func TestBoundaryPoleIsUnstable(t *testing.T) {
	r := analyzeText(t, `{"plant": "1/s^2"}`)
	if cl := r.ClosedLoop.Stable; cl == nil || *cl {
		t.Errorf("closed_loop.stable = %v, want false", cl)
	}
	if mg := r.Margins.ClosedLoopStable; mg != nil && *mg {
		t.Errorf("margins.closed_loop_stable = true for poles ±j")
	}
	if !strings.Contains(joined(r.Warnings), "on the imaginary axis to within the rounding") {
		t.Errorf("warnings do not name the boundary poles:\n%s", joined(r.Warnings))
	}
}

// TestRootRadius checks the uncertainty radius against closed forms: a
// simple root r of a monic quadratic with coefficients of size 1 moves by
// η·S(r)/|P′(r)| (first-order perturbation), a double root by √(η·S(r)),
// with η = 8·(n+1)·2⁻⁵³ = 24·2⁻⁵³.
func TestRootRadius(t *testing.T) {
	eta := 24 * 0x1p-53
	// (x − 1)(x − 2) = x² − 3x + 2: at 1, S = 1 + 3 + 2 = 6, P′ = −1.
	p := mustPoly(t, 1, -3, 2)
	if got, want := rootRadius(p, 1), eta*6; math.Abs(got/want-1) > 1e-12 {
		t.Errorf("simple root: ρ = %g, want %g", got, want)
	}
	// (x − 1)² = x² − 2x + 1: at 1, S = 4, P″/2 = 1.
	q := mustPoly(t, 1, -2, 1)
	if got, want := rootRadius(q, 1), math.Sqrt(eta*4); math.Abs(got/want-1) > 1e-12 {
		t.Errorf("double root: ρ = %g, want %g", got, want)
	}
}

func mustPoly(t *testing.T, c ...float64) poly.Poly {
	t.Helper()
	p, err := poly.New(c...)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// reportOptions compare Report values with go-cmp: a NaN Number (a
// quantity not computed) equals another NaN.
var reportOptions = cmp.Options{
	cmp.Comparer(func(a, b Number) bool {
		return a == b || (math.IsNaN(float64(a)) && math.IsNaN(float64(b)))
	}),
	cmp.AllowUnexported(LoopText{}),
}

// TestLoopInGoEqualsLoopFile checks that a Loop written in Go with only
// the plant gives the same report as the loop file with the same keys
// (the zero values are the defaults), and that Analyze is repeatable.
func TestLoopInGoEqualsLoopFile(t *testing.T) {
	fromFile := analyzeText(t, `{"name": "x", "plant": "2/(s*(s+1)*(s+3))", "requirements": {"min_phase_margin_deg": 30}}`)
	inGo, err := Analyze(&Loop{Name: "x", Plant: "2/(s*(s+1)*(s+3))", Requirements: []Requirement{{Key: "min_phase_margin_deg", Limit: 30}}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if diff := cmp.Diff(fromFile, inGo, reportOptions); diff != "" {
		t.Errorf("Loop in Go vs loop file (-file +go):\n%s", diff)
	}
	again := analyzeText(t, `{"name": "x", "plant": "2/(s*(s+1)*(s+3))", "requirements": {"min_phase_margin_deg": 30}}`)
	if diff := cmp.Diff(fromFile, again, reportOptions); diff != "" {
		t.Errorf("two analyses differ (-first +second):\n%s", diff)
	}
}

// TestUnstableLoopInWords checks issue 11, item 6: the report of an
// unstable loop never quotes a margin as if it were one, never prints
// "undefined" in a sentence, and says what the crossovers mean. K = 10
// on K/(s(s+1)(s+2)) is unstable; it is stable for 0 < K < 6 (Ogata,
// Modern Control Engineering, 5th ed., Example 6-1, from memory).
func TestUnstableLoopInWords(t *testing.T) {
	r := analyzeText(t, `{"plant": "1/(s*(s+1)*(s+2))", "gain": 10, "requirements": {"min_phase_margin_deg": 30, "min_gain_margin_db": 6, "min_delay_margin_sec": 0.1}}`)
	var text bytes.Buffer
	if err := r.WriteSummary(&text); err != nil {
		t.Fatal(err)
	}
	page, err := r.HTML(nil)
	if err != nil {
		t.Fatal(err)
	}
	for name, out := range map[string]string{"summary": text.String(), "summary.md": string(r.Markdown()), "index.html": string(page)} {
		for _, bad := range []string{"undefined", "is no safety margin", "gain factor", "gain margin of", "phase margin of"} {
			if strings.Contains(out, bad) {
				t.Errorf("%s contains %q", name, bad)
			}
		}
		for _, want := range []string{"unstable: no gain, phase or delay margin", "stable for k in (0, 6)", "puts −1 on the Nyquist curve"} {
			if !strings.Contains(out, want) {
				t.Errorf("%s lacks %q", name, want)
			}
		}
	}
	for _, q := range r.Requirements {
		if q.Pass || !math.IsNaN(float64(q.Value)) {
			t.Errorf("requirement %q on an unstable loop: pass %v, value %v (want fail, null)", q.Name, q.Pass, q.Value)
		}
	}
}

// TestReproducibleReport checks issue 11, item 19: two runs on the same
// loop write byte-identical files; a timestamp appears only when asked
// for.
func TestReproducibleReport(t *testing.T) {
	content := `{"name": "repro", "plant": "4/(s*(s+2))", "requirements": {"max_overshoot_pct": 20}}`
	var dirs []string
	for range 2 {
		lf, err := ReadLoop("r.json", []byte(content))
		if err != nil {
			t.Fatal(err)
		}
		r, err := Analyze(lf, &Settings{Plots: true})
		if err != nil {
			t.Fatal(err)
		}
		dir := t.TempDir()
		if _, err := r.WriteFolder(dir, nil); err != nil {
			t.Fatal(err)
		}
		dirs = append(dirs, dir)
	}
	entries, err := os.ReadDir(dirs[0])
	if err != nil {
		t.Fatal(err)
	}
	if len(entries) < 13 {
		t.Fatalf("%d files written, want 13", len(entries))
	}
	for _, e := range entries {
		a, _ := os.ReadFile(filepath.Join(dirs[0], e.Name()))
		b, err := os.ReadFile(filepath.Join(dirs[1], e.Name()))
		if err != nil || !bytes.Equal(a, b) {
			t.Errorf("%s differs between two runs (%v)", e.Name(), err)
		}
	}
	r := analyzeText(t, content)
	stamped, err := r.HTML(&WriteSettings{Timestamp: time.Date(2026, 12, 5, 13, 30, 0, 0, time.UTC)})
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(stamped, []byte("generated 2026-12-05 13:30 UTC")) {
		t.Errorf("the timestamp is missing from index.html")
	}
	plain, _ := r.HTML(nil)
	if bytes.Contains(plain, []byte("generated")) {
		t.Errorf("index.html carries a time without being asked")
	}
}

// TestHTMLNumberFormat checks issue 11, item 19: outside the plots,
// index.html writes the minus sign U+2212, a no-break space between a
// number and "%" or "dB", and lays every result table out in the same two
// columns.
func TestHTMLNumberFormat(t *testing.T) {
	r := analyzeText(t, `{"plant": "(s+2.5)/(s*(s+2)*(s^2+7.2s+144)*(s+40))", "gain": 921.6,
		"requirements": {"min_damping_ratio": 0.3, "max_overshoot_pct": 10, "min_gain_margin_db": 10}}`)
	page, err := r.HTML(nil)
	if err != nil {
		t.Fatal(err)
	}
	text := regexp.MustCompile(`(?s)<svg.*?</svg>`).ReplaceAllString(string(page), "")
	body := text[strings.Index(text, "<body>"):]
	// Leave out the echo of the loop file's own expressions.
	body = regexp.MustCompile(`<tr><td>(plant|controller|sensor \(feedback path\))</td><td>[^<]*</td></tr>`).ReplaceAllString(body, "")
	if m := regexp.MustCompile(`(^|[\s(>=,])-[0-9]`).FindString(body); m != "" {
		t.Errorf("index.html writes a hyphen as a minus sign: %q", m)
	}
	if m := regexp.MustCompile(`[0-9](%| %| dB)`).FindString(body); m != "" {
		t.Errorf("index.html separates a number from its unit by %q, want a no-break space", m)
	}
	if n, kv := strings.Count(body, "<table"), strings.Count(body, `<table class="kv">`); kv != n-1 {
		t.Errorf("%d of %d tables share the two-column layout, want all but the requirements", kv, n)
	}
}

// TestSectionPanicBecomesWarning checks that a defect that panics inside
// one section leaves a warning and the other sections' results.
func TestSectionPanicBecomesWarning(t *testing.T) {
	lf, err := ReadLoop("p.json", []byte(`{"plant": "1/(s+1)"}`))
	if err != nil {
		t.Fatal(err)
	}
	m, err := build(lf)
	if err != nil {
		t.Fatal(err)
	}
	a := &analysis{m: m, rep: emptyReport()}
	a.runSection(section{stage: "broken", run: func(*analysis) { panic("boom") }})
	a.runSection(loopsSection)
	if !strings.Contains(joined(a.rep.Warnings), "broken: internal error (boom)") {
		t.Errorf("warnings %q", a.rep.Warnings)
	}
	if a.rep.ClosedLoop.Stable == nil || !*a.rep.ClosedLoop.Stable {
		t.Errorf("the next section did not run")
	}
}

// TestVerdictAgreesWithLocus checks, on seeded random loops, that the one
// verdict agrees with the stable intervals of the gain locus (computed by
// package locus from the exact characteristic polynomial in k) and with the
// margins section, and that the step section is not filled for an
// unstable loop; half of the loops are sampled (zero-order hold, T from
// 1 ms to 0.1 s). Nominal gains within 1e-6 (relative) of an interval end
// are skipped: there the two may differ by rounding.
func TestVerdictAgreesWithLocus(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 21))
	checked := 0
	for range 120 {
		np := 2 + rng.IntN(4)
		den := "1"
		for range np {
			den += fmt.Sprintf("*(s+%.3f)", rng.Float64()*10-1)
		}
		num := "1"
		if rng.IntN(2) == 0 {
			num = fmt.Sprintf("(s+%.3f)", rng.Float64()*5)
		}
		k := math.Pow(10, rng.Float64()*4-2)
		content := fmt.Sprintf(`{"plant": "%s/(%s)", "gain": %g}`, num, den, k)
		if rng.IntN(2) == 0 {
			// Sampled by a zero-order hold: the verdict is then on |z| < 1.
			content = fmt.Sprintf(`{"plant": "%s/(%s)", "gain": %g, "discretize": {"method": "zoh", "sample_time_sec": %.3g}}`, num, den, k, math.Pow(10, rng.Float64()*2-3))
		}
		lf, err := ReadLoop("r.json", []byte(content))
		if err != nil {
			t.Fatal(err)
		}
		r, err := Analyze(lf, nil)
		if err != nil {
			t.Fatalf("%s: %v", content, err)
		}
		v := r.ClosedLoop.Stable
		if v == nil || r.Locus.StableIntervals == nil {
			continue
		}
		inside, near := false, false
		for _, iv := range r.Locus.StableIntervals {
			lo, hi := float64(iv[0]), float64(iv[1])
			inside = inside || (k > lo && k < hi)
			near = near || math.Abs(k-lo) <= 1e-6*k || math.Abs(k-hi) <= 1e-6*k
		}
		if near {
			continue
		}
		checked++
		if inside != *v {
			t.Errorf("%s: verdict stable = %v, locus stable intervals %v", content, *v, r.Locus.StableIntervals)
		}
		if mg := r.Margins.ClosedLoopStable; mg != nil && *mg != *v {
			t.Errorf("%s: margins say %v, closed loop %v", content, *mg, *v)
		}
		if stepDone := !math.IsNaN(float64(r.Step.FinalValue)); stepDone && !*v {
			t.Errorf("%s: step metrics for an unstable loop", content)
		}
	}
	t.Logf("%d of 120 loops checked", checked)
	if checked < 100 {
		t.Errorf("only %d of 120 loops checked", checked)
	}
}

// TestRootRadiusScales checks that the radius is computed without
// overflow for roots near 1e154 of a polynomial with a coefficient of
// 1e308 (s² + s + 1e308: roots −0.5 ± 1e154j), and that it scales with the
// root: ρ of p(x/σ) at σr is σ·ρ of p at r for σ a power of two.
func TestRootRadiusScales(t *testing.T) {
	p := mustPoly(t, 1, 1, 1e308)
	r := complex(-0.5, 1e154)
	if rho := rootRadius(p, r); math.IsInf(rho, 0) || math.IsNaN(rho) || rho <= 0 {
		t.Errorf("ρ = %g for a root near 1e154", rho)
	}
	q := mustPoly(t, 1, -3, 2) // roots 1 and 2
	qs := mustPoly(t, 1, -3*1024, 2*1024*1024)
	if a, b := rootRadius(q, 1), rootRadius(qs, 1024); math.Abs(b/(1024*a)-1) > 1e-12 {
		t.Errorf("ρ = %g at 1, %g at 1024 for the scaled polynomial; want a ratio of 1024", a, b)
	}
}

// TestNegligibleDeadTime checks the treatment of a dead time far below the
// loop's time scales. 1/(s+1)^30 with 1e-300 s: e^(−sτ) differs from 1 by
// 3e-300 at the poles, so the loop is the rational one (before: the Padé
// approximation failed, and the margins ran out of memory scanning up to
// 4π/τ). 2(s+1)/(s+2) with the same dead time: |L(j∞)| = 2 > 1, so the
// dead time makes the closed loop unstable however short it is (the
// characteristic equation is of neutral type; its difference part
// 1 + 2e^(−sτ) has roots with Re s = ln 2/τ > 0; hand derivation): the
// dead time is not left out.
func TestNegligibleDeadTime(t *testing.T) {
	r := analyzeText(t, `{"plant": "1/(s+1)^30", "delay_sec": 1e-300}`)
	if cl := r.ClosedLoop.Stable; cl == nil || !*cl {
		t.Errorf("1/(s+1)^30 with 1e-300 s: closed loop stable = %v, want true (K = 1 < 1/cos(π/30)^30 ≈ 1.18, the critical gain of 1/(s+1)^n)", cl)
	}
	if !strings.Contains(joined(r.Warnings), "negligible") {
		t.Errorf("no warning that the dead time is left out:\n%s", joined(r.Warnings))
	}
	r = analyzeText(t, `{"plant": "2*(s+1)/(s+2)", "delay_sec": 1e-300}`)
	if cl := r.ClosedLoop.Stable; cl == nil || *cl {
		t.Errorf("2(s+1)/(s+2)·e^(−1e-300 s): closed loop stable = %v, want false", cl)
	}
}

// TestLostPolynomialIsNotJudged: the closed loop of 1/(s + 1)ⁿ at k = 1 has
// the characteristic polynomial (s + 1)ⁿ + 1, whose roots are
// −1 + e^(jπ(2m+1)/n) (closed form): all have Re s = −1 + cos(π(2m+1)/n) < 0,
// so the loop is stable. At high degree the expanded coefficients (binomials
// up to 1e149 at n = 500) lose the roots, whose computed values scatter into
// the right half-plane; the verdict must then be "not determined", never
// "unstable". At n = 10 the roots are well conditioned and the verdict is
// "stable".
func TestLostPolynomialIsNotJudged(t *testing.T) {
	for _, n := range []int{10, 60, 120, 200} {
		p := mustPoly(t, 1)
		f := mustPoly(t, 1, 1)
		for range n {
			p = p.Mul(f)
		}
		p = p.Add(mustPoly(t, 1))
		roots, err := p.Roots()
		if err != nil {
			t.Fatalf("n = %d: %v", n, err)
		}
		v := judgePoles(p, roots, false)
		if v.known && !v.stable {
			t.Errorf("n = %d: verdict unstable, want stable or not determined (every root has Re s < 0)", n)
		}
		if n == 10 && !(v.known && v.stable) {
			t.Errorf("n = 10: verdict known=%v stable=%v, want stable", v.known, v.stable)
		}
	}
}
