package spec_test

import (
	"errors"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/closedloop"
	"github.com/loopwise/loopwise/internal/testutil"
	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// Loops whose quantities are known in closed form.
var (
	// secondOrder is ωn²/(s(s + 2ζωn)) with ζ = 0.5, ωn = 2: the closed
	// loop is ωn²/(s² + 2ζωn s + ωn²) (Ogata, Modern Control Engineering,
	// 5th ed., Sec. 5-3, from memory).
	zeta, wn    = 0.5, 2.0
	secondOrder = tf.MustParse("4/(s*(s+2))")
	// firstOrder is a/s with a = 2: T = a/(s + a), y = 1 − e^(−at).
	a          = 2.0
	firstOrder = tf.MustParse("2/s")
	// cubic is K/(s(s+1)(s+2)) at K = 1: gain margin 6 at √2 rad/s
	// (Ogata, Modern Control Engineering, 5th ed., Example 6-1, from
	// memory; the crossing K = 6 at ω = √2 follows from Routh's array).
	cubic = tf.MustParse("1/(s*(s+1)*(s+2))")
	// typeZero is 4/(s+1): Kp = 4, step error 1/(1 + Kp) = 0.2.
	typeZero = tf.MustParse("4/(s+1)")
	// deadTimeIntegrator is e^(−s)/s: gain crossover at 1 rad/s with
	// phase margin 90° − 180°/π, so the delay margin is π/2 − 1 s; phase
	// crossover at π/2 with gain margin π/2 (hand derivation; reference
	// case C04).
	deadTimeIntegrator = tf.MustParse("exp(-s)/s")
)

// Closed forms.
var (
	// Phase margin of ωn²/(s(s+2ζωn)): ωc = ωn·√(√(1+4ζ⁴) − 2ζ²) and
	// PM = atan(2ζωn/ωc) (Ogata, Modern Control Engineering, 5th ed.,
	// Sec. 7-6, from memory; it follows from |L(jωc)| = 1).
	wc          = wn * math.Sqrt(math.Sqrt(1+4*math.Pow(zeta, 4))-2*zeta*zeta)
	pmSecond    = math.Atan2(2*zeta*wn, wc) * 180 / math.Pi
	osSecond    = 100 * math.Exp(-zeta*math.Pi/math.Sqrt(1-zeta*zeta))
	riseFirst   = math.Log(9) / a  // 10 % to 90 % of 1 − e^(−at)
	settleFirst = math.Log(50) / a // |e^(−at)| = 0.02
	gmCubicDB   = 20 * math.Log10(6)
)

func TestCheckEachRequirement(t *testing.T) {
	// Each quantity is checked with a limit just on the passing side and
	// just on the failing side of its closed-form value: the relative
	// margin 1e-6 is far above the accuracy of the analyses (about 1e-12)
	// and far below any rounding that could flip a verdict by accident.
	const eps = 1e-6
	tests := []struct {
		name  string
		loop  tf.TF
		value float64 // closed-form value of the quantity
		req   func(float64) spec.Requirement
		min   bool
	}{
		{"phase margin of the second-order loop", secondOrder, pmSecond, spec.MinPhaseMarginDeg, true},
		{"gain margin of K/(s(s+1)(s+2))", cubic, gmCubicDB, spec.MinGainMarginDB, true},
		{"delay margin of e^(−s)/s", deadTimeIntegrator, math.Pi/2 - 1, spec.MinDelayMarginSec, true},
		// Peak sensitivity of K/(s(s+1)(s+2)), reference case C01 (mpmath,
		// 50 digits).
		{"peak sensitivity of K/(s(s+1)(s+2))", cubic, 1.5683807467542445, spec.MaxPeakSensitivity, false},
		{"damping ratio of the second-order closed loop", secondOrder, zeta, spec.MinDampingRatio, true},
		{"overshoot of the second-order closed loop", secondOrder, osSecond, spec.MaxOvershootPct, false},
		{"rise time of the first-order closed loop", firstOrder, riseFirst, spec.MaxRiseTimeSec, false},
		{"settling time of the first-order closed loop", firstOrder, settleFirst, spec.MaxSettlingTimeSec, false},
		{"step error of 4/(s+1)", typeZero, 0.2, spec.MaxSteadyStateError, false},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			passLimit, failLimit := test.value*(1+eps), test.value*(1-eps)
			if test.min {
				passLimit, failLimit = failLimit, passLimit
			}
			rep := spec.Check(test.loop, spec.Requirements{test.req(passLimit), test.req(failLimit)})
			if len(rep.Results) != 2 {
				t.Fatalf("%d results, want 2", len(rep.Results))
			}
			pass, fail := rep.Results[0], rep.Results[1]
			if !testutil.Close(pass.Value, test.value, 1e-9, 1e-12) {
				t.Errorf("measured %v, want %v", pass.Value, test.value)
			}
			if !pass.Pass || pass.Err != nil {
				t.Errorf("limit %v: failed (%v): %s", passLimit, pass.Err, pass.Message)
			}
			if fail.Pass {
				t.Errorf("limit %v: passed: %s", failLimit, fail.Message)
			}
			if !strings.HasSuffix(pass.Message, "met.") || !strings.HasSuffix(fail.Message, "not met.") {
				t.Errorf("messages do not end with the verdict:\n%s\n%s", pass.Message, fail.Message)
			}
			if pass.Name != test.req(1).Name() || pass.Limit != passLimit {
				t.Errorf("result names %q with limit %v", pass.Name, pass.Limit)
			}
			if rep.Err() == nil || len(rep.Failures()) != 1 || rep.Passed() {
				t.Errorf("report with one failure: Err %v, %d failures", rep.Err(), len(rep.Failures()))
			}
		})
	}
}

