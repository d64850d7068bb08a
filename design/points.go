package design

import (
	"math"

	"github.com/loopwise/loopwise/internal/statespace"
	"github.com/loopwise/loopwise/tf"
)

// closedLoop is the closed loop at one value of the variable with what the
// direct step-metric constructions of jump.go need, computed once per value
// and cached: the final value, the half period π/ω_d of the least damped
// oscillating pole pair and the realisation of package response
// (statespace.FromTransferFunction, the scaled controllable companion
// form), from which the unit-step response y and its derivative y′ (the
// impulse response) are evaluated exactly, as response.Step and
// response.Impulse evaluate them, without realising the loop and finding
// its poles again for every time.
type closedLoop struct {
	cl          tf.TF
	final, half float64
	m           statespace.Model
}

// closedAt returns the closed loop at x (cached), and false when it has no
// finite non-zero final value or no oscillating pole pair.
func (p *problem) closedAt(x float64) (*closedLoop, bool) {
	if c, ok := p.closed[x]; ok {
		return c, c != nil
	}
	c := p.newClosedLoop(x)
	p.closed[x] = c
	return c, c != nil
}

func (p *problem) newClosedLoop(x float64) *closedLoop {
	l, err := p.v.LoopAt(x)
	if err != nil {
		return nil
	}
	cl, err := l.ClosedLoop()
	if err != nil || cl.IsDiscrete() || cl.DelaySec() != 0 || !cl.IsProper() {
		return nil
	}
	final, err := cl.StaticGain()
	if err != nil || final == 0 || math.IsNaN(final) || math.IsInf(final, 0) {
		return nil
	}
	poles, err := cl.Poles()
	if err != nil {
		return nil
	}
	best, half := math.Inf(-1), 0.0
	for _, q := range poles {
		if imag(q) > 0 && real(q) > best {
			best, half = real(q), math.Pi/imag(q)
		}
	}
	if !(half > 0) {
		return nil
	}
	m, err := statespace.FromTransferFunction(cl.Num().Coeffs(), cl.Den().Coeffs())
	if err != nil || m.Order() == 0 {
		return nil
	}
	return &closedLoop{cl: cl, final: final, half: half, m: m}
}

// at returns y(t) and y′(t) for t > 0 from one zero-order-hold transition
// from rest over [0, t] (Van Loan 1978, statespace.ZeroOrderHold): the
// state of the unit step is Γ(t), so y = C·Γ + D, and the impulse response
// is y′ = C·Φ(t)·B. NaN when the transition cannot be computed.
func (c *closedLoop) at(t float64) (y, dy float64) {
	phi, gamma, err := c.m.ZeroOrderHold(t)
	if err != nil {
		return math.NaN(), math.NaN()
	}
	n := c.m.Order()
	y = c.m.D
	for i, g := range gamma {
		y += c.m.C[i] * g
	}
	for i := 0; i < n; i++ {
		s := 0.0
		for j := 0; j < n; j++ {
			s += phi.At(i, j) * c.m.B[j]
		}
		dy += c.m.C[i] * s
	}
	return y, dy
}

func (c *closedLoop) y(t float64) float64  { y, _ := c.at(t); return y }
func (c *closedLoop) dy(t float64) float64 { _, d := c.at(t); return d }

// samples are y and y′ on the grid t_k = k·h, k = 0…n.
type samples struct{ t, y, dy []float64 }

// grid returns y and y′ on the grid k·h, k = 0…n, from one zero-order-hold
// transition Φ(h), Γ(h): the step state advances as x ← Φ·x + Γ from rest,
// the impulse state as w ← Φ·w from B (the recursions of response.Step and
// response.Impulse, sharing one matrix exponential). False when the
// transition cannot be computed or a value is not finite.
func (c *closedLoop) grid(h float64, n int) (samples, bool) {
	phiM, gamma, err := c.m.ZeroOrderHold(h)
	if err != nil || n < 1 {
		return samples{}, false
	}
	N := c.m.Order()
	phi := phiM.RawMatrix()
	s := samples{t: make([]float64, n+1), y: make([]float64, n+1), dy: make([]float64, n+1)}
	x, w := make([]float64, N), append([]float64(nil), c.m.B...)
	nx, nw := make([]float64, N), make([]float64, N)
	C := c.m.C
	for k := 0; k <= n; k++ {
		s.t[k] = float64(k) * h
		y, d := c.m.D, 0.0
		for i := 0; i < N; i++ {
			y += C[i] * x[i]
			d += C[i] * w[i]
		}
		if math.IsNaN(y) || math.IsInf(y, 0) || math.IsNaN(d) || math.IsInf(d, 0) {
			return samples{}, false
		}
		s.y[k], s.dy[k] = y, d
		if k == n {
			break
		}
		for i := 0; i < N; i++ {
			row := phi.Data[i*phi.Stride : i*phi.Stride+N]
			sx, sw := gamma[i], 0.0
			for j, v := range row {
				sx += v * x[j]
				sw += v * w[j]
			}
			nx[i], nw[i] = sx, sw
		}
		x, nx = nx, x
		w, nw = nw, w
	}
	return s, true
}
