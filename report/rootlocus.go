package report

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/tf"
)

// rootLocus fills the locus section: in the gain k, or in the parameter.
func (a *analysis) rootLocus() {
	m, lf, rep := a.m, a.m.file, a.rep
	set := &locus.Settings{PadeOrder: padeOrder}
	loop, loopAt := m.base, m.loopAt
	if m.delayIgnored {
		// The dead time is negligible (negligibleDelay): left out here as
		// for the closed-loop poles.
		loop = m.base.WithoutDelay()
		loopAt = func(p float64) (tf.TF, error) {
			l, err := m.loopAt(p)
			return l.WithoutDelay(), err
		}
	}
	if p := lf.Parameter; p != nil {
		// The variable and its range are the loop file's, known even when
		// the locus cannot be formed.
		rep.Locus.Variable = p.Name
		rep.Locus.Range = Interval{Number(p.Range[0]), Number(p.Range[1])}
		set.Variable = p.Name
		set.Range = locus.Range{Min: p.Range[0], Max: p.Range[1]}
		if a.deadTimeParamLocus(loopAt, set) { // deadtime.go: exact with dead time
			return
		}
		par, err := locus.FromParameter(p.Name, loopAt)
		if err != nil {
			a.warn("the locus in the parameter %s cannot be formed: %s; the locus keys are null", p.Name, short(err))
			return
		}
		loop = par.Loop
		for _, n := range par.Notes {
			a.warn("parameter locus: %s", n)
		}
		set.Variable = p.Name
		set.Range = locus.Range{Min: p.Range[0], Max: p.Range[1]}
	} else {
		set.Range = locus.Range{Min: lf.GainRange[0], Max: lf.GainRange[1]}
	}
	rep.Locus.Variable = "gain"
	if set.Variable != "" {
		rep.Locus.Variable = set.Variable
	}
	rep.Locus.Range = Interval{Number(set.Range.Min), Number(set.Range.Max)}
	a.locusFor = loop
	an, err := locus.Analyze(loop, set)
	if err != nil {
		a.warn("root locus: %s; the locus keys are null", short(err))
		return
	}
	a.locus = &an
	l := &rep.Locus
	l.fill(an)
	if a.deadTimeLocus(loop, set) { // deadtime.go: the exact locus with dead time
		return
	}
	l.Notes = append(l.Notes, an.Notes...)
	for _, n := range an.Notes {
		a.warn("root locus: %s", n)
	}
	l.markApproximation(padeArtefacts(loop))
}

// markApproximation marks the departure and arrival angles at the poles
// and zeros of the Padé approximation of the dead time (not the plant's)
// and says so in a note.
func (l *LocusResult) markApproximation(ap *chart.Approximation) {
	if ap == nil {
		return
	}
	near := func(z complex128, set []complex128) bool {
		for _, w := range set {
			if cmplx.Abs(z-w) <= 1e-6*math.Max(1, cmplx.Abs(w)) {
				return true
			}
		}
		return false
	}
	marked := 0
	for i, d := range l.DepartureAngles {
		if d.Pole != nil && near(complex(float64(d.Pole.Re), float64(d.Pole.Im)), ap.Poles) {
			l.DepartureAngles[i].Approximation = true
			marked++
		}
	}
	for i, d := range l.ArrivalAngles {
		if d.Zero != nil && near(complex(float64(d.Zero.Re), float64(d.Zero.Im)), ap.Zeros) {
			l.ArrivalAngles[i].Approximation = true
			marked++
		}
	}
	if marked > 0 {
		l.Notes = append(l.Notes, fmt.Sprintf("the %d poles and %d zeros of the %s are not the plant's: the departure and arrival angles marked \"approximation\" describe the approximation", len(ap.Poles), len(ap.Zeros), ap.Name))
	}
}

