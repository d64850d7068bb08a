// Command paramsweep sweeps a compensator time constant with the gain held
// fixed and picks the value that gives the dominant closed-loop poles a
// target damping ratio. The locus variable is the time constant, not a
// gain: the characteristic polynomial a(s) + τ·b(s) is affine in τ, so
// every root-locus rule applies to τ as it does to a gain.
//
// The scenario is this project's own: the tilt axis of a camera gimbal.
// From the motor driver's voltage to the tilt angle,
//
//	G(s) = 40 / (s (s + 2) (s + 20))   rad per V
//
// (camera inertia with bearing friction, and the driver's current loop).
// A PD controller C(s) = 10·(1 + τs) V per rad drives it; the proportional
// gain 10 V/rad is fixed by how stiffly the camera must hold against wind
// torque, and the derivative time τ (seconds) is free. The drive's
// derivative filter is far faster than the loop and left out of the model.
// The program looks for damping ratio 0.6.
//
// Usage:
//
//	go run ./examples/paramsweep [-out folder]
package main

import (
	"io"

	"github.com/loopwise/loopwise/examples/internal/output"
)

func main() { output.Main("paramsweep", "paramsweep-output", run) }

// run sweeps the time constant, prints the summary to stdout and writes the
// plots into outDir (no plots when outDir is empty).
func run(stdout io.Writer, outDir string) error {
	d, err := sweep()
	if err != nil {
		return err
	}
	return output.Report(stdout, outDir, d.print, d.plot)
}
