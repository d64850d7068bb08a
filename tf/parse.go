package tf

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode"

	"github.com/loopwise/loopwise/poly"
)

// ParseSettings controls Parse. A nil *ParseSettings means the defaults.
type ParseSettings struct {
	// SampleTimeSec is the sample period in seconds. If zero, the text is a
	// continuous-time expression in s; if positive, a discrete-time one in z.
	SampleTimeSec float64
	// Params gives values to named parameters that may appear in the text
	// (for example {"Ti": 0.5}). Names are identifiers (a letter or '_'
	// followed by letters, digits or '_'); they may not be s, z or exp.
	Params map[string]float64
}

// maxExponent bounds integer exponents in text, so that a typo such as
// s^99999 is an error rather than a huge allocation.
const maxExponent = 1000

// maxDegree bounds the degree of every polynomial built while parsing, so
// that text such as (s^999)^999 is an error rather than a long computation.
const maxDegree = 500

// maxTextLen bounds the length of text accepted by Parse.
const maxTextLen = 1 << 16

// Parse reads a continuous-time transfer function in s from text, for
// example "10(s+1)/(s(s+5)^2)" or "2.5s/(s^2 + 0.4s + 4)*exp(-0.2s)".
// Grammar (whitespace is ignored):
//
//	expr    = term { ("+" | "-") term }
//	term    = unary { ("*" | "/") unary | implicit }   implicit: juxtaposition
//	unary   = ("-" | "+") unary | power
//	power   = primary [ "^" ["-"|"+"] integer ]
//	primary = number | "s" | "z" | name | "exp" "(" expr ")" | "(" expr ")"
//
// Numbers are decimal with an optional exponent (1e-3). "exp(−T·s)" is dead
// time of T seconds; it may only multiply the whole expression (terms of a
// sum must carry the same dead time). Exponents are at most 1000 and every
// intermediate polynomial has degree at most 500. Errors match ErrSyntax
// and are *SyntaxError values that give the position and what was
// expected; text that overflows float64 returns ErrNotFinite, a zero
// denominator ErrZeroDenominator and a dead-time advance (1/exp(−s))
// ErrNegativeDelay.
func Parse(text string) (TF, error) { return ParseWith(text, nil) }

// ParseDiscrete reads a discrete-time transfer function in z with sample
// period sampleTimeSec > 0 (ErrSampleTime otherwise).
func ParseDiscrete(text string, sampleTimeSec float64) (TF, error) {
	if !(sampleTimeSec > 0) {
		return TF{}, fmt.Errorf("%w: a discrete transfer function needs a positive sample period, got %v", ErrSampleTime, sampleTimeSec)
	}
	return ParseWith(text, &ParseSettings{SampleTimeSec: sampleTimeSec})
}

// MustParse is like Parse but panics on error; for constants in tests and
// examples.
func MustParse(text string) TF {
	g, err := Parse(text)
	if err != nil {
		panic(err)
	}
	return g
}

// ParseWith reads a transfer function from text with the given settings
// (nil = continuous time, no parameters). See Parse for the grammar.
func ParseWith(text string, set *ParseSettings) (TF, error) {
	var s ParseSettings
	if set != nil {
		s = *set
	}
	if err := checkSampleTime(s.SampleTimeSec); err != nil {
		return TF{}, err
	}
	for name, v := range s.Params {
		if !validParamName(name) {
			return TF{}, fmt.Errorf("tf: parameter name %q is not a valid name (letters, digits, '_'; not s, z or exp)", name)
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return TF{}, fmt.Errorf("%w: parameter %s = %v", ErrNotFinite, name, v)
		}
	}
	if len(text) > maxTextLen {
		return TF{}, &SyntaxError{Text: text[:64] + "…", Offset: maxTextLen, Msg: fmt.Sprintf("text longer than %d bytes", maxTextLen)}
	}
	p := parser{text: text, set: s}
	p.next()
	v, err := p.expr()
	if err != nil {
		return TF{}, err
	}
	if p.tok.kind != tokEOF {
		return TF{}, p.errf("unexpected %s; expected an operator or the end of the text", p.tok.describe())
	}
	if v.den.IsZero() {
		return TF{}, fmt.Errorf("%w: %q divides by zero", ErrZeroDenominator, text)
	}
	if !v.num.IsFinite() || !v.den.IsFinite() {
		return TF{}, fmt.Errorf("%w: %q overflows float64", ErrNotFinite, text)
	}
	if math.IsNaN(v.delay) || math.IsInf(v.delay, 0) {
		return TF{}, fmt.Errorf("%w: %q has a dead time that overflows float64", ErrNotFinite, text)
	}
	if v.delay < 0 {
		return TF{}, fmt.Errorf("%w: %q has a dead time of %v s", ErrNegativeDelay, text, v.delay)
	}
	return TF{num: v.num, den: v.den, delay: v.delay, ts: s.SampleTimeSec}, nil
}

