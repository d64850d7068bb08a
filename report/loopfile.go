package report

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strings"
	"unicode/utf8"

	"github.com/loopwise/loopwise/tf"
)

// Loop describes one feedback loop L = k·controller·plant·sensor with
// negative feedback: the value a loop file holds (see ReadLoop for its JSON
// form). The zero value of an optional field means its default, so a Loop
// written in Go needs only Plant.
type Loop struct {
	// Name is the report's title; if empty, "Loop" and the file name.
	Name string
	// Description is a sentence or two shown under the title.
	Description string
	// Plant is a transfer function in the text form of package tf, in s,
	// or in z when SampleTimeSec > 0: "2.5/(s*(0.2s+1))". Required.
	Plant string
	// Controller is the controller's transfer function; it may use the
	// parameter's name. If empty, defaults to "1".
	Controller string
	// ControllerForm, if not nil, gives the controller by its form and
	// parameters (the loop file's structured "controller", closedloop.go)
	// and replaces Controller.
	ControllerForm *ControllerForm
	// Sensor is the feedback path. If empty, defaults to "1".
	Sensor string
	// Gain is the loop gain k at which margins and responses are
	// evaluated. If zero, defaults to 1 (a loop file must not give 0).
	Gain float64
	// GainRange is the range of k for the root locus; ±Inf for an
	// unbounded end; a negative range gives the complementary locus. If
	// both ends are zero, defaults to [0, +Inf).
	GainRange [2]float64
	// Parameter, if not nil, makes the root locus one in a named
	// parameter of the expressions.
	Parameter *Parameter
	// DelaySec is dead time added to the loop, in seconds, ≥ 0.
	DelaySec float64
	// SampleTimeSec is 0 for a continuous loop (expressions in s); a
	// positive sample time in seconds means the expressions are in z.
	SampleTimeSec float64
	// Discretize, if not nil, converts the continuous loop to z before
	// every analysis.
	Discretize *Discretize
	// Requirements are limits checked against the loop (package spec).
	Requirements []Requirement
	// Uncertain and Samples are the robust section's keys (robust.go).
	Uncertain []UncertainParameter
	Samples   int
	// Plane is the design section's key (design.go).
	Plane *PlaneSpec
	// DeadTimeModel is how a continuous loop's dead time is analysed:
	// "exact" (the default when empty: e^(−sτ) kept exact, see the
	// dead_time section) or "pade" (a 6th-order Padé approximation).
	DeadTimeModel string

	// pos holds the position ("line 3, column 12") of each key as
	// written, for messages about values that parse but do not make sense
	// (an expression that does not parse, an improper loop); nil for a
	// Loop written in Go.
	pos  map[string]position
	off  map[string]int // byte offset of each value in data
	data []byte
	file string
}

// Parameter names a parameter of the expressions and its range for the
// root locus.
type Parameter struct {
	// Name is the parameter's name in the expressions: letters, digits
	// and '_', starting with a letter, and not s, z or exp.
	Name string
	// Value is the nominal value, at which margins and responses are
	// evaluated.
	Value float64
	// Range is the parameter's range for the locus; ±Inf for an unbounded
	// end. A loop file without "range" gets [0, +Inf), or (−Inf, 0] for a
	// negative Value.
	Range [2]float64
}

// Discretize says how a continuous loop is converted to z.
type Discretize struct {
	// Method is "zoh", "foh", "tustin" or "matched".
	Method string
	// SampleTimeSec is the sample time in seconds, > 0.
	SampleTimeSec float64
	// PrewarpRadPerSec is the Tustin prewarp frequency in rad/s, in
	// (0, π/T); 0 for none.
	PrewarpRadPerSec float64
}

// MaxLoopFileBytes is the largest loop file ReadLoop accepts: 1 MiB, far
// above any real loop description (a few hundred bytes), so that a wrong
// file (a device, an image, a log) is refused at once.
const MaxLoopFileBytes = 1 << 20

// coreKeys are the top-level loop-file keys read in this file; sections
// add their own (section.keys).
var coreKeys = []string{"name", "description", "plant", "controller", "sensor", "gain", "gain_range", "parameter", "delay_sec", "sample_time_sec", "discretize"}

