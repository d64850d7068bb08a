// Command servo tunes the proportional gain of a motor position servo with
// the gain root locus, then checks the chosen gain with the frequency-domain
// margins and the step-response metrics.
//
// The scenario is this project's own: a small DC motor drives a rotary
// indexing table. From the amplifier's input voltage to the table angle the
// motor, its mechanical time constant (125 ms) and the current loop and
// encoder filter of the drive (25 ms) give
//
//	G(s) = 2400 / (s (s + 8) (s + 40))   rad per V.
//
// A proportional controller Kp (V per rad of angle error) closes the loop,
// L(s) = Kp·G(s). The program traces the root locus over Kp, finds the gain
// that puts the dominant closed-loop poles on the damping ratio 0.7, and
// reports the margins and the step response at that gain.
//
// Usage:
//
//	go run ./examples/servo [-out folder]
package main

import (
	"io"

	"github.com/loopwise/loopwise/examples/internal/output"
)

func main() { output.Main("servo", "servo-output", run) }

// run designs the servo, prints the summary to stdout and writes the plots
// into outDir (no plots when outDir is empty).
func run(stdout io.Writer, outDir string) error {
	d, err := designServo()
	if err != nil {
		return err
	}
	return output.Report(stdout, outDir, d.print, d.plot)
}
