// Package output writes the figures of the example programs. It is shared
// by the examples and is not part of the library's API.
package output

import (
	"fmt"
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
