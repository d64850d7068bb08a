// Command digital takes a continuous controller design and turns it into
// a digital controller at two sample periods, then compares the three loops
// — continuous, fast sampling and slow sampling — on the unit circle (where
// the discrete root locus leaves it, the gain margin) and in the step
// response.
//
// The scenario is this project's own: a robot wrist joint. From the drive
// voltage to the joint angle,
//
//	G(s) = 200 / (s (s + 10))   rad per V.
//
// The continuous design is a lead compensator C(s) = 4(s + 10)/(s + 40)
// V per rad: its zero cancels the mechanical pole, leaving the loop
// 800/(s(s + 40)), a pole pair with damping ratio 1/√2 and natural frequency
// √800 ≈ 28.3 rad/s. For the digital controller C(s) is discretised by the
// Tustin (bilinear) rule, and the plant, seen through the converter's
// zero-order hold, by its exact zero-order-hold equivalent, at T = 5 ms
// (about 44 samples per period of the closed-loop poles) and T = 50 ms
// (about 4).
//
// Usage:
//
//	go run ./examples/digital [-out folder]
package main

import (
	"io"

	"github.com/loopwise/loopwise/examples/internal/output"
)

func main() { output.Main("digital", "digital-output", run) }

// run compares the designs, prints the summary to stdout and writes the
// plots into outDir (no plots when outDir is empty).
func run(stdout io.Writer, outDir string) error {
	d, err := compare()
	if err != nil {
		return err
	}
	return output.Report(stdout, outDir, d.print, d.plot)
}
