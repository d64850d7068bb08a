package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// failingWriter fails every write, like standard output on a full disk.
type failingWriter struct{}

func (failingWriter) Write([]byte) (int, error) { return 0, errors.New("no space left on device") }

// TestUnwritableOutputExitsOne checks issue 11, item 10: the README
// promises exit status 1 when the output cannot be written.
func TestUnwritableOutputExitsOne(t *testing.T) {
	for _, args := range [][]string{{"-json", "-out", ""}, {"-out", ""}, {"-print-demo"}, {"-h"}} {
		var errb bytes.Buffer
		if code := run(args, failingWriter{}, &errb); code != 1 || !strings.Contains(errb.String(), "cannot write") {
			t.Errorf("%v to a failing writer: exit %d, stderr %q; want 1 and a message", args, code, errb.String())
		}
	}
	// The report folder: a file where the folder should be.
	file := filepath.Join(t.TempDir(), "taken")
	if err := os.WriteFile(file, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	var out, errb bytes.Buffer
	if code := run([]string{"-out", filepath.Join(file, "report")}, &out, &errb); code != 1 {
		t.Errorf("report folder under a file: exit %d, want 1", code)
	}
}

// TestLoopFileSizeCap checks issue 11, item 11: a loop file above 1 MiB
// is refused with exit status 2, and an endless device is read only that
// far.
func TestLoopFileSizeCap(t *testing.T) {
	big := `{"plant": "1/(s+1)", "description": "` + strings.Repeat("x", 1<<20) + `"}`
	code, _, errs := runLoop(t, big, "-json")
	if code != 2 || !strings.Contains(errs, "larger than 1048576 bytes") {
		t.Errorf("1 MiB loop file: exit %d, stderr %q", code, errs)
	}
	if _, err := os.Stat("/dev/zero"); err == nil {
		var out, errb bytes.Buffer
		if code := run([]string{"-json", "-loop", "/dev/zero"}, &out, &errb); code != 2 {
			t.Errorf("-loop /dev/zero: exit %d, stderr %q", code, errb.String())
		}
	}
}

// TestMessagesInTheFilesWords checks issue 11, item 12: a long bad
// expression is quoted as a short excerpt around the column; messages name
// the loop file's keys, not internal settings or +Inf; a UTF-8 byte-order
// mark is accepted.
func TestMessagesInTheFilesWords(t *testing.T) {
	long := `{"plant": "1/(` + strings.Repeat("(s+1)*", 160000) + `(s+2)+)"}`
	code, _, errs := runLoop(t, long, "-json")
	if code != 2 || len(errs) > 400 || !strings.Contains(errs, "…") || !strings.Contains(errs, `key "plant"`) {
		t.Errorf("1 MB expression: exit %d, %d bytes of message: %.300q", code, len(errs), errs)
	}
	for _, test := range []struct{ loop, key string }{
		{`{"plant":"1/(z-0.5)","sample_time_sec":1e-320,"delay_sec":1}`, `"sample_time_sec"`},
		{`{"plant":"1/(s+1)","delay_sec":0.05,"discretize":{"method":"tustin","sample_time_sec":1e-320}}`, `"discretize.sample_time_sec"`},
		{`{"plant":"1/(s+1)","delay_sec":1e300,"discretize":{"method":"zoh","sample_time_sec":1e-300}}`, `"delay_sec"`},
	} {
		code, _, errs := runLoop(t, test.loop, "-json")
		if code != 2 || !strings.Contains(errs, test.key) || strings.Contains(errs, "Inf") || strings.Contains(errs, "panic") {
			t.Errorf("%s: exit %d, stderr %q; want 2 naming %s", test.loop, code, errs, test.key)
		}
	}
	d := runJSON(t, `{"plant": "1/(s+1)", "delay_sec": 1e6}`)
	for _, w := range d["warnings"].([]any) {
		if s := w.(string); strings.Contains(s, "OmegaMaxRadPerSec") || strings.Contains(s, "invalid setting") {
			t.Errorf("warning speaks the margins package's settings: %q", s)
		}
	}
	code, out, errs := runLoop(t, "\ufeff"+`{"plant": "1/(s+1)"}`, "-json")
	if code != 0 || !strings.HasPrefix(out, "{") {
		t.Errorf("loop file with a byte-order mark: exit %d, stderr %q", code, errs)
	}
}

// TestLimitsAreValidated checks issue 11, item 13: requirement limits
// outside their quantity's range and a Tustin prewarp frequency equal to
// π/T to 15 digits (31.4159265358979 for T = 0.1 s; tan(ω₀T/2) ≈ 6e14)
// are refused with exit status 2 and the key named.
func TestLimitsAreValidated(t *testing.T) {
	for _, test := range []struct{ loop, key string }{
		{`{"plant": "1/(s+1)", "requirements": {"max_overshoot_pct": -5}}`, `"requirements.max_overshoot_pct"`},
		{`{"plant": "1/(s+1)", "requirements": {"min_phase_margin_deg": -1e308}}`, `"requirements.min_phase_margin_deg"`},
		{`{"plant": "1/(s+1)", "requirements": {"min_damping_ratio": 2}}`, `"requirements.min_damping_ratio"`},
		{`{"plant": "1/(s*(s+1))", "discretize": {"method": "tustin", "sample_time_sec": 0.1, "prewarp_rad_per_sec": 31.4159265358979}}`, `"discretize.prewarp_rad_per_sec"`},
		{`{"plant": "1/(s*(s+1))", "discretize": {"method": "zoh", "sample_time_sec": 0.1, "prewarp_rad_per_sec": 1}}`, `"discretize.prewarp_rad_per_sec"`},
		{`{"plant":"1/(s*(s+1))","discretize":{"method":"zoh","sample_time_sec":1e-12}}`, `"discretize.sample_time_sec"`},
	} {
		code, _, errs := runLoop(t, test.loop, "-json")
		if code != 2 || !strings.Contains(errs, test.key) {
			t.Errorf("%s: exit %d, stderr %q; want 2 naming %s", test.loop, code, errs, test.key)
		}
	}
}

// TestHostileLoopsSpeakPlainly runs loops at the edges of double precision
// and checks that none panics, none leaks the internal words of the
// packages below (+Inf, NaN, settings names, package prefixes), and that
// the sections agree on stability.
func TestHostileLoopsSpeakPlainly(t *testing.T) {
	for _, loop := range []string{
		`{"plant":"1/(1e308s+1)"}`,                                                          // before: "sample period +Inf s"
		`{"plant":"1/(s*(s+1))","delay_sec":1e-300}`,                                        // before: Padé roots not converged
		`{"plant":"1/(s*(s+1))","parameter":{"name":"k2","value":1e308},"controller":"k2"}`, // before: "k2 does not appear"
		`{"plant":"1/(s+1)","delay_sec":1e6}`,
		`{"plant":"1/(z-2)","sample_time_sec":0.1,"delay_sec":0.3}`,
		`{"plant":"1/(s+1)^100"}`,
		`{"plant":"exp(-1000s)/(s+1)"}`,
	} {
		code, out, errs := runLoop(t, loop, "-json")
		if code != 0 {
			t.Errorf("%s: exit %d: %s", loop, code, errs)
			continue
		}
		var d map[string]any
		if err := json.Unmarshal([]byte(out), &d); err != nil {
			t.Fatal(err)
		}
		for _, w := range d["warnings"].([]any) {
			s := w.(string)
			for _, bad := range []string{"Inf", "NaN", "RadPerSec =", "statespace:", "poly:", "tf:", "undefined", "does not appear"} {
				if strings.Contains(s, bad) {
					t.Errorf("%s: warning contains %q: %s", loop, bad, s)
				}
			}
		}
		cl, mg := d["closed_loop"].(map[string]any)["stable"], d["margins"].(map[string]any)["closed_loop_stable"]
		if cl != nil && mg != nil && cl != mg {
			t.Errorf("%s: closed_loop.stable %v, margins.closed_loop_stable %v", loop, cl, mg)
		}
	}
}
