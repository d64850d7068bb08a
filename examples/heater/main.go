// Command heater analyses a temperature loop with dead time: an electric
// heater warms a small process vessel, and the sensor sees the change only
// after the liquid has travelled to it. Dead time is exact in the
// frequency domain, so the program first reports the gain, phase and delay
// margins with the dead time kept exactly. A root locus needs a rational
// loop, so it then replaces the dead time by Padé approximations of order
// 1, 2 and 3 and shows what each one adds to the locus (poles on the left,
// zeros mirrored on the right) and how close its stability limit comes to
// the exact one.
//
// The scenario is this project's own: from heater power u (% of full
// power) to the measured temperature (°C),
//
//	G(s) = 2.5·e^(−12s) / (90s + 1)   °C per %,
//
// a 90 s lag and 12 s of transport delay. A PI controller
// C(s) = Kc·(1 + 1/(Ti·s)) is tuned by cancelling the lag (Ti = 90 s) and
// asking for a closed-loop time constant λ = 30 s: Kc = 90/(2.5·(λ + 12))
// % per °C (lambda tuning, common practice).
//
// Usage:
//
//	go run ./examples/heater [-out folder]
package main

import (
	"io"

	"github.com/loopwise/loopwise/examples/internal/output"
)

func main() { output.Main("heater", "heater-output", run) }

// run analyses the heater loop, prints the summary to stdout and writes the
// plots into outDir (no plots when outDir is empty).
func run(stdout io.Writer, outDir string) error {
	d, err := analyse()
	if err != nil {
		return err
	}
	return output.Report(stdout, outDir, d.print, d.plot)
}