func validParamName(name string) bool {
	if name == "" || name == "s" || name == "z" || name == "exp" {
		return false
	}
	for i, r := range name {
		if !(r == '_' || unicode.IsLetter(r) || (i > 0 && unicode.IsDigit(r))) {
			return false
		}
	}
	return true
}

type tokKind int

const (
	tokEOF tokKind = iota
	tokNum
	tokIdent
	tokOp // one of + - * / ^ ( )
	tokBad
)

type token struct {
	kind tokKind
	pos  int
	text string
	num  float64
}

func (t token) describe() string {
	switch t.kind {
	case tokEOF:
		return "end of text"
	case tokNum:
		return "number " + t.text
	case tokIdent:
		return "name " + strconv.Quote(t.text)
	}
	return strconv.Quote(t.text)
}

// rat is an intermediate value of the parser: num/den·e^(−s·delay).
type rat struct {
	num, den poly.Poly
	delay    float64
}

type parser struct {
	text string
	set  ParseSettings
	pos  int
	tok  token
	prev token // the token before tok
}

func (p *parser) errf(format string, a ...any) error {
	return &SyntaxError{Text: p.text, Offset: p.tok.pos, Msg: fmt.Sprintf(format, a...)}
}

func (p *parser) next() {
	p.prev = p.tok
	for p.pos < len(p.text) && (p.text[p.pos] == ' ' || p.text[p.pos] == '\t' || p.text[p.pos] == '\n' || p.text[p.pos] == '\r') {
		p.pos++
	}
	start := p.pos
	if p.pos >= len(p.text) {
		p.tok = token{kind: tokEOF, pos: start}
		return
	}
	c := p.text[p.pos]
	switch {
	case c >= '0' && c <= '9' || c == '.':
		p.lexNumber()
		return
	case c == '_' || c < 0x80 && unicode.IsLetter(rune(c)):
		for p.pos < len(p.text) {
			c := p.text[p.pos]
			if c == '_' || c < 0x80 && (unicode.IsLetter(rune(c)) || unicode.IsDigit(rune(c))) {
				p.pos++
				continue
			}
			break
		}
		p.tok = token{kind: tokIdent, pos: start, text: p.text[start:p.pos]}
		return
	case strings.IndexByte("+-*/^()", c) >= 0:
		p.pos++
		p.tok = token{kind: tokOp, pos: start, text: string(c)}
		return
	}
	// Unknown character: report it (decode UTF-8 for the message).
	r := []rune(p.text[start:])[0]
	p.tok = token{kind: tokBad, pos: start, text: string(r)}
}

func (p *parser) lexNumber() {
	start := p.pos
	digits := 0
	for p.pos < len(p.text) && p.text[p.pos] >= '0' && p.text[p.pos] <= '9' {
		p.pos++
		digits++
	}
	if p.pos < len(p.text) && p.text[p.pos] == '.' {
		p.pos++
		for p.pos < len(p.text) && p.text[p.pos] >= '0' && p.text[p.pos] <= '9' {
			p.pos++
			digits++
		}
	}
	if digits == 0 {
		p.tok = token{kind: tokBad, pos: start, text: p.text[start:p.pos]}
		return
	}
	// Exponent only when followed by digits: "2e3" is 2000, "2exp(...)" is
	// 2·exp(...), "2e" is 2·e (a parameter named e).
	if p.pos < len(p.text) && (p.text[p.pos] == 'e' || p.text[p.pos] == 'E') {
		q := p.pos + 1
		if q < len(p.text) && (p.text[q] == '+' || p.text[q] == '-') {
			q++
		}
		if q < len(p.text) && p.text[q] >= '0' && p.text[q] <= '9' {
			for q < len(p.text) && p.text[q] >= '0' && p.text[q] <= '9' {
				q++
			}
			p.pos = q
		}
	}
	s := p.text[start:p.pos]
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(v, 0) {
		p.tok = token{kind: tokBad, pos: start, text: s}
		return
	}
	p.tok = token{kind: tokNum, pos: start, text: s, num: v}
}

