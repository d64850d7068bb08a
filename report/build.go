package report

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"unicode/utf8"

	"github.com/loopwise/loopwise/tf"
)

// loopModel is a loop file turned into transfer functions.
type loopModel struct {
	file *Loop
	// gain is the nominal loop gain k.
	gain float64
	// controller, plant and sensor are the parsed expressions at the
	// nominal parameter value, before any discretization.
	controller, plant, sensor tf.TF
	// base is controller·plant·sensor with the dead time, converted to z
	// when the file asks for it: the loop whose root locus in k is drawn.
	base tf.TF
	// open is L = k·base, the loop at which margins and responses are
	// evaluated.
	open tf.TF
	// forward is k·controller·plant (converted like base): the path from
	// reference to output. It equals open when the sensor is 1.
	forward tf.TF
	// unitySensor reports whether the sensor is 1, so that the closed loop
	// from reference to output is L/(1 + L).
	unitySensor bool
	// loopAt returns k·controller·plant·sensor (with dead time and
	// discretization) at the parameter value p; nil without a parameter.
	loopAt func(p float64) (tf.TF, error)
	// discrete describes the conversion to z; nil without "discretize".
	discrete *DiscreteLoopResult
	// delayIgnored reports that the dead time is negligible
	// (negligibleDelay); analysed is then open without it, otherwise open
	// itself: the loop of the margins, the requirements and the plots.
	delayIgnored bool
	analysed     tf.TF
	// rational is open with dead time replaced: by its Padé approximation
	// in s, by exact poles at z = 0 in z; open itself when padeErr is set.
	rational tf.TF
	padeErr  error
	// closedPoles are the roots of the characteristic polynomial of
	// rational (nil with closedErr set, or when rational has dead time).
	closedPoles []complex128
	closedErr   error
	// verdict is the stability verdict from closedPoles; for a continuous
	// loop with dead time it is provisional (Padé) until the margins
	// section replaces it by the Nyquist verdict.
	verdict verdict
}

// parseExpr reads the expression text of key, naming the key and the
// position in the file on error.
func (lf *Loop) parseExpr(key, text string, params map[string]float64) (tf.TF, error) {
	g, err := tf.ParseWith(text, &tf.ParseSettings{SampleTimeSec: lf.SampleTimeSec, Params: params})
	if err == nil {
		return g, nil
	}
	where := lf.where(key)
	var se *tf.SyntaxError
	if errors.As(err, &se) {
		msg := fmt.Sprintf("key %q%s: cannot read the expression %q: at column %d of the text", key, where, excerpt(text, se.Offset), utf8.RuneCountInString(text[:min(se.Offset, len(text))])+1)
		if off, ok := lf.off[key]; ok && verbatim(lf.data, off, text) {
			msg += fmt.Sprintf(" (%s of the file)", positionOf(lf.data, off+1+se.Offset))
		}
		return tf.TF{}, badInput("%s: %s", msg, se.Msg)
	}
	return tf.TF{}, badInput("key %q%s: the expression %q is not usable: %s", key, where, text, strings.TrimPrefix(err.Error(), "tf: "))
}

// verbatim reports whether the JSON string at offset off of data holds text
// without escapes, so that offsets in text map to offsets in the file.
func verbatim(data []byte, off int, text string) bool {
	end := off + 1 + len(text)
	return off >= 0 && end < len(data) && data[off] == '"' && string(data[off+1:end]) == text && data[end] == '"'
}

// buildAt parses controller, plant and sensor with the parameter (if any)
// set to p and returns them.
func (lf *Loop) buildAt(p float64) (c, g, h tf.TF, err error) {
	var params map[string]float64
	if lf.Parameter != nil {
		params = map[string]float64{lf.Parameter.Name: p}
	}
	params = lf.uncertainMidpoints(params) // robust.go: the centre of the uncertain box
	params = lf.planeNominal(params)       // design.go: the plane's nominal point
	if c, err = lf.parseExpr("controller", lf.Controller, params); err != nil {
		return
	}
	if g, err = lf.parseExpr("plant", lf.Plant, params); err != nil {
		return
	}
	h, err = lf.parseExpr("sensor", lf.Sensor, params)
	return
}

// product returns k·c·g·h with the file's extra dead time added.
func (lf *Loop) product(k float64, parts ...tf.TF) (tf.TF, error) {
	out := parts[0]
	for _, p := range parts[1:] {
		var err error
		if out, err = out.Series(p); err != nil {
			return tf.TF{}, badInput("the loop cannot be formed: %v", err)
		}
	}
	out, err := out.Scale(k)
	if err != nil {
		return tf.TF{}, badInput("key \"gain\": %v", err)
	}
	if lf.DelaySec > 0 {
		if out, err = out.WithDelay(out.DelaySec() + lf.DelaySec); err != nil {
			return tf.TF{}, badInput("key \"delay_sec\": %v", err)
		}
	}
	return out, nil
}

