package report

import (
	"errors"
	"fmt"
	"math"

	"github.com/loopwise/loopwise/tf"
)

// loops fills open_loop and closed_loop.
func (a *analysis) loops() {
	m, rep := a.m, a.rep
	a.rational = m.rational
	if m.padeErr != nil {
		a.warn("the dead time cannot be replaced for the closed-loop poles: %s", short(m.padeErr))
	} else if m.delayIgnored {
		a.warn("the dead time of %s s is negligible against the loop's fastest pole or zero (e^(−sτ) differs from 1 by less than 1e-8 there): every analysis leaves it out", g(Number(m.open.DelaySec())))
	}
	exact := m.padeErr == nil && a.deadTimeLoops() // deadtime.go
	// Open-loop poles: those of the rational part; in discrete time the
	// dead time's poles at z = 0 are exact and listed too.
	ol := m.open.WithoutDelay()
	if m.open.IsDiscrete() && a.rational.DelaySec() == 0 {
		ol = a.rational
	}
	if p, err := ol.Poles(); err == nil {
		rep.OpenLoop.Poles = complexList(p)
	} else {
		a.warn("open-loop poles: %s", short(err))
	}
	if z, err := ol.Zeros(); err == nil {
		rep.OpenLoop.Zeros = complexList(z)
	} else {
		a.warn("open-loop zeros: %s", short(err))
	}
	if len(rep.OpenLoop.Poles) > 0 || ol.Den().Degree() == 0 {
		p, _ := ol.Poles()
		z, _ := ol.Zeros()
		delay := m.open.DelaySec()
		if ol.DelaySec() == 0 && ol.IsDiscrete() && m.open.DelaySec() > 0 {
			delay = 0 // already poles at z = 0
		}
		rep.Loop.OpenLoopFactored = factoredText(ol.GainFactor(), z, p, ol.Variable(), delay, ol.IsDiscrete())
	}
	if k, err := m.open.StaticGain(); err == nil {
		rep.OpenLoop.StaticGain = Number(k)
		if m.open.IsDiscrete() && integrates(m.open) {
			// tf.StaticGain evaluates D(1) exactly; a pole at z = 1 written
			// as (z − 1)(z − 0.368) expands to coefficients whose sum is a
			// rounding error, not 0.
			rep.OpenLoop.StaticGain = Number(math.Inf(1))
		}
	} else if errors.Is(err, tf.ErrInfiniteGain) {
		rep.OpenLoop.StaticGain = Number(math.Inf(1))
	} else {
		a.warn("open-loop static gain: %s", short(err))
	}

	// Closed loop from reference to output.
	if a.rational.DelaySec() == 0 && !exact {
		var err error
		if m.unitySensor {
			a.refOut, err = a.rational.ClosedLoop()
		} else {
			a.refOut, err = a.feedbackWithSensor()
		}
		if err != nil {
			a.warn("closed loop: %s", short(err))
		}
	}
	switch {
	case exact:
		// deadTimeLoops set the exact roots and verdict.
		a.verdictWarnings()
		return
	case m.closedErr != nil:
		a.warn("closed-loop poles: %s", short(m.closedErr))
	case a.rational.DelaySec() == 0:
		rep.ClosedLoop.Poles = complexList(m.closedPoles)
	}
	a.verdict = m.verdict
	rep.ClosedLoop.Stable = a.verdict.ptr()
	a.verdictWarnings()
}

// verdictWarnings says why the verdict is what it is when poles sit on the
// stability boundary or too close to it to tell.
func (a *analysis) verdictWarnings() {
	v, discrete := a.verdict, a.m.open.IsDiscrete()
	if len(v.boundary) > 0 {
		a.warn("the closed loop has %s on %s to within the rounding of its coefficients (e.g. %s): it is not asymptotically stable (an undamped oscillation or an integration, or damping too small to tell from none), and the report counts it as unstable", count(len(v.boundary), "a pole", "poles"), boundaryName(discrete), cplx(newComplex(v.boundary[0]), false))
	}
	if len(v.undecided) > 0 {
		verdict := "the stability of the closed loop is not determined"
		if v.known {
			verdict = "other poles make the closed loop unstable"
		}
		a.warn("%s: %s", verdict, v.undecidedText(discrete))
	}
	if v.isLost {
		a.warn("the stability of the closed loop is not determined: the characteristic polynomial (degree %d) vanishes at %s on %s to within the rounding of its coefficients, so its computed roots do not tell on which side of the boundary the true ones lie; the margins (computed from the loop's factors) are the better guide", a.m.rational.CharacteristicPolynomial().Degree(), cplx(newComplex(v.lost), false), boundaryName(discrete))
	}
}