func constRat(v float64) rat { return rat{num: poly.Constant(v), den: poly.Constant(1)} }

func (p *parser) expr() (rat, error) {
	v, err := p.term()
	if err != nil {
		return rat{}, err
	}
	for p.tok.kind == tokOp && (p.tok.text == "+" || p.tok.text == "-") {
		op := p.tok
		p.next()
		w, err := p.term()
		if err != nil {
			return rat{}, err
		}
		if op.text == "-" {
			w.num = w.num.Neg()
		}
		if v.delay != w.delay && !v.num.IsZero() && !w.num.IsZero() {
			return rat{}, &SyntaxError{Text: p.text, Offset: op.pos, Msg: fmt.Sprintf("terms with different dead times (%v s and %v s) cannot be added; dead time may only multiply the whole expression", v.delay, w.delay)}
		}
		// A zero term carries no dead time into the sum.
		d := v.delay
		if v.num.IsZero() {
			d = w.delay
		}
		if !v.den.Equal(w.den) && (v.den.Degree()+w.den.Degree() > maxDegree || max(v.num.Degree()+w.den.Degree(), w.num.Degree()+v.den.Degree()) > maxDegree) {
			return rat{}, &SyntaxError{Text: p.text, Offset: op.pos, Msg: fmt.Sprintf("the sum has degree above %d", maxDegree)}
		}
		if v.den.Equal(w.den) {
			v = rat{num: v.num.Add(w.num), den: v.den, delay: d}
		} else {
			v = rat{num: v.num.Mul(w.den).Add(w.num.Mul(v.den)), den: v.den.Mul(w.den), delay: d}
		}
	}
	return v, nil
}

// startsPrimary reports whether the current token can start a factor, for
// implicit multiplication.
func (p *parser) startsPrimary() bool {
	return p.tok.kind == tokNum || p.tok.kind == tokIdent || (p.tok.kind == tokOp && p.tok.text == "(")
}

func (p *parser) term() (rat, error) {
	v, err := p.unary()
	if err != nil {
		return rat{}, err
	}
	for {
		var op token
		switch {
		case p.tok.kind == tokOp && (p.tok.text == "*" || p.tok.text == "/"):
			op = p.tok
			p.next()
		case p.startsPrimary():
			if p.tok.kind == tokNum && p.prev.kind == tokNum {
				// "2 3" or "1 000": a typo far more often than a product.
				return rat{}, p.errf("two numbers side by side (%s %s); write '*' between them if a product is meant", p.prev.text, p.tok.text)
			}
			op = token{kind: tokOp, text: "*", pos: p.tok.pos}
		default:
			return v, nil
		}
		w, err := p.unary()
		if err != nil {
			return rat{}, err
		}
		if max(v.num.Degree()+w.num.Degree(), v.den.Degree()+w.den.Degree(), v.num.Degree()+w.den.Degree(), v.den.Degree()+w.num.Degree()) > maxDegree {
			return rat{}, &SyntaxError{Text: p.text, Offset: op.pos, Msg: fmt.Sprintf("the product has degree above %d", maxDegree)}
		}
		if op.text == "*" {
			v = rat{num: v.num.Mul(w.num), den: v.den.Mul(w.den), delay: v.delay + w.delay}
			continue
		}
		if w.num.IsZero() {
			return rat{}, &SyntaxError{Text: p.text, Offset: op.pos, Msg: "division by zero"}
		}
		v = rat{num: v.num.Mul(w.den), den: v.den.Mul(w.num), delay: v.delay - w.delay}
	}
}

func (p *parser) unary() (rat, error) {
	if p.tok.kind == tokOp && (p.tok.text == "-" || p.tok.text == "+") {
		neg := p.tok.text == "-"
		p.next()
		v, err := p.unary()
		if err != nil {
			return rat{}, err
		}
		if neg {
			v.num = v.num.Neg()
		}
		return v, nil
	}
	return p.power()
}

