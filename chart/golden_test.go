package chart_test

import (
	"bytes"
	"flag"
	"image"
	"image/color"
	"image/png"
	"os"
	"path/filepath"
	"testing"

	"github.com/loopwise/loopwise/chart"
)

// regen rewrites the golden images from the current code:
//
//	go test ./chart/ -run Golden -regen
//
// Look at every changed testdata/*_golden.png before committing it.
var regen = flag.Bool("regen", false, "regenerate the golden images in testdata/")

// Golden-image tolerance. Rendering is pure Go (vgimg with the Liberation
// fonts shipped with gonum/plot), so the same code gives the same pixels;
// the tolerance only absorbs anti-aliasing differences between processors
// (fused multiply–add changes the last bits of edge coverage). A pixel
// differs when its YIQ colour distance exceeds goldenDelta of the largest
// possible distance (the metric of gonum/plot's cmpimg, after Kotsarenko
// and Ramos, "Measuring perceived color difference using YIQ NTSC
// transmission color space in mobile applications", 2010); an image fails
// when more than goldenPixels pixels differ, fewer than the dark pixels of
// one short label (about 100 at 72 dpi), so a lost label or curve shows.
const (
	goldenDelta  = 0.1
	goldenPixels = 60
)

// TestGolden compares a small set of figures with images checked by eye.
// cmpimg.CheckPlotApprox of gonum/plot does the same but needs a go.sum
// entry (rsc.io/pdf) that the module does not have; the comparison below
// uses its colour metric. The inputs are sampled on fixed grids by the
// test itself (goldenCases), so that a change of the automatic grids or
// of the tracer in the analysis packages does not move these images: only
// a change of this package does.
func TestGolden(t *testing.T) {
	for _, c := range goldenCases() {
		t.Run(c.name, func(t *testing.T) {
			f := c.build(t)
			f.DPI = 72
			var buf bytes.Buffer
			if err := f.Render(&buf, chart.FormatPNG); err != nil {
				t.Fatal(err)
			}
			path := filepath.Join("testdata", c.name+"_golden.png")
			if *regen {
				if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			raw, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run with -regen to create it)", err)
			}
			got, err := png.Decode(bytes.NewReader(buf.Bytes()))
			if err != nil {
				t.Fatal(err)
			}
			gold, err := png.Decode(bytes.NewReader(raw))
			if err != nil {
				t.Fatal(err)
			}
			n, err := differingPixels(got, gold, goldenDelta)
			if err != nil {
				t.Fatal(err)
			}
			if n > goldenPixels {
				out := filepath.Join(t.TempDir(), c.name+".png")
				_ = os.WriteFile(out, buf.Bytes(), 0o644)
				t.Errorf("%d pixels differ from %s (at most %d allowed); the new image is %s", n, path, goldenPixels, out)
			}
		})
	}
}

// differingPixels counts the pixels whose YIQ distance exceeds delta
// (0..1) of the largest possible one.
func differingPixels(a, b image.Image, delta float64) (int, error) {
	if a.Bounds() != b.Bounds() {
		return 0, errSize{a.Bounds(), b.Bounds()}
	}
	const maxDist = 35215.0 // YIQ distance between black and white
	limit := maxDist * delta * delta
	n := 0
	r := a.Bounds()
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			if yiqDistance(a.At(x, y), b.At(x, y)) > limit {
				n++
			}
		}
	}
	return n, nil
}

type errSize struct{ got, want image.Rectangle }

func (e errSize) Error() string {
	return "image sizes differ: " + e.got.String() + " and " + e.want.String()
}

// yiqDistance is the weighted squared distance of two colours in the
// YIQ space, on 8-bit channels (Kotsarenko and Ramos 2010).
func yiqDistance(c1, c2 color.Color) float64 {
	yiq := func(c color.Color) (float64, float64, float64) {
		n := color.RGBAModel.Convert(c).(color.RGBA)
		r, g, b := float64(n.R), float64(n.G), float64(n.B)
		return r*0.29889531 + g*0.58662247 + b*0.11448223,
			r*0.59597799 - g*0.27417610 - b*0.32180189,
			r*0.21147017 - g*0.52261711 + b*0.31114694
	}
	y1, i1, q1 := yiq(c1)
	y2, i2, q2 := yiq(c2)
	dy, di, dq := y1-y2, i1-i2, q1-q2
	return 0.5053*dy*dy + 0.299*di*di + 0.1957*dq*dq
}
