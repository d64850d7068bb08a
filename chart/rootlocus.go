package chart

import (
	"fmt"
	"math"
	"strings"

	"github.com/loopwise/loopwise/locus"
)

// LocusSettings controls RootLocus. A nil *LocusSettings means the
// defaults.
type LocusSettings struct {
	// PlaneSettings holds the size, theme, title and damping grid.
	PlaneSettings
	// Mark, if not nil, marks the closed-loop poles at one value of the
	// locus variable (the chosen gain) with filled dots.
	Mark *LocusMark
	// Also marks the closed-loop poles at further values of the locus
	// variable (candidates a design compares with Mark), each set as dots
	// of its own colour, named in the key like Mark. Poles left nil are
	// read off the branches as for Mark.
	Also []LocusMark
	// HideValues leaves out the labels that give the value of the locus
	// variable at break points and axis crossings (the marks stay).
	HideValues bool
}

// LocusMark selects the closed-loop poles to mark on a root locus.
type LocusMark struct {
	// Value is the value of the locus variable (gain or parameter).
	Value float64
	// Poles are the closed-loop poles at Value, from
	// locus.ClosedLoopPoles. If nil, they are read off the traced branches
	// by linear interpolation in the value between neighbouring points,
	// which is as accurate as the trace is fine (good enough to draw,
	// not to quote).
	Poles []complex128
}

func (s *LocusSettings) check() error {
	if s == nil {
		return nil
	}
	if err := s.PlaneSettings.check(); err != nil {
		return err
	}
	check := func(name string, mk LocusMark) error {
		if !finite(mk.Value) {
			return fmt.Errorf("%w: %s.Value = %g", ErrNotFinite, name, mk.Value)
		}
		for i, z := range mk.Poles {
			if !finite(real(z)) || !finite(imag(z)) {
				return fmt.Errorf("%w: %s.Poles[%d] = %v", ErrNotFinite, name, i, z)
			}
		}
		return nil
	}
	if s.Mark != nil {
		if err := check("Mark", *s.Mark); err != nil {
			return err
		}
	}
	for j, mk := range s.Also {
		if err := check(fmt.Sprintf("Also[%d]", j), mk); err != nil {
			return err
		}
	}
	return nil
}

