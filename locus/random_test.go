package locus

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// randomLoop draws a loop with 1 to 8 poles and up to 5 zeros (fixed seed
// stream): real and complex, some repeated, some on the boundary, some
// unstable; integer-valued parts make coincidences (repeated roots, common
// break points) frequent.
func randomLoop(rng *rand.Rand) (tf.TF, error) {
	draw := func(n int) []complex128 {
		var r []complex128
		for len(r) < n {
			re := float64(rng.IntN(9) - 6)
			if rng.IntN(3) == 0 || len(r) == n-1 {
				r = append(r, complex(re, 0))
				if rng.IntN(5) == 0 && len(r) < n {
					r = append(r, complex(re, 0)) // repeated
				}
				continue
			}
			im := float64(1 + rng.IntN(4))
			r = append(r, complex(re, im), complex(re, -im))
		}
		return r
	}
	poles := draw(1 + rng.IntN(8))
	zeros := draw(rng.IntN(6))
	if len(zeros) > len(poles)+1 {
		zeros = zeros[:len(poles)]
		if len(zeros) > 0 && imag(zeros[len(zeros)-1]) > 0 {
			zeros = zeros[:len(zeros)-1]
		}
	}
	return tf.FromZerosPolesGain(zeros, poles, 1)
}

// TestRandomLoops traces 150 random loops, half of them discrete, over
// random ranges: no panic,
// and every traced point satisfies the characteristic equation (relative
// backward error 1e-9, the documented bound); a failure must be one of the
// package's errors.
func TestRandomLoops(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	ranges := []Range{{}, {Min: math.Inf(-1), Max: 0}, {Min: -3, Max: 50}, {Min: math.Inf(-1), Max: math.Inf(1)}, {Min: 0.5, Max: math.Inf(1)}}
	failures := 0
	for i := range 150 {
		loop, err := randomLoop(rng)
		if err != nil {
			t.Fatal(err)
		}
		if i%2 == 1 {
			// A discrete loop: roots scaled by 1/7 into and around the
			// unit disc (sample period 0.1 s).
			if loop, err = tf.FromPolys(loop.Num().ScaleVariable(7), loop.Den().ScaleVariable(7), 0.1); err != nil {
				t.Fatal(err)
			}
		}
		rg := ranges[i%len(ranges)]
		set := &Settings{Range: rg}
		loc, err := Trace(loop, set)
		if err != nil {
			failures++
			t.Logf("loop %d %v range %v: %v", i, loop, rg, err)
			continue
		}
		r, _ := resolve(set)
		full, _ := newProblem(loop, r)
		p := full.moving() // the traced equation, shared roots divided out
		for _, br := range loc.Branches {
			eq := p
			if br.Index >= p.order {
				eq = full // a root shared by a and b: fixed, a root of both
			}
			for _, q := range br.Points {
				if math.IsInf(q.Value, 0) {
					continue
				}
				f, _ := eq.eval(q.S, q.Value)
				if e := cmplx.Abs(f) / eq.magnitude(q.S, q.Value); e > 1e-9 {
					t.Errorf("loop %d %v range %v: residual %g at %v", i, loop, rg, e, q)
					break
				}
			}
		}
	}
	if failures > 0 {
		t.Errorf("%d of 150 random traces failed", failures)
	}
}
