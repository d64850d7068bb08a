package tf_test

import (
	"fmt"
	"log"

	"gonum.org/v1/gonum/mat"

	"github.com/loopwise/loopwise/tf"
)

// A conveyor drive modelled as a motor lag with transport delay, closed
// with a proportional gain: the text form, the Padé approximation of the
// delay, the closed loop, and the zero-order-hold equivalent for a 10 ms
// control period (the 20 ms delay is two whole periods: two poles at z = 0).
func Example() {
	plant, err := tf.Parse("4/((0.5s+1)(0.05s+1))*exp(-0.02s)")
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("plant:", plant)

	k, err := plant.StaticGain()
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("static gain: %.4g\n", k)

	rational, err := plant.Pade(2) // e^(−0.02s) ≈ 2nd-order Padé
	if err != nil {
		log.Fatal(err)
	}
	loop, err := rational.Scale(1.5)
	if err != nil {
		log.Fatal(err)
	}
	closed, err := loop.ClosedLoop()
	if err != nil {
		log.Fatal(err)
	}
	t0, _ := closed.StaticGain()
	fmt.Printf("closed loop: order %d, static gain %.4g\n", closed.Den().Degree(), t0)

	discrete, err := plant.Discretize(0.01, tf.ZeroOrderHold, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("sampled plant: num %.4g\n", discrete.Num().Coeffs())
	fmt.Printf("               den %.4g\n", discrete.Den().Coeffs())
	// Output:
	// plant: (4)/(0.025*s^2 + 0.55*s + 1)*exp(-0.02*s)
	// static gain: 4
	// closed loop: order 4, static gain 0.8571
	// sampled plant: num [0.007442 0.006916]
	//                den [1 -1.799 0.8025 0 0]
}

// The text form and its round trip.
func ExampleParse() {
	g, err := tf.Parse("10(s+1)/(s(s+5)^2)")
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(g)
	zeros, _ := g.Zeros()
	fmt.Printf("zeros %.4g, relative degree %d\n", zeros, g.RelativeDegree())
	back, _ := tf.Parse(g.String())
	fmt.Println("round trip equal:", back.EqualApprox(g, 0))
	_, err = tf.Parse("10(s+1)/(s(s+5)^2")
	fmt.Println(err)
	// Output:
	// (10*s + 10)/(s^3 + 10*s^2 + 25*s)
	// zeros [(-1+0i)], relative degree 2
	// round trip equal: true
	// tf: cannot parse "10(s+1)/(s(s+5)^2" at column 18: unexpected end of text; expected ')' to close the '(' at column 9
}

// Cancelling a pole–zero pair left over from a controller design.
func ExampleTF_Minimal() {
	g := tf.MustParse("(s+2)(s+0.5)/((s+0.5)(s+1)(s+4))")
	m, cancelled, err := g.Minimal(0)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("%v, cancelled %.4g\n", m, cancelled)
	// Output:
	// (s + 2)/(s^2 + 5*s + 4), cancelled [(-0.5+0i)]
}

// Tustin with pre-warping at the crossover of a lead compensator.
func ExampleTF_Discretize() {
	lead := tf.MustParse("(s+1)/(0.1s+1)")
	d, err := lead.Discretize(0.05, tf.Tustin, &tf.DiscretizeSettings{PrewarpRadPerSec: 3})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("num %.5g\nden %.5g\n", d.Num().Coeffs(), d.Den().Coeffs())
	// Output:
	// num [8.1973 -7.7967]
	// den [1 -0.5994]
}

// A test-stand axis written as state equations: a 2 kg carriage on a
// 50 N/m spring with 0.6 N·s/m damping, force in, position out.
func ExampleFromStateSpace() {
	a := mat.NewDense(2, 2, []float64{0, 1, -25, -0.3})
	b := mat.NewDense(2, 1, []float64{0, 0.5})
	c := mat.NewDense(1, 2, []float64{1, 0})
	d := mat.NewDense(1, 1, []float64{0})
	g, err := tf.FromStateSpace(a, b, c, d)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("num %.4g\nden %.4g\n", g.Num().Coeffs(), g.Den().Coeffs())
	// Output:
	// num [0.5]
	// den [1 0.3 25]
}

// The second-order Padé approximant of a 0.1 s transport delay.
func ExamplePadeDelay() {
	p, err := tf.PadeDelay(0.1, 2)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(p)
	// Output:
	// (0.0008333333333333335*s^2 - 0.05*s + 1)/(0.0008333333333333335*s^2 + 0.05*s + 1)
}

// ExamplePID shows a controller in the time-constant form, its transfer
// function and its parallel form.
func ExamplePID() {
	p := tf.PID{Gain: 2, IntegralTimeSec: 0.5, DerivativeTimeSec: 0.05, DerivativeFilter: 10}
	c, err := p.TF()
	if err != nil {
		log.Fatal(err)
	}
	q, _ := p.Parallel()
	fmt.Println(p)
	fmt.Println(c)
	fmt.Println(q)
	// Output:
	// PID: gain 2, integral time 0.5 s, derivative time 0.05 s, derivative filter 10
	// (0.11*s^2 + 2.02*s + 4)/(0.005*s^2 + s)
	// parallel PID: proportional gain 2, integral gain 4 1/s, derivative gain 0.1 s, filter time 0.005 s
}
