package chart_test

import (
	"bytes"
	"flag"
	"image"
	"image/color"
	"image/png"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/chart"
)

// outDir, if set, receives a PNG of every test figure, for looking at.
var outDir = flag.String("out", "", "write the test figures as PNG into `dir`")

// TestFiguresRender draws every figure (continuous, discrete and parameter
// loops) in the three formats and checks that the result is a real
// picture: the PNG has the requested size in pixels, a fair share of it is
// drawn on, the data colour of the curves is present, the SVG has many
// drawn elements and names what it shows in words, and the PDF is a PDF.
func TestFiguresRender(t *testing.T) {
	for _, c := range allCases() {
		t.Run(c.name, func(t *testing.T) {
			f := c.build(t)
			f.DPI = 72

			var pngBuf bytes.Buffer
			if err := f.Render(&pngBuf, chart.FormatPNG); err != nil {
				t.Fatalf("PNG: %v", err)
			}
			img, err := png.Decode(&pngBuf)
			if err != nil {
				t.Fatalf("PNG does not decode: %v", err)
			}
			// The backend rounds the size in pixels to the nearest whole one:
			// 16 cm at 72 dpi is 453.5 px, 12 cm 340.2 px.
			wantW, wantH := int(math.Round(f.WidthCm/2.54*72)), int(math.Round(f.HeightCm/2.54*72))
			if b := img.Bounds(); b.Dx() != wantW || b.Dy() != wantH {
				t.Errorf("PNG is %d × %d px, want %d × %d", b.Dx(), b.Dy(), wantW, wantH)
			}
			if *outDir != "" {
				if err := f.Save(filepath.Join(*outDir, c.name+".png")); err != nil {
					t.Fatal(err)
				}
			}
			// Curves are blue; a pole-zero map has black marks only, about
			// 15 pixels each at 72 dpi.
			data, least := chart.OkabeIto()[5], 100
			if strings.HasPrefix(c.name, "polezero") {
				data, least = chart.OkabeIto()[0], 40
			}
			inked, blue := inkAndColour(img, data)
			// A blank figure has no ink; axes, text and one curve alone give
			// about 2 %; a shaded stable region or band adds much more.
			if inked < 0.03 {
				t.Errorf("only %.1f %% of the pixels are drawn on", 100*inked)
			}
			if blue < least {
				t.Errorf("only %d pixels in the data colour", blue)
			}

			var svg bytes.Buffer
			if err := f.Render(&svg, chart.FormatSVG); err != nil {
				t.Fatalf("SVG: %v", err)
			}
			s := svg.String()
			if n := strings.Count(s, "<path"); n < 40 {
				t.Errorf("SVG has %d path elements, want at least 40", n)
			}
			if n := strings.Count(s, "<text"); n < 10 {
				t.Errorf("SVG has %d text elements, want at least 10", n)
			}
			for _, w := range c.words {
				if !strings.Contains(s, w) {
					t.Errorf("SVG does not contain %q", w)
				}
			}
			for _, bad := range []string{"#-", "NaN", "Inf"} {
				if strings.Contains(s, bad) {
					t.Errorf("SVG contains %q (an invalid colour or coordinate)", bad)
				}
			}
			if !strings.Contains(s, "font-family:'Liberation Sans',Arial,Helvetica,sans-serif") {
				t.Errorf("SVG does not name the fallback fonts")
			}
		})
	}
}

// TestPDF checks the PDF output of one figure of each kind (PDF rendering
// embeds fonts and is the slowest format, so not every case).
func TestPDF(t *testing.T) {
	for _, c := range allCases() {
		if !strings.HasSuffix(c.name, "_continuous") {
			continue
		}
		t.Run(c.name, func(t *testing.T) {
			var buf bytes.Buffer
			if err := c.build(t).Render(&buf, chart.FormatPDF); err != nil {
				t.Fatal(err)
			}
			if !bytes.HasPrefix(buf.Bytes(), []byte("%PDF-")) || buf.Len() < 10000 {
				t.Errorf("PDF output: %d bytes starting %q", buf.Len(), buf.Bytes()[:min(8, buf.Len())])
			}
		})
	}
}

// inkAndColour returns the fraction of pixels that are not white and the
// number of pixels within a small distance of the colour c.
func inkAndColour(img image.Image, c color.Color) (float64, int) {
	b := img.Bounds()
	cr, cg, cb, _ := c.RGBA()
	var ink, near int
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			r, g, bl, _ := img.At(x, y).RGBA()
			if r < 0xf000 || g < 0xf000 || bl < 0xf000 {
				ink++
			}
			d := math.Abs(float64(r)-float64(cr)) + math.Abs(float64(g)-float64(cg)) + math.Abs(float64(bl)-float64(cb))
			if d < 3*0x1800 {
				near++
			}
		}
	}
	return float64(ink) / float64(b.Dx()*b.Dy()), near
}
