package locus

import (
	"errors"
	"math"
	"math/cmplx"
	"testing"

	"github.com/loopwise/loopwise/internal/quasipoly"
	"github.com/loopwise/loopwise/tf"
)

// TestDelayedAnalyzeIntegrator: for k·e^(−sτ)/s the real roots of
// s + k·e^(−sτ) meet where W(−kτ) has its branch point, −kτ = −1/e: the
// break point is s = −1/τ at k = 1/(e·τ) (Asl & Ulsoy 2003, closed form),
// and the crossing is at kτ = π/2, ω = π/(2τ) (Hayes 1950).
func TestDelayedAnalyzeIntegrator(t *testing.T) {
	const tau = 0.4
	loop := delayed(t, "1/s", tau)
	an, err := DelayedAnalyze(loop, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(an.BreakPoints) != 1 {
		t.Fatalf("break points %v, want one", an.BreakPoints)
	}
	b := an.BreakPoints[0]
	// The break point is the root of the linear 1 + τs (exact to rounding);
	// k = e^(−1)/τ through one exp.
	if math.Abs(real(b.Point)+1/tau) > 1e-15/tau || math.Abs(b.Value-math.Exp(-1)/tau) > 4e-16*b.Value || b.Branches != 2 {
		t.Errorf("break point %+v, want s = %v at k = %v with 2 branches", b, -1/tau, math.Exp(-1)/tau)
	}
	if len(an.AxisCrossings) != 1 || math.Abs(an.AxisCrossings[0].Value-math.Pi/(2*tau)) > 1e-12*math.Pi/(2*tau) ||
		math.Abs(an.AxisCrossings[0].FrequencyRadPerSec-math.Pi/(2*tau)) > 1e-12*math.Pi/(2*tau) {
		t.Errorf("crossings %+v, want k = ω = π/(2τ)", an.AxisCrossings)
	}
	if an.HasAsymptotes || len(an.RealAxisSegments) != 1 || !math.IsInf(an.RealAxisSegments[0].Lo, -1) || an.RealAxisSegments[0].Hi != 0 {
		t.Errorf("asymptotes %v, real-axis segments %v: want none and [−∞, 0]", an.HasAsymptotes, an.RealAxisSegments)
	}
}

// TestDelayedDepartureAngle checks the exact departure angle at a complex
// pole against the direction in which the exact root (quasipoly, Newton)
// leaves the pole for a small gain: (s(k) − p) has the angle of the
// departure to O(k).
func TestDelayedDepartureAngle(t *testing.T) {
	const tau = 0.3
	loop := delayed(t, "(s+3)/((s+1)^2 + 4)/(s+5)", tau)
	an, err := DelayedAnalyze(loop, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(an.Departures) != 1 {
		t.Fatalf("departures %v, want one (the pole −1 + 2j)", an.Departures)
	}
	p := an.Departures[0].Point
	q := quasipoly.Q{D: loop.Den().Coeffs(), N: loop.Num().Coeffs(), K: 1e-7, Tau: tau}
	s, ok := q.Polish(p, 1e-14, 1)
	if !ok {
		t.Fatal("Newton did not converge near the pole")
	}
	got := cmplx.Phase(s-p) * 180 / math.Pi
	// The O(k) term moves the direction by about k·|...|: 1e-5 degree
	// covers it at k = 1e-7.
	if d := math.Abs(wrapDeg(got - an.Departures[0].AngleDeg)); d > 1e-5 {
		t.Errorf("departure angle %v°, the exact root leaves at %v°", an.Departures[0].AngleDeg, got)
	}
	// Without the delay term the angle would differ by Im(p)·τ = 34.4°.
	if d := math.Abs(wrapDeg(got - an.Departures[0].AngleDeg - 2*tau*180/math.Pi)); d < 1 {
		t.Errorf("delay term missing?")
	}
}

// TestDelayedTraceLag traces K·e^(−sτ)/(s + 1), τ = 0.5: the crossing at
// K* = 3.8068828648258725 (ωT = −tan(ωτ), textbook result from memory;
// mpmath value from report/testdata/deadtime_refs.py), every drawn point
// a root of the exact quasi-polynomial, the crossing inside the view.
func TestDelayedTraceLag(t *testing.T) {
	const tau = 0.5
	loop := delayed(t, "1/(s+1)", tau)
	l, err := DelayedTrace(loop, nil)
	if err != nil {
		t.Fatal(err)
	}
	cr := l.Analysis.AxisCrossings
	if len(cr) != 1 || math.Abs(cr[0].Value-3.8068828648258725024) > 1e-12*3.8 {
		t.Fatalf("crossings %+v", cr)
	}
	v := l.View
	if w := cr[0].FrequencyRadPerSec; w > v.ImMax || v.ReMin > -1 || v.ReMax < 0 {
		t.Errorf("view %+v does not frame the pole −1 and the crossing at %v rad/s", v, w)
	}
	// The root from the pole −1 meets, at the break point s = −3 (root of
	// 1 + τ(s + 1)) and k = 2e^(−1.5), the real root that came in from
	// the left; the pair then crosses at K*.
	if bp := l.Analysis.BreakPoints; len(bp) != 1 || math.Abs(real(bp[0].Point)+3) > 1e-15*3 || math.Abs(bp[0].Value-2*math.Exp(-1.5)) > 1e-15 {
		t.Errorf("break points %+v, want s = −3 at k = 2e^(−1.5)", bp)
	}
	if len(l.Branches) < 2 {
		t.Errorf("%d branches, want the one from the pole and the one coming in from the left", len(l.Branches))
	}
	q := quasipoly.Q{D: loop.Den().Coeffs(), N: loop.Num().Coeffs(), Tau: tau}
	points, crossedNear := 0, false
	for _, b := range l.Branches {
		for i, p := range b.Points {
			points++
			q.K = p.Value
			f, _ := q.Eval(p.S)
			scale := cmplx.Abs(p.S) + 1 + p.Value*math.Exp(-real(p.S)*tau)
			if cmplx.Abs(f) > 1e-12*scale {
				t.Fatalf("point %v at k = %v: |f| = %.3g, not a root", p.S, p.Value, cmplx.Abs(f))
			}
			if i > 0 && p.Value <= b.Points[i-1].Value {
				t.Fatalf("branch %d not ordered by value", b.Index)
			}
			if p.Value == cr[0].Value && math.Abs(real(p.S)) < 1e-9 {
				crossedNear = true
			}
		}
	}
	if !crossedNear {
		t.Errorf("no traced point on the axis at the crossing value")
	}
	t.Logf("%d branches, %d points", len(l.Branches), points)
}

// TestDelayedTraceErrors: discrete loops, loops without dead time and
// negative ranges are refused.
func TestDelayedTraceErrors(t *testing.T) {
	if _, err := DelayedTrace(tf.MustParse("1/(s+1)"), nil); !errors.Is(err, ErrUnsupported) {
		t.Errorf("no delay: %v", err)
	}
	loop := delayed(t, "1/(s+1)", 0.1)
	if _, err := DelayedTrace(loop, &Settings{Range: Range{Min: -1, Max: 1}}); !errors.Is(err, ErrUnsupported) {
		t.Errorf("negative range: %v", err)
	}
	if _, err := DelayedAnalyze(delayed(t, "(s+2)/(s+1)", 0.1), nil); !errors.Is(err, ErrUnsupported) {
		t.Errorf("biproper: %v", err)
	}
}

// delayed parses text and adds the dead time tau.
func delayed(t *testing.T, text string, tau float64) tf.TF {
	t.Helper()
	g, err := tf.MustParse(text).WithDelay(tau)
	if err != nil {
		t.Fatal(err)
	}
	return g
}
