package main

// TEMPORARY: stands in for locus.FromParameter until it lands; removed then.

import (
	"fmt"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

type parametric struct {
	Name string
	A, B poly.Poly
	Loop tf.TF
}

func fromParameter(name string, f func(float64) (tf.TF, error)) (parametric, error) {
	c := func(p float64) (poly.Poly, float64, error) {
		l, err := f(p)
		if err != nil {
			return poly.Poly{}, 0, err
		}
		l, err = l.Pade(padeOrder)
		if err != nil {
			return poly.Poly{}, 0, err
		}
		return l.CharacteristicPolynomial(), l.SampleTimeSec(), nil
	}
	c0, ts, err := c(0)
	if err != nil {
		return parametric{}, err
	}
	c1, _, err := c(1)
	if err != nil {
		return parametric{}, err
	}
	c2, _, err := c(2)
	if err != nil {
		return parametric{}, err
	}
	b := c1.Add(c0.Neg())
	if !c2.Add(c0.Neg()).EqualApprox(b.Add(b), 1e-12) {
		return parametric{}, fmt.Errorf("the characteristic polynomial is not of the form a + %s·b", name)
	}
	loop, err := tf.FromPolys(b, c0, ts)
	return parametric{Name: name, A: c0, B: b, Loop: loop}, err
}