// fill sets the construction quantities of the locus section from an.
func (l *LocusResult) fill(an locus.Analysis) {
	l.Centroid = nan
	l.AsymptoteAnglesDeg, l.RealAxisSegments = []Number{}, []Interval{}
	l.DepartureAngles, l.ArrivalAngles = []AngleAt{}, []AngleAt{}
	l.BreakPoints, l.AxisCrossings, l.StableIntervals = []BreakPoint{}, []AxisCrossing{}, []Interval{}
	if an.HasAsymptotes {
		l.Centroid = Number(an.CentroidReal)
	}
	for _, x := range an.AsymptoteAnglesDeg {
		l.AsymptoteAnglesDeg = append(l.AsymptoteAnglesDeg, Number(x))
	}
	for _, iv := range an.RealAxisSegments {
		l.RealAxisSegments = append(l.RealAxisSegments, Interval{Number(iv.Lo), Number(iv.Hi)})
	}
	for _, d := range an.Departures {
		p := newComplex(d.Point)
		l.DepartureAngles = append(l.DepartureAngles, AngleAt{Pole: &p, AngleDeg: Number(d.AngleDeg)})
	}
	for _, d := range an.Arrivals {
		z := newComplex(d.Point)
		l.ArrivalAngles = append(l.ArrivalAngles, AngleAt{Zero: &z, AngleDeg: Number(d.AngleDeg)})
	}
	for _, b := range an.BreakPoints {
		l.BreakPoints = append(l.BreakPoints, BreakPoint{S: newComplex(b.Point), Value: Number(b.Value), Branches: b.Branches})
	}
	for _, c := range an.AxisCrossings {
		l.AxisCrossings = append(l.AxisCrossings, AxisCrossing{FrequencyRadPerSec: Number(c.FrequencyRadPerSec), Point: newComplex(c.Point), Value: Number(c.Value)})
	}
	for _, iv := range an.StableIntervals {
		l.StableIntervals = append(l.StableIntervals, Interval{Number(iv.Lo), Number(iv.Hi)})
	}
}

// locusTables shows the root locus.
func locusTables(r *Report) []table {
	var out []table
	lo := r.Locus
	ls := table{title: "Root locus in " + variableWords(lo.Variable)}
	ls.rows = append(ls.rows, row{"range of " + lo.Variable, intervalText(lo.Range)})
	if lo.StableIntervals == nil {
		ls.rows = append(ls.rows, row{"locus", notComputed})
		return append(out, ls)
	}
	if len(lo.AsymptoteAnglesDeg) > 0 {
		angles := make([]string, len(lo.AsymptoteAnglesDeg))
		for i, a := range lo.AsymptoteAnglesDeg {
			angles[i] = gUnit(a, "°")
		}
		ls.rows = append(ls.rows, row{"asymptotes", fmt.Sprintf("centroid %s, angles %s", g(lo.Centroid), strings.Join(angles, ", "))})
	} else if r.DeadTime != nil {
		ls.rows = append(ls.rows, row{"asymptotes", "none: with the dead time exact, the branches to infinity come in from Re s = −∞"})
	} else {
		ls.rows = append(ls.rows, row{"asymptotes", "none (as many zeros as poles)"})
	}
	ls.rows = append(ls.rows, row{"real-axis segments", intervalListClosed(lo.RealAxisSegments)})
	for _, a := range lo.DepartureAngles {
		ls.rows = append(ls.rows, row{"departure angle from the " + approxWord(a.Approximation) + "pole " + cplx(*a.Pole, false), gUnit(a.AngleDeg, "°")})
	}
	for _, a := range lo.ArrivalAngles {
		ls.rows = append(ls.rows, row{"arrival angle at the " + approxWord(a.Approximation) + "zero " + cplx(*a.Zero, false), gUnit(a.AngleDeg, "°")})
	}
	for _, b := range lo.BreakPoints {
		ls.rows = append(ls.rows, row{"break point s = " + cplx(b.S, false), fmt.Sprintf("%s = %s, %d branches meet", lo.Variable, g(b.Value), b.Branches)})
	}
	if len(lo.BreakPoints) == 0 {
		ls.rows = append(ls.rows, row{"break points", "none"})
	}
	axis := "imaginary axis"
	if float64(r.Loop.SampleTimeSec) > 0 {
		axis = "unit circle"
	}
	for _, c := range lo.AxisCrossings {
		ls.rows = append(ls.rows, row{"crosses the " + axis + " at " + gUnit(c.FrequencyRadPerSec, "rad/s"), fmt.Sprintf("%s = %s", lo.Variable, g(c.Value))})
	}
	if len(lo.AxisCrossings) == 0 {
		ls.rows = append(ls.rows, row{"crossings of the " + axis, "none"})
	}
	ls.rows = append(ls.rows, row{"closed loop stable for " + lo.Variable + " in", intervalList(lo.StableIntervals)})
	for _, n := range lo.Notes {
		ls.rows = append(ls.rows, row{"note", n})
	}
	out = append(out, ls)
	return out
}

