package chart

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// PlaneSettings controls the complex-plane figures (PoleZero, RootLocus).
// A nil *PlaneSettings means the defaults.
type PlaneSettings struct {
	// Size is the output size. Its zero value gives 16 × 12 cm at 150 dpi.
	Size
	// Theme is the look. If nil, defaults to DefaultTheme().
	Theme *Theme
	// Title is the panel title. If empty, defaults to a title naming the
	// figure ("Pole–zero map", "Root locus", "Root locus over parameter a").
	Title string
	// DampingRatios are the damping ratios ζ, each in (0, 1), whose lines
	// of constant damping are drawn as dotted guides. If nil, none (unless
	// Grid is set).
	DampingRatios []float64
	// NaturalFrequenciesRadPerSec are the natural frequencies ωn > 0
	// (rad/s) whose arcs are drawn as dotted guides. If nil, none (unless
	// Grid is set).
	NaturalFrequenciesRadPerSec []float64
	// Grid draws a default damping grid (ζ = 0.2, 0.4, 0.6, 0.8 and a few
	// round natural frequencies in view) when both lists above are empty.
	Grid bool
	// HideKey leaves out the box that explains the symbols. The box is
	// drawn right of the panels, outside the data; with no WidthCm the
	// figure is widened by its width.
	HideKey bool
	// Detail adds a second panel to the right that zooms on the group of
	// poles, zeros and break points nearest the origin when that group is
	// small against the whole view (a fast pole far to the left, say);
	// the region is outlined in the main panel. Without such a group the
	// figure has one panel. Without Detail the zoomed panel is added all
	// the same when key points crowd: when marks lie closer than 1.5 % of
	// the view (about 6 pt) to each other, the panel shows the largest such
	// group, and the labels of the points in it are written there only.
	// With a detail panel and no WidthCm the figure is 10 cm wider.
	Detail bool
	// Window fixes the visible part of the plane. If nil, the view is
	// chosen from the points that matter (see the package documentation);
	// it is then widened on one axis so that both axes have the same scale.
	Window *Window
	// Approximation, if not nil, names the poles and zeros that an
	// approximation added to the drawn loop (the Padé approximation of dead
	// time): they are drawn as approximation artefacts, never as the
	// plant's (see Approximation).
	Approximation *Approximation
}

// Approximation describes poles and zeros that are artefacts of an
// approximation rather than the plant's: a figure's pole or zero within
// 1e-6·max(1, |z|) of one of them is drawn with its own mark (a small grey
// + for a pole, a small grey ○ for a zero), named in the key as the
// approximation's, and left out of the points the automatic view frames
// (with the asymptotes' centroid, which they move), so that the default
// view shows the plant's region and not the approximation's far poles:
// the automatic view then frames only the points (poles, zeros, break
// points, crossings, marked closed-loop poles) within half the modulus of
// the approximation's nearest pole or zero — the region where it is
// faithful — and the first crossing of the stability boundary.
type Approximation struct {
	// Name names the approximation in the key, e.g. "Padé approximation
	// of the dead time". If empty, "approximation".
	Name string
	// Poles and Zeros are the approximation's own poles and zeros.
	Poles, Zeros []complex128
}

// artefactTol is the distance, relative to max(1, |z|), within which a pole
// or zero is taken for the approximation's: far above the rounding of the
// roots of the product polynomial, far below any plant–artefact distance
// worth drawing apart.
const artefactTol = 1e-6

// split returns the roots of rs that match one of the points of want, and
// the others.
func splitArtefacts(rs []poly.Root, want []complex128) (art, rest []poly.Root) {
	for _, r := range rs {
		hit := false
		for _, z := range want {
			if cmplx.Abs(r.Value-z) <= artefactTol*math.Max(1, cmplx.Abs(z)) {
				hit = true
				break
			}
		}
		if hit {
			art = append(art, r)
		} else {
			rest = append(rest, r)
		}
	}
	return art, rest
}

// artefactNote returns the line under the figure that says where the
// approximation's poles and zeros are ("" without them).
func (s *planeSpec) artefactNote() string {
	r := s.artefactReach()
	if r == 0 || s.window != nil {
		return ""
	}
	return fmt.Sprintf("the view frames the points with |s| < %s rad/s, where the %s is faithful; its own %d poles and %d zeros lie beyond and are not the plant's",
		formatNumber(r, 3), s.artName, len(s.artPoles), len(s.artZeros))
}

// artefactKeys returns the key entries of the approximation's poles and
// zeros in the figure.
func (s *planeSpec) artefactKeys() []keyEntry {
	var out []keyEntry
	if len(s.artPoles) > 0 {
		out = append(out, keyEntry{Text: "pole of the " + s.artName + " (artefact, not the plant's)", Glyph: ptr(artefactPoleGlyph())})
	}
	if len(s.artZeros) > 0 {
		out = append(out, keyEntry{Text: "zero of the " + s.artName + " (artefact, not the plant's)", Glyph: ptr(artefactZeroGlyph())})
	}
	return out
}

