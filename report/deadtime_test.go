package report

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// The reference values below come from testdata/deadtime_refs.py (mpmath,
// 50 digits); the script states the closed forms and their sources.

// relClose reports whether got is within tol of want, relative to |want|.
func relClose(got Number, want, tol float64) bool {
	return math.Abs(float64(got)-want) <= tol*math.Abs(want)
}

// TestDeadTimeIntegratorHayes checks the loop a·e^(−sτ)/s (ẋ = −a·x(t−τ)):
// stable iff aτ < π/2 (Hayes 1950), rightmost roots W_k(−aτ)/τ (Asl &
// Ulsoy 2003), delay margin π/(2a) − τ, and the step response by the method
// of steps (Bellman & Cooke 1963).
func TestDeadTimeIntegratorHayes(t *testing.T) {
	r := analyzeText(t, `{"plant": "1/s", "gain": 1, "delay_sec": 0.5}`)
	d := r.DeadTime
	if d == nil {
		t.Fatalf("no dead_time section; warnings %q", r.Warnings)
	}
	for _, w := range r.Warnings {
		if strings.Contains(w, "closed-loop poles and the step response") {
			t.Errorf("Padé warning without a request for Padé: %q", w)
		}
	}
	// Roots: Newton to 1e-12 relative; 1e-11 leaves room for the
	// rounding of e^(−sτ) at |s| ≈ 28.
	want := []complex128{complex(-1.5880472646893787359, 1.5402235010207582194), complex(-1.5880472646893787359, -1.5402235010207582194),
		complex(-5.5441380303061639365, 14.999886056683751578), complex(-5.5441380303061639365, -14.999886056683751578),
		complex(-6.7067031976222224998, 27.800898670553769026), complex(-6.7067031976222224998, -27.800898670553769026)}
	if len(d.RightmostRoots) < len(want) {
		t.Fatalf("%d rightmost roots, want at least %d", len(d.RightmostRoots), len(want))
	}
	for i, w := range want {
		got := complex(float64(d.RightmostRoots[i].Re), float64(d.RightmostRoots[i].Im))
		if e := cmplxAbs(got - w); e > 1e-11*cmplxAbs(w) {
			t.Errorf("root %d = %v, want %v (Lambert W), error %.3g", i, got, w, e)
		}
	}
	if r.ClosedLoop.Stable == nil || !*r.ClosedLoop.Stable {
		t.Errorf("verdict %v, want stable (aτ = 0.5 < π/2)", r.ClosedLoop.Stable)
	}
	// Delay margin and the stable delay range: the crossing frequency is
	// a = 1 exactly, so the ends are π/2 − τ and π/2 to rounding.
	if !relClose(d.DelayMarginSec, 1.0707963267948966192, 1e-12) {
		t.Errorf("delay margin %v, want π/2 − 0.5 = 1.0707963267948966", d.DelayMarginSec)
	}
	if len(d.StableDelayIntervalsSec) != 1 || d.StableDelayIntervalsSec[0][0] != 0 || !relClose(d.StableDelayIntervalsSec[0][1], math.Pi/2, 1e-12) {
		t.Errorf("stable delay intervals %v, want [[0, π/2]]", d.StableDelayIntervalsSec)
	}
	// The same margin from the exact frequency response (package margins).
	if !relClose(r.Margins.DelayMarginSec, 1.0707963267948966192, 1e-9) {
		t.Errorf("margins delay margin %v", r.Margins.DelayMarginSec)
	}
	// Step by the method of steps: 10 % at τ + 0.1/a = 0.6 s, 90 % on
	// [3τ, 4τ] at 1.5527317628140904107 s; rise time to the 1e-9 relative
	// target of issue 14.
	if !relClose(r.Step.RiseTimeSec, 0.95273176281409041071, 1e-9) {
		t.Errorf("rise time %v, want 0.95273176281409041 (method of steps)", r.Step.RiseTimeSec)
	}
	if !relClose(r.Step.FinalValue, 1, 1e-12) {
		t.Errorf("final value %v, want 1", r.Step.FinalValue)
	}
	// The locus in k: the crossing at k·τ = π/2, ω = k.
	if n := len(r.Locus.StableIntervals); n != 1 || !relClose(r.Locus.StableIntervals[0][1], math.Pi, 1e-12) {
		t.Errorf("locus stable intervals %v, want [[0, π]] (kτ < π/2)", r.Locus.StableIntervals)
	}
}

func cmplxAbs(c complex128) float64 { return math.Hypot(real(c), imag(c)) }

