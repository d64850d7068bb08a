package closedloop

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// astromIntegral returns
//
//	I = (1/2πj)∮ B(s)·B(−s)/(A(s)·A(−s)) ds = ∫₀^∞ h(t)² dt,  h = B/A,
//
// for a stable A(s) = a₀sⁿ + … + aₙ and B(s) = b₁sⁿ⁻¹ + … + bₙ by Åström's
// algorithm: a Routh-like reduction of A and B,
//
//	αₖ = a₀ᵏ/a₁ᵏ,  βₖ = b₁ᵏ/a₁ᵏ,
//	aᵢᵏ⁻¹ = aᵢ₊₁ᵏ (i even),  aᵢ₊₁ᵏ − αₖ·aᵢ₊₂ᵏ (i odd),
//	bᵢᵏ⁻¹ = bᵢ₊₁ᵏ (i odd),   bᵢ₊₁ᵏ − βₖ·aᵢ₊₁ᵏ (i even),
//	I = Σₖ βₖ²/(2αₖ),
//
// (K. J. Åström, Introduction to Stochastic Control Theory, Academic Press
// 1970, ch. 5, the continuous-time algorithm for the integrals Iₙ; from
// memory). It shares nothing with the package's Lyapunov solve (no state
// space, no linear system), so agreement checks both.
func astromIntegral(a, b []float64) float64 {
	n := len(a) - 1
	a = append([]float64(nil), a...)
	// b is padded to n coefficients b₁…bₙ; index i ↦ b[i−1].
	bb := make([]float64, n)
	copy(bb[n-len(b):], b)
	I := 0.0
	for k := n; k >= 1; k-- {
		alpha, beta := a[0]/a[1], bb[0]/a[1]
		I += beta * beta / (2 * alpha)
		na := make([]float64, k)
		for i := 0; i < k; i++ {
			na[i] = a[i+1]
			if i%2 == 1 && i+2 <= k {
				na[i] -= alpha * a[i+2]
			}
		}
		nb := make([]float64, k-1)
		for i := 1; i <= k-1; i++ {
			nb[i-1] = bb[i]
			if i%2 == 0 {
				nb[i-1] -= beta * a[i+1]
			}
		}
		a, bb = na, nb
	}
	return I
}

// TestAstromTableEntries checks astromIntegral itself against the closed
// forms of the integral tables (James, Nichols & Phillips, Theory of
// Servomechanisms, 1947, and Newton, Gould & Kaiser, Analytical Design of
// Linear Feedback Controls, 1957, appendix table of Iₙ; from memory):
//
//	I₁ = b₁²/(2a₀a₁)
//	I₂ = (b₁²a₂ + b₂²a₀)/(2a₀a₁a₂)
//	I₃ = (b₁²a₂a₃ + (b₂² − 2b₁b₃)a₀a₃ + b₃²a₀a₁)/(2a₀a₃(a₁a₂ − a₀a₃))
//
// written here with A = a₀s³ + a₁s² + a₂s + a₃, B = b₁s² + b₂s + b₃.
func TestAstromTableEntries(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for range 200 {
		a0, a1, a2, a3 := 0.5+rng.Float64(), 0.5+rng.Float64(), 0.5+rng.Float64(), 0.1+rng.Float64()
		if a1*a2 <= a0*a3 { // Routh–Hurwitz for a cubic
			continue
		}
		b1, b2, b3 := rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()
		for _, c := range []struct {
			name      string
			got, want float64
		}{
			{"I1", astromIntegral([]float64{a0, a1}, []float64{b1}), b1 * b1 / (2 * a0 * a1)},
			{"I2", astromIntegral([]float64{a0, a1, a2}, []float64{b1, b2}), (b1*b1*a2 + b2*b2*a0) / (2 * a0 * a1 * a2)},
			{"I3", astromIntegral([]float64{a0, a1, a2, a3}, []float64{b1, b2, b3}),
				(b1*b1*a2*a3 + (b2*b2-2*b1*b3)*a0*a3 + b3*b3*a0*a1) / (2 * a0 * a3 * (a1*a2 - a0*a3))},
		} {
			if rel(c.got, c.want) > 1e-12 {
				t.Fatalf("%s: Åström %.17g, table %.17g", c.name, c.got, c.want)
			}
		}
	}
}

