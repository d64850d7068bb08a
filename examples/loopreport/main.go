// Command loopreport analyses a linear feedback loop and prints or writes
// everything loopwise knows about it: open- and closed-loop poles, the root
// locus with its construction quantities and stable intervals, margins,
// step response and steady-state errors, requirement verdicts, and plots.
//
// Usage:
//
//	loopreport [-loop FILE] [-json] [-out DIR] [-quiet]
//
// Without -loop it analyses a built-in demonstration loop. The loop file
// format and the JSON output are documented in README.md and by -h.
package main

import (
	"bytes"
	_ "embed"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/loopwise/loopwise/report"
)

//go:embed demo.json
var demoLoop []byte

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

const usageHead = `loopreport analyses a linear feedback loop L = k·controller·plant·sensor
(negative feedback) and prints a summary, or the full analysis as JSON, and
writes a report folder with plots, a Markdown summary and index.html.

Usage:
  loopreport [-loop FILE] [-json] [-out DIR] [-quiet] [-timestamp]

Without -loop the built-in demonstration loop is analysed (print it with
-print-demo to start a loop file of your own).

Flags:
`

const usageFormat = `
Loop file (UTF-8 JSON of at most 1 MiB; unknown keys are rejected):
  name             text; a name for the report
  description      text; a sentence shown in the report
  plant            text, required: transfer function in s, or in z when
                   sample_time_sec > 0, e.g. "2.5/(s*(0.2s+1))"; exp(-0.1s)
                   adds dead time
  controller       text, default "1"; may use the parameter name; or a
                   structured form (continuous loops):
                   {"form": "pid", "gain": 2, "integral_time_sec": 0.5,
                    "derivative_time_sec": 0.05, "derivative_filter": 10}
                   forms: pid (gain, integral_time_sec, derivative_time_sec,
                   derivative_filter optional, 0 = unfiltered), pi (gain,
                   integral_time_sec), pd (gain, derivative_time_sec,
                   derivative_filter), lead_lag (center_frequency_rad_per_sec,
                   phase_deg, gain optional), notch (frequency_rad_per_sec,
                   depth 0..1, width_rad_per_sec, gain optional)
  sensor           text, default "1": the feedback path
  gain             number, default 1: the loop gain k at which margins and
                   responses are evaluated
  gain_range       [min, max], default [0, null]: the range of k for the
                   root locus; null is an unbounded end; a negative range
                   gives the complementary locus
  parameter        {"name": "p", "value": 0.5, "range": [0, 5]}: the locus,
                   break points, crossings and stable intervals are then in
                   the parameter (at the given gain); margins and responses
                   are evaluated at the given value
  delay_sec        number, default 0: dead time added to the loop
  dead_time_model  "exact" (default) or "pade": a continuous loop's dead
                   time kept exact (closed-loop roots, crossings, stable
                   dead-time ranges, step response) or replaced by a
                   6th-order Padé approximation
  sample_time_sec  number, default 0 (continuous, expressions in s);
                   positive: the expressions are in z
  discretize       {"method": "zoh"|"foh"|"tustin"|"matched",
                    "sample_time_sec": T, "prewarp_rad_per_sec": w}: the
                   continuous loop is converted and analysed in z
  requirements     limits checked against the loop:
                   min_phase_margin_deg, min_gain_margin_db,
                   min_delay_margin_sec, max_peak_sensitivity,
                   min_damping_ratio, max_overshoot_pct, max_rise_time_sec,
                   max_settling_time_sec, max_steady_state_error,
                   max_disturbance_peak (per unit load step),
                   max_recovery_time_sec (2 % of the peak),
                   max_control_peak (per unit reference step),
                   max_integrated_absolute_error (load step),
                   max_noise_to_control_gain (largest |noise → u|)
  uncertain        {"g": {"range": [0.8, 1.2]},
                    "m": {"range": [0.05, 0.08], "distribution": "normal"}}:
                   parameters of the expressions with their ranges; the
                   loop is proven stable for the whole box (or an unstable
                   point is given), worst margins are bounded, each
                   requirement is judged over the box, and a Monte Carlo
                   estimate is made; the other analyses use the centres
  samples          number of Monte Carlo samples with "uncertain",
                   default 1000
  plane            {"x": {"name": "Kp", "value": 1, "range": [0, 10]},
                    "y": {"name": "Ki", "value": 0.5, "range": [0, 5]}}:
                   two parameters of the expressions (value: the nominal
                   point used by every other analysis; range: finite);
                   adds the stable regions of their plane (D-partition),
                   the regions where each requirement holds, and the
                   figure parameter-plane

Example:
  {"name": "speed loop", "plant": "40/((s+2)(s+8))",
   "controller": "(1 + 1/(0.5s))", "gain": 0.8,
   "requirements": {"min_phase_margin_deg": 45, "max_overshoot_pct": 10}}

JSON output: open_loop, closed_loop, locus, margins, step, steady_state,
load_disturbance, control_effort, noise, discrete_loop (with discretize),
requirements, design (with requirements: the values of the gain or the
parameter that meet each one), plane (with plane), robust (with uncertain),
dead_time (continuous loops with dead time: exact roots, delay margin,
stable dead-time ranges), warnings; a quantity that is
infinite or does not exist is null; complex numbers are {"re": x, "im": y}.
See README.md for every key.

Exit status: 0 on success, 2 for bad input (flags, loop file), 1 when the
output or the report cannot be written.

Results describe a linear model. They do not guarantee the behaviour of real
hardware: validate loops that drive machines on the real plant with limits
and interlocks in place.
`

