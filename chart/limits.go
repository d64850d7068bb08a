package chart

import (
	"math"
	"sort"
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

// focusGapRatio is the ratio of moduli that separates a group of key
// points from the next: points eight times farther from the origin than
// the group below them are of another scale (a Padé approximation of dead
// time, a fast sensor pole) and would shrink the region that decides
// stability to a few pixels. Common practice of plotting; the figure
// says how many points lie outside the view.
const focusGapRatio = 8

// focus returns the key points of the lowest group of moduli that still
// holds every point of must, and the number of key points left out. Points
// at the origin always stay. With no gap wider than focusGapRatio all
// points stay.
func focus(key, must []complex128) (kept []complex128, left int) {
	type pt struct {
		z   complex128
		mod float64
	}
	var pts []pt
	for _, z := range key {
		pts = append(pts, pt{z, cmplxAbs(z)})
	}
	sort.Slice(pts, func(i, j int) bool { return pts[i].mod < pts[j].mod })
	need := 0.0
	for _, z := range must {
		need = math.Max(need, cmplxAbs(z))
	}
	cut := len(pts)
	for i := 1; i < len(pts); i++ {
		lo, hi := pts[i-1].mod, pts[i].mod
		if lo > 0 && hi > focusGapRatio*lo && lo >= need && i >= 2 {
			cut = i
			break
		}
	}
	for i, p := range pts {
		if i < cut {
			kept = append(kept, p.z)
		}
	}
	return kept, len(pts) - cut
}
