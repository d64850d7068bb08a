package robust

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/mat"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// Distribution is how a parameter is drawn by MonteCarlo. It does not
// affect the guaranteed verdicts, which hold for every value in the range.
type Distribution int

const (
	// Uniform draws every value of the range with equal density.
	Uniform Distribution = iota
	// Normal draws from a normal distribution centred on the middle of the
	// range and truncated to it (rejection sampling); its standard deviation
	// is Param.Sigma, or a sixth of the range if zero.
	Normal
)

// String returns "uniform" or "normal".
func (d Distribution) String() string {
	switch d {
	case Uniform:
		return "uniform"
	case Normal:
		return "normal"
	}
	return fmt.Sprintf("Distribution(%d)", int(d))
}

// ParseDistribution reads "uniform" (or "") and "normal".
func ParseDistribution(text string) (Distribution, error) {
	switch strings.ToLower(strings.TrimSpace(text)) {
	case "", "uniform":
		return Uniform, nil
	case "normal":
		return Normal, nil
	}
	return 0, fmt.Errorf("%w: distribution %q (want \"uniform\" or \"normal\")", ErrParam, text)
}

// Param is one uncertain parameter: a name used in the loop's expressions and
// the closed range [Min, Max] of its values.
type Param struct {
	// Name is the identifier used in the expressions (a letter or '_'
	// followed by letters, digits or '_'; not s, z or exp).
	Name string
	// Min and Max bound the range; Min = Max fixes the parameter.
	Min, Max float64
	// Distribution is used by MonteCarlo only.
	Distribution Distribution
	// Sigma is the standard deviation of a Normal distribution, in the
	// parameter's unit; if zero, defaults to (Max − Min)/6.
	Sigma float64
}

// Mid returns the middle of the range.
func (p Param) Mid() float64 { return p.Min + (p.Max-p.Min)/2 }

// Description is an uncertain loop as text: the loop transfer function L is
// the product of the expressions (plant, controller, sensor, delay …, in any
// order), in which the parameters appear by name.
type Description struct {
	// Expressions are multiplied in series to give L, for example
	// {"9*g/(s^2 (m s + 1))", "(1 + 0.2 s)/(1 + 0.02 s)"}.
	Expressions []string
	// Params are the uncertain parameters.
	Params []Param
	// SampleTimeSec is 0 for a continuous loop in s, or the sample period
	// of a discrete loop in z.
	SampleTimeSec float64
	// Discretize, if not nil, converts the loop, written in s
	// (SampleTimeSec 0), to z as a whole; see Discretization.
	Discretize *Discretization
}

// Discretization is the conversion of a loop written in s to z. Only the
// Tustin (bilinear) method is supported: it substitutes
// s = c·(z − 1)/(z + 1) and multiplies by (z + 1)ⁿ, a fixed linear map of
// the coefficients, so the discrete coefficients stay polynomial in the
// parameters — of the same class (interval families become affine) — and
// the guaranteed methods apply to them exactly. The holds and the matched
// pole-zero map form e^(p·T) of parameter-dependent poles, which is not
// polynomial in the parameters; NewLoop refuses them (ErrUnsupported)
// rather than prove something about an approximation.
type Discretization struct {
	// SampleTimeSec is the sample period, > 0.
	SampleTimeSec float64
	// Method must be tf.Tustin.
	Method tf.DiscretizeMethod
	// PrewarpRadPerSec is the Tustin pre-warping frequency (see
	// tf.DiscretizeSettings); 0 for none (c = 2/T).
	PrewarpRadPerSec float64
}

// MaxDegreePerParam is the largest degree in any one parameter that the
// coefficient recovery accepts.
const MaxDegreePerParam = 8

// Class is the kind of dependence of the closed-loop characteristic
// polynomial's coefficients on the parameters; it selects the proof method.
type Class int

