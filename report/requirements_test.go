package report

import (
	"strings"
	"testing"
)

// TestRequirementsDeadTime: with the dead time exact (the default), the
// damping verdict is judged on the dominant exact closed-loop roots and
// says so; for e^(−s)/s its value is the Lambert-W reference of package
// spec (spec/testdata/dominant_lambertw.py, mpmath: 0.18685384591050425,
// compared to 1e-11 absolute, the accuracy of ζ from roots polished to
// 1e-12 relative). With "dead_time_model": "pade" the verdicts say Padé,
// and the root-locus and pole–zero figures name the approximation's poles
// and zeros as artefacts.
func TestRequirementsDeadTime(t *testing.T) {
	const loop = `{"plant": "1/s", "gain": 1, "delay_sec": 1, "requirements": {"min_damping_ratio": 0.18, "max_overshoot_pct": 60}%s}`
	r := analyzeText(t, strings.Replace(loop, "%s", "", 1))
	if len(r.Requirements) != 2 {
		t.Fatalf("requirements %+v", r.Requirements)
	}
	d := r.Requirements[0]
	if !d.Pass || !relClose(d.Value, 0.18685384591050425, 1e-11/0.187) || !strings.Contains(d.Message, "dead time exact: the 6 exact closed-loop roots with Re s > -3 rad/s") {
		t.Errorf("damping: %+v", d)
	}
	// The closed form of the method of steps gives a 50 % overshoot
	// (spec/testdata/delayed_step.py).
	if o := r.Requirements[1]; !o.Pass || !relClose(o.Value, 50, 1e-9) || !strings.Contains(o.Message, "dead time exact") {
		t.Errorf("overshoot: %+v", o)
	}
	if testing.Short() {
		return
	}
	lf, err := ReadLoop("x.json", []byte(strings.Replace(loop, "%s", `, "dead_time_model": "pade"`, 1)))
	if err != nil {
		t.Fatal(err)
	}
	r, err = Analyze(lf, &Settings{Plots: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range r.Requirements {
		if !strings.Contains(q.Message, "Padé approximation of order 6, as requested") {
			t.Errorf("Padé model: %s", q.Message)
		}
	}
	marked := map[string]bool{}
	for _, f := range r.Figures {
		svg := string(f.SVG)
		marked[f.File] = strings.Contains(svg, "pole of the Padé approximation of the dead time (order 6) (artefact, not the plant") &&
			strings.Contains(svg, "where the Padé approximation of the dead time (order 6) is faithful")
	}
	if !marked["root-locus"] || !marked["pole-zero-map"] {
		t.Errorf("artefacts marked: %v", marked)
	}
}
