package main

import (
	"fmt"
	"io"
	"os"
	"strings"
)

// progress shows what the program is doing on one line of a terminal:
// "loopreport: [3/8] margins". On a writer that is not a terminal (a file,
// a pipe) it stays silent, so logs and captured output stay clean.
type progress struct {
	w     io.Writer
	live  bool
	total int
	n     int
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

// step announces the next stage.
func (p *progress) step(what string) {
	p.n++
	p.show(what)
}

// fraction reports how far the current stage has come, in [0, 1].
func (p *progress) fraction(what string, f float64) {
	p.show(fmt.Sprintf("%s %3.0f %%", what, 100*min(max(f, 0), 1)))
}

func (p *progress) show(what string) {
	if !p.live {
		return
	}
	line := fmt.Sprintf("loopreport: [%d/%d] %s …", p.n, max(p.total, p.n), what)
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