var (
	parameterKeys  = []string{"name", "value", "range"}
	discretizeKeys = []string{"method", "sample_time_sec", "prewarp_rad_per_sec"}
)

// loopKey is a top-level loop-file key owned by a section: decode reads
// its value v into the loop.
type loopKey struct {
	name   string
	decode func(v keyValue, lf *Loop) error
}

// keyValue is the value of one loop-file key, with what a decoder needs
// for messages that name the key and its place in the file.
type keyValue struct {
	data []byte
	f    field
	lf   *Loop
}

// text reads the value as text.
func (v keyValue) text(dst *string) error { return decodeString(v.data, v.f, v.f.key, dst) }

// number reads the value as a finite number.
func (v keyValue) number(dst *float64) error { return decodeNumber(v.data, v.f, v.f.key, dst) }

// fields splits an object value into its keys, in file order, checking
// that each is one of known; every sub-key's position is recorded as
// "key.sub" for later messages.
func (v keyValue) fields(known []string) ([]keyValue, error) {
	fs, err := objectFields(v.data, v.f.raw, v.f.valOff, fmt.Sprintf("key %q", v.f.key))
	if err != nil {
		return nil, err
	}
	out := make([]keyValue, len(fs))
	for i, g := range fs {
		if known != nil && !slices.Contains(known, g.key) {
			return nil, unknownKey(v.data, g, fmt.Sprintf(" in %q", v.f.key), known)
		}
		if v.lf != nil && v.lf.pos != nil {
			v.lf.pos[v.f.key+"."+g.key] = positionOf(v.data, g.valOff)
			v.lf.off[v.f.key+"."+g.key] = g.valOff
		}
		g.key = v.f.key + "." + g.key
		out[i] = keyValue{data: v.data, f: g, lf: v.lf}
	}
	return out, nil
}

// sectionKeys returns the loop-file keys the pipeline's sections own.
func sectionKeys() map[string]loopKey {
	out := map[string]loopKey{}
	for _, s := range pipeline {
		for _, k := range s.keys {
			out[k.name] = k
		}
	}
	return out
}

// topKeys returns every top-level loop-file key, core keys first.
func topKeys() []string {
	keys := slices.Clone(coreKeys)
	for _, s := range pipeline {
		for _, k := range s.keys {
			keys = append(keys, k.name)
		}
	}
	return keys
}

// LoopKeys returns every key a loop file may hold, nested keys written
// "parameter.name", in the order of the documentation.
func LoopKeys() []string {
	var out []string
	for _, k := range topKeys() {
		out = append(out, k)
		var sub []string
		switch k {
		case "parameter":
			sub = parameterKeys
		case "discretize":
			sub = discretizeKeys
		case "requirements":
			sub = requirementKeys
		case "controller":
			sub = controllerFormKeys
		}
		for _, s := range sub {
			out = append(out, k+"."+s)
		}
	}
	return out
}

// inputError is a problem with the loop.
type inputError struct{ msg string }

func (e *inputError) Error() string        { return e.msg }
func (e *inputError) Is(target error) bool { return target == ErrBadInput }

func badInput(format string, a ...any) error {
	return &inputError{msg: shorten(fmt.Sprintf(format, a...))}
}

// position is a place in the loop file, 1-based.
type position struct{ line, column int }

func (p position) String() string { return fmt.Sprintf("line %d, column %d", p.line, p.column) }

// positionOf returns the line and column of byte offset off in data.
func positionOf(data []byte, off int) position {
	off = min(max(off, 0), len(data))
	before := data[:off]
	line := bytes.Count(before, []byte("\n")) + 1
	lineStart := bytes.LastIndexByte(before, '\n') + 1
	return position{line: line, column: utf8.RuneCount(before[lineStart:]) + 1}
}

// field is one key–value pair of a JSON object with the byte offsets of the
// key and the value in the whole file.
type field struct {
	key            string
	keyOff, valOff int
	raw            json.RawMessage
}

