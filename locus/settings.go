package locus

import (
	"context"
	"fmt"
	"math"
)

// Range is the range of the locus variable k (a gain or a parameter); ±Inf
// ends are allowed. The zero value means (0, +Inf), the usual locus; use
// Range{Min: math.Inf(-1), Max: 0} for the complementary locus (k < 0).
type Range struct{ Min, Max float64 }

// IsZero reports whether r is the zero value (0, 0), which stands for the
// default (0, +Inf).
func (r Range) IsZero() bool { return r.Min == 0 && r.Max == 0 }

// Contains reports whether Min ≤ k ≤ Max.
func (r Range) Contains(k float64) bool { return k >= r.Min && k <= r.Max }

// Settings controls Analyze, Trace and the queries. A nil *Settings means
// the defaults; so does the zero value of every field.
type Settings struct {
	// Range is the range of the locus variable. If zero, (0, +Inf).
	Range Range
	// PadeOrder is the order of the diagonal Padé approximation that
	// replaces dead time e^(−sT) in a continuous-time loop (1 to 20). If
	// zero, defaults to 6. A note records the replacement.
	PadeOrder int
	// Variable is the name of the locus variable used in notes and labels.
	// If empty, defaults to "gain".
	Variable string

	// ChordTolerance is the largest step of a traced branch between two
	// points, as a fraction of the scale of the plot (the half-diagonal of
	// Locus.View), in (0, 1]. It holds within 1.25 half-diagonals of the
	// view's centre; beyond, the limit grows as the fifth power of the distance
	// (branches far off the plot are nearly straight). If zero, defaults
	// to 0.02.
	ChordTolerance float64
	// AngleToleranceDeg is the largest turn of a traced branch between two
	// points, in degrees, in (0, 90]. If zero, defaults to 5.
	AngleToleranceDeg float64
	// ExtentRadius is the distance from the centre of Locus.View beyond
	// which a branch that goes to infinity is no longer traced (in units of
	// s, or z in discrete time). If zero, defaults to twice the
	// half-diagonal of the view.
	ExtentRadius float64
	// MaxPoints bounds the total number of traced points. If zero, defaults
	// to 1,000,000; the trace stops with ErrTooManyPoints beyond it.
	MaxPoints int
	// PointTolerance is the relative tolerance of ValueAt on the angle
	// condition: a point s is on the locus when the phase of −a(s)/b(s)
	// differs from that of a real value in the range by at most this many
	// radians. If zero, defaults to 1e-6 (for points read off a plot use
	// about 1e-2).
	PointTolerance float64
	// Context cancels a long trace. If nil, context.Background().
	Context context.Context
	// Progress, if not nil, is called during Trace with the fraction of the
	// work done, in [0, 1], from the calling goroutine.
	Progress func(fraction float64)
}

// resolved holds the validated settings with defaults filled in.
type resolved struct {
	rng         Range
	padeOrder   int
	variable    string
	chordTol    float64
	angleTolRad float64
	extent      float64
	maxPoints   int
	pointTol    float64
	ctx         context.Context
	progress    func(float64)
}

const maxPadeOrder = 20

func resolve(set *Settings) (resolved, error) {
	var s Settings
	if set != nil {
		s = *set
	}
	r := resolved{rng: s.Range, padeOrder: s.PadeOrder, variable: s.Variable,
		chordTol: s.ChordTolerance, extent: s.ExtentRadius, maxPoints: s.MaxPoints,
		pointTol: s.PointTolerance, ctx: s.Context, progress: s.Progress}
	if r.rng.IsZero() {
		r.rng = Range{0, math.Inf(1)}
	}
	if math.IsNaN(r.rng.Min) || math.IsNaN(r.rng.Max) {
		return r, fmt.Errorf("%w: Range{Min: %v, Max: %v} has a NaN end", ErrInvalidRange, r.rng.Min, r.rng.Max)
	}
	if r.rng.Min >= r.rng.Max {
		return r, fmt.Errorf("%w: Range{Min: %v, Max: %v} needs Min < Max", ErrInvalidRange, r.rng.Min, r.rng.Max)
	}
	if r.padeOrder == 0 {
		r.padeOrder = 6
	}
	if r.padeOrder < 1 || r.padeOrder > maxPadeOrder {
		return r, fmt.Errorf("%w: PadeOrder %d is outside 1…%d", ErrInvalidSettings, s.PadeOrder, maxPadeOrder)
	}
	if r.variable == "" {
		r.variable = "gain"
	}
	if r.chordTol == 0 {
		r.chordTol = 0.02
	}
	if !(r.chordTol > 0 && r.chordTol <= 1) {
		return r, fmt.Errorf("%w: ChordTolerance %v is outside (0, 1]", ErrInvalidSettings, s.ChordTolerance)
	}
	a := s.AngleToleranceDeg
	if a == 0 {
		a = 5
	}
	if !(a > 0 && a <= 90) {
		return r, fmt.Errorf("%w: AngleToleranceDeg %v is outside (0, 90]", ErrInvalidSettings, s.AngleToleranceDeg)
	}
	r.angleTolRad = a * math.Pi / 180
	if r.extent < 0 || math.IsNaN(r.extent) || math.IsInf(r.extent, 0) {
		return r, fmt.Errorf("%w: ExtentRadius %v must be finite and non-negative", ErrInvalidSettings, s.ExtentRadius)
	}
	if r.maxPoints == 0 {
		r.maxPoints = 1_000_000
	}
	if r.maxPoints < 0 {
		return r, fmt.Errorf("%w: MaxPoints %d is negative", ErrInvalidSettings, s.MaxPoints)
	}
	if r.pointTol == 0 {
		r.pointTol = 1e-6
	}
	if !(r.pointTol > 0) || math.IsInf(r.pointTol, 0) {
		return r, fmt.Errorf("%w: PointTolerance %v must be positive and finite", ErrInvalidSettings, s.PointTolerance)
	}
	if r.ctx == nil {
		r.ctx = context.Background()
	}
	return r, nil
}
