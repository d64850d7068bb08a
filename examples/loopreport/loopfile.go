package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"unicode/utf8"
)

// loopFile is a loop description read from JSON (see README.md for the
// format). Absent keys hold their defaults after readLoopFile.
type loopFile struct {
	Name        string
	Description string
	Plant       string
	Controller  string
	Sensor      string
	Gain        float64
	// GainRange is the range of the loop gain k for the locus; ±Inf for an
	// unbounded end.
	GainRange     [2]float64
	Parameter     *parameterSpec
	DelaySec      float64
	SampleTimeSec float64
	Discretize    *discretizeSpec
	Requirements  []requirementSpec

	// pos holds the position ("line 3, column 12") of each key as
	// written, for messages about values that parse but do not make sense
	// (an expression that does not parse, an improper loop).
	pos  map[string]position
	off  map[string]int // byte offset of each value in data
	data []byte
	file string
}

type parameterSpec struct {
	Name  string
	Value float64
	Range [2]float64
}

type discretizeSpec struct {
	Method           string
	SampleTimeSec    float64
	PrewarpRadPerSec float64
}

// requirementSpec is one entry of "requirements": its key as written and
// its limit.
type requirementSpec struct {
	Key   string
	Limit float64
}

// requirementKeys lists the keys accepted inside "requirements", in the
// order in which the report lists them.
var requirementKeys = []string{
	"min_phase_margin_deg",
	"min_gain_margin_db",
	"min_delay_margin_sec",
	"max_peak_sensitivity",
	"min_damping_ratio",
	"max_overshoot_pct",
	"max_rise_time_sec",
	"max_settling_time_sec",
	"max_steady_state_error",
}

var (
	topKeys        = []string{"name", "description", "plant", "controller", "sensor", "gain", "gain_range", "parameter", "delay_sec", "sample_time_sec", "discretize", "requirements"}
	parameterKeys  = []string{"name", "value", "range"}
	discretizeKeys = []string{"method", "sample_time_sec", "prewarp_rad_per_sec"}
)

// errBadInput marks errors in the user's input; run exits with status 2 on
// them.
var errBadInput = errors.New("bad input")

// inputError is a problem with the loop file or the flags.
type inputError struct{ msg string }

func (e *inputError) Error() string        { return e.msg }
func (e *inputError) Is(target error) bool { return target == errBadInput }

func badInput(format string, a ...any) error {
	return &inputError{msg: fmt.Sprintf(format, a...)}
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

// readLoopFile reads a loop description. name is the file name used in
// messages. Every problem is an *inputError naming the key and its position.
func readLoopFile(name string, data []byte) (*loopFile, error) {
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

func decodeLoop(data []byte) (*loopFile, error) {
	fields, err := objectFields(data, data, 0, "the loop file")
	if err != nil {
		return nil, err
	}
	lf := &loopFile{
		Controller: "1",
		Sensor:     "1",
		Gain:       1,
		GainRange:  [2]float64{0, math.Inf(1)},
		pos:        map[string]position{},
		off:        map[string]int{},
		data:       data,
	}
	for _, f := range fields {
		lf.pos[f.key] = positionOf(data, f.valOff)
		lf.off[f.key] = f.valOff
		switch f.key {
		case "name":
			err = decodeString(data, f, f.key, &lf.Name)
		case "description":
			err = decodeString(data, f, f.key, &lf.Description)
		case "plant":
			err = decodeString(data, f, f.key, &lf.Plant)
		case "controller":
			err = decodeString(data, f, f.key, &lf.Controller)
		case "sensor":
			err = decodeString(data, f, f.key, &lf.Sensor)
		case "gain":
			err = decodeNumber(data, f, f.key, &lf.Gain)
		case "gain_range":
			err = decodeRange(data, f, f.key, &lf.GainRange)
		case "delay_sec":
			err = decodeNumber(data, f, f.key, &lf.DelaySec)
		case "sample_time_sec":
			err = decodeNumber(data, f, f.key, &lf.SampleTimeSec)
		case "parameter":
			lf.Parameter, err = decodeParameter(data, f, lf.pos)
		case "discretize":
			lf.Discretize, err = decodeDiscretize(data, f, lf.pos)
		case "requirements":
			lf.Requirements, err = decodeRequirements(data, f)
		default:
			err = unknownKey(data, f, "", topKeys)
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
func (lf *loopFile) where(key string) string {
	if p, ok := lf.pos[key]; ok {
		return " at " + p.String()
	}
	return ""
}

// validate checks the values that parse as JSON but make no sense.
func (lf *loopFile) validate() error {
	if lf.DelaySec < 0 {
		return badInput("key \"delay_sec\"%s: the dead time must be zero or positive, got %g", lf.where("delay_sec"), lf.DelaySec)
	}
	if lf.SampleTimeSec < 0 {
		return badInput("key \"sample_time_sec\"%s: the sample time must be zero (continuous time) or positive, got %g", lf.where("sample_time_sec"), lf.SampleTimeSec)
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

func decodeParameter(data []byte, f field, pos map[string]position) (*parameterSpec, error) {
	fields, err := objectFields(data, f.raw, f.valOff, "key \"parameter\"")
	if err != nil {
		return nil, err
	}
	p := &parameterSpec{}
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

func decodeDiscretize(data []byte, f field, pos map[string]position) (*discretizeSpec, error) {
	fields, err := objectFields(data, f.raw, f.valOff, "key \"discretize\"")
	if err != nil {
		return nil, err
	}
	d := &discretizeSpec{}
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

func decodeRequirements(data []byte, f field) ([]requirementSpec, error) {
	fields, err := objectFields(data, f.raw, f.valOff, "key \"requirements\"")
	if err != nil {
		return nil, err
	}
	var out []requirementSpec
	for _, g := range fields {
		known := false
		for _, k := range requirementKeys {
			known = known || k == g.key
		}
		if !known {
			return nil, unknownKey(data, g, " in \"requirements\"", requirementKeys)
		}
		var v float64
		if err := decodeNumber(data, g, "requirements."+g.key, &v); err != nil {
			return nil, err
		}
		out = append(out, requirementSpec{Key: g.key, Limit: v})
	}
	return out, nil
}