func TestErrListsEveryFailure(t *testing.T) {
	req := spec.Requirements{
		spec.MinPhaseMarginDeg(80),    // PM ≈ 51.8°
		spec.MinGainMarginDB(3),       // infinite: passes
		spec.MaxOvershootPct(5),       // 16.3 %
		spec.MinDampingRatio(0.7),     // 0.5
		spec.MaxSteadyStateError(0.1), // 0 (type 1): passes
	}
	rep := spec.Check(secondOrder, req)
	err := rep.Err()
	if err == nil {
		t.Fatal("Err() = nil with three failures")
	}
	if !errors.Is(err, spec.ErrNotMet) {
		t.Errorf("Err does not match ErrNotMet: %v", err)
	}
	if errors.Is(err, spec.ErrInvalidRequirement) {
		t.Errorf("Err matches ErrInvalidRequirement without an invalid requirement")
	}
	var fe *spec.FailureError
	if !errors.As(err, &fe) || len(fe.Failures) != 3 || fe.Checked != 5 {
		t.Fatalf("FailureError %+v", fe)
	}
	msg := err.Error()
	if !strings.HasPrefix(msg, "spec: 3 of 5 requirements not met:") {
		t.Errorf("message starts %q", strings.SplitN(msg, "\n", 2)[0])
	}
	for _, r := range rep.Results {
		if r.Pass == strings.Contains(msg, r.Message) {
			t.Errorf("pass=%v but message listed=%v: %s", r.Pass, !r.Pass, r.Message)
		}
	}
	if got := rep.Results[1]; !got.Pass || !math.IsInf(got.Value, 1) {
		t.Errorf("infinite gain margin: pass %v value %v", got.Pass, got.Value)
	}
	if got := rep.Results[4]; !got.Pass || got.Value != 0 {
		t.Errorf("type-1 step error: pass %v value %v", got.Pass, got.Value)
	}
}

func TestAllPassGivesNilErr(t *testing.T) {
	rep := spec.Check(secondOrder, spec.Requirements{spec.MinPhaseMarginDeg(45), spec.MaxOvershootPct(20)})
	if err := rep.Err(); err != nil || !rep.Passed() {
		t.Errorf("Err() = %v", err)
	}
	if err := spec.Check(secondOrder, nil).Err(); err != nil {
		t.Errorf("no requirements: Err() = %v", err)
	}
}

func TestUnstableLoopFailsEverything(t *testing.T) {
	// K = 10 > 6: unstable (Ogata, Example 6-1, from memory).
	loop, _ := cubic.Scale(10)
	var req spec.Requirements
	for _, k := range spec.Keys() {
		r, err := spec.ByKey(k, 0)
		if err != nil {
			t.Fatal(err)
		}
		req = append(req, r)
	}
	// Even lenient limits fail: the margins of an unstable loop are no
	// margins, and the step response has no metrics. The requirements on
	// the whole loop get its parts: plant cubic, controller 10.
	rep := spec.CheckWith(loop, req, &spec.Settings{Loop: closedloop.Loop{Plant: cubic, Controller: tf.MustNew([]float64{10}, []float64{1})}})
	for _, r := range rep.Results {
		if r.Requirement.Key() == "max_steady_state_error" || r.Requirement.Key() == "min_damping_ratio" {
			if r.Pass {
				t.Errorf("%s passed on an unstable loop: %s", r.Name, r.Message)
			}
			continue
		}
		if r.Pass {
			t.Errorf("%s passed on an unstable loop: %s", r.Name, r.Message)
		}
		if !strings.Contains(r.Message, "unstable") {
			t.Errorf("%s: message does not say why: %s", r.Name, r.Message)
		}
	}
}