// TestISEPublishedExamples checks the ISE of the package (a Lyapunov
// equation on the realisation) against published worked values and
// against Åström's algorithm.
//
//   - The standard second-order loop L = ωₙ²/(s(s + 2ζωₙ)) under a unit
//     reference step: E(s) = (s + 2ζωₙ)/(s² + 2ζωₙs + ωₙ²), and I₂ gives
//     ISE = (1 + 4ζ²)/(4ζωₙ), least at ζ = 0.5 where it is 1/ωₙ (the
//     ISE-optimal damping ratio one half: Newton, Gould & Kaiser 1957,
//     ch. 7; from memory). With ωₙ = 1: 1 at ζ = 0.5, 1.25 at ζ = 1 and at
//     ζ = 0.25; with ωₙ = 4, ζ = 0.5: 0.25.
//   - The third-order loop L = K/(s(s + 1)(s + 2)), K = 1 (a scenario of
//     this project's own, through the published table): E(s) =
//     (s² + 3s + 2)/(s³ + 3s² + 2s + 1); I₃ with a = (1, 3, 2, 1),
//     b = (1, 3, 2) gives (1·2·1 + (9 − 4)·1·1 + 4·3·1)/(2·1·1·(3·2 − 1))
//     = 19/10; testdata/gen_ise_examples.py confirms 1.9 to 50 digits
//     (mpmath quad of the partial-fraction response).
//
// Tolerance 1e-12 relative: the Lyapunov solve of an order-3 system in
// double precision is accurate to a few units of 1e-15 times its condition
// (about 10 here).
func TestISEPublishedExamples(t *testing.T) {
	for _, c := range []struct {
		name  string
		plant tf.TF
		want  float64
	}{
		{"ζ = 0.5, ωn = 1", tf.MustNew([]float64{1}, []float64{1, 1, 0}), 1},
		{"ζ = 1, ωn = 1", tf.MustNew([]float64{1}, []float64{1, 2, 0}), 1.25},
		{"ζ = 0.25, ωn = 1", tf.MustNew([]float64{1}, []float64{1, 0.5, 0}), 1.25},
		{"ζ = 0.5, ωn = 4", tf.MustNew([]float64{16}, []float64{1, 4, 0}), 0.25},
		{"K/(s(s+1)(s+2)), K = 1", tf.MustNew([]float64{1}, []float64{1, 3, 2, 0}), 1.9},
	} {
		fs, err := Of(Loop{Plant: c.plant, Controller: tf.MustNew([]float64{1}, []float64{1})}, nil)
		if err != nil {
			t.Fatal(err)
		}
		ic, err := fs.ErrorIntegrals(Reference)
		if err != nil {
			t.Fatal(err)
		}
		// Åström's algorithm on E(s)/s: with unity feedback and C = 1,
		// E = D_G/P, and D_G = s·D₀ (type-1 plant), so the error's step
		// response is the impulse response of D₀/P, P = D_G + N_G.
		dg := c.plant.Den().Coeffs()
		if dg[len(dg)-1] != 0 {
			t.Fatalf("%s: plant is not type 1", c.name)
		}
		P := fs.CharacteristicPolynomial().Coeffs()
		ast := astromIntegral(P, dg[:len(dg)-1])
		t.Logf("%s: ISE Lyapunov %.17g, Åström %.17g, published %v", c.name, ic.IntegratedSquaredError, ast, c.want)
		if rel(ic.IntegratedSquaredError, c.want) > 1e-12 {
			t.Errorf("%s: ISE %.17g, want %v", c.name, ic.IntegratedSquaredError, c.want)
		}
		if rel(ast, c.want) > 1e-12 {
			t.Errorf("%s: Åström's algorithm %.17g, want %v", c.name, ast, c.want)
		}
		if math.IsInf(ic.IntegratedAbsoluteError, 0) {
			t.Errorf("%s: IAE infinite for a type-1 loop", c.name)
		}
	}
}

// TestISEAstromVersusLyapunov compares the package's ISE with Åström's
// algorithm on the load-disturbance response of random stable PI loops of
// orders 2 to 7 (seeded): two methods with nothing in common.
func TestISEAstromVersusLyapunov(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 3))
	checked := 0
	for range 60 {
		n := 1 + rng.IntN(5)
		den := poly.MustNew(1)
		for range n {
			den = den.Mul(poly.MustNew(1, 0.3+3*rng.Float64()))
		}
		plant, _ := tf.FromPolys(poly.MustNew(1+rng.Float64()), den, 0)
		kp, ki := 0.2+rng.Float64(), 0.05+0.3*rng.Float64()
		fs, err := Of(Loop{Plant: plant, Controller: tf.MustNew([]float64{kp, ki}, []float64{1, 0})}, nil)
		if err != nil {
			t.Fatal(err)
		}
		if !fs.InternallyStable {
			continue
		}
		d, err := fs.StepDeviation(LoadDisturbance, ProcessOutput, nil)
		if err != nil {
			t.Fatal(err)
		}
		// d → y = N_G·D_C/P with D_C = s: its step response is the impulse
		// response of N_G/P (the factor s of D_C cancels 1/s exactly).
		P := fs.CharacteristicPolynomial()
		ast := astromIntegral(P.Coeffs(), plant.Num().Coeffs())
		if rel(d.IntegratedSquaredError, ast) > 1e-10 {
			t.Errorf("order %d: ISE Lyapunov %.17g, Åström %.17g", n+1, d.IntegratedSquaredError, ast)
		}
		checked++
	}
	if checked < 30 {
		t.Fatalf("only %d stable loops checked", checked)
	}
}