// Window is a rectangle of the complex plane.
type Window struct {
	// RealMin, RealMax, ImagMin and ImagMax bound the rectangle; each
	// must be finite with RealMin < RealMax and ImagMin < ImagMax.
	RealMin, RealMax, ImagMin, ImagMax float64
}

func (s *PlaneSettings) check() error {
	if s == nil {
		return nil
	}
	if err := s.Size.check(); err != nil {
		return err
	}
	for i, z := range s.DampingRatios {
		if !(z > 0 && z < 1) {
			return fmt.Errorf("%w: DampingRatios[%d] = %g, want a value in (0, 1)", ErrSettings, i, z)
		}
	}
	if w := s.Window; w != nil {
		if !finite(w.RealMin) || !finite(w.RealMax) || !finite(w.ImagMin) || !finite(w.ImagMax) ||
			!(w.RealMin < w.RealMax) || !(w.ImagMin < w.ImagMax) {
			return fmt.Errorf("%w: Window %+v, want finite bounds with min < max", ErrSettings, *w)
		}
	}
	if a := s.Approximation; a != nil {
		for i, z := range append(append([]complex128(nil), a.Poles...), a.Zeros...) {
			if !finite(real(z)) || !finite(imag(z)) {
				return fmt.Errorf("%w: Approximation point %d (poles, then zeros) is %v", ErrNotFinite, i, z)
			}
		}
	}
	for i, w := range s.NaturalFrequenciesRadPerSec {
		if !(w > 0) || !finite(w) {
			return fmt.Errorf("%w: NaturalFrequenciesRadPerSec[%d] = %g, want a finite value > 0", ErrSettings, i, w)
		}
	}
	return nil
}

func (s *PlaneSettings) theme() Theme {
	if s == nil || s.Theme == nil {
		return DefaultTheme()
	}
	return s.Theme.withDefaults()
}

// PoleZero returns the pole–zero map of g: poles as ×, zeros as ○, the
// multiplicity of a repeated root written beside its mark, the stable
// region lightly shaded (left half-plane, or the unit disc in discrete
// time) and optional lines of constant damping and natural frequency.
// The view frames every pole and zero. A transfer function without poles
// or zeros (a constant) gives an error wrapping ErrNoData.
func PoleZero(g tf.TF, set *PlaneSettings) (*Figure, error) {
	if err := set.check(); err != nil {
		return nil, err
	}
	poles, err := g.Den().RootsWithMultiplicity()
	if err != nil {
		return nil, fmt.Errorf("chart: poles of %v: %w", g, err)
	}
	var zeros []poly.Root
	if !g.IsZero() {
		if zeros, err = g.Num().RootsWithMultiplicity(); err != nil {
			return nil, fmt.Errorf("chart: zeros of %v: %w", g, err)
		}
	}
	if len(poles) == 0 && len(zeros) == 0 {
		return nil, fmt.Errorf("%w: %v has neither poles nor zeros", ErrNoData, g)
	}
	spec := planeSpec{
		th:         set.theme(),
		title:      "Pole–zero map",
		discrete:   g.IsDiscrete(),
		sampleTime: g.SampleTimeSec(),
		poles:      poles,
		zeros:      zeros,
	}
	spec.applySettings(set)
	if !spec.keyHidden(set) {
		if len(spec.poles) > 0 {
			spec.key = append(spec.key, keyEntry{Text: "pole", Glyph: ptr(poleGlyph())})
		}
		if len(spec.zeros) > 0 {
			spec.key = append(spec.key, keyEntry{Text: "zero", Glyph: ptr(zeroGlyph())})
		}
		spec.key = append(spec.key, spec.artefactKeys()...)
		spec.key = append(spec.key, spec.stableKey())
	}
	f, err := spec.figureWithDetail(set)
	if err == nil {
		if n := spec.artefactNote(); n != "" {
			f.Notes = append(f.Notes, n)
		}
	}
	return f, err
}

func ptr[T any](v T) *T { return &v }

func (s *planeSpec) applySettings(set *PlaneSettings) {
	if set == nil {
		return
	}
	s.size = set.Size
	if set.Title != "" {
		s.title = set.Title
	}
	s.dampings = set.DampingRatios
	s.freqs = set.NaturalFrequenciesRadPerSec
	s.autoGrid = set.Grid
	s.window = set.Window
	if a := set.Approximation; a != nil {
		s.artName = a.Name
		if s.artName == "" {
			s.artName = "approximation"
		}
		s.artPoles, s.poles = splitArtefacts(s.poles, a.Poles)
		s.artZeros, s.zeros = splitArtefacts(s.zeros, a.Zeros)
	}
}

func (s *planeSpec) keyHidden(set *PlaneSettings) bool { return set != nil && set.HideKey }

func (s *planeSpec) stableKey() keyEntry {
	if s.discrete {
		return keyEntry{Text: "stable region (inside the unit circle)", Fill: s.th.Stable}
	}
	return keyEntry{Text: "stable region (left half-plane)", Fill: s.th.Stable}
}
