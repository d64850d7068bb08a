package report

import (
	"bytes"
	"fmt"
	"io"
	"strings"
)

// row is one line of a result table: a quantity in words and its value.
type row struct{ label, value string }

// table is a titled group of rows, shared by the text summary, the
// Markdown summary and index.html.
type table struct {
	title string
	rows  []row
}

// tables turns the report into titled tables of words and numbers: the
// loop, then every section of the pipeline in order.
func tables(r *Report) []table {
	out := []table{loopTable(r)}
	for _, s := range pipeline {
		if s.tables == nil {
			continue
		}
		for _, t := range s.tables(r) {
			// Notes and reasons from other packages, in the report's
			// number format (the loop table echoes the loop file's own
			// text and is left as written).
			for i := range t.rows {
				t.rows[i].label = typeset(t.rows[i].label)
				t.rows[i].value = typeset(t.rows[i].value)
			}
			out = append(out, t)
		}
	}
	return out
}

// loopTable describes the loop that was analysed.
func loopTable(r *Report) table {
	loop := table{title: "Loop"}
	loop.rows = append(loop.rows,
		row{"plant", r.Loop.Plant},
		row{"controller", r.Loop.Controller},
		row{"sensor (feedback path)", r.Loop.Sensor},
	)
	if r.Loop.OpenLoopFactored != "" {
		loop.rows = append(loop.rows, row{"open loop L = k·controller·plant·sensor", r.Loop.OpenLoopFactored})
	} else {
		loop.rows = append(loop.rows, row{"open loop L = k·controller·plant·sensor", r.Loop.OpenLoop})
	}
	loop.rows = append(loop.rows, row{"loop gain k", g(r.Loop.Gain)})
	if r.Loop.Parameter != nil {
		loop.rows = append(loop.rows, row{"parameter", *r.Loop.Parameter})
	}
	if float64(r.Loop.SampleTimeSec) > 0 {
		loop.rows = append(loop.rows, row{"sample time", gUnit(r.Loop.SampleTimeSec, "s")})
	}
	if float64(r.Loop.DelaySec) > 0 {
		loop.rows = append(loop.rows, row{"dead time", gUnit(r.Loop.DelaySec, "s")})
	}
	if d := r.DiscreteLoop; d != nil {
		loop.rows = append(loop.rows, row{"converted to z by", fmt.Sprintf("%s at a sample time of %s", methodWords(d.Method), gUnit(d.SampleTimeSec, "s"))})
	}
	return loop
}

// atFrequency says where a peak lies: "at 2.5 rad/s", or "approached as
// the frequency grows without bound".
func atFrequency(w Number) string {
	if isInf(w) {
		return "(approached as the frequency grows without bound)"
	}
	return "at " + gUnit(w, "rad/s")
}

func isInf(x Number) bool { return float64(x) > 1e308 }

// intervalListClosed formats real-axis segments [lo, hi].
func intervalListClosed(ivs []Interval) string { return listIntervals(ivs, true) }

func variableWords(v string) string {
	if v == "gain" {
		return "the loop gain k"
	}
	return "the parameter " + v
}

func methodWords(m string) string {
	switch m {
	case "zoh":
		return "zero-order hold"
	case "foh":
		return "first-order hold"
	case "tustin":
		return "the Tustin (bilinear) transform"
	case "matched":
		return "matched poles and zeros"
	}
	return m
}

// verdictCounts returns how many requirements pass, of how many.
func verdictCounts(r *Report) (pass, total int) {
	for _, q := range r.Requirements {
		if q.Pass {
			pass++
		}
	}
	return pass, len(r.Requirements)
}

// WriteSummary writes the readable text summary of the report to w.
func (r *Report) WriteSummary(w io.Writer) error {
	var b bytes.Buffer
	fmt.Fprintln(&b, r.Name)
	fmt.Fprintln(&b, strings.Repeat("=", len([]rune(r.Name))))
	if r.Description != "" {
		fmt.Fprintln(&b, r.Description)
	}
	for _, s := range tables(r) {
		fmt.Fprintf(&b, "\n%s\n", s.title)
		width := 0
		for _, rw := range s.rows {
			width = max(width, len([]rune(rw.label)))
		}
		width = min(width, 44)
		for _, rw := range s.rows {
			pad := max(width-len([]rune(rw.label)), 0)
			fmt.Fprintf(&b, "  %s%s  %s\n", rw.label, strings.Repeat(" ", pad), rw.value)
		}
	}
	if len(r.Requirements) > 0 {
		pass, total := verdictCounts(r)
		fmt.Fprintf(&b, "\nRequirements: %d of %d met\n", pass, total)
		for _, q := range r.Requirements {
			verdict := "pass"
			if !q.Pass {
				verdict = "FAIL"
			}
			fmt.Fprintf(&b, "  %s  %s\n", verdict, typeset(q.Message))
		}
	}
	if len(r.Warnings) > 0 {
		fmt.Fprintln(&b, "\nWarnings")
		for _, s := range r.Warnings {
			fmt.Fprintf(&b, "  - %s\n", typeset(s))
		}
	}
	fmt.Fprintf(&b, "\nCaution: %s\n", safetyCaution)
	_, err := w.Write(b.Bytes())
	return err
}

// safetyCaution is printed with every report.
const safetyCaution = "These results describe a linear model. They do not guarantee the behaviour of real hardware (saturation, friction, backlash, quantisation, noise and unmodelled dynamics are not in the model). Validate loops that drive machines on the real plant with limits and interlocks in place; local codes, applicable standards and licensed engineering practice govern any safety-related use."
