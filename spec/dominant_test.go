package spec_test

import (
	"encoding/json"
	"errors"
	"github.com/loopwise/loopwise/internal/testutil"
	"math"
	"math/cmplx"
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// dominantCase is one entry of testdata/dominant_lambertw.json, generated
// by testdata/dominant_lambertw.py (mpmath, 50 digits) from the Lambert-W
// closed form of the roots of s + a·e^(−sτ) = 0 (Asl & Ulsoy 2003).
type dominantCase struct {
	A        float64   `json:"a"`
	Tau      float64   `json:"tau"`
	Factor   float64   `json:"factor"`
	Multiple float64   `json:"multiple"`
	Abscissa string    `json:"abscissa"`
	Count    int       `json:"count"`
	ZetaMin  string    `json:"zeta_min"`
	Worst    [2]string `json:"worst"`
}

// readJSON decodes the file testdata/name into v.
func readJSON(t *testing.T, name string, v any) {
	t.Helper()
	b, err := os.ReadFile("testdata/" + name)
	if err == nil {
		err = json.Unmarshal(b, v)
	}
	if err != nil {
		t.Fatal(err)
	}
}

func loadDominant(t *testing.T) []dominantCase {
	var cs []dominantCase
	readJSON(t, "dominant_lambertw.json", &cs)
	return cs
}

// float parses a reference value.
func float(t *testing.T, s string) float64 { return testutil.ParseFloat(t, s) }

// delayedIntegrator returns a·e^(−sτ)/s.
func delayedIntegrator(t *testing.T, a, tau float64) tf.TF {
	t.Helper()
	g, err := tf.New([]float64{a}, []float64{1, 0})
	if err != nil {
		t.Fatal(err)
	}
	if g, err = g.WithDelay(tau); err != nil {
		t.Fatal(err)
	}
	return g
}

// TestDominantLambertW compares the dominant set and its smallest damping
// ratio with the Lambert-W closed form. Tolerances: the roots are polished
// by Newton to 1e-12 relative (locus.DelayedRoots), and the damping ratio
// −Re s/|s| inherits that error relative to |s|, so ζ is compared to
// 1e-11 absolute (ζ is of order 1) and the root to 1e-11·|s| (the far
// chain roots carry a rounding of |s|τ·u in e^(−sτ), up to 1e-12·|s| for
// |s|τ ≤ 1500).
func TestDominantLambertW(t *testing.T) {
	for _, c := range loadDominant(t) {
		loop := delayedIntegrator(t, c.A, c.Tau)
		set := &spec.Settings{DominantFactor: c.Factor, DominantCrossoverMultiple: c.Multiple}
		d, err := spec.DominantClosedLoopRoots(loop, set)
		if err != nil {
			t.Errorf("%v: %v", loop, err)
			continue
		}
		if want := float(t, c.Abscissa); math.Abs(d.AbscissaRadPerSec-want) > 1e-11*math.Abs(want) {
			t.Errorf("%v F=%g M=%g: abscissa %v, want %v", loop, c.Factor, c.Multiple, d.AbscissaRadPerSec, want)
		}
		if len(d.Roots) != c.Count {
			t.Errorf("%v F=%g M=%g: %d roots in the set, want %d", loop, c.Factor, c.Multiple, len(d.Roots), c.Count)
			continue
		}
		zeta := math.Inf(1)
		var worst complex128
		for _, r := range d.Roots {
			if z := spec.DampingRatio(r, 0); z < zeta {
				zeta, worst = z, r
			}
		}
		want := complex(float(t, c.Worst[0]), float(t, c.Worst[1]))
		if e := math.Abs(zeta - float(t, c.ZetaMin)); e > 1e-11 {
			t.Errorf("%v F=%g M=%g: ζ_min %v, want %s (error %.2g)", loop, c.Factor, c.Multiple, zeta, c.ZetaMin, e)
		}
		if e := cmplx.Abs(worst - want); e > 1e-11*cmplx.Abs(want) {
			t.Errorf("%v F=%g M=%g: worst root %v, want %v", loop, c.Factor, c.Multiple, worst, want)
		}
	}
}

// TestDominantVerdictAtLimit checks MinDampingRatio just inside and just
// outside the exact ζ_min of the dominant set (1e-9 relative on either
// side: well above the 1e-11 accuracy of ζ, see TestDominantLambertW), and
// that the message names the roots judged.
func TestDominantVerdictAtLimit(t *testing.T) {
	for _, c := range loadDominant(t) {
		if c.Factor != 5 || c.Multiple != 3 {
			continue // the defaults only
		}
		z := float(t, c.ZetaMin)
		if !(z > 0 && z < 1) {
			continue // a limit lies in [0, 1]
		}
		loop := delayedIntegrator(t, c.A, c.Tau)
		for _, tc := range []struct {
			limit float64
			pass  bool
		}{{z * (1 - 1e-9), true}, {z * (1 + 1e-9), false}} {
			r := spec.Check(loop, spec.Requirements{spec.MinDampingRatio(tc.limit)}).Results[0]
			if r.Pass != tc.pass || r.Err != nil {
				t.Errorf("%v limit %.12g: pass %v (err %v), want %v: %s", loop, tc.limit, r.Pass, r.Err, tc.pass, r.Message)
			}
			if math.Abs(r.Value-z) > 1e-11 {
				t.Errorf("%v: value %v, want %v", loop, r.Value, z)
			}
			for _, w := range []string{"dead time exact", strconv.Itoa(c.Count) + " exact closed-loop roots", "Re s > ", "argument principle"} {
				if c.Count == 1 && strings.HasPrefix(w, "1 ") {
					w = "one exact closed-loop root"
				}
				if !strings.Contains(r.Message, w) {
					t.Errorf("message lacks %q: %s", w, r.Message)
				}
			}
		}
	}
}

// TestDominantSettings: invalid settings are refused, PadeDeadTime goes
// back to the Padé poles, a biproper loop keeps Padé with the reason, and a
// loop without dead time is not a case for the dominant set.
func TestDominantSettings(t *testing.T) {
	loop := delayedIntegrator(t, 1, 1)
	req := spec.Requirements{spec.MinDampingRatio(0.1)}
	for _, set := range []*spec.Settings{{DominantFactor: 1}, {DominantFactor: -2}, {DominantCrossoverMultiple: -1}, {DominantFactor: math.NaN()}, {DominantCrossoverMultiple: math.Inf(1)}} {
		r := spec.CheckWith(loop, req, set).Results[0]
		if r.Pass || !errors.Is(r.Err, spec.ErrInvalidSettings) {
			t.Errorf("%+v: pass %v, err %v", *set, r.Pass, r.Err)
		}
		if _, err := spec.DominantClosedLoopRoots(loop, set); !errors.Is(err, spec.ErrInvalidSettings) {
			t.Errorf("DominantClosedLoopRoots %+v: err %v", *set, err)
		}
	}
	r := spec.CheckWith(loop, req, &spec.Settings{PadeDeadTime: true}).Results[0]
	if !strings.Contains(r.Message, "Padé") || !strings.Contains(r.Message, "as requested") {
		t.Errorf("PadeDeadTime: %s", r.Message)
	}
	bi := tf.MustParse("exp(-s)*(s+1)/(s+2)")
	r = spec.Check(bi, req).Results[0]
	if !strings.Contains(r.Message, "Padé") || !strings.Contains(r.Message, "biproper") {
		t.Errorf("biproper: %s", r.Message)
	}
	// A closed loop from reference to output given as a transfer function
	// keeps Padé for the step metrics, and says why; its damping ratio is
	// still that of the exact roots of 1 + L.
	ro := spec.CheckWith(loop, spec.Requirements{spec.MaxOvershootPct(100), spec.MinDampingRatio(0.1)},
		&spec.Settings{ReferenceToOutput: tf.MustParse("exp(-s)/(s+1)")}).Results
	if !strings.Contains(ro[0].Message, "Padé") || !strings.Contains(ro[0].Message, "given as a transfer function") {
		t.Errorf("reference to output, step: %s", ro[0].Message)
	}
	if !strings.Contains(ro[1].Message, "dead time exact") {
		t.Errorf("reference to output, damping: %s", ro[1].Message)
	}
	dz, err := tf.ParseDiscrete("1/(z-0.5)", 0.1)
	if err != nil {
		t.Fatal(err)
	}
	if dz, err = dz.WithDelay(0.2); err != nil {
		t.Fatal(err)
	}
	for _, l := range []tf.TF{tf.MustParse("1/(s+1)"), bi, dz} {
		if _, err := spec.DominantClosedLoopRoots(l, nil); !errors.Is(err, spec.ErrInvalidSettings) {
			t.Errorf("DominantClosedLoopRoots(%v): err %v", l, err)
		}
	}
}

// TestDelayedStepExact compares the step-response requirements of
// a·e^(−sτ)/s, whose dead time is kept exact by default, with the closed
// form of the method of steps (testdata/delayed_step.py, mpmath at 50
// digits). Tolerance 1e-9 relative: the accuracy package response states
// for the exact delayed step metrics. With PadeDeadTime the values differ
// (the Padé closed loop), and the messages say which was used.
func TestDelayedStepExact(t *testing.T) {
	var cs []struct {
		A         float64 `json:"a"`
		Tau       float64 `json:"tau"`
		Overshoot string  `json:"overshoot_pct"`
		Rise      string  `json:"rise_time_sec"`
		Settling  string  `json:"settling_time_sec"`
	}
	readJSON(t, "delayed_step.json", &cs)
	for _, c := range cs {
		loop := delayedIntegrator(t, c.A, c.Tau)
		req := spec.Requirements{spec.MaxOvershootPct(100), spec.MaxRiseTimeSec(100), spec.MaxSettlingTimeSec(100)}
		want := []float64{float(t, c.Overshoot), float(t, c.Rise), float(t, c.Settling)}
		exact := spec.Check(loop, req)
		pade := spec.CheckWith(loop, req, &spec.Settings{PadeDeadTime: true})
		for i, r := range exact.Results {
			if e := math.Abs(r.Value-want[i]) / want[i]; !(e <= 1e-9) || !r.Pass {
				t.Errorf("%v %s: %v, want %v (rel. error %.2g), pass %v", loop, r.Name, r.Value, want[i], e, r.Pass)
			}
			if !strings.Contains(r.Message, "dead time exact") {
				t.Errorf("message: %s", r.Message)
			}
			p := pade.Results[i]
			if !strings.Contains(p.Message, "Padé") || p.Value == r.Value {
				t.Errorf("Padé: value %v (exact %v): %s", p.Value, r.Value, p.Message)
			}
		}
	}
}
