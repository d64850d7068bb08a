package design

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// TestStepBounds checks every certificate of certify.go against the step
// metrics (spec.CheckWith): at 40 values across the stable range of each
// loop, wherever stepBounds certifies the verdicts, the requirement holds
// exactly where the bound is non-negative. The loops are those of the
// benchmark and two of the tests, with limits that make each certificate
// occur, and twelve random loops of order 5 with an integrator.
func TestStepBounds(t *testing.T) {
	cases := []struct {
		loop string
		req  spec.Requirements
	}{
		{benchLoop, spec.Requirements{spec.MaxOvershootPct(30), spec.MaxRiseTimeSec(5), spec.MaxSettlingTimeSec(20)}},
		{"(s+0.5)/(s*(s+1)*(s+4)*(s^2+2*s+10))", spec.Requirements{spec.MaxOvershootPct(15), spec.MaxRiseTimeSec(3), spec.MaxSettlingTimeSec(12)}},
		{"4*(s+1)/(s*(s+2)*(s^2+s+4))", spec.Requirements{spec.MaxOvershootPct(20), spec.MaxRiseTimeSec(2), spec.MaxSettlingTimeSec(10)}},
		{"1/(s*(s+1)*(s+2))", spec.Requirements{spec.MaxOvershootPct(5), spec.MaxRiseTimeSec(8), spec.MaxSettlingTimeSec(6)}},
	}
	// Random loops k·(s + z)/(s·(s + a)·(s² + 2ζωs + ω²)·(s + b)), fixed
	// seed, with limits drawn around typical values.
	rng := rand.New(rand.NewPCG(5, 11))
	for range 12 {
		z, a, b := 0.2+3*rng.Float64(), 0.3+3*rng.Float64(), 2+20*rng.Float64()
		zeta, w := 0.05+0.6*rng.Float64(), 0.5+4*rng.Float64()
		loop := fmt.Sprintf("(s+%.3g)/(s*(s+%.3g)*(s^2+%.3g*s+%.3g)*(s+%.3g))", z, a, 2*zeta*w, w*w, b)
		cases = append(cases, struct {
			loop string
			req  spec.Requirements
		}{loop, spec.Requirements{spec.MaxOvershootPct(5 + 40*rng.Float64()), spec.MaxRiseTimeSec(0.5 + 8*rng.Float64()), spec.MaxSettlingTimeSec(2 + 30*rng.Float64())}})
	}
	certified := 0
	for _, c := range cases {
		v, p := gainProblem(t, tf.MustParse(c.loop), nil)
		for _, st := range p.stable {
			for _, x := range samplesIn(st.Lo, st.Hi, 40) {
				b, ok := p.stepBounds(c.req, x)
				if !ok {
					continue
				}
				certified++
				l, _ := v.LoopAt(x)
				rep := spec.CheckWith(l, c.req, nil)
				for i, r := range rep.Results {
					if (b[i] >= 0) != r.Pass {
						t.Errorf("%s at k = %v: %s certified with slack bound %v, step metrics: %v (pass %v)", c.loop, x, r.Name, b[i], r.Value, r.Pass)
					}
					// The bound is on the correct side of the slack.
					if s := Slack(r); b[i] >= 0 && s < b[i] || b[i] < 0 && s > b[i] {
						t.Errorf("%s at k = %v: %s slack %v beyond its bound %v", c.loop, x, r.Name, s, b[i])
					}
				}
			}
		}
	}
	// The certificates occur (near the stability boundaries); otherwise
	// this test would check nothing.
	if certified < 10 {
		t.Errorf("only %d values certified", certified)
	}
	t.Logf("%d values certified", certified)
}

// TestUnstableFails checks what solveExact assumes without measuring:
// every requirement kind with an exact construction fails (spec.CheckWith)
// at values where the closed loop is unstable, for a continuous and a
// discrete loop, at 20 values in each unstable piece of the range.
func TestUnstableFails(t *testing.T) {
	disc, err := tf.ParseDiscrete("0.1*(z+0.9)/((z-1)*(z-0.7))", 0.1)
	if err != nil {
		t.Fatal(err)
	}
	req := allNine(40, 6, 1.8, 0.3, 0.1, 20, 2, 10, 0.1)
	checked := 0
	for _, l := range []tf.TF{tf.MustParse(benchLoop), tf.MustParse("(s+0.5)/(s*(s+1)*(s+4)*(s^2+2*s+10))"), disc} {
		v, p := gainProblem(t, l, &Settings{Range: Range{0, 1e4}})
		var exact spec.Requirements
		for _, r := range req {
			if _, ok := p.exactCandidates(r); ok {
				exact = append(exact, r)
			}
		}
		xs := p.breakpoints(nil)
		for j := 0; j+1 < len(xs); j++ {
			if p.isStable(midpoint(xs[j], xs[j+1])) {
				continue
			}
			for _, x := range samplesIn(xs[j], xs[j+1], 20) {
				lx, _ := v.LoopAt(x)
				for _, r := range spec.CheckWith(lx, exact, nil).Results {
					checked++
					if r.Pass {
						t.Errorf("%v at %v (unstable): %s passes (%v)", l, x, r.Name, r.Value)
					}
				}
			}
		}
	}
	if checked < 100 {
		t.Errorf("only %d verdicts checked", checked)
	}
}

// gainProblem returns the gain of the loop l as the variable and the
// problem of a Solve with the settings set.
func gainProblem(t *testing.T, l tf.TF, set *Settings) (Variable, *problem) {
	t.Helper()
	v, err := Gain(l)
	if err != nil {
		t.Fatal(err)
	}
	p, err := newProblem(v, set)
	if err != nil {
		t.Fatal(err)
	}
	return v, p
}