const (
	// Interval: each coefficient is affine in parameters that appear in no
	// other coefficient, so the family is an interval polynomial.
	Interval Class = iota
	// Affine: each coefficient is affine in the parameters (a polytope of
	// polynomials).
	Affine
	// Multilinear: affine in each parameter separately.
	Multilinear
	// Polynomial: any polynomial dependence.
	Polynomial
	// WithDelay: the loop has dead time (the characteristic function is a
	// quasi-polynomial).
	WithDelay
)

// String names the class in words.
func (c Class) String() string {
	switch c {
	case Interval:
		return "independent interval coefficients"
	case Affine:
		return "affine"
	case Multilinear:
		return "multilinear"
	case Polynomial:
		return "polynomial"
	case WithDelay:
		return "with dead time"
	}
	return fmt.Sprintf("Class(%d)", int(c))
}

// Loop is an uncertain loop: its description and the exact dependence of its
// coefficients on the parameters. A Loop is immutable and safe for concurrent
// use.
//
// The dependence is recovered by exact interpolation: the coefficients of
// N and D (as tf.ParseWith returns them, highest power first, no
// normalisation) are polynomials in the parameters, so the degree in each
// parameter is found by fitting at Chebyshev points of growing number until
// two further points agree, the tensor-product interpolant on the Chebyshev
// grid of those degrees gives every coefficient as a polynomial in the
// scaled parameters t_i ∈ [−1, 1], and the result is verified against the
// parser at VerifyPoints further points to 1e-9 of each coefficient's scale.
// Terms below 1e-11 of that scale are taken as exactly zero (interpolation
// rounding), which makes the classification exact.
type Loop struct {
	desc   Description
	mid    []float64
	rad    []float64
	num    []mpoly // ascending powers
	den    []mpoly
	tau    mpoly
	nomial tf.TF
	class  Class
	// ts is the sample period of the analysed loop: SampleTimeSec, or that
	// of Discretize; 0 when continuous.
	ts float64
	// inS is set while the coefficients of a loop to be discretized are
	// recovered: At then returns the loop in s.
	inS bool
}

// VerifyPoints is the number of points, besides the interpolation grid, at
// which the recovered coefficients are checked against the parser.
const VerifyPoints = 4

// NewLoop reads an uncertain loop. Errors wrap ErrParam (bad or unused
// parameter, reversed range), ErrExpression (unreadable text, coefficients
// not polynomial in the parameters) and ErrUnsupported.
func NewLoop(d Description) (*Loop, error) {
	if len(d.Expressions) == 0 {
		return nil, fmt.Errorf("%w: no expression", ErrExpression)
	}
	if math.IsNaN(d.SampleTimeSec) || math.IsInf(d.SampleTimeSec, 0) || d.SampleTimeSec < 0 {
		return nil, fmt.Errorf("%w: sample time %v s must be finite and ≥ 0", ErrSettings, d.SampleTimeSec)
	}
	l := &Loop{desc: Description{Expressions: append([]string(nil), d.Expressions...), Params: append([]Param(nil), d.Params...), SampleTimeSec: d.SampleTimeSec}, ts: d.SampleTimeSec}
	if dz := d.Discretize; dz != nil {
		if err := dz.check(d.SampleTimeSec); err != nil {
			return nil, err
		}
		c := *dz
		l.desc.Discretize, l.ts = &c, c.SampleTimeSec
	}
	seen := map[string]bool{}
	for _, p := range d.Params {
		switch {
		case p.Name == "":
			return nil, fmt.Errorf("%w: empty name", ErrParam)
		case seen[p.Name]:
			return nil, fmt.Errorf("%w: %q given twice", ErrParam, p.Name)
		case math.IsNaN(p.Min) || math.IsNaN(p.Max) || math.IsInf(p.Min, 0) || math.IsInf(p.Max, 0):
			return nil, fmt.Errorf("%w: %q has range [%v, %v]; bounds must be finite", ErrParam, p.Name, p.Min, p.Max)
		case p.Min > p.Max:
			return nil, fmt.Errorf("%w: %q has a reversed range [%v, %v] (Min > Max)", ErrParam, p.Name, p.Min, p.Max)
		case p.Distribution != Uniform && p.Distribution != Normal:
			return nil, fmt.Errorf("%w: %q has an unknown distribution %v", ErrParam, p.Name, p.Distribution)
		case p.Sigma < 0 || math.IsNaN(p.Sigma) || math.IsInf(p.Sigma, 0):
			return nil, fmt.Errorf("%w: %q has sigma %v; want finite and ≥ 0", ErrParam, p.Name, p.Sigma)
		}
		seen[p.Name] = true
		l.mid = append(l.mid, p.Mid())
		l.rad = append(l.rad, (p.Max-p.Min)/2)
	}
	nom, err := l.At(l.mid)
	if err != nil {
		return nil, err
	}
	l.nomial = nom
	l.inS = l.desc.Discretize != nil
	err = l.recover()
	l.inS = false
	if err != nil {
		return nil, err
	}
	if l.desc.Discretize != nil {
		if !l.tau.isZero() {
			return nil, fmt.Errorf("%w: dead time in a loop converted by Discretize; write the delay as a power of z in a loop in z", ErrUnsupported)
		}
		l.num, l.den = l.desc.Discretize.mapped(l.num, l.den, len(l.mid))
	}
	if err := l.classify(); err != nil {
		return nil, err
	}
	return l, nil
}

