// Command levitation shows a loop around an open-loop unstable plant that is
// stable only inside a window of controller gains: too little gain and the
// unstable pole is not pulled back, too much and the lags of the lead
// filter and the coil driver destabilise the loop. It prints the exact
// stable gain interval, places the gain in the geometric middle of it, and
// reports both the ordinary (upper) and the lower gain margin.
//
// The scenario is this project's own: a steel ball hangs under an
// electromagnet with a 21.8 mm air gap at 1 A. Linearised about that point,
// the ball height h (m, up positive) follows the coil current i (A) as
//
//	G(s) = 19.62 / (s² − 900)   m per A,
//
// an unstable pole at +30 1/s (√(2g/gap)). The controller is a lead filter
// C(s) = Kc·(s/15 + 1)/(s/150 + 1) in A per m of height error, and the coil
// driver follows its current command with a lag D(s) = 1/(s/300 + 1).
// The locus variable is Kc.
//
// Usage:
//
//	go run ./examples/levitation [-out folder]
package main

import (
	"io"

	"github.com/loopwise/loopwise/examples/internal/output"
)

func main() { output.Main("levitation", "levitation-output", run) }

// run analyses the levitation loop, prints the summary to stdout and writes
// the plots into outDir (no plots when outDir is empty).
func run(stdout io.Writer, outDir string) error {
	d, err := analyse()
	if err != nil {
		return err
	}
	return output.Report(stdout, outDir, d.print, d.plot)
}