// objectFields splits the JSON object raw (found at offset base of data)
// into its fields, in file order. what names the object in messages.
func objectFields(data []byte, raw []byte, base int, what string) ([]field, error) {
	start := base + skipSpace(raw, 0)
	if kind := valueKind(raw); kind != "an object" {
		return nil, badInput("%s %s: want a JSON object {...}, got %s", what, at(data, start), kind)
	}
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.UseNumber()
	if _, err := dec.Token(); err != nil { // '{'
		return nil, syntaxError(data, base, err)
	}
	var fields []field
	seen := map[string]bool{}
	for dec.More() {
		tok, err := dec.Token()
		if err != nil {
			return nil, syntaxError(data, base, err)
		}
		key, _ := tok.(string)
		keyEnd := int(dec.InputOffset())
		keyOff := keyStart(raw, keyEnd)
		valOff := skipSpace(raw, keyEnd)
		if valOff < len(raw) && raw[valOff] == ':' {
			valOff = skipSpace(raw, valOff+1)
		}
		var val json.RawMessage
		if err := dec.Decode(&val); err != nil {
			return nil, syntaxError(data, base, err)
		}
		if seen[key] {
			return nil, badInput("key %q %s appears twice in %s", key, at(data, base+keyOff), what)
		}
		seen[key] = true
		fields = append(fields, field{key: key, keyOff: base + keyOff, valOff: base + valOff, raw: val})
	}
	return fields, nil
}

// keyStart returns the offset of the opening quote of the key string that
// ends just before end.
func keyStart(raw []byte, end int) int {
	for i := end - 2; i >= 0; i-- {
		if raw[i] == '"' && (i == 0 || raw[i-1] != '\\') {
			return i
		}
	}
	return 0
}

func skipSpace(b []byte, i int) int {
	for i < len(b) && (b[i] == ' ' || b[i] == '\t' || b[i] == '\n' || b[i] == '\r') {
		i++
	}
	return i
}

// valueKind names the JSON type of raw for messages.
func valueKind(raw []byte) string {
	i := skipSpace(raw, 0)
	if i >= len(raw) {
		return "nothing"
	}
	switch raw[i] {
	case '"':
		return "text"
	case '{':
		return "an object"
	case '[':
		return "a list"
	case 't', 'f':
		return "true/false"
	case 'n':
		return "null"
	}
	return "a number"
}

func at(data []byte, off int) string { return "at " + positionOf(data, off).String() }

// syntaxError turns an encoding/json error into a message with a position.
func syntaxError(data []byte, base int, err error) error {
	var se *json.SyntaxError
	if errors.As(err, &se) {
		return badInput("the file is not valid JSON: %s: %s", at(data, base+int(se.Offset)-1), strings.TrimPrefix(se.Error(), "json: "))
	}
	if errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) || strings.Contains(err.Error(), "unexpected EOF") {
		return badInput("the file is not valid JSON: the text ends before the object is complete")
	}
	return badInput("the file is not valid JSON: %v", err)
}

// ReadLoop reads a loop description in its JSON form (a loop file; the keys
// are documented in examples/loopreport/README.md). Unknown keys, keys
// given twice, values of the wrong type and non-finite numbers are
// rejected. name is the file name used in messages and in the default
// title. Every error wraps ErrBadInput and names the key and its line and
// column. A leading UTF-8 byte-order mark is ignored; a file larger than
// MaxLoopFileBytes is refused.
func ReadLoop(name string, data []byte) (*Loop, error) {
	if len(data) > MaxLoopFileBytes {
		return nil, badInput("%s: the file is larger than %d bytes (1 MiB); a loop file is a short JSON object such as {\"plant\": \"1/(s*(s+1))\"}", name, MaxLoopFileBytes)
	}
	// A UTF-8 byte-order mark, which some editors write, is not part of
	// the text.
	data = bytes.TrimPrefix(data, []byte("\ufeff"))
	if !utf8.Valid(data) {
		return nil, badInput("%s: the file is not UTF-8 text", name)
	}
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, badInput("%s: the file is empty; it should hold a JSON object such as {\"plant\": \"1/(s*(s+1))\"}", name)
	}
	if !json.Valid(data) {
		var v any
		err := json.Unmarshal(data, &v)
		if err == nil {
			err = errors.New("invalid JSON")
		}
		return nil, fmt.Errorf("%s: %w", name, syntaxError(data, 0, err))
	}
	lf, err := decodeLoop(data)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	lf.file = name
	return lf, nil
}

func unknownKey(data []byte, f field, where string, known []string) error {
	return badInput("unknown key %q%s %s; the keys allowed there are %s", f.key, where, at(data, f.keyOff), strings.Join(known, ", "))
}