// run is the whole program: it parses args, reads the loop, analyses it
// and writes the output. It returns the exit status.
func run(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("loopreport", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var help bytes.Buffer
	for _, a := range args {
		if a == "--" {
			break
		}
		if a == "-h" || a == "-help" || a == "--h" || a == "--help" {
			fs.SetOutput(&help) // asked for: the documentation is the output
		}
	}
	loopPath := fs.String("loop", "", "read the loop from `FILE` (JSON, format below) instead of using the demonstration loop")
	asJSON := fs.Bool("json", false, "print the full analysis as JSON on stdout instead of the summary; the report folder is then written only when -out is given")
	outDir := fs.String("out", "loopreport-out", "write the report (plots, summary.md, index.html) into `DIR`; an empty DIR writes no report")
	quiet := fs.Bool("quiet", false, "do not show the progress line on stderr")
	printDemo := fs.Bool("print-demo", false, "print the demonstration loop file and exit")
	stamp := fs.Bool("timestamp", false, "write the time of the run into index.html; without it two runs on the same loop file write identical files")
	fs.Usage = func() {
		fmt.Fprint(fs.Output(), usageHead)
		fs.PrintDefaults()
		fmt.Fprint(fs.Output(), usageFormat)
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			if _, err := stdout.Write(help.Bytes()); err != nil {
				fmt.Fprintf(stderr, "loopreport: cannot write the help text: %v\n", err)
				return 1
			}
			return 0
		}
		return 2
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "loopreport: unexpected argument %q; the loop file is given with -loop FILE (see -h)\n", fs.Arg(0))
		return 2
	}
	if *printDemo {
		if _, err := stdout.Write(demoLoop); err != nil {
			fmt.Fprintf(stderr, "loopreport: cannot write the demonstration loop: %v\n", err)
			return 1
		}
		return 0
	}
	outGiven := false
	fs.Visit(func(f *flag.Flag) { outGiven = outGiven || f.Name == "out" })
	writeReport := *outDir != "" && (!*asJSON || outGiven)

	name, data := "the demonstration loop", demoLoop
	if *loopPath != "" {
		var err error
		name = *loopPath
		data, err = readCapped(*loopPath, report.MaxLoopFileBytes)
		if err != nil {
			fmt.Fprintf(stderr, "loopreport: cannot read the loop file: %s\n", describeFileError(*loopPath, err))
			return 2
		}
	}
	lf, err := report.ReadLoop(name, data)
	if err != nil {
		fmt.Fprintf(stderr, "loopreport: %v\n", err)
		return 2
	}
	prog := newProgress(stderr, *quiet)
	rep, err := report.Analyze(lf, &report.Settings{Plots: writeReport, Progress: prog.show})
	if err != nil {
		fmt.Fprintf(stderr, "loopreport: %s: %v\n", name, err)
		return 2
	}
	if *asJSON {
		b, err := rep.JSON()
		if err != nil {
			prog.done()
			fmt.Fprintf(stderr, "loopreport: cannot encode the report: %v\n", err)
			return 1
		}
		if _, err := stdout.Write(b); err != nil {
			prog.done()
			fmt.Fprintf(stderr, "loopreport: cannot write the JSON output: %v\n", err)
			return 1
		}
	}
	var index string
	if writeReport {
		prog.step("writing the report")
		var set report.WriteSettings
		if *stamp {
			set.Timestamp = time.Now()
		}
		index, err = rep.WriteFolder(*outDir, &set)
		if err != nil {
			prog.done()
			fmt.Fprintf(stderr, "loopreport: cannot write the report: %v\n", err)
			return 1
		}
	}
	prog.done()
	if !*asJSON {
		err := rep.WriteSummary(stdout)
		if err == nil && index != "" {
			_, err = fmt.Fprintf(stdout, "\nReport written to %s (open it in a browser).\n", index)
		}
		if err != nil {
			fmt.Fprintf(stderr, "loopreport: cannot write the summary: %v\n", err)
			return 1
		}
	}
	return 0
}

// readCapped reads the file at path, at most limit+1 bytes: enough for
// ReadLoop to refuse a file over the limit, and a device that never ends
// (/dev/zero) is read only that far.
func readCapped(path string, limit int) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return io.ReadAll(io.LimitReader(f, int64(limit)+1))
}

// describeFileError says why a file could not be read, in words.
func describeFileError(path string, err error) string {
	switch {
	case errors.Is(err, os.ErrNotExist):
		abs, _ := filepath.Abs(path)
		return fmt.Sprintf("%s does not exist (looked for %s)", path, abs)
	case errors.Is(err, os.ErrPermission):
		return fmt.Sprintf("%s cannot be opened: permission denied", path)
	}
	return strings.TrimPrefix(err.Error(), "open ")
}
