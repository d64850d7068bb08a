package main

import (
	"bytes"

	"github.com/loopwise/loopwise/chart"
)

// render draws fig as SVG and PNG into a figure of the report.
func render(fig *chart.Figure, file, title, caption string) (figure, error) {
	var svg, png bytes.Buffer
	if err := fig.Render(&svg, chart.FormatSVG); err != nil {
		return figure{}, err
	}
	if err := fig.Render(&png, chart.FormatPNG); err != nil {
		return figure{}, err
	}
	return figure{file: file, title: title, caption: caption, svg: svg.Bytes(), png: png.Bytes()}, nil
}

// plots draws the figures of the report; a figure that cannot be drawn is
// left out with a warning.
func (a *analysis) plots() []figure {
	var figs []figure
	add := func(fig *chart.Figure, err error, file, title, caption string) {
		if err != nil {
			a.warn("plot %q: %s", title, short(err))
			return
		}
		f, err := render(fig, file, title, caption)
		if err != nil {
			a.warn("plot %q: %s", title, short(err))
			return
		}
		figs = append(figs, f)
	}
	fig, err := chart.PoleZero(a.m.open, &chart.PlaneSettings{Grid: true})
	add(fig, err, "pole-zero-map", "Pole–zero map of the open loop", "Open-loop poles (×) and zeros (○) of L; the shaded region is where closed-loop poles are stable.")
	return figs
}