func (dz *Discretization) check(sampleTime float64) error {
	T := dz.SampleTimeSec
	switch {
	case sampleTime != 0:
		return fmt.Errorf("%w: Discretize converts a loop written in s; SampleTimeSec must be 0, not %v s", ErrSettings, sampleTime)
	case math.IsNaN(T) || math.IsInf(T, 0) || T <= 0:
		return fmt.Errorf("%w: Discretize.SampleTimeSec %v s must be finite and > 0", ErrSettings, T)
	case dz.Method != tf.Tustin:
		return fmt.Errorf("%w: Discretize method %v: its discrete coefficients are exponentials e^(p·T) of parameter-dependent poles, not polynomials in the parameters, which the guaranteed methods need; use the Tustin method, or write the loop in z", ErrUnsupported, dz.Method)
	case dz.PrewarpRadPerSec < 0 || math.IsNaN(dz.PrewarpRadPerSec) || dz.PrewarpRadPerSec*T >= math.Pi:
		return fmt.Errorf("%w: Discretize.PrewarpRadPerSec %v rad/s must be in [0, π/T)", ErrSettings, dz.PrewarpRadPerSec)
	}
	return nil
}

// mapped applies the Tustin substitution to the coefficient polynomials
// (ascending powers of s) of numerator and denominator with one order
// n = max degree: Σ a_k s^k ↦ Σ a_k c^k (z − 1)^k (z + 1)^(n−k), the map of
// tf.Discretize up to its normalisation by a constant.
func (dz *Discretization) mapped(num, den []mpoly, nparams int) (dnum, dden []mpoly) {
	T := dz.SampleTimeSec
	c := 2 / T
	if w0 := dz.PrewarpRadPerSec; w0 != 0 {
		c = w0 / math.Tan(w0*T/2)
	}
	n := max(degree(num), degree(den), 0)
	// basis[k] = c^k (z − 1)^k (z + 1)^(n−k), ascending in z.
	basis := make([]poly.Poly, n+1)
	for k := range basis {
		b := poly.Constant(math.Pow(c, float64(k)))
		for range k {
			b = b.Mul(poly.MustNew(1, -1))
		}
		for range n - k {
			b = b.Mul(poly.MustNew(1, 1))
		}
		basis[k] = b
	}
	m := func(ps []mpoly) []mpoly {
		out := make([]mpoly, n+1)
		for j := range out {
			w := make([]float64, len(ps))
			for k := range ps {
				if k <= n {
					w[k] = basis[k].Coef(j)
				}
			}
			out[j] = combine(ps, w, nparams)
		}
		return out
	}
	return m(num), m(den)
}