// feedbackWithSensor returns forward/(1 + forward·sensor) with dead time
// replaced, for loops whose sensor is not 1.
func (a *analysis) feedbackWithSensor() (tf.TF, error) {
	m := a.m
	fwd, h := m.forward, m.sensor
	if m.delayIgnored {
		fwd, h = fwd.WithoutDelay(), h.WithoutDelay()
	}
	fwd, err := fwd.Pade(padeOrder)
	if err != nil {
		return tf.TF{}, err
	}
	if d := m.file.Discretize; d != nil {
		if h, err = discretize(h, d); err != nil {
			return tf.TF{}, err
		}
		a.warn("the sensor was converted to z on its own to form the closed loop from reference to output")
	}
	if h, err = h.Pade(padeOrder); err != nil {
		return tf.TF{}, err
	}
	return tf.Feedback(fwd, h)
}

// unitRootTol is the relative tolerance, to the 1-norm of the
// coefficients, below which D(1) counts as zero for a discrete loop (the
// value package response uses for the same decision).
const unitRootTol = 1e-12

// integrates reports whether the discrete loop l has a pole at z = 1 that
// its numerator does not cancel.
func integrates(l tf.TF) bool {
	d, n := l.Den(), l.Num()
	return math.Abs(d.Eval(1)) <= unitRootTol*d.Norm1() && math.Abs(n.Eval(1)) > unitRootTol*n.Norm1()
}

// ordinal returns "6th" and the like.
func ordinal(n int) string {
	suffix := "th"
	switch {
	case n%100 >= 11 && n%100 <= 13:
	case n%10 == 1:
		suffix = "st"
	case n%10 == 2:
		suffix = "nd"
	case n%10 == 3:
		suffix = "rd"
	}
	return fmt.Sprintf("%d%s", n, suffix)
}

// loopsTables shows the open and closed loop.
func loopsTables(r *Report) []table {
	var out []table
	ol := table{title: "Open loop"}
	ol.rows = append(ol.rows,
		row{fmt.Sprintf("poles (%d)", len(r.OpenLoop.Poles)), rootList(r.OpenLoop.Poles)},
		row{fmt.Sprintf("zeros (%d)", len(r.OpenLoop.Zeros)), rootList(r.OpenLoop.Zeros)},
		row{"static gain", g(r.OpenLoop.StaticGain)},
	)
	out = append(out, ol)

	cl := table{title: "Closed loop"}
	cl.rows = append(cl.rows,
		row{"stability", stableWord(r.ClosedLoop.Stable)},
		row{fmt.Sprintf("poles (%d)", len(r.ClosedLoop.Poles)), rootList(r.ClosedLoop.Poles)},
	)
	out = append(out, cl)
	return out
}

// loopsSection computes open_loop and closed_loop.
var loopsSection = section{stage: "open and closed loop", run: (*analysis).loops, tables: loopsTables}

// OpenLoopResult is the "open_loop" section: the poles, zeros and static
// gain of L (of its rational part; in discrete time the poles at z = 0 of
// an exact dead time are listed too).
type OpenLoopResult struct {
	// Poles are the poles of L.
	Poles []Complex `json:"poles"`
	// Zeros are the finite zeros of L.
	Zeros []Complex `json:"zeros"`
	// StaticGain is L(0) (L(1) in z); null when L has a pole there.
	StaticGain Number `json:"static_gain"`
}

// ClosedLoopResult is the "closed_loop" section: the roots of 1 + L (with
// dead time replaced by its Padé approximation or exact poles at z = 0) and
// the one stability verdict of the loop.
type ClosedLoopResult struct {
	// Poles are the closed-loop poles.
	Poles []Complex `json:"poles"`
	// Stable is the stability verdict of the loop; null when it could not be decided.
	Stable *bool `json:"stable"`
}