// RootLocus returns the picture of a traced root locus l (from
// locus.Trace): every branch as a continuous line in its own colour with
// arrows in the direction of increasing gain (or parameter); open-loop
// poles as × and zeros as ○; the asymptotes as thin dashed rays from their
// centroid; break points (diamonds) and crossings of the stability
// boundary (squares) marked and labelled with their value of the locus
// variable; the stable region lightly shaded (left half-plane, or inside
// the unit circle in discrete time, whose boundary is drawn); optional
// lines of constant damping ratio and arcs of constant natural frequency;
// and optionally the closed-loop poles at a chosen value. A box explains
// the symbols and states the stable values of the variable. Labels name
// the variable of the locus: the gain, or the parameter of a parameter
// locus. The view is chosen from the poles, zeros, break points,
// crossings, centroid and marked poles (see planeView), at equal scale on
// both axes so that angles and circles are true.
//
// Errors: ErrNoData for a locus without branches or poles, ErrNotFinite
// for NaN or infinite points, ErrSettings and ErrSize for bad settings.
func RootLocus(l locus.Locus, set *LocusSettings) (*Figure, error) {
	if err := set.check(); err != nil {
		return nil, err
	}
	a := l.Analysis
	if len(l.Branches) == 0 && len(a.Poles) == 0 && len(a.Zeros) == 0 {
		return nil, fmt.Errorf("%w: locus has no branches, poles or zeros", ErrNoData)
	}
	var ps *PlaneSettings
	if set != nil {
		ps = &set.PlaneSettings
	}
	name := a.Variable
	if name == "" {
		name = "gain"
	}
	spec := planeSpec{
		th:         ps.theme(),
		discrete:   a.Discrete,
		sampleTime: a.SampleTimeSec,
		poles:      a.Poles,
		zeros:      a.Zeros,
		hasAsym:    a.HasAsymptotes,
		centroid:   a.CentroidReal,
		anglesDeg:  a.AsymptoteAnglesDeg,
	}
	if name == "gain" {
		spec.title = "Root locus over the gain"
	} else {
		spec.title = "Root locus over the parameter " + name
	}
	if a.Discrete {
		spec.title += fmt.Sprintf(" (discrete time, sample period %s s)", formatNumber(a.SampleTimeSec, 3))
	}
	spec.applySettings(ps)
	if a.Discrete && !(a.SampleTimeSec > 0) {
		// Without a sample period the damping grid cannot be mapped.
		spec.dampings, spec.freqs, spec.autoGrid = nil, nil, false
	}

	for i, b := range l.Branches {
		pts := make([]complex128, 0, len(b.Points))
		for j, p := range b.Points {
			if !finite(real(p.S)) || !finite(imag(p.S)) {
				return nil, fmt.Errorf("%w: branch %d point %d is %v", ErrNotFinite, i, j, p.S)
			}
			pts = append(pts, p.S)
		}
		spec.branches = append(spec.branches, pts)
	}
	// Colour by closed-loop root index so that a branch split at infinity
	// keeps its colour.
	spec.colourIndex = make([]int, len(l.Branches))
	for i, b := range l.Branches {
		spec.colourIndex[i] = b.Index
	}

	hide := set != nil && set.HideValues
	for _, bp := range a.BreakPoints {
		label := ""
		if !hide && imag(bp.Point) >= 0 {
			label = name + " = " + formatNumber(bp.Value, 4)
		}
		spec.breaks = append(spec.breaks, valuedPoint{At: bp.Point, Value: bp.Value, Label: label})
	}
	// The first crossing (smallest value) decides the stable range: the
	// automatic view keeps it.
	first := -1
	for i, c := range a.AxisCrossings {
		if first < 0 || math.Abs(c.Value) < math.Abs(a.AxisCrossings[first].Value) {
			first = i
		}
	}
	if first >= 0 {
		spec.mustSee = append(spec.mustSee, a.AxisCrossings[first].Point)
	}
	for _, c := range a.AxisCrossings {
		label := ""
		if !hide {
			label = fmt.Sprintf("%s = %s at %s rad/s", name, formatNumber(c.Value, 4), formatNumber(c.FrequencyRadPerSec, 3))
		}
		spec.crossings = append(spec.crossings, valuedPoint{At: c.Point, Value: c.Value, Label: label})
		if imag(c.Point) != 0 {
			spec.crossings = append(spec.crossings, valuedPoint{At: complex(real(c.Point), -imag(c.Point)), Value: c.Value})
		}
	}
	if set != nil && set.Mark != nil {
		poles := set.Mark.Poles
		if poles == nil {
			poles = polesAt(l.Branches, set.Mark.Value)
		}
		spec.marked = append([]complex128(nil), poles...)
		spec.markedLabel = fmt.Sprintf("closed-loop poles at %s = %s", name, formatNumber(set.Mark.Value, 4))
	}
	if set != nil {
		for _, mk := range set.Also {
			poles := mk.Poles
			if poles == nil {
				poles = polesAt(l.Branches, mk.Value)
			}
			spec.also = append(spec.also, append([]complex128(nil), poles...))
		}
	}

	if ps == nil || !ps.HideKey {
		// Every locus a(s) + p·b(s) = 0 starts at the roots of a (the
		// closed-loop poles at p = 0) and ends at the roots of b. For the
		// gain these are the open-loop poles and zeros; for a parameter
		// they are not, so one wording names both alike, by what they are
		// on the locus.
		poleText, zeroText := startEndWords(name, a.Range)
		spec.key = append(spec.key, keyEntry{Text: poleText, Glyph: ptr(poleGlyph())})
		if len(spec.zeros) > 0 {
			spec.key = append(spec.key, keyEntry{Text: zeroText, Glyph: ptr(zeroGlyph())})
		}
		spec.key = append(spec.key, spec.artefactKeys()...)
		if len(spec.breaks) > 0 {
			spec.key = append(spec.key, keyEntry{Text: "break point", Glyph: ptr(breakGlyph())})
		}
		if len(spec.crossings) > 0 {
			boundary := "imaginary axis"
			if a.Discrete {
				boundary = "unit circle"
			}
			spec.key = append(spec.key, keyEntry{Text: "crossing of the " + boundary, Glyph: ptr(crossingGlyph())})
		}
		if a.HasAsymptotes && len(a.AsymptoteAnglesDeg) > 0 {
			spec.key = append(spec.key, keyEntry{Text: "asymptote from " + formatNumber(a.CentroidReal, 3), Line: ptr(asymptoteLine(spec.th))})
		}
		if len(spec.marked) > 0 {
			spec.key = append(spec.key, keyEntry{Text: spec.markedLabel, Glyph: ptr(markedGlyph())})
		}
		if set != nil {
			for i, mk := range set.Also {
				spec.key = append(spec.key, keyEntry{Text: fmt.Sprintf("closed-loop poles at %s = %s", name, formatNumber(mk.Value, 4)), Glyph: ptr(alsoGlyph(i))})
			}
		}
		spec.key = append(spec.key, spec.stableKey())
		spec.key = append(spec.key, keyEntry{Text: stableWords(name, a.StableIntervals, a.Range)})
	}
	f, err := spec.figureWithDetail(ps)
	if err != nil {
		return nil, err
	}
	// Approximations and special situations recorded by the analysis.
	f.Notes = append(f.Notes, a.Notes...)
	if n := spec.artefactNote(); n != "" {
		f.Notes = append(f.Notes, n)
	}
	return f, nil
}