// build turns the loop file into transfer functions and checks that the
// loop can be analysed.
func build(lf *Loop) (*loopModel, error) {
	if lf.Parameter != nil && !validName(lf.Parameter.Name) {
		return nil, badInput("key \"parameter.name\"%s: %q is not a usable name; use letters, digits and '_', starting with a letter, and not s, z or exp", lf.where("parameter.name"), lf.Parameter.Name)
	}
	if err := lf.checkDeadTimeModel(`"dead_time_model"`); err != nil {
		return nil, err
	}
	p := 0.0
	if lf.Parameter != nil {
		p = lf.Parameter.Value
	}
	c, g, h, err := lf.buildAt(p)
	if err != nil {
		return nil, err
	}
	m := &loopModel{file: lf, gain: lf.Gain, controller: c, plant: g, sensor: h}
	if m.base, err = lf.product(1, c, g, h); err != nil {
		return nil, err
	}
	if !m.base.IsProper() {
		return nil, badInput("the loop controller·plant·sensor = %s is improper (numerator degree %d above denominator degree %d); a physical loop needs at least as many poles as zeros — add the roll-off of the sensor or the controller",
			m.base, m.base.Num().Degree(), m.base.Den().Degree())
	}
	if m.base.IsZero() {
		return nil, badInput("the loop controller·plant·sensor is zero; there is nothing to analyse")
	}
	fwd, err := lf.product(1, c, g)
	if err != nil {
		return nil, err
	}
	one, _ := tf.New([]float64{1}, []float64{1})
	m.unitySensor = h.WithoutDelay().EqualApprox(one, 0) && h.DelaySec() == 0
	if err := lf.checkDelaySamples(m.base.DelaySec()); err != nil {
		return nil, err
	}
	if d := lf.Discretize; d != nil {
		if m.base, err = discretize(m.base, d); err != nil {
			return nil, err
		}
		if fwd, err = discretize(fwd, d); err != nil {
			return nil, err
		}
	}
	if m.open, err = m.base.Scale(lf.Gain); err != nil {
		return nil, badInput("key \"gain\": %v", err)
	}
	if m.forward, err = fwd.Scale(lf.Gain); err != nil {
		return nil, badInput("key \"gain\": %v", err)
	}
	if m.unitySensor {
		m.forward = m.open
	}
	if d := lf.Discretize; d != nil {
		mo, err := m.open.WithoutDelay().Den().Monic()
		if err != nil {
			return nil, badInput("the discretized loop has a zero denominator")
		}
		lead := m.open.Den().Lead()
		num := m.open.Num().Coeffs()
		for i := range num {
			num[i] /= lead
		}
		m.discrete = &DiscreteLoopResult{Method: d.Method, SampleTimeSec: Number(d.SampleTimeSec), Num: numbers(num), Den: numbers(mo.Coeffs())}
	}
	if err := m.judge(); err != nil {
		return nil, err
	}
	if lf.Parameter != nil {
		k := lf.Gain
		m.loopAt = func(p float64) (tf.TF, error) {
			c, g, h, err := lf.buildAt(p)
			if err != nil {
				return tf.TF{}, err
			}
			l, err := lf.product(k, c, g, h)
			if err != nil {
				return tf.TF{}, err
			}
			if d := lf.Discretize; d != nil {
				return discretize(l, d)
			}
			return l, nil
		}
	}
	if lf.Parameter != nil {
		// The parameter must change the loop, or its locus is empty.
		l0, err0 := m.loopAt(lf.Parameter.Value)
		other := lf.Parameter.Value + 1
		if other == lf.Parameter.Value { // |value| ≥ 2⁵³: +1 is lost
			other = lf.Parameter.Value / 2
		}
		l1, err1 := m.loopAt(other)
		if err0 == nil && err1 == nil && l0.EqualApprox(l1, 0) {
			return nil, badInput("key \"parameter\"%s: the parameter %q does not appear in the controller, the plant or the sensor, so there is no locus in it", lf.where("parameter"), lf.Parameter.Name)
		}
	}
	return m, nil
}

func numbers(v []float64) []Number {
	out := make([]Number, len(v))
	for i, x := range v {
		out[i] = Number(x)
	}
	return out
}