// Description returns the loop's description.
func (l *Loop) Description() Description {
	d := l.desc
	d.Expressions = append([]string(nil), d.Expressions...)
	d.Params = append([]Param(nil), d.Params...)
	if d.Discretize != nil {
		c := *d.Discretize
		d.Discretize = &c
	}
	return d
}

// Params returns the parameters.
func (l *Loop) Params() []Param { return append([]Param(nil), l.desc.Params...) }

// Nominal returns the loop at the middle of every range.
func (l *Loop) Nominal() tf.TF { return l.nomial }

// Class returns the kind of dependence of the characteristic polynomial on
// the parameters.
func (l *Loop) Class() Class { return l.class }

// At returns the loop transfer function at the given parameter values (in
// the order of Params), read by tf.ParseWith and, with
// Description.Discretize, converted to z by tf.Discretize. Values outside
// the ranges are allowed.
func (l *Loop) At(values []float64) (tf.TF, error) {
	if len(values) != len(l.desc.Params) {
		return tf.TF{}, fmt.Errorf("%w: %d values for %d parameters", ErrParam, len(values), len(l.desc.Params))
	}
	set := &tf.ParseSettings{SampleTimeSec: l.desc.SampleTimeSec, Params: map[string]float64{}}
	if dz := l.desc.Discretize; dz != nil && !l.inS {
		g, err := l.atS(values, set)
		if err != nil {
			return tf.TF{}, err
		}
		var dset *tf.DiscretizeSettings
		if dz.PrewarpRadPerSec > 0 {
			dset = &tf.DiscretizeSettings{PrewarpRadPerSec: dz.PrewarpRadPerSec}
		}
		out, err := g.Discretize(dz.SampleTimeSec, dz.Method, dset)
		if err != nil {
			return tf.TF{}, fmt.Errorf("%w: discretizing the loop: %w", ErrExpression, err)
		}
		return out, nil
	}
	return l.atS(values, set)
}

// atS multiplies the expressions read with set.
func (l *Loop) atS(values []float64, set *tf.ParseSettings) (tf.TF, error) {
	for i, p := range l.desc.Params {
		set.Params[p.Name] = values[i]
	}
	var out tf.TF
	for i, text := range l.desc.Expressions {
		g, err := tf.ParseWith(text, set)
		if err != nil {
			return tf.TF{}, fmt.Errorf("%w: expression %d %q: %w", ErrExpression, i+1, text, err)
		}
		if i == 0 {
			out = g
			continue
		}
		if out, err = out.Series(g); err != nil {
			return tf.TF{}, fmt.Errorf("%w: expression %d %q in series: %w", ErrExpression, i+1, text, err)
		}
	}
	return out, nil
}

// valuesOf maps scaled t to parameter values.
func (l *Loop) valuesOf(t []float64) []float64 {
	v := make([]float64, len(t))
	for i := range t {
		v[i] = l.mid[i] + l.rad[i]*t[i]
		v[i] = math.Min(math.Max(v[i], l.desc.Params[i].Min), l.desc.Params[i].Max)
	}
	return v
}

// raw returns num (ascending, padded to nn), den (padded to nd) and the delay
// at scaled point t.
func (l *Loop) raw(t []float64, nn, nd int) ([]float64, error) {
	g, err := l.At(l.valuesOf(t))
	if err != nil {
		return nil, err
	}
	num, den := g.Num().Ascending(), g.Den().Ascending()
	if len(num) > nn || len(den) > nd {
		return nil, fmt.Errorf("%w: the degree of the loop changes inside the box in an unexpected way", ErrExpression)
	}
	out := make([]float64, nn+nd+1)
	copy(out, num)
	copy(out[nn:], den)
	out[nn+nd] = g.DelaySec()
	return out, nil
}

