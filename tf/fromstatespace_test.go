package tf

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// companion returns the controllable canonical form of num/den with monic
// den (Kailath, Linear Systems, 1980, §2.1; the textbook realisation), an
// independent construction to feed FromStateSpace.
func companion(num, den []float64) (a, b, c, d *mat.Dense) {
	n := len(den) - 1
	a = mat.NewDense(n, n, nil)
	for j := 0; j < n; j++ {
		a.Set(0, j, -den[j+1])
	}
	for i := 1; i < n; i++ {
		a.Set(i, i-1, 1)
	}
	b = mat.NewDense(n, 1, nil)
	b.Set(0, 0, 1)
	pad := make([]float64, n+1)
	copy(pad[n+1-len(num):], num)
	dv := pad[0]
	c = mat.NewDense(1, n, nil)
	for j := 0; j < n; j++ {
		c.Set(0, j, pad[j+1]-dv*den[j+1])
	}
	d = mat.NewDense(1, 1, []float64{dv})
	return a, b, c, d
}

func TestFromStateSpace(t *testing.T) {
	tests := []struct {
		name     string
		num, den []float64
	}{
		{"first order", []float64{2}, []float64{1, 3}},
		{"relative degree 3", []float64{10}, []float64{1, 6, 11, 6}},
		{"zeros", []float64{1, 3, 2}, []float64{1, 2, 6, 10, 4}},
		{"biproper", []float64{2, 1, 5}, []float64{1, 3, 7}},
		{"integrators", []float64{1, 1}, []float64{1, 5, 0, 0}},
		{"non-minimum phase", []float64{-1, 1}, []float64{1, 2.5, 1}},
	}
	rng := rand.New(rand.NewPCG(1, 1))
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			a, b, c, d := companion(test.num, test.den)
			want := MustNew(test.num, test.den)
			got, err := FromStateSpace(a, b, c, d)
			if err != nil {
				t.Fatal(err)
			}
			// 1e-12: eigenvalues backward stable, products of n of them.
			if !got.EqualApprox(want, 1e-12) {
				t.Errorf("companion: got %v, want %v", got, want)
			}
			if got.RelativeDegree() != want.RelativeDegree() {
				t.Errorf("relative degree %d, want %d (num %v)", got.RelativeDegree(), want.RelativeDegree(), got.Num().Coeffs())
			}
			// A similarity transform x = Pξ leaves the transfer function
			// unchanged: (P⁻¹AP, P⁻¹B, CP, D). Random P, fixed seed.
			n, _ := a.Dims()
			for trial := 0; trial < 3; trial++ {
				p := mat.NewDense(n, n, nil)
				for i := 0; i < n; i++ {
					for j := 0; j < n; j++ {
						p.Set(i, j, rng.NormFloat64())
					}
					p.Set(i, i, p.At(i, i)+3)
				}
				var pi mat.Dense
				if err := pi.Inverse(p); err != nil {
					t.Fatal(err)
				}
				var a2, tmp, b2, c2 mat.Dense
				tmp.Mul(&pi, a)
				a2.Mul(&tmp, p)
				b2.Mul(&pi, b)
				c2.Mul(c, p)
				got, err := FromStateSpace(&a2, &b2, &c2, d)
				if err != nil {
					t.Fatal(err)
				}
				// The transform adds cond(P)·ε of rounding.
				if !got.EqualApprox(want, 1e-10) {
					t.Errorf("similar realisation: got %v, want %v", got, want)
				}
				if got.RelativeDegree() != want.RelativeDegree() {
					t.Errorf("similar realisation: relative degree %d, want %d (num %v)", got.RelativeDegree(), want.RelativeDegree(), got.Num().Coeffs())
				}
			}
		})
	}
}

// TestFromStateSpaceMassSpring checks a physical model written by hand: a
// mass m on a spring k with damper c, force input, position output, has
// G(s) = 1/(m s² + c s + k) (Ogata, Modern Control Engineering, 5th ed.,
// Ch. 2, mechanical systems; from memory; it follows from m ẍ + c ẋ + k x = u).
func TestFromStateSpaceMassSpring(t *testing.T) {
	const m, c, k = 2.0, 0.6, 50.0
	a := mat.NewDense(2, 2, []float64{0, 1, -k / m, -c / m})
	b := mat.NewDense(2, 1, []float64{0, 1 / m})
	cm := mat.NewDense(1, 2, []float64{1, 0})
	d := mat.NewDense(1, 1, []float64{0})
	g, err := FromStateSpace(a, b, cm, d)
	if err != nil {
		t.Fatal(err)
	}
	if want := MustNew([]float64{1}, []float64{m, c, k}); !g.EqualApprox(want, 1e-14) || g.RelativeDegree() != 2 {
		t.Errorf("got %v, want %v", g, want)
	}
	// Velocity output: s/(m s² + c s + k).
	cm = mat.NewDense(1, 2, []float64{0, 1})
	g, err = FromStateSpace(a, b, cm, d)
	if err != nil {
		t.Fatal(err)
	}
	if want := MustNew([]float64{1, 0}, []float64{m, c, k}); !g.EqualApprox(want, 1e-14) {
		t.Errorf("velocity: got %v, want %v", g, want)
	}
}

func TestFromStateSpaceErrors(t *testing.T) {
	a := mat.NewDense(2, 2, []float64{0, 1, -2, -3})
	b := mat.NewDense(2, 1, []float64{0, 1})
	c := mat.NewDense(1, 2, []float64{1, 0})
	d := mat.NewDense(1, 1, []float64{0})
	nan := mat.NewDense(2, 2, []float64{0, 1, math.NaN(), -3})
	tests := []struct {
		name       string
		a, b, c, d mat.Matrix
		want       error
	}{
		{"nil A", nil, b, c, d, ErrShape},
		{"non-square A", mat.NewDense(2, 3, nil), b, c, d, ErrShape},
		{"B rows", a, mat.NewDense(3, 1, nil), c, d, ErrShape},
		{"B columns (two inputs)", a, mat.NewDense(2, 2, nil), c, d, ErrShape},
		{"C rows (two outputs)", a, b, mat.NewDense(2, 2, nil), d, ErrShape},
		{"D shape", a, b, c, mat.NewDense(1, 2, nil), ErrShape},
		{"NaN in A", nan, b, c, d, ErrNotFinite},
		{"Inf in D", a, b, c, mat.NewDense(1, 1, []float64{math.Inf(1)}), ErrNotFinite},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			if _, err := FromStateSpace(test.a, test.b, test.c, test.d); !errors.Is(err, test.want) {
				t.Errorf("got %v, want %v", err, test.want)
			}
		})
	}
	// B = 0: the zero transfer function over det(sI − A).
	g, err := FromStateSpace(a, mat.NewDense(2, 1, nil), c, d)
	if err != nil || !g.IsZero() || g.Den().Degree() != 2 {
		t.Errorf("zero input vector: %v, %v", g, err)
	}
}