// validName reports whether name can be a parameter of the text form.
func validName(name string) bool {
	if name == "" || name == "s" || name == "z" || name == "exp" {
		return false
	}
	for i, r := range name {
		letter := r == '_' || (r >= 'a' && r <= 'z') || (r >= 'A' && r <= 'Z')
		if !letter && (i == 0 || r < '0' || r > '9') {
			return false
		}
	}
	return true
}

// finite reports whether x is neither NaN nor infinite.
func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// judge computes the closed-loop poles of the rational loop and the
// stability verdict (see stability.go). It refuses a loop converted to z
// whose verdict double precision cannot give.
func (m *loopModel) judge() error {
	m.rational, m.analysed = m.open, m.open
	if tau := m.open.DelaySec(); tau > 0 && !m.open.IsDiscrete() && negligibleDelay(m.open) {
		// e^(−sτ) = 1 − sτ + … differs from 1 by less than 1e-8 up to
		// the fastest pole or zero, while its Padé approximation would
		// put poles at about 1/τ that the root finder cannot reach.
		m.rational = m.open.WithoutDelay()
		m.delayIgnored = true
		m.analysed = m.rational
	} else if tau > 0 {
		if r, err := m.open.Pade(padeOrder); err != nil {
			m.padeErr = err
		} else {
			m.rational = r
		}
	}
	if m.rational.DelaySec() > 0 {
		return nil
	}
	char := m.rational.CharacteristicPolynomial()
	m.closedPoles, m.closedErr = char.Roots()
	if m.closedErr != nil {
		return nil
	}
	m.verdict = judgePoles(char, m.closedPoles, m.open.IsDiscrete())
	if lost, why := m.verdict.crowdsAtOne(); lost && m.file.Discretize != nil {
		d := m.file.Discretize
		return badInput("key \"discretize.sample_time_sec\"%s: at the sample time %s s double precision cannot tell whether the sampled closed loop is stable: %s. The sample time is too short for the loop's dynamics (the poles crowd at z = 1); use a longer sample time, or analyse the continuous loop without \"discretize\"",
			m.file.where("discretize.sample_time_sec"), g(Number(d.SampleTimeSec)), why)
	}
	return nil
}

// maxDelaySamples is the most sample periods of dead time a loop in z may
// have: each is a pole at z = 0, and the expressions themselves are
// limited to degree 500 (package tf).
const maxDelaySamples = 500

// checkDelaySamples refuses a sampled loop whose dead time (delaySec in
// all: delay_sec and exp(−τs) in the expressions) spans more sample
// periods than a loop in z can hold, and a sample time too short to
// compute with.
func (lf *Loop) checkDelaySamples(delaySec float64) error {
	T, key := lf.SampleTimeSec, "sample_time_sec"
	if d := lf.Discretize; d != nil {
		T, key = d.SampleTimeSec, "discretize.sample_time_sec"
	}
	if T <= 0 {
		return nil
	}
	if T < 0x1p-1022 {
		return badInput("key %q%s: the sample time %s s is below the smallest normal double (2.2e-308 s); no loop can be sampled that fast", key, lf.where(key), g(Number(T)))
	}
	if n := delaySec / T; n > maxDelaySamples {
		periods := g(Number(n))
		if math.IsInf(n, 1) {
			periods = "more than 1e308"
		}
		return badInput("key \"delay_sec\"%s: the dead time of %s s (delay_sec and the dead time in the expressions) spans %s sample periods of %q = %s s; a loop in z holds at most %d (one pole at z = 0 each): use a longer sample time or a shorter dead time",
			lf.where("delay_sec"), g(Number(delaySec)), periods, key, g(Number(T)), maxDelaySamples)
	}
	return nil
}

// negligibleDelay reports whether the dead time τ of the continuous loop l
// changes e^(−sτ) by less than 1e-8 at the loop's fastest pole or zero
// (|sτ| < 1e-8) and |L| is small where it does matter (ω near 1/τ): the
// rational loop without it is then exact to that level for the closed-loop
// poles, the locus, the margins and the responses.
func negligibleDelay(l tf.TF) bool {
	r := l.WithoutDelay()
	p, err1 := r.Poles()
	z, err2 := r.Zeros()
	if err1 != nil || err2 != nil {
		return false
	}
	fastest := 0.0
	for _, x := range append(p, z...) {
		fastest = math.Max(fastest, cmplx.Abs(x))
	}
	if !(fastest > 0 && l.DelaySec()*fastest < 1e-8) {
		return false
	}
	// At frequencies near 1/τ the dead time turns L(jω) through whole
	// turns; that is harmless only where |L| has fallen well below 1:
	// a strictly proper loop, or a biproper one with |L(∞)| < 1/2.
	return r.RelativeDegree() > 0 || math.Abs(r.GainFactor()) < 0.5
}