func (p *parser) power() (rat, error) {
	v, err := p.primary()
	if err != nil {
		return rat{}, err
	}
	if !(p.tok.kind == tokOp && p.tok.text == "^") {
		return v, nil
	}
	p.next()
	neg := false
	if p.tok.kind == tokOp && (p.tok.text == "-" || p.tok.text == "+") {
		neg = p.tok.text == "-"
		p.next()
	}
	if p.tok.kind != tokNum || strings.ContainsAny(p.tok.text, ".eE") {
		return rat{}, p.errf("unexpected %s; expected a whole-number exponent after '^'", p.tok.describe())
	}
	n, err := strconv.Atoi(p.tok.text)
	if err != nil || n > maxExponent {
		return rat{}, p.errf("exponent %s is larger than %d", p.tok.text, maxExponent)
	}
	if n > 0 && max(v.num.Degree(), v.den.Degree()) > maxDegree/n {
		return rat{}, p.errf("the power has degree above %d", maxDegree)
	}
	expTok := p.tok
	p.next()
	r := rat{num: v.num.Pow(n), den: v.den.Pow(n), delay: v.delay * float64(n)}
	if neg {
		if r.num.IsZero() {
			return rat{}, &SyntaxError{Text: p.text, Offset: expTok.pos, Msg: "negative power of zero"}
		}
		r = rat{num: r.den, den: r.num, delay: -r.delay}
	}
	return r, nil
}

func (p *parser) primary() (rat, error) {
	t := p.tok
	switch t.kind {
	case tokNum:
		p.next()
		return constRat(t.num), nil
	case tokOp:
		if t.text == "(" {
			p.next()
			v, err := p.expr()
			if err != nil {
				return rat{}, err
			}
			if !(p.tok.kind == tokOp && p.tok.text == ")") {
				return rat{}, p.errf("unexpected %s; expected ')' to close the '(' at column %d", p.tok.describe(), t.pos+1)
			}
			p.next()
			return v, nil
		}
		return rat{}, p.errf("unexpected %s; expected a number, %s, a parameter or '('", t.describe(), p.variable())
	case tokIdent:
		return p.ident(t)
	case tokBad:
		return rat{}, p.errf("unexpected %q; expected a number, %s, a parameter or '('", t.text, p.variable())
	}
	return rat{}, p.errf("unexpected end of text; expected a number, %s, a parameter or '('", p.variable())
}

func (p *parser) variable() string {
	if p.set.SampleTimeSec > 0 {
		return "z"
	}
	return "s"
}

func (p *parser) ident(t token) (rat, error) {
	discrete := p.set.SampleTimeSec > 0
	switch {
	case t.text == "exp":
		return p.exp()
	case t.text == "s" && !discrete, t.text == "z" && discrete:
		p.next()
		return rat{num: poly.X(), den: poly.Constant(1)}, nil
	case t.text == "s" && discrete:
		return rat{}, p.errf("the variable of a discrete transfer function is z, not s")
	case t.text == "z" && !discrete:
		return rat{}, p.errf("z is the variable of discrete time; give a positive sample period to use it, or write the expression in s")
	}
	v, ok := p.set.Params[t.text]
	if !ok {
		if len(p.set.Params) == 0 {
			return rat{}, p.errf("unknown name %q; expected a number, %s or '(' (no parameters are defined here)", t.text, p.variable())
		}
		return rat{}, p.errf("unknown name %q; the parameters defined here are %s", t.text, strings.Join(sortedKeys(p.set.Params), ", "))
	}
	p.next()
	return constRat(v), nil
}

// exp parses exp(−T·s): a dead time of T seconds. The argument must be a
// non-positive multiple of s (the variable s stands for seconds of dead
// time in discrete time too).
func (p *parser) exp() (rat, error) {
	start := p.tok.pos
	p.next()
	if !(p.tok.kind == tokOp && p.tok.text == "(") {
		return rat{}, p.errf("unexpected %s; expected '(' after exp", p.tok.describe())
	}
	// Parse the argument in continuous mode, so that s is available.
	sub := *p
	sub.set.SampleTimeSec = 0
	sub.next()
	arg, err := sub.expr()
	if err != nil {
		return rat{}, err
	}
	if !(sub.tok.kind == tokOp && sub.tok.text == ")") {
		return rat{}, sub.errf("unexpected %s; expected ')' to close exp(", sub.tok.describe())
	}
	p.pos = sub.pos
	p.next()
	bad := &SyntaxError{Text: p.text, Offset: start, Msg: "exp(...) must be a dead time exp(-T*s) with a constant T ≥ 0 seconds"}
	if arg.delay != 0 || arg.den.Degree() != 0 || arg.num.Degree() > 1 || arg.num.Coef(0) != 0 {
		return rat{}, bad
	}
	t := -arg.num.Coef(1) / arg.den.Coef(0)
	if t < 0 || math.IsNaN(t) || math.IsInf(t, 0) {
		return rat{}, bad
	}
	return rat{num: poly.Constant(1), den: poly.Constant(1), delay: t}, nil
}
