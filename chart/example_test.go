package chart_test

import (
	"fmt"
	"log"
	"os"
	"path/filepath"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/tf"
)

// Example draws the root locus of a position loop (a scenario of this
// project's own), marks the closed-loop poles at the chosen gain and
// writes the figure as SVG and PNG.
func Example() {
	loop := tf.MustParse("(s+2)/(s(s+1)(s+5)(s+8))")
	l, err := locus.Trace(loop, nil)
	if err != nil {
		log.Fatal(err)
	}
	poles, err := locus.ClosedLoopPoles(loop, 20)
	if err != nil {
		log.Fatal(err)
	}
	fig, err := chart.RootLocus(l, &chart.LocusSettings{
		PlaneSettings: chart.PlaneSettings{Size: chart.Size{WidthCm: 14, HeightCm: 10}, Grid: true},
		Mark:          &chart.LocusMark{Value: 20, Poles: poles},
	})
	if err != nil {
		log.Fatal(err)
	}
	dir, err := os.MkdirTemp("", "chart-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	for _, name := range []string{"locus.svg", "locus.png"} {
		if err := fig.Save(filepath.Join(dir, name)); err != nil {
			log.Fatal(err)
		}
		info, err := os.Stat(filepath.Join(dir, name))
		if err != nil {
			log.Fatal(err)
		}
		fmt.Printf("%s written: %t\n", name, info.Size() > 10000)
	}
	fmt.Println(fig.Title)
	// Output:
	// locus.svg written: true
	// locus.png written: true
	// Root locus over the gain
}

// ExampleFigure_Render writes a pole–zero map to an in-memory SVG, as a
// report generator would inline it into an HTML page.
func ExampleFigure_Render() {
	g := tf.MustParse("4/(s^2+1.2s+4)")
	fig, err := chart.PoleZero(g, nil)
	if err != nil {
		log.Fatal(err)
	}
	var svg bytesCounter
	if err := fig.Render(&svg, chart.FormatSVG); err != nil {
		log.Fatal(err)
	}
	fmt.Println("SVG bytes > 5000:", svg.n > 5000)
	// Output:
	// SVG bytes > 5000: true
}

type bytesCounter struct{ n int }

func (b *bytesCounter) Write(p []byte) (int, error) { b.n += len(p); return len(p), nil }
