package main

import (
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/loopwise/loopwise/report"
)

// progress shows what the program is doing on one line of a terminal:
// "loopreport: [3/8] margins". On a writer that is not a terminal (a file,
// a pipe) it stays silent, so logs and captured output stay clean.
type progress struct {
	w     io.Writer
	live  bool
	last  report.Progress
	width int
}

// newProgress returns a progress line on w; it is live only when w is a
// terminal and quiet is false.
func newProgress(w io.Writer, quiet bool) *progress {
	live := false
	if f, ok := w.(*os.File); ok && !quiet {
		if st, err := f.Stat(); err == nil && st.Mode()&os.ModeCharDevice != 0 {
			live = true
		}
	}
	return &progress{w: w, live: live}
}

// step announces a stage of the program's own after those of the analysis.
func (p *progress) step(what string) {
	n := p.last.Step + 1
	p.show(report.Progress{Stage: what, Step: n, Steps: max(p.last.Steps, n)})
}

// show draws the progress line for the stage of r.
func (p *progress) show(r report.Progress) {
	p.last = r
	if !p.live {
		return
	}
	what := r.Stage
	if r.Fraction > 0 {
		what = fmt.Sprintf("%s %3.0f %%", what, 100*r.Fraction)
	}
	line := fmt.Sprintf("loopreport: [%d/%d] %s …", r.Step, max(r.Steps, r.Step), what)
	pad := ""
	if d := p.width - len([]rune(line)); d > 0 {
		pad = strings.Repeat(" ", d)
	}
	fmt.Fprintf(p.w, "\r%s%s", line, pad)
	p.width = len([]rune(line))
}

// done clears the progress line.
func (p *progress) done() {
	if p.live && p.width > 0 {
		fmt.Fprintf(p.w, "\r%s\r", strings.Repeat(" ", p.width))
		p.width = 0
	}
}