// TestDeadTimeFirstOrderLag checks K·e^(−sτ)/(Ts + 1): stable for
// K < sqrt(1 + (ωT)²) with ωT = −tan(ωτ) (textbook result, from memory);
// T = 1, τ = 0.5.
func TestDeadTimeFirstOrderLag(t *testing.T) {
	r := analyzeText(t, `{"plant": "1/(s+1)", "gain": 2, "delay_sec": 0.5}`)
	iv := r.Locus.StableIntervals
	if len(iv) != 1 || iv[0][0] != 0 || !relClose(iv[0][1], 3.8068828648258725024, 1e-12) {
		t.Fatalf("stable gain intervals %v, want [[0, 3.8068828648258725]]", iv)
	}
	if len(r.Locus.AxisCrossings) != 1 || !relClose(r.Locus.AxisCrossings[0].FrequencyRadPerSec, 3.6731944063042514455, 1e-12) {
		t.Errorf("axis crossings %v, want one at 3.6731944063042514 rad/s", r.Locus.AxisCrossings)
	}
	if r.DeadTime == nil || r.ClosedLoop.Stable == nil || !*r.ClosedLoop.Stable {
		t.Fatalf("dead_time %v, verdict %v: want the exact section and stable", r.DeadTime, r.ClosedLoop.Stable)
	}
	// At K = 2 the loop has a finite delay margin: the stable delay range
	// ends at τ + margin.
	d := r.DeadTime
	if n := len(d.StableDelayIntervalsSec); n != 1 || !relClose(d.StableDelayIntervalsSec[0][1], 0.5+float64(d.DelayMarginSec), 1e-12) {
		t.Errorf("stable delay intervals %v, delay margin %v: the range must end at τ + margin", d.StableDelayIntervalsSec, d.DelayMarginSec)
	}
	// Final value K/(1 + K) = 2/3 for proportional control.
	if !relClose(r.Step.FinalValue, 2.0/3, 1e-12) {
		t.Errorf("final value %v, want 2/3", r.Step.FinalValue)
	}
}

// TestDeadTimeModelPade checks that "pade" restores the approximation with
// its warning, and that an unknown model is refused.
func TestDeadTimeModelPade(t *testing.T) {
	r := analyzeText(t, `{"plant": "1/(s+1)", "gain": 2, "delay_sec": 0.5, "dead_time_model": "pade"}`)
	if r.DeadTime != nil {
		t.Errorf("dead_time section with the Padé model")
	}
	found := false
	for _, w := range r.Warnings {
		found = found || strings.Contains(w, "Padé approximation for the closed-loop poles")
	}
	if !found {
		t.Errorf("no Padé warning: %q", r.Warnings)
	}
	// The Padé(6) stable interval is close to the exact one, not equal.
	if iv := r.Locus.StableIntervals; len(iv) != 1 || !relClose(iv[0][1], 3.8068828648258725024, 1e-3) {
		t.Errorf("Padé stable interval %v", iv)
	}
	_, err := ReadLoop("x.json", []byte(`{"plant": "1/(s+1)", "dead_time_model": "lagrange"}`))
	if !errors.Is(err, ErrBadInput) || !strings.Contains(err.Error(), "dead_time_model") {
		t.Errorf("unknown model: error %v, want ErrBadInput naming the key", err)
	}
	if _, err := Analyze(&Loop{Plant: "1/(s+1)", DeadTimeModel: "x"}, nil); !errors.Is(err, ErrBadInput) {
		t.Errorf("unknown model in a Loop value: error %v, want ErrBadInput", err)
	}
}

// TestDeadTimeUnstableAndBiproper: an unstable delayed loop gets a zero
// delay margin and no step; a biproper loop falls back on Padé with a
// warning that says why.
func TestDeadTimeUnstableAndBiproper(t *testing.T) {
	r := analyzeText(t, `{"plant": "1/(s+1)", "gain": 5, "delay_sec": 0.5}`)
	if r.ClosedLoop.Stable == nil || *r.ClosedLoop.Stable {
		t.Errorf("K = 5 > 3.807: verdict %v, want unstable", r.ClosedLoop.Stable)
	}
	if d := r.DeadTime; d == nil || d.DelayMarginSec != 0 || float64(d.RightmostRoots[0].Re) <= 0 {
		t.Errorf("dead_time %+v: want margin 0 and a rightmost root in the right half plane", d)
	}
	if !math.IsNaN(float64(r.Step.RiseTimeSec)) {
		t.Errorf("step of an unstable loop: %v", r.Step)
	}
	r = analyzeText(t, `{"plant": "(s+2)/(s+1)", "gain": 0.3, "delay_sec": 0.5}`)
	found := false
	for _, w := range r.Warnings {
		found = found || strings.Contains(w, "neutral type")
	}
	if r.DeadTime != nil || !found {
		t.Errorf("biproper: dead_time %v, warnings %q", r.DeadTime, r.Warnings)
	}
}

// TestDeadTimeLocusFigure: with the dead time exact the root-locus figure
// is traced on the exact closed loop (no fallback warning).
func TestDeadTimeLocusFigure(t *testing.T) {
	checkExactLocusFigure(t, `{"plant": "1/(0.1s+1)", "controller": "2(1+1/(0.05s))", "delay_sec": 0.02}`, "dead time 0.02 s exact")
}