// locusSection computes locus: in the loop gain k or in the parameter.
var locusSection = section{stage: "root locus", run: (*analysis).rootLocus, tables: locusTables}

// AngleAt is the locus's departure angle at a complex pole or arrival
// angle at a complex zero.
type AngleAt struct {
	// Pole is the pole a branch departs from (departure angles only).
	Pole *Complex `json:"pole,omitempty"`
	// Zero is the zero a branch arrives at (arrival angles only).
	Zero *Complex `json:"zero,omitempty"`
	// AngleDeg is the angle in degrees.
	AngleDeg Number `json:"angle_deg"`
	// Approximation is true when the pole or zero is not the plant's but
	// the Padé approximation's of the dead time (dead_time_model "pade").
	Approximation bool `json:"approximation,omitempty"`
}

// BreakPoint is a point where branches of the locus meet and part.
type BreakPoint struct {
	// S is the point in the plane.
	S Complex `json:"s"`
	// Value is the gain or parameter value there.
	Value Number `json:"value"`
	// Branches is the number of branches that meet.
	Branches int `json:"branches"`
}

// AxisCrossing is a crossing of the stability boundary (the imaginary axis,
// or the unit circle in z).
type AxisCrossing struct {
	// FrequencyRadPerSec is the frequency of the crossing in rad/s.
	FrequencyRadPerSec Number `json:"frequency_rad_per_sec"`
	// Point is the crossing in the plane.
	Point Complex `json:"point"`
	// Value is the gain or parameter value there.
	Value Number `json:"value"`
}

// LocusResult is the "locus" section: the root locus in the loop gain k or
// in the parameter, with its construction quantities (package locus).
type LocusResult struct {
	// Variable is "gain" or the parameter's name.
	Variable string `json:"variable"`
	// Range is the range of the variable.
	Range Interval `json:"range"`
	// Centroid is the real point the asymptotes leave from; null without asymptotes.
	Centroid Number `json:"centroid"`
	// AsymptoteAnglesDeg are the asymptotes' angles in degrees.
	AsymptoteAnglesDeg []Number `json:"asymptote_angles_deg"`
	// RealAxisSegments are the parts of the real axis on the locus.
	RealAxisSegments []Interval `json:"real_axis_segments"`
	// DepartureAngles are the angles at complex open-loop poles.
	DepartureAngles []AngleAt `json:"departure_angles"`
	// ArrivalAngles are the angles at complex open-loop zeros.
	ArrivalAngles []AngleAt `json:"arrival_angles"`
	// BreakPoints are the break-away and break-in points.
	BreakPoints []BreakPoint `json:"break_points"`
	// AxisCrossings are the crossings of the stability boundary.
	AxisCrossings []AxisCrossing `json:"axis_crossings"`
	// StableIntervals are the values of the variable for which the closed loop is stable.
	StableIntervals []Interval `json:"stable_intervals"`
	// Notes say what the locus analysis approximated or left out.
	Notes []string `json:"notes,omitempty"`
}

// approxWord labels a pole or zero of the Padé approximation.
func approxWord(approx bool) string {
	if approx {
		return "Padé "
	}
	return ""
}
