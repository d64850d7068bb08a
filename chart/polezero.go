package chart

import (
	"fmt"

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
		if len(poles) > 0 {
			spec.key = append(spec.key, keyEntry{Text: "pole", Glyph: ptr(poleGlyph())})
		}
		if len(zeros) > 0 {
			spec.key = append(spec.key, keyEntry{Text: "zero", Glyph: ptr(zeroGlyph())})
		}
		spec.key = append(spec.key, spec.stableKey())
	}
	return spec.figureWithDetail(set)
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
}

func (s *planeSpec) keyHidden(set *PlaneSettings) bool { return set != nil && set.HideKey }

func (s *planeSpec) stableKey() keyEntry {
	if s.discrete {
		return keyEntry{Text: "stable region (inside the unit circle)", Fill: s.th.Stable}
	}
	return keyEntry{Text: "stable region (left half-plane)", Fill: s.th.Stable}
}