// checkExactLocusFigure analyses the loop file text with plots and checks
// that the root-locus figure is the exact one (its title holds title) and
// that no warning concerns the locus.
func checkExactLocusFigure(t *testing.T, text, title string) {
	t.Helper()
	if testing.Short() {
		t.Skip("draws every figure")
	}
	lf, err := ReadLoop("x.json", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	r, err := Analyze(lf, &Settings{Plots: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range r.Warnings {
		if strings.Contains(w, "root locus") || strings.Contains(w, "parameter locus") {
			t.Errorf("warning %q", w)
		}
	}
	found := false
	for _, f := range r.Figures {
		found = found || (f.File == "root-locus" && strings.Contains(string(f.SVG), title))
	}
	if !found {
		t.Errorf("no exact root-locus figure")
	}
}

// TestDeadTimeUnstablePlant checks k·e^(−sτ)/(s − 1) at k = 2: stable for
// τ < arctan(√(k² − 1))/√(k² − 1) = (π/3)/√3 (closed form from the axis
// crossing at ω = √(k² − 1), where ωτ = arctan ω; by hand), and for k > 1
// only.
func TestDeadTimeUnstablePlant(t *testing.T) {
	r := analyzeText(t, `{"plant": "1/(s-1)", "gain": 2, "delay_sec": 0.2}`)
	d := r.DeadTime
	if d == nil || r.ClosedLoop.Stable == nil || !*r.ClosedLoop.Stable {
		t.Fatalf("dead_time %v, verdict %v: want stable", d, r.ClosedLoop.Stable)
	}
	tauMax := math.Pi / 3 / math.Sqrt(3)
	if len(d.StableDelayIntervalsSec) != 1 || !relClose(d.StableDelayIntervalsSec[0][1], tauMax, 1e-12) {
		t.Errorf("stable delay intervals %v, want [[0, %v]]", d.StableDelayIntervalsSec, tauMax)
	}
	if !relClose(d.DelayMarginSec, tauMax-0.2, 1e-12) {
		t.Errorf("delay margin %v, want %v", d.DelayMarginSec, tauMax-0.2)
	}
	if iv := r.Locus.StableIntervals; len(iv) != 1 || !relClose(iv[0][0], 1, 1e-12) {
		t.Errorf("stable gain intervals %v, want one starting at k = 1 (D(0) + k·N(0) = 0)", iv)
	}
}

// TestDeadTimeParameterExact: a loop file with a parameter (the integral
// gain Ki of a PI controller, Kp = 0.5, on 1/(s+1) with 0.5 s dead time)
// gets the exact locus in the parameter with no Padé warning: the closed
// loop s(s+1) + (0.5s + Ki)·e^(−0.5s) crosses the axis at Ki = 0 (s = 0)
// and at Ki = 3.00797419780234320758825659684 (ω = 1.6298…), the 50-digit
// mpmath reference of locus/testdata/delay_param.py (case pi_lag); so it
// is stable for 0 < Ki < 3.0079742. Tolerance 1e-12 relative: the
// polishing goal of the interval ends.
func TestDeadTimeParameterExact(t *testing.T) {
	r := analyzeText(t, `{"plant": "1/(s+1)", "controller": "0.5 + Ki/s", "delay_sec": 0.5,
		"parameter": {"name": "Ki", "value": 1, "range": [-1, 5]}}`)
	for _, w := range r.Warnings {
		if strings.Contains(w, "Padé") && (strings.Contains(w, "locus") || strings.Contains(w, "parameter")) {
			t.Errorf("Padé warning for the locus without a request for Padé: %q", w)
		}
	}
	l := r.Locus
	if l.Variable != "Ki" {
		t.Errorf("variable %q", l.Variable)
	}
	const want = 3.00797419780234320758825659684
	if len(l.StableIntervals) != 1 || l.StableIntervals[0][0] != 0 || !relClose(l.StableIntervals[0][1], want, 1e-12) {
		t.Errorf("stable intervals %v, want [[0, %.16g]]", l.StableIntervals, want)
	}
	if len(l.AxisCrossings) != 2 {
		t.Errorf("crossings %v, want two", l.AxisCrossings)
	}
	if len(l.Notes) == 0 || !strings.Contains(l.Notes[0], "kept exact") {
		t.Errorf("notes %q", l.Notes)
	}
	// With "dead_time_model": "pade" the Padé locus comes back, warned.
	rp := analyzeText(t, `{"plant": "1/(s+1)", "controller": "0.5 + Ki/s", "delay_sec": 0.5, "dead_time_model": "pade",
		"parameter": {"name": "Ki", "value": 1, "range": [-1, 5]}}`)
	warned := false
	for _, w := range rp.Warnings {
		warned = warned || (strings.Contains(w, "Padé") && strings.Contains(w, "locus"))
	}
	if !warned {
		t.Errorf("no Padé warning with dead_time_model pade: %q", rp.Warnings)
	}
}

// TestDeadTimeParameterFigure: the locus figure in a parameter with dead
// time is the exact one.
func TestDeadTimeParameterFigure(t *testing.T) {
	checkExactLocusFigure(t, `{"plant": "1/(s+1)", "controller": "0.5 + Ki/s", "delay_sec": 0.5,
		"parameter": {"name": "Ki", "value": 1, "range": [-1, 5]}}`, "dead time 0.5 s exact")
}
