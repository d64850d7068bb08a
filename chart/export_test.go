package chart

import "gonum.org/v1/plot/vg"

// DrawnLayout is the layout of a figure's last drawing, for the tests of
// package chart_test: the boxes of symbols and words (keys, inside or
// beside the panels), the text labels, the points of the curves and marks
// inside each data area, and the data areas, in canvas coordinates.
type DrawnLayout struct {
	Keys, Labels, Areas []vg.Rectangle
	Points              []vg.Point
}

// Layout returns the layout of f's last drawing.
func Layout(f *Figure) DrawnLayout {
	var d DrawnLayout
	for _, l := range f.layers {
		d.Keys = append(d.Keys, l.drawn.keys...)
		d.Labels = append(d.Labels, l.drawn.labels...)
		d.Points = append(d.Points, l.drawn.points...)
		d.Areas = append(d.Areas, l.drawn.area)
	}
	if f.side != nil && len(f.side.Entries) > 0 {
		d.Keys = append(d.Keys, f.sideDrawn)
	}
	return d
}
