// Package output writes the figures of the example programs. It is shared
// by the examples and is not part of the library's API.
package output

import (
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"github.com/loopwise/loopwise/chart"
)

// Save writes fig into dir (created if missing) as base.svg and base.png
// and returns the paths written.
func Save(fig *chart.Figure, dir, base string) ([]string, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("output folder: %w", err)
	}
	var paths []string
	for _, ext := range []string{".svg", ".png"} {
		path := filepath.Join(dir, base+ext)
		if err := fig.Save(path); err != nil {
			return paths, fmt.Errorf("writing %s: %w", path, err)
		}
		paths = append(paths, path)
	}
	return paths, nil
}

// Report prints a study's summary to stdout with print and, when outDir is
// not empty, writes its plots with plot and lists the files written.
func Report(stdout io.Writer, outDir string, print func(io.Writer) error, plot func(dir string) ([]string, error)) error {
	if err := print(stdout); err != nil {
		return err
	}
	if outDir == "" {
		return nil
	}
	files, err := plot(outDir)
	if err != nil {
		return err
	}
	fmt.Fprintln(stdout)
	fmt.Fprintln(stdout, "Plots written:")
	for _, f := range files {
		fmt.Fprintln(stdout, "  "+f)
	}
	return nil
}

// Main is the main function of an example program: it reads the -out flag
// (default defaultOut; empty for no plots), calls run with standard output
// and exits with status 1 and a message naming the program on error.
func Main(name, defaultOut string, run func(stdout io.Writer, outDir string) error) {
	out := flag.String("out", defaultOut, "folder for the plots (created if missing; empty for no plots)")
	flag.Parse()
	if err := run(os.Stdout, *out); err != nil {
		fmt.Fprintln(os.Stderr, name+":", err)
		os.Exit(1)
	}
}