func decodeLoop(data []byte) (*Loop, error) {
	fields, err := objectFields(data, data, 0, "the loop file")
	if err != nil {
		return nil, err
	}
	lf := &Loop{
		Controller: "1",
		Sensor:     "1",
		Gain:       1,
		GainRange:  [2]float64{0, math.Inf(1)},
		pos:        map[string]position{},
		off:        map[string]int{},
		data:       data,
	}
	extra := sectionKeys()
	for _, f := range fields {
		lf.pos[f.key] = positionOf(data, f.valOff)
		lf.off[f.key] = f.valOff
		v := keyValue{data: data, f: f, lf: lf}
		switch f.key {
		case "name":
			err = v.text(&lf.Name)
		case "description":
			err = v.text(&lf.Description)
		case "plant":
			err = v.text(&lf.Plant)
		case "controller":
			err = decodeController(v, lf)
		case "sensor":
			err = v.text(&lf.Sensor)
		case "gain":
			err = v.number(&lf.Gain)
		case "gain_range":
			err = decodeRange(data, f, f.key, &lf.GainRange)
		case "delay_sec":
			err = v.number(&lf.DelaySec)
		case "sample_time_sec":
			err = v.number(&lf.SampleTimeSec)
		case "parameter":
			lf.Parameter, err = decodeParameter(data, f, lf.pos)
		case "discretize":
			lf.Discretize, err = decodeDiscretize(data, f, lf.pos)
		default:
			if k, ok := extra[f.key]; ok {
				err = k.decode(v, lf)
			} else {
				err = unknownKey(data, f, "", topKeys())
			}
		}
		if err != nil {
			return nil, err
		}
	}
	if _, ok := lf.pos["plant"]; !ok {
		return nil, badInput("the key \"plant\" is missing; it is required (for example \"plant\": \"2/(s*(s+1))\")")
	}
	if strings.TrimSpace(lf.Plant) == "" {
		return nil, badInput("key \"plant\"%s is empty; give a transfer function such as \"2/(s*(s+1))\"", lf.where("plant"))
	}
	return lf, lf.validate()
}

// where returns " at line L, column C" for a key of the file, or "" when
// the loop did not come from a file.
func (lf *Loop) where(key string) string {
	if p, ok := lf.pos[key]; ok {
		return " at " + p.String()
	}
	return ""
}

// withDefaults returns a copy of lf with every zero optional field set to
// its default, checked by validate.
func (lf *Loop) withDefaults() (*Loop, error) {
	if lf == nil {
		return nil, badInput("no loop given")
	}
	c := *lf
	if c.ControllerForm != nil {
		g, err := c.ControllerForm.TF()
		if err != nil {
			return nil, badInput("controller form: %s", strings.TrimPrefix(err.Error(), "tf: "))
		}
		c.Controller = g.String()
	}
	if c.Controller == "" {
		c.Controller = "1"
	}
	if c.Sensor == "" {
		c.Sensor = "1"
	}
	if c.Gain == 0 {
		c.Gain = 1
	}
	if c.GainRange == [2]float64{} {
		c.GainRange = [2]float64{0, math.Inf(1)}
	}
	if strings.TrimSpace(c.Plant) == "" {
		return nil, badInput("key \"plant\"%s is empty; give a transfer function such as \"2/(s*(s+1))\"", c.where("plant"))
	}
	return &c, c.validate()
}