// genericPoint returns a fixed point of the box that is not special.
func genericPoint(n, k int) []float64 {
	t := make([]float64, n)
	for i := range t {
		x := math.Mod(0.6180339887498949*float64(i+1)+0.41421356237309515*float64(k+1), 1)
		t[i] = 2*x - 1
	}
	return t
}

func chebNodes(m int) []float64 {
	x := make([]float64, m)
	for j := range x {
		x[j] = math.Cos(math.Pi * (float64(j) + 0.5) / float64(m))
	}
	if m == 1 {
		x[0] = 0.123456789 // away from 0 is not needed, but keeps the probe generic
	}
	return x
}

// vandermondeInverse returns the inverse of V[j][k] = x_j^k.
func vandermondeInverse(x []float64) (*mat.Dense, error) {
	m := len(x)
	v := mat.NewDense(m, m, nil)
	for j := range m {
		p := 1.0
		for k := range m {
			v.Set(j, k, p)
			p *= x[j]
		}
	}
	var inv mat.Dense
	if err := inv.Inverse(v); err != nil {
		return nil, err
	}
	return &inv, nil
}

func (l *Loop) recover() error {
	n := len(l.desc.Params)
	// Sizes from generic points (the degree is maximal there).
	nn, nd := 0, 0
	for k := range 3 {
		g, err := l.At(l.valuesOf(genericPoint(n, k)))
		if err != nil {
			return err
		}
		nn = max(nn, len(g.Num().Ascending()))
		nd = max(nd, len(g.Den().Ascending()))
	}
	width := nn + nd + 1
	// Degree in each parameter, at a generic base point.
	deg := make([]int, n)
	for i := range n {
		if l.rad[i] == 0 {
			continue // fixed parameter: degree 0 in t
		}
		base := genericPoint(n, 7)
		found := false
		for d := 0; d <= MaxDegreePerParam && !found; d++ {
			nodes := chebNodes(d + 1)
			inv, err := vandermondeInverse(nodes)
			if err != nil {
				return fmt.Errorf("%w: interpolation in %q: %v", ErrExpression, l.desc.Params[i].Name, err)
			}
			vals := make([][]float64, d+1)
			for j, x := range nodes {
				t := append([]float64(nil), base...)
				t[i] = x
				if vals[j], err = l.raw(t, nn, nd); err != nil {
					return err
				}
			}
			found = true
			for _, x := range []float64{0.7548776662466927, -0.569840290998053} {
				t := append([]float64(nil), base...)
				t[i] = x
				want, err := l.raw(t, nn, nd)
				if err != nil {
					return err
				}
				for c := range width {
					var got, scale float64
					for k := range d + 1 {
						a := 0.0
						for j := range d + 1 {
							a += inv.At(k, j) * vals[j][c]
							scale = math.Max(scale, math.Abs(vals[j][c]))
						}
						got += a * math.Pow(x, float64(k))
					}
					scale = math.Max(scale, math.Abs(want[c]))
					if math.Abs(got-want[c]) > 1e-10*scale {
						found = false
					}
				}
			}
			if found {
				deg[i] = d
			}
		}
		if !found {
			return fmt.Errorf("%w: the coefficients are not polynomial in %q of degree ≤ %d (write divisions by a parameter as part of a denominator, e.g. g/(m*(s+1)) rather than g/m/(s+1))", ErrExpression, l.desc.Params[i].Name, MaxDegreePerParam)
		}
		if deg[i] == 0 {
			return fmt.Errorf("%w: %q appears in no expression (or does not change the loop)", ErrParam, l.desc.Params[i].Name)
		}
	}
	// Tensor grid.
	size := 1
	nodes := make([][]float64, n)
	for i := range n {
		nodes[i] = chebNodes(deg[i] + 1)
		if deg[i] == 0 {
			nodes[i] = []float64{0}
		}
		size *= deg[i] + 1
	}
	const maxGrid = 1 << 16
	if size > maxGrid {
		return fmt.Errorf("%w: %d interpolation points needed (more than %d); use fewer parameters or lower degrees", ErrExpression, size, maxGrid)
	}
	grid := make([][]float64, size)
	scale := make([]float64, width)
	idx := make([]int, n)
	for g := range size {
		r := g
		t := make([]float64, n)
		for i := n - 1; i >= 0; i-- {
			idx[i] = r % (deg[i] + 1)
			r /= deg[i] + 1
			t[i] = nodes[i][idx[i]]
		}
		v, err := l.raw(t, nn, nd)
		if err != nil {
			return err
		}
		grid[g] = v
		for c := range width {
			scale[c] = math.Max(scale[c], math.Abs(v[c]))
		}
	}
	// Apply the inverse Vandermonde along each axis.
	stride := 1
	for i := n - 1; i >= 0; i-- {
		m := deg[i] + 1
		if m > 1 {
			inv, err := vandermondeInverse(nodes[i])
			if err != nil {
				return fmt.Errorf("%w: interpolation: %v", ErrExpression, err)
			}
			tmp := make([][]float64, m)
			for g := range size {
				if (g/stride)%m != 0 {
					continue
				}
				for k := range m {
					tmp[k] = make([]float64, width)
					for j := range m {
						w := inv.At(k, j)
						for c := range width {
							tmp[k][c] += w * grid[g+j*stride][c]
						}
					}
				}
				for k := range m {
					grid[g+k*stride] = tmp[k]
				}
			}
		}
		stride *= m
	}
	polys := make([]mpoly, width)
	for g := range size {
		r := g
		e := make([]int, n)
		for i := n - 1; i >= 0; i-- {
			e[i] = r % (deg[i] + 1)
			r /= deg[i] + 1
		}
		for c := range width {
			a := grid[g][c]
			if math.Abs(a) <= 1e-11*scale[c] {
				continue
			}
			polys[c].terms = append(polys[c].terms, term{exp: append([]int(nil), e...), c: a})
		}
	}
	l.num, l.den, l.tau = polys[:nn], polys[nn:nn+nd], polys[nn+nd]
	// Verify at further points.
	for k := range VerifyPoints {
		t := genericPoint(n, 11+k)
		want, err := l.raw(t, nn, nd)
		if err != nil {
			return err
		}
		for c := range width {
			got := polys[c].eval(t)
			if math.Abs(got-want[c]) > 1e-9*math.Max(scale[c], math.SmallestNonzeroFloat64) {
				return fmt.Errorf("%w: coefficient recovery failed its check (%g vs %g); the dependence is not polynomial", ErrExpression, got, want[c])
			}
		}
	}
	return nil
}