// startEndWords names the × and ○ of a locus over the variable name: the
// closed-loop poles at name = 0, where every branch starts, and the points
// the branches end at as name grows without bound (−∞ for a complementary
// locus, whose range is negative).
func startEndWords(name string, rg locus.Range) (start, end string) {
	inf := "∞"
	if rg.Max <= 0 && !rg.IsZero() {
		inf = "−∞"
	}
	return fmt.Sprintf("start: closed-loop pole at %s = 0", name),
		fmt.Sprintf("end: where poles go as %s → %s", name, inf)
}

// stableWords states the stable values of the variable in words.
func stableWords(name string, iv []locus.Interval, rg locus.Range) string {
	if len(iv) == 0 {
		return "unstable for every " + name + " in the range"
	}
	var parts []string
	for _, v := range iv {
		lo, hi := v.Lo, v.Hi
		switch {
		case math.IsInf(lo, -1) && math.IsInf(hi, 1):
			parts = append(parts, "every "+name)
		case math.IsInf(hi, 1):
			parts = append(parts, name+" > "+formatNumber(lo, 4))
		case math.IsInf(lo, -1):
			parts = append(parts, name+" < "+formatNumber(hi, 4))
		default:
			parts = append(parts, formatNumber(lo, 4)+" < "+name+" < "+formatNumber(hi, 4))
		}
	}
	return "stable for " + strings.Join(parts, " and for ")
}

// polesAt reads the closed-loop poles at value v off the branches by
// linear interpolation between the two traced points around v.
func polesAt(branches []locus.Branch, v float64) []complex128 {
	var out []complex128
	for _, b := range branches {
		pts := b.Points
		for i := 1; i < len(pts); i++ {
			lo, hi := pts[i-1].Value, pts[i].Value
			if v >= lo && v <= hi {
				f := 0.0
				if hi > lo {
					f = (v - lo) / (hi - lo)
				}
				out = append(out, pts[i-1].S+complex(f, 0)*(pts[i].S-pts[i-1].S))
				break
			}
		}
	}
	return out
}