// validate checks the values that parse as JSON but make no sense.
func (lf *Loop) validate() error {
	if lf.DelaySec < 0 {
		return badInput("key \"delay_sec\"%s: the dead time must be zero or positive, got %g", lf.where("delay_sec"), lf.DelaySec)
	}
	if lf.SampleTimeSec < 0 {
		return badInput("key \"sample_time_sec\"%s: the sample time must be zero (continuous time) or positive, got %g", lf.where("sample_time_sec"), lf.SampleTimeSec)
	}
	if T, d := lf.SampleTimeSec, lf.DelaySec; T > 0 && d > 0 {
		// A loop written in z holds a dead time only as whole sample periods
		// (z^−d): between samples the z-domain loop says nothing, so a
		// fractional part has no exact meaning there. tf applies the rule
		// (and its tolerance); say it once here instead of in every section.
		one, err := tf.NewDiscrete([]float64{1}, []float64{1}, T)
		if err == nil {
			if one, err = one.WithDelay(d); err == nil {
				_, err = one.Pade(1)
			}
		}
		if errors.Is(err, tf.ErrFractionalDelay) {
			return badInput("key \"delay_sec\"%s: %s s is %s sample periods of \"sample_time_sec\" %s s; a loop written in z can only hold whole sample periods of dead time (z^−d). For a fractional dead time write the loop in s and add \"discretize\" with the zero- or first-order hold, which keep any dead time exactly (modified z-transform)",
				lf.where("delay_sec"), g(Number(d)), g(Number(d/T)), g(Number(T)))
		}
	}
	if lf.Gain == 0 {
		return badInput("key \"gain\"%s: the loop gain k must not be zero (there would be no feedback); use a small value such as 0.001, negative for the complementary locus", lf.where("gain"))
	}
	if lf.GainRange[0] >= lf.GainRange[1] {
		return badInput("key \"gain_range\"%s: the lower end must be below the upper end, got [%g, %g]", lf.where("gain_range"), lf.GainRange[0], lf.GainRange[1])
	}
	if p := lf.Parameter; p != nil {
		if p.Range[0] >= p.Range[1] {
			return badInput("key \"parameter.range\"%s: the lower end must be below the upper end, got [%g, %g]", lf.where("parameter.range"), p.Range[0], p.Range[1])
		}
	}
	if d := lf.Discretize; d != nil {
		if lf.SampleTimeSec > 0 {
			return badInput("keys \"sample_time_sec\"%s and \"discretize\"%s exclude each other: \"discretize\" converts a continuous loop written in s, \"sample_time_sec\" says the loop is already written in z", lf.where("sample_time_sec"), lf.where("discretize"))
		}
		if !(d.SampleTimeSec > 0) {
			return badInput("key \"discretize.sample_time_sec\"%s: the sample time must be positive, got %g", lf.where("discretize.sample_time_sec"), d.SampleTimeSec)
		}
		if d.PrewarpRadPerSec < 0 {
			return badInput("key \"discretize.prewarp_rad_per_sec\"%s: the prewarp frequency must be positive, got %g", lf.where("discretize.prewarp_rad_per_sec"), d.PrewarpRadPerSec)
		}
		if w := d.PrewarpRadPerSec; w > 0 && w*d.SampleTimeSec < 0x1p-1022 {
			return badInput("key \"discretize.prewarp_rad_per_sec\"%s: the prewarp frequency %s rad/s is too small to compute with at the sample time %s s; leave the key out for the plain Tustin conversion (it is the limit of a small prewarp frequency)", lf.where("discretize.prewarp_rad_per_sec"), g(Number(w)), g(Number(d.SampleTimeSec)))
		}
		if w, nyq := d.PrewarpRadPerSec, math.Pi/d.SampleTimeSec; w > 0 && w >= nyq*(1-0x1p-26) {
			// tf.Discretize refuses it too; say it in the file's words.
			return badInput("key \"discretize.prewarp_rad_per_sec\"%s: the prewarp frequency %s rad/s must lie below π/T = %s rad/s (half the sampling frequency of \"sample_time_sec\" %s s) by more than a relative 1.5e-8: there the Tustin conversion degenerates", lf.where("discretize.prewarp_rad_per_sec"), g(Number(w)), g(Number(nyq)), g(Number(d.SampleTimeSec)))
		}
		if d.PrewarpRadPerSec > 0 && d.Method != "tustin" {
			return badInput("key \"discretize.prewarp_rad_per_sec\"%s: a prewarp frequency applies to the method \"tustin\" only, not %q", lf.where("discretize.prewarp_rad_per_sec"), d.Method)
		}
	}
	return nil
}

func decodeString(data []byte, f field, key string, dst *string) error {
	if k := valueKind(f.raw); k != "text" {
		return badInput("key %q %s: want text in quotes, got %s", key, at(data, f.valOff), k)
	}
	return json.Unmarshal(f.raw, dst)
}

func decodeNumber(data []byte, f field, key string, dst *float64) error {
	v, err := number1(data, f.raw, f.valOff, key, false)
	if err != nil {
		return err
	}
	*dst = v
	return nil
}

