package chart_test

import (
	"os"
	"path/filepath"
	"testing"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/design"
	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// designFigures builds the design figures of the golden tests: the gain
// axis of k/(s(s+1)(s+2)) with four requirements, and the PI plane of
// 1/(s+1)³ with a damping and a phase-margin requirement. Their inputs are
// the exact results of package design (no grid of another package).
func designFigures(t *testing.T) map[string]*chart.Figure {
	t.Helper()
	out := map[string]*chart.Figure{}
	v, err := design.Gain(tf.MustParse("1/(s*(s+1)*(s+2))"))
	if err != nil {
		t.Fatal(err)
	}
	res, err := design.Solve(v, spec.Requirements{spec.MinPhaseMarginDeg(45), spec.MinGainMarginDB(6), spec.MaxPeakSensitivity(1.6), spec.MinDampingRatio(0.4)}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if out["design_axis"], err = chart.DesignAxis(res, nil); err != nil {
		t.Fatal(err)
	}
	pl, err := design.NewPlane("Kp", "Ki", "(Kp*s + Ki)/s", tf.MustParse("1/(s+1)^3"))
	if err != nil {
		t.Fatal(err)
	}
	pp, err := design.Partition(pl, &design.PlaneSettings{XRange: design.Range{Min: -2, Max: 10}, YRange: design.Range{Min: -0.5, Max: 3},
		Requirements: spec.Requirements{spec.MinDampingRatio(0.3), spec.MinPhaseMarginDeg(45)}})
	if err != nil {
		t.Fatal(err)
	}
	if out["parameter_plane"], err = chart.ParameterPlane(pp, &chart.ParameterPlaneSettings{Nominal: &[2]float64{1, 0.5}}); err != nil {
		t.Fatal(err)
	}
	return out
}

// TestDesignGolden compares the design figures with images checked by eye
// (regenerate with -regen, as TestGolden).
func TestDesignGolden(t *testing.T) {
	for name, f := range designFigures(t) {
		t.Run(name, func(t *testing.T) { checkGolden(t, name, f) })
	}
}

// TestDesignFiguresLook writes the figures at full resolution for looking
// at: go test ./chart -run DesignFiguresLook -args -designout DIR.
func TestDesignFiguresLook(t *testing.T) {
	dir := os.Getenv("LOOPWISE_DESIGN_OUT")
	if dir == "" {
		t.Skip("set LOOPWISE_DESIGN_OUT to write the design figures")
	}
	for name, f := range designFigures(t) {
		if err := f.Save(filepath.Join(dir, name+".png")); err != nil {
			t.Fatal(err)
		}
	}
}
