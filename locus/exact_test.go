package locus

import (
	"math"
	"testing"

	"github.com/loopwise/loopwise/internal/refcases"
	"github.com/loopwise/loopwise/tf"
)

// TestExactValues measures the relative error of every crossing value and
// break-point value against the 50-digit references (reference cases and
// testdata/golden.json) and requires 1e-12: they are roots of exact
// polynomials polished by Newton's method, and the value at a break point
// is stationary, so its error is second order. The references are
// rounded to 17 digits, far below the bound.
func TestExactValues(t *testing.T) {
	cases, err := refcases.ByType("root_locus")
	if err != nil {
		t.Fatal(err)
	}
	worstCross, worstBreak := 0.0, 0.0
	for _, c := range cases {
		var q rlQuery
		var want rlExpected
		if err := c.DecodeQuery(&q); err != nil {
			t.Fatal(err)
		}
		if err := c.Decode(&want); err != nil {
			t.Fatal(err)
		}
		loop, _ := tf.NewDiscrete(c.Loop.Num, c.Loop.Den, c.Loop.SampleTime)
		an, err := Analyze(loop, &Settings{Range: rangeForSign(q.GainSign)})
		if err != nil {
			t.Fatal(err)
		}
		for i, w := range want.Crossings {
			if i < len(an.AxisCrossings) {
				worstCross = math.Max(worstCross, math.Abs(an.AxisCrossings[i].Value-w.K)/math.Abs(w.K))
				if w.Omega != 0 {
					worstCross = math.Max(worstCross, math.Abs(an.AxisCrossings[i].FrequencyRadPerSec-w.Omega)/w.Omega)
				}
			}
		}
		for _, w := range want.BreakPoints {
			for _, g := range an.BreakPoints {
				if math.Abs(real(g.Point)-real(complex128(w.S))) < 1e-6 && math.Abs(imag(g.Point)-imag(complex128(w.S))) < 1e-6 {
					worstBreak = math.Max(worstBreak, math.Abs(g.Value-w.K)/math.Abs(w.K))
				}
			}
		}
	}
	g := loadGolden(t)
	an, err := Analyze(tf.MustNew(g.CondStable.Num, g.CondStable.Den), nil)
	if err != nil {
		t.Fatal(err)
	}
	for i, w := range g.CondStable.Crossings {
		worstCross = math.Max(worstCross, math.Abs(an.AxisCrossings[i].Value-w.K)/w.K)
	}
	for i, w := range g.CondStable.Breaks {
		worstBreak = math.Max(worstBreak, math.Abs(an.BreakPoints[i].Value-w.K)/w.K)
	}
	d := g.Discrete
	an, err = Analyze(mustDiscrete(d.Num, d.Den, d.SampleTime), nil)
	if err != nil {
		t.Fatal(err)
	}
	for i, w := range d.Crossings {
		worstCross = math.Max(worstCross, math.Abs(an.AxisCrossings[i].Value-w.K)/w.K)
	}
	for i, w := range d.Breaks {
		worstBreak = math.Max(worstBreak, math.Abs(an.BreakPoints[i].Value-w.K)/w.K)
	}
	t.Logf("largest relative error: crossings %.2e, break points %.2e", worstCross, worstBreak)
	if worstCross > 1e-12 || worstBreak > 1e-12 {
		t.Errorf("crossings %.3g, break points %.3g: above 1e-12", worstCross, worstBreak)
	}
}
