package chart

import (
	"math"
)

// planeView returns axis limits for a complex plane that show every key
// point (poles, zeros, break points, axis crossings, the centroid, marked
// closed-loop poles) with room around them: the box of the key points
// grows by a quarter of its larger side on each side, the imaginary axis
// (continuous time) or the unit circle (discrete time) is always in view,
// and the imaginary range is symmetric because every plot of a real system
// is symmetric about the real axis. Branches that run off to infinity are
// clipped at this box; the asymptotes show where they go.
func planeView(key []complex128, discrete bool) (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = math.Inf(1), math.Inf(-1)
	yabs := 0.0
	for _, z := range key {
		x, y := real(z), imag(z)
		if !finite(x) || !finite(y) {
			continue
		}
		xmin, xmax = math.Min(xmin, x), math.Max(xmax, x)
		yabs = math.Max(yabs, math.Abs(y))
	}
	if discrete {
		xmin, xmax = math.Min(xmin, -1), math.Max(xmax, 1)
		yabs = math.Max(yabs, 1)
	} else {
		// The imaginary axis is the stability boundary: keep it in view.
		xmin, xmax = math.Min(xmin, 0), math.Max(xmax, 0)
	}
	if xmin > xmax { // no key points at all
		xmin, xmax = -1, 1
	}
	span := math.Max(xmax-xmin, 2*yabs)
	if span == 0 {
		span = 2
	}
	pad := 0.25 * span
	if discrete {
		pad = 0.12 * span
	}
	xmin -= pad
	xmax += pad
	yabs += pad
	return xmin, xmax, -yabs, yabs
}

// niceCeil returns the smallest number of the form 1, 2 or 5 times a power
// of ten that is not below x > 0.
func niceCeil(x float64) float64 {
	if x <= 0 || !finite(x) {
		return 1
	}
	mag := math.Pow(10, math.Floor(math.Log10(x)))
	for _, f := range []float64{1, 2, 5, 10} {
		if f*mag >= x*(1-1e-12) {
			return f * mag
		}
	}
	return 10 * mag
}
