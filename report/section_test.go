package report

import (
	"bytes"
	"fmt"
	"slices"
	"strings"
	"testing"
)

// The section below is the worked example of the package documentation
// ("Adding a section"): a loop-file key "bandwidth_goal_rad_per_sec", a
// run function that compares it with the closed-loop bandwidth of the
// margins section, and a table. A real section also adds its result field
// to Report; this one keeps its result in the table to stay inside a test.

// goal is the decoded key (a real section stores it in a field of Loop).
var goal float64

var goalKey = loopKey{name: "bandwidth_goal_rad_per_sec", decode: func(v keyValue, lf *Loop) error {
	if err := v.number(&goal); err != nil {
		return err
	}
	if !(goal > 0) {
		return badInput("key %q %s: the bandwidth goal must be positive", v.f.key, at(v.data, v.f.valOff))
	}
	return nil
}}

var goalResult string

func (a *analysis) bandwidthGoal() {
	if reason := a.unsettled(); reason != "" {
		a.warn("bandwidth goal: %s; the bandwidth goal keys are null", reason)
		return
	}
	bw := float64(a.rep.Margins.BandwidthRadPerSec)
	goalResult = fmt.Sprintf("%s (goal %s)", gUnit(Number(bw), "rad/s"), gUnit(Number(goal), "rad/s"))
}

func bandwidthGoalTables(*Report) []table {
	return []table{{title: "Bandwidth goal", rows: []row{{"closed-loop bandwidth", goalResult}}}}
}

var bandwidthGoalSection = section{stage: "bandwidth goal", keys: []loopKey{goalKey}, run: (*analysis).bandwidthGoal, tables: bandwidthGoalTables}

// TestAddSection adds the section to the pipeline (the one line a real
// section adds to pipeline.go) and checks that its key is read, that
// unknown-key messages and LoopKeys list it, that it runs after the
// margins, and that its table reaches the summary.
func TestAddSection(t *testing.T) {
	saved := pipeline
	pipeline = append(slices.Clone(pipeline), bandwidthGoalSection)
	defer func() { pipeline = saved }()

	if !slices.Contains(LoopKeys(), "bandwidth_goal_rad_per_sec") {
		t.Errorf("LoopKeys does not list the section's key")
	}
	_, err := ReadLoop("x.json", []byte(`{"plant": "4/(s*(s+2))", "bandwidth_goal": 2}`))
	if err == nil || !strings.Contains(err.Error(), "bandwidth_goal_rad_per_sec") {
		t.Errorf("unknown key message does not offer the section's key: %v", err)
	}
	if _, err := ReadLoop("x.json", []byte(`{"plant": "4/(s*(s+2))", "bandwidth_goal_rad_per_sec": -1}`)); err == nil || !strings.Contains(err.Error(), "line 1, column 56") {
		t.Errorf("bad value: %v", err)
	}
	r := analyzeText(t, `{"plant": "4/(s*(s+2))", "bandwidth_goal_rad_per_sec": 2}`)
	var b bytes.Buffer
	if err := r.WriteSummary(&b); err != nil {
		t.Fatal(err)
	}
	// ωn²/(s² + 2ζωn s + ωn²) with ωn = 2, ζ = 0.5 has the −3 dB
	// bandwidth ωn·√(1 − 2ζ² + √(2 − 4ζ² + 4ζ⁴)) = 2·√(0.5 + √1.25) =
	// 2.544 rad/s (Ogata, Modern Control Engineering, 5th ed., Sec. 8-9,
	// from memory).
	if !strings.Contains(b.String(), "Bandwidth goal") || !strings.Contains(b.String(), "2.544\u00a0rad/s (goal 2\u00a0rad/s)") {
		t.Errorf("the section's table is missing from the summary:\n%s", b.String())
	}
}
