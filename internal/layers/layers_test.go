package layers

import (
	"encoding/json"
	"io"
	"os/exec"
	"strings"
	"testing"
)

const module = "github.com/loopwise/loopwise"

// allowed lists, for each library package, the loopwise packages it may
// import (directly or indirectly). internal/* packages may import only the
// standard library and gonum; the analysis packages are siblings.
var allowed = map[string][]string{
	"poly":     {"internal/"},
	"tf":       {"internal/", "poly"},
	"locus":    {"internal/", "poly", "tf"},
	"margins":  {"internal/", "poly", "tf"},
	"response": {"internal/", "poly", "tf"},
	"spec":     {"internal/", "poly", "tf", "locus", "margins", "response", "closedloop"},
	// chart sits above the design layer (see ../shared/DESIGN.md) and may
	// draw its results; nothing below chart imports it.
	"chart": {"internal/", "poly", "tf", "locus", "margins", "response", "spec",
		"design", "closedloop", "robust"},
	// closedloop gathers the standard loop's closed-loop functions and
	// their metrics from the analysis packages; spec checks them.
	"closedloop": {"internal/", "poly", "tf", "locus", "margins", "response"},
	// The design layer: each uses the analysis packages and spec's
	// requirement kinds, but not one another.
	"design": {"internal/", "poly", "tf", "locus", "margins", "response", "closedloop", "spec"},
	"robust": {"internal/", "poly", "tf", "locus", "margins", "response", "closedloop", "spec"},
	// report runs every analysis into one report value and may draw it.
	"report": {"internal/", "poly", "tf", "locus", "margins", "response", "spec",
		"design", "closedloop", "robust", "chart"},
}

type pkg struct {
	ImportPath string
	Deps       []string
}

func TestImportsPointDown(t *testing.T) {
	if testing.Short() {
		t.Skip("runs go list")
	}
	out, err := exec.Command("go", "list", "-deps=false", "-json", module+"/...").Output()
	if err != nil {
		t.Skipf("go list unavailable: %v", err)
	}
	dec := json.NewDecoder(strings.NewReader(string(out)))
	seen := 0
	for {
		var p pkg
		if err := dec.Decode(&p); err == io.EOF {
			break
		} else if err != nil {
			t.Fatal(err)
		}
		rel := strings.TrimPrefix(strings.TrimPrefix(p.ImportPath, module), "/")
		top := strings.SplitN(rel, "/", 2)[0]
		for _, d := range p.Deps {
			if !strings.HasPrefix(d, module+"/") {
				// report draws its figures with chart (it sits at the top).
				if top != "chart" && top != "report" && top != "examples" && strings.HasPrefix(d, "gonum.org/v1/plot") {
					t.Errorf("%s depends on %s: only chart, report and the examples may use gonum/plot", p.ImportPath, d)
				}
				continue
			}
			dep := strings.TrimPrefix(d, module+"/")
			if top == "examples" {
				continue
			}
			if top == "internal" {
				if !strings.HasPrefix(dep, "internal/") {
					t.Errorf("%s imports %s: internal packages sit at the bottom", p.ImportPath, d)
				}
				continue
			}
			ok := false
			for _, a := range allowed[top] {
				if dep == a || strings.HasPrefix(dep, a) || strings.HasPrefix(dep, top+"/") || dep == top {
					ok = true
				}
			}
			if !ok {
				t.Errorf("%s depends on %s: imports must point down (see DEVELOPERS.md)", p.ImportPath, d)
			}
		}
		seen++
	}
	if seen < 4 {
		t.Fatalf("go list returned only %d packages", seen)
	}
}