func TestInvalidRequirements(t *testing.T) {
	rep := spec.Check(secondOrder, spec.Requirements{{}, spec.MinPhaseMarginDeg(math.NaN()), spec.MaxOvershootPct(math.Inf(1))})
	for i, r := range rep.Results {
		if r.Pass || !errors.Is(r.Err, spec.ErrInvalidRequirement) {
			t.Errorf("result %d: pass %v, err %v", i, r.Pass, r.Err)
		}
	}
	if err := rep.Err(); !errors.Is(err, spec.ErrInvalidRequirement) || !errors.Is(err, spec.ErrNotMet) {
		t.Errorf("Err() = %v", err)
	}
	if _, err := spec.ByKey("max_phase_margin_deg", 1); !errors.Is(err, spec.ErrInvalidRequirement) {
		t.Errorf("ByKey of an unknown key: %v", err)
	}
	bad := spec.CheckWith(secondOrder, spec.Requirements{spec.MinPhaseMarginDeg(1)}, &spec.Settings{PadeOrder: 99})
	if bad.Passed() || !errors.Is(bad.Results[0].Err, spec.ErrInvalidSettings) {
		t.Errorf("PadeOrder 99: %+v", bad.Results[0])
	}
}

func TestKeysRoundTrip(t *testing.T) {
	keys := spec.Keys()
	if len(keys) != 14 {
		t.Fatalf("%d keys", len(keys))
	}
	for _, k := range keys {
		r, err := spec.ByKey(k, 0.5)
		if err != nil || r.Key() != k || r.Limit() != 0.5 {
			t.Errorf("ByKey(%q): %v %v", k, r, err)
		}
		if strings.HasPrefix(k, "min_") != strings.HasPrefix(r.Name(), "minimum ") {
			t.Errorf("%q is named %q", k, r.Name())
		}
	}
}

func TestDeadTime(t *testing.T) {
	// e^(−s)/s (reference case C04): phase margin 90° − 180°/π at 1 rad/s.
	// The damping ratio and step metrics keep the dead time exact by
	// default, and use a Padé approximation when the settings ask for it;
	// the message says which.
	req := spec.Requirements{
		spec.MinPhaseMarginDeg(30), spec.MinDampingRatio(0.1), spec.MaxOvershootPct(60),
	}
	for _, tc := range []struct {
		set  *spec.Settings
		want string
	}{{nil, "dead time exact"}, {&spec.Settings{PadeDeadTime: true}, "Padé"}} {
		rep := spec.CheckWith(deadTimeIntegrator, req, tc.set)
		if want := 90 - 180/math.Pi; !testutil.Close(rep.Results[0].Value, want, 1e-9, 0) {
			t.Errorf("phase margin %v, want %v", rep.Results[0].Value, want)
		}
		for _, r := range rep.Results[1:] {
			if !r.Pass || !strings.Contains(r.Message, tc.want) {
				t.Errorf("pass %v; message does not say %q: %s", r.Pass, tc.want, r.Message)
			}
		}
	}
}

func TestReferenceToOutput(t *testing.T) {
	// With a sensor H = 1/(0.5s + 1) in the feedback path, the closed loop
	// from reference to output F/(1 + F·H) for F = 2/s is
	// 2(0.5s + 1)/(0.5s² + s + 2), whose overshoot is not that of L/(1+L).
	f := tf.MustParse("2/s")
	l := tf.MustParse("2/(s*(0.5s+1))")
	refOut, err := tf.Feedback(f, tf.MustParse("1/(0.5s+1)"))
	if err != nil {
		t.Fatal(err)
	}
	unity := spec.Check(l, spec.Requirements{spec.MaxOvershootPct(100)}).Results[0].Value
	withSensor := spec.CheckWith(l, spec.Requirements{spec.MaxOvershootPct(100)}, &spec.Settings{ReferenceToOutput: refOut}).Results[0].Value
	// L/(1+L) = 4/(s² + 2s + 4): ζ = 0.5, overshoot 16.3 % (closed form).
	if !testutil.Close(unity, osSecond, 1e-9, 0) {
		t.Errorf("unity overshoot %v, want %v", unity, osSecond)
	}
	if withSensor <= unity {
		t.Errorf("overshoot with the sensor's zero %v, want above %v (the zero at −2 adds overshoot)", withSensor, unity)
	}
}