func (l *Loop) classify() error {
	if !l.tau.isZero() {
		if l.ts > 0 {
			return fmt.Errorf("%w: a discrete loop with dead time; write the delay as a power of z", ErrUnsupported)
		}
		l.class = WithDelay
		return nil
	}
	ch := l.charPoly()
	n := len(l.desc.Params)
	class := Interval
	used := make([]int, n)
	for _, c := range ch {
		switch {
		case c.totalDegree() > 1:
			if c.maxVarDegree() > 1 {
				class = Polynomial
			} else {
				class = max(class, Multilinear)
			}
		}
		for i := range n {
			if c.uses(i) {
				used[i]++
			}
		}
	}
	if class == Interval {
		for _, u := range used {
			if u > 1 {
				class = Affine
			}
		}
	}
	l.class = class
	return nil
}

// charPoly returns den + num (ascending) for a rational loop.
func (l *Loop) charPoly() []mpoly {
	m := max(len(l.num), len(l.den))
	out := make([]mpoly, m)
	for k := range m {
		var parts []mpoly
		if k < len(l.den) {
			parts = append(parts, l.den[k])
		}
		if k < len(l.num) {
			parts = append(parts, l.num[k])
		}
		out[k] = combine(parts, []float64{1, 1}, len(l.mid))
	}
	return out
}

func ftoa(x float64) string { return fmt.Sprint(x) }
