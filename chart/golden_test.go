package chart_test

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"

	"github.com/loopwise/loopwise/chart"
	"gonum.org/v1/plot/cmpimg"
)

// The golden images are rewritten from the current code with gonum/plot's
// own flag (cmpimg.GenerateTestData):
//
//	go test ./chart/ -run Golden -regen
//
// Look at every changed testdata/*_golden.png before committing it.

// goldenDelta is the per-pixel tolerance of cmpimg.EqualApprox: the
// largest YIQ colour distance, as a fraction of the distance from black to
// white, that a pixel may differ by (Kotsarenko and Ramos, "Measuring
// perceived color difference using YIQ NTSC transmission color space in
// mobile applications", 2010). Rendering is pure Go (vgimg with the
// Liberation fonts shipped with gonum/plot), so the same code gives the
// same pixels; 0.1 only absorbs anti-aliasing differences between
// processors (fused multiply–add changes the last bits of edge coverage)
// and is far below the change a lost label, mark or curve makes.
const goldenDelta = 0.1

// TestGolden compares a small set of figures with images checked by eye.
// The comparison is gonum/plot's cmpimg.EqualApprox. The inputs are sampled on fixed grids by the
// test itself (goldenCases), so that a change of the automatic grids or
// of the tracer in the analysis packages does not move these images: only
// a change of this package does.
func TestGolden(t *testing.T) {
	for _, c := range goldenCases() {
		t.Run(c.name, func(t *testing.T) { checkGolden(t, c.name, c.build(t)) })
	}
}

// checkGolden renders f at 72 dpi and compares it with
// testdata/NAME_golden.png (or writes that file with -regen).
func checkGolden(t *testing.T, name string, f *chart.Figure) {
	t.Helper()
	f.DPI = 72
	var buf bytes.Buffer
	if err := f.Render(&buf, chart.FormatPNG); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join("testdata", name+"_golden.png")
	if *cmpimg.GenerateTestData {
		if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run with -regen to create it)", err)
	}
	ok, err := cmpimg.EqualApprox("png", buf.Bytes(), raw, goldenDelta)
	if err != nil {
		t.Fatal(err)
	}
	if !ok {
		out := filepath.Join(t.TempDir(), name+".png")
		_ = os.WriteFile(out, buf.Bytes(), 0o644)
		t.Errorf("the figure differs from %s by more than %.2g per pixel; the new image is %s", path, goldenDelta, out)
	}
}