func TestDampingRatio(t *testing.T) {
	// A pole s = ωn(−ζ + j√(1−ζ²)) has damping ratio ζ by definition; its
	// discrete image e^(sT) must give the same.
	const T = 0.1
	for _, z := range []float64{-0.3, 0, 0.2, 0.7, 1} {
		s := complex(-z*3, 3*math.Sqrt(1-z*z))
		if got := spec.DampingRatio(s, 0); !testutil.Close(got, z, 1e-14, 1e-15) {
			t.Errorf("continuous ζ = %v: got %v", z, got)
		}
		if got := spec.DampingRatio(cmplx.Exp(s*T), T); !testutil.Close(got, z, 1e-12, 1e-14) {
			t.Errorf("discrete ζ = %v: got %v", z, got)
		}
	}
	if spec.DampingRatio(0, 0) != 0 || spec.DampingRatio(0, T) != 1 || spec.DampingRatio(-2, 0) != 1 {
		t.Errorf("special cases")
	}
}

func TestDiscreteLoop(t *testing.T) {
	// The zero-order-hold loop of reference case C13 (T = 1 s): phase
	// margin 30.384°, gain margin 7.576 dB (mpmath, 50 digits).
	l, err := tf.NewDiscrete([]float64{0.36787944117144233, 0.2642411176571154}, []float64{1, -1.3678794411714423, 0.36787944117144233}, 1)
	if err != nil {
		t.Fatal(err)
	}
	rep := spec.Check(l, spec.Requirements{spec.MinPhaseMarginDeg(30), spec.MinGainMarginDB(7.6), spec.MaxOvershootPct(100)})
	if !rep.Results[0].Pass || !testutil.Close(rep.Results[0].Value, 30.384272800323433, 1e-9, 0) {
		t.Errorf("phase margin %+v", rep.Results[0])
	}
	if rep.Results[1].Pass || !testutil.Close(rep.Results[1].Value, 7.57599035510848, 1e-9, 0) {
		t.Errorf("gain margin %+v", rep.Results[1])
	}
	if !rep.Results[2].Pass {
		t.Errorf("overshoot %+v", rep.Results[2])
	}
}

// TestConcurrentChecks runs Check from several goroutines on shared
// inputs (meaningful under go test -race) and compares with a serial run.
func TestConcurrentChecks(t *testing.T) {
	req := spec.Requirements{spec.MinPhaseMarginDeg(45), spec.MaxOvershootPct(20), spec.MinDampingRatio(0.4)}
	want := spec.Check(secondOrder, req).String()
	done := make(chan string)
	for range 4 {
		go func() { done <- spec.Check(secondOrder, req).String() }()
	}
	for range 4 {
		if got := <-done; got != want {
			t.Errorf("concurrent result differs:\n%s\nwant\n%s", got, want)
		}
	}
}

// TestUnits: each requirement states the unit of its limit, matching the
// unit in its constructor's name (Deg, DB, Sec, Pct; ratios have none).
func TestUnits(t *testing.T) {
	for _, test := range []struct {
		req  spec.Requirement
		want string
	}{
		{spec.MinPhaseMarginDeg(45), "°"},
		{spec.MinGainMarginDB(6), "dB"},
		{spec.MinDelayMarginSec(0.1), "s"},
		{spec.MaxPeakSensitivity(1.5), ""},
		{spec.MinDampingRatio(0.5), ""},
		{spec.MaxOvershootPct(10), "%"},
		{spec.MaxRiseTimeSec(1), "s"},
		{spec.MaxSettlingTimeSec(2), "s"},
		{spec.MaxSteadyStateError(0.01), ""},
		{spec.Requirement{}, ""},
	} {
		if got := test.req.Unit(); got != test.want {
			t.Errorf("%s: unit %q, want %q", test.req.Name(), got, test.want)
		}
	}
}

