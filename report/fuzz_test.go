package report

import (
	"errors"
	"os"
	"testing"
)

// FuzzLoopFile checks that no loop file, however malformed, makes the
// reader or the model builder panic, and that every rejection is a
// bad-input error (exit status 2) with a message.
func FuzzLoopFile(f *testing.F) {
	demo, err := os.ReadFile("../examples/loopreport/demo.json")
	if err != nil {
		f.Fatal(err)
	}
	f.Add(string(demo))
	for _, s := range []string{
		`{"plant": "1/(s+1"}`,
		`{"plant": "1/(s+1)", "gain": "x"}`,
		`{"plnt": "1/(s+1)"}`,
		`{"plant": "1/((s+1)*(s+3))", "controller": "2 + Ki/s", "parameter": {"name": "Ki", "value": 4, "range": [0, null]}}`,
		`{"plant": "1/(s*(s+1))", "discretize": {"method": "tustin", "sample_time_sec": 0.1, "prewarp_rad_per_sec": 1}}`,
		`{"plant": "(0.368z+0.264)/((z-1)(z-0.368))", "sample_time_sec": 1, "delay_sec": 2}`,
		`{"plant": "exp(-0.5s)/(s+1)", "gain_range": [null, 0], "gain": -1, "requirements": {"min_phase_margin_deg": 30}}`,
		"{\"plant\": \"1/s\",\n \"parameter\": {\"name\": \"p\", \"value\": 1, \"rnge\": [0, 1]}}",
		`not json`, ``, `[]`, `{"plant": null}`,
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, content string) {
		lf, err := ReadLoop("fuzz.json", []byte(content))
		if err == nil {
			_, err = build(lf)
		}
		if err != nil && (!errors.Is(err, ErrBadInput) || err.Error() == "") {
			t.Errorf("rejection is not a bad-input error with a message: %v", err)
		}
	})
}
