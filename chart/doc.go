// Package chart turns the results of the analysis packages into pictures,
// on gonum/plot: root loci, pole–zero maps, frequency responses (magnitude
// and phase), Nyquist curves and step responses, written as SVG, PNG or
// PDF. It is optional: nothing else in the library imports it, so a
// program that never plots never compiles gonum/plot.
//
// Every figure function takes a result and a *Settings (nil = defaults)
// and returns a *Figure:
//
//	l, _ := locus.Trace(loop, nil)
//	f, _ := chart.RootLocus(l, &chart.LocusSettings{Mark: &chart.LocusMark{Value: 20}})
//	_ = f.Save("locus.svg")                  // format from the extension
//	_ = f.Render(w, chart.FormatSVG)         // inline SVG for an HTML page
//
//	f, _ = chart.PoleZero(g, nil)            // any tf.TF
//	f, _ = chart.FrequencyResponse(resp, &result, nil) // margins.FrequencyResponse, margins.Compute
//	f, _ = chart.Nyquist(curve, &result, nil)          // margins.NyquistCurve
//	f, _ = chart.StepResponse(r, &metrics, nil)        // response.Step, response.StepMetrics
//
// A Figure holds ordinary gonum/plot panels (Figure.Panels) that may be
// changed before writing, a title and lines of notes written under the
// panels (the margins in words, the approximations the analysis made). The building blocks are exported plotters that
// follow gonum/plot's conventions (constructors copy and check the data,
// styles are exported fields): Curve (lines with direction arrows), Marks,
// Rays, StableRegion and Band.
//
// # Conventions
//
// Complex planes use equal scales on both axes, so that angles (asymptotes,
// lines of constant damping) and circles (unit circle, sensitivity circle)
// look true. The s-plane is labelled "real part σ (1/s)" and "imaginary
// part ω (rad/s)"; the z-plane and the Nyquist plane are dimensionless.
// Frequencies are in rad/s on a logarithmic axis, magnitudes in dB, phases
// in degrees (written °), times in seconds. One mark means one thing in
// every figure: poles are ×, zeros ○ (the textbook convention; on a locus
// the × are where branches start, the closed-loop poles at the value 0,
// and the ○ where they end, for the gain and for a parameter alike),
// break points orange diamonds, boundary crossings vermillion squares,
// marked closed-loop poles black dots (further values: dots of other
// colours), samples of a sequence small blue dots on stems. The key to
// the marks stands right of the panels, outside the data; the margins in
// words are written under the panels; the title is centred across the
// top. Numbers are written with
// three or four significant digits and a true minus sign; margins and
// metrics are written out in words ("gain margin 9.93 dB (factor 3.14) at
// 4.01 rad/s").
//
// The look is this project's own: the Okabe–Ito colour-blind-safe palette
// (Palette), Liberation Sans text (shipped with gonum/plot, so output does
// not depend on the fonts installed), thin grey guides, a lightly shaded
// stable region. Text labels are placed by a greedy search that avoids
// curves, marks, other labels and the edges.
//
// The view of a complex plane is chosen from the points that matter
// (poles, zeros, break points, crossings, asymptote centroid, marked
// poles, the stability boundary, and the arcs of the locus that leave the
// real axis and come back), not from the whole trace: branches that run to
// infinity are clipped and their asymptotes show where they go. Points
// eight times farther out than the rest (the poles and zeros of a Padé
// approximation of dead time, say) are left out of the view and counted
// in the key, unless the first crossing of the stability boundary lies
// among them. When PlaneSettings.Approximation names the poles and zeros
// an approximation added (the Padé approximation of dead time), they are
// drawn as artefacts (a small grey + and ○, with their own key entries,
// never as the plant's × and ○), and the view frames only the points within
// half the modulus of the nearest of them, where the approximation is
// faithful; a note under the figure says so. PlaneSettings.Detail adds a zoomed panel for a small group
// of points near the origin, and one is added unasked where marks crowd
// (PlaneSettings.Detail says when); PlaneSettings.Window fixes the view.
// The key of a complex plane stands right of the panels, outside the data,
// so that it hides no branch, mark or label.
//
// # Invariants
//
// Inputs are never modified; the figure functions copy what they keep.
// Rendering is deterministic: the same figure gives the same bytes for SVG
// and PNG on any machine, which the golden-image tests rely on. Bad input
// (empty data, NaN or infinite values, mismatched lengths, out-of-range
// settings, an unknown format) returns an error wrapping a sentinel of
// errors.go, never a panic. A Figure is not safe for concurrent use while
// it is being changed or rendered; the figure functions themselves are
// safe for concurrent use.
package chart