// TestWholeLoopRequirements: plant 1/(s + 1) with the PI controller
// 1 + 4/s. Load → output is s/(s² + 2s + 4) (a = 1, b = √3): the peak
// deviation e^(−a·tp)·sin(b·tp)/b at tp = atan2(b, a)/b and
// IAE = coth(aπ/(2b))/ω² (closed forms derived in closedloop's tests); the
// reference → control is C·S = (s + 4)(s + 1)/(s² + 2s + 4), and since
// (s + 4)(s + 1) = (s² + 2s + 4) + 3s its step response is
// u(t) = 1 + 3·e^(−t)·sin(√3·t)/√3, peaking at 1 + 3·peak at tp; noise →
// control is −C·S, |C·S|² = (x² + 17x + 16)/(x² − 4x + 16) with x = ω²,
// stationary where −21x² + 336 = 0: x = 4, ω = 2 rad/s, |C·S| = 10/4 = 2.5.
func TestWholeLoopRequirements(t *testing.T) {
	parts := closedloop.Loop{Plant: tf.MustParse("1/(s+1)"), Controller: tf.MustParse("(s+4)/s")}
	loop, _ := parts.Controller.Series(parts.Plant)
	a, b := 1.0, math.Sqrt(3)
	tp := math.Atan2(b, a) / b
	peak := math.Exp(-a*tp) * math.Sin(b*tp) / b
	iae := 1 / math.Tanh(a*math.Pi/(2*b)) / 4
	set := &spec.Settings{Loop: parts}
	for _, c := range []struct {
		make func(float64) spec.Requirement
		want float64
	}{
		{spec.MaxDisturbancePeak, peak},
		{spec.MaxIntegratedAbsoluteError, iae},
	} {
		for _, f := range []float64{0.999, 1.001} {
			r := spec.CheckWith(loop, spec.Requirements{c.make(f * c.want)}, set).Results[0]
			if r.Pass != (f > 1) || math.Abs(r.Value-c.want) > 1e-10*c.want {
				t.Errorf("%s limit %v: pass %v value %.15g, want %.15g: %s", r.Name, f*c.want, r.Pass, r.Value, c.want, r.Message)
			}
		}
	}
	rep := spec.CheckWith(loop, spec.Requirements{spec.MaxControlPeak(2), spec.MaxNoiseToControlGain(2.4), spec.MaxRecoveryTimeSec(10)}, set)
	if !rep.Results[0].Pass || rep.Results[1].Pass || !rep.Results[2].Pass {
		t.Errorf("%v", rep)
	}
	if v := rep.Results[0].Value; math.Abs(v-(1+3*peak)) > 1e-12 {
		t.Errorf("control peak %.15g, want %.15g", v, 1+3*peak)
	}
	if v := rep.Results[1].Value; math.Abs(v-2.5) > 1e-12 || !strings.Contains(rep.Results[1].Message, "at 2 rad/s") {
		t.Errorf("noise → control gain %.15g, want 2.5 at 2 rad/s: %s", v, rep.Results[1].Message)
	}
	// Without the parts the requirement fails and says what it needs.
	r := spec.Check(loop, spec.Requirements{spec.MaxDisturbancePeak(1)}).Results[0]
	// The error names the Go field for programmers; the message, which a
	// report built from a loop file shows, says it without Go names.
	if r.Pass || !errors.Is(r.Err, spec.ErrInvalidSettings) || !strings.Contains(r.Err.Error(), "Settings.Loop") {
		t.Errorf("without parts: %+v", r)
	}
	if strings.Contains(r.Message, "Settings") || !strings.Contains(r.Message, "the plant and the controller taken apart") {
		t.Errorf("without parts, message %q: want the reason in words, without Go names", r.Message)
	}
}

// TestLimitsOutsideTheQuantity checks that ByKey rejects limits the
// quantity cannot have (issue 11, item 13): a negative overshoot, a phase
// margin of −1e308°, a damping ratio above 1 (ζ ≤ 1 for every pole).
func TestLimitsOutsideTheQuantity(t *testing.T) {
	for _, test := range []struct {
		key   string
		limit float64
	}{
		{"max_overshoot_pct", -5},
		{"min_phase_margin_deg", -1e308},
		{"min_phase_margin_deg", 181},
		{"min_gain_margin_db", -1},
		{"min_delay_margin_sec", -0.1},
		{"max_peak_sensitivity", -2},
		{"min_damping_ratio", 1.5},
		{"max_rise_time_sec", -1},
		{"max_settling_time_sec", -1},
		{"max_steady_state_error", -0.01},
		{"max_disturbance_peak", -0.1},
		{"max_recovery_time_sec", -1},
		{"max_control_peak", -1},
		{"max_integrated_absolute_error", -1},
		{"max_noise_to_control_gain", -3},
	} {
		_, err := spec.ByKey(test.key, test.limit)
		if !errors.Is(err, spec.ErrInvalidRequirement) {
			t.Errorf("ByKey(%q, %g): err = %v, want ErrInvalidRequirement", test.key, test.limit, err)
		}
	}
	if rep := spec.Check(secondOrder, spec.Requirements{spec.MaxOvershootPct(-5)}); !errors.Is(rep.Results[0].Err, spec.ErrInvalidRequirement) {
		t.Errorf("Check of max overshoot −5 %%: %+v", rep.Results[0])
	}
}