// number1 reads one JSON number; with nullOK a null gives NaN.
func number1(data []byte, raw []byte, off int, key string, nullOK bool) (float64, error) {
	k := valueKind(raw)
	if k == "null" && nullOK {
		return math.NaN(), nil
	}
	if k != "a number" {
		return 0, badInput("key %q %s: want a number, got %s", key, at(data, off), k)
	}
	var v float64
	if err := json.Unmarshal(raw, &v); err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, badInput("key %q %s: %s is not a finite number", key, at(data, off), strings.TrimSpace(string(raw)))
	}
	return v, nil
}

// decodeRange reads [lo, hi] where an end may be null for unbounded.
func decodeRange(data []byte, f field, key string, dst *[2]float64) error {
	if k := valueKind(f.raw); k != "a list" {
		return badInput("key %q %s: want a list [low, high] (null for an unbounded end), got %s", key, at(data, f.valOff), k)
	}
	var items []json.RawMessage
	if err := json.Unmarshal(f.raw, &items); err != nil || len(items) != 2 {
		return badInput("key %q %s: want a list of two numbers [low, high] (null for an unbounded end)", key, at(data, f.valOff))
	}
	for i, it := range items {
		v, err := number1(data, it, f.valOff, key, true)
		if err != nil {
			return err
		}
		if math.IsNaN(v) {
			v = math.Inf(2*i - 1)
		}
		dst[i] = v
	}
	return nil
}

func decodeParameter(data []byte, f field, pos map[string]position) (*Parameter, error) {
	fields, err := objectFields(data, f.raw, f.valOff, "key \"parameter\"")
	if err != nil {
		return nil, err
	}
	p := &Parameter{}
	seen := map[string]bool{}
	for _, g := range fields {
		seen[g.key] = true
		key := "parameter." + g.key
		pos[key] = positionOf(data, g.valOff)
		switch g.key {
		case "name":
			err = decodeString(data, g, key, &p.Name)
		case "value":
			err = decodeNumber(data, g, key, &p.Value)
		case "range":
			err = decodeRange(data, g, key, &p.Range)
		default:
			err = unknownKey(data, g, " in \"parameter\"", parameterKeys)
		}
		if err != nil {
			return nil, err
		}
	}
	for _, k := range []string{"name", "value"} {
		if !seen[k] {
			return nil, badInput("key \"parameter\" %s lacks %q; write for example {\"name\": \"p\", \"value\": 0.5, \"range\": [0, 5]}", at(data, f.valOff), k)
		}
	}
	if !seen["range"] {
		// The parameter's side of zero, as for the gain.
		p.Range = [2]float64{0, math.Inf(1)}
		if p.Value < 0 {
			p.Range = [2]float64{math.Inf(-1), 0}
		}
	}
	return p, nil
}

func decodeDiscretize(data []byte, f field, pos map[string]position) (*Discretize, error) {
	fields, err := objectFields(data, f.raw, f.valOff, "key \"discretize\"")
	if err != nil {
		return nil, err
	}
	d := &Discretize{}
	seen := map[string]bool{}
	for _, g := range fields {
		seen[g.key] = true
		key := "discretize." + g.key
		pos[key] = positionOf(data, g.valOff)
		switch g.key {
		case "method":
			err = decodeString(data, g, key, &d.Method)
			if err == nil {
				switch d.Method {
				case "zoh", "foh", "tustin", "matched":
				default:
					err = badInput("key %q %s: unknown method %q; use \"zoh\", \"foh\", \"tustin\" or \"matched\"", key, at(data, g.valOff), d.Method)
				}
			}
		case "sample_time_sec":
			err = decodeNumber(data, g, key, &d.SampleTimeSec)
		case "prewarp_rad_per_sec":
			err = decodeNumber(data, g, key, &d.PrewarpRadPerSec)
		default:
			err = unknownKey(data, g, " in \"discretize\"", discretizeKeys)
		}
		if err != nil {
			return nil, err
		}
	}
	for _, k := range []string{"method", "sample_time_sec"} {
		if !seen[k] {
			return nil, badInput("key \"discretize\" %s lacks %q; write for example {\"method\": \"zoh\", \"sample_time_sec\": 0.01}", at(data, f.valOff), k)
		}
	}
	return d, nil
}
