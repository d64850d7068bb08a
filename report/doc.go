// Package report runs every analysis of loopwise on one feedback loop and
// returns the results as one value: the library behind the loopreport
// program, for test rigs and tools that want the same analysis in code.
//
// A Loop describes L = k·controller·plant·sensor with negative feedback,
// written in Go or read from its JSON form (a loop file) with ReadLoop,
// which rejects unknown keys and names the line and column of every bad
// value. Analyze runs the pipeline of sections (open and closed loop, root
// locus, margins, step response, steady-state errors, requirements) and
// returns a Report: a struct with one named field per section whose
// encoding/json form (Report.JSON) is the output of loopreport -json. The
// report is written as a text summary (WriteSummary), Markdown (Markdown),
// a self-contained HTML page (HTML) or a folder with plots (WriteFolder).
//
// # Conventions
//
// A quantity that is infinite or does not exist is NaN or ±Inf in a Number
// and null in JSON. An analysis that fails never stops the others: its keys
// stay null (a nil list) and Report.Warnings says why; an empty list means
// "computed: there is none". Frequencies are in rad/s, times in seconds,
// angles in degrees; names carry the unit.
//
// # One stability verdict
//
// Each loop gets one stability verdict, computed once and used by every
// section (ClosedLoopResult.Stable, MarginsResult.ClosedLoopStable, the
// step and steady-state sections, the requirements): from the closed-loop
// poles, each trusted only beyond its rounding uncertainty (stability.go),
// or from the Nyquist criterion of package margins when the loop has dead
// time in s. A pole on the stability boundary to within rounding makes the
// loop unstable (not asymptotically stable); poles too close to tell make
// the verdict unknown (nil); a loop converted to z whose poles crowd at
// z = 1 beyond what double precision can separate is refused.
//
// # Adding a section
//
// A section is one file in this package and one line in the pipeline
// (pipeline.go), plus its result field in Report (report.go) and, when it
// reads loop-file keys, their field in Loop (loopfile.go). For a section
// "disturbances" with a loop-file key "disturbances" and a JSON key
// "disturbances":
//
//  1. Create disturbances.go holding, in this order:
//     - the input type and its loop-file key: a loopKey whose decode reads
//     the value with keyValue.fields / number / text (these name the key
//     and its line and column in every error) and stores it in the Loop;
//     - the result type, with json tags and units in the field names;
//     - the run function, func (a *analysis) disturbances(), which reads
//     the loop model a.m (a.m.open is L at the nominal gain, a.m.rational
//     the same with dead time replaced), the results of earlier sections
//     (a.verdict is the loop's one stability verdict and a.unsettled()
//     says in words why there is no settled response, "" when stable;
//     a.refOut is the closed loop from reference to output, a.margins the
//     margins), writes its result into a.rep and calls a.warn for every
//     quantity it cannot compute (a sentence ending "; the ... keys are
//     null");
//     - the tables function, func disturbancesTables(r *Report) []table,
//     whose rows (label, value) appear in the text summary, summary.md and
//     index.html;
//     - the section value:
//     var disturbancesSection = section{stage: "disturbances",
//     keys: []loopKey{disturbancesKey}, run: (*analysis).disturbances,
//     tables: disturbancesTables}
//  2. Add the line disturbancesSection to the pipeline slice, after the
//     sections whose results it uses.
//  3. Add the field Disturbances *DisturbancesResult
//     `json:"disturbances"` to Report (a nil pointer is written as null:
//     leave it nil when the section has nothing to say, set it when it
//     ran) and, for the loop-file key, Disturbances *DisturbanceSpec to
//     Loop.
//  4. Document the loop-file and JSON keys in examples/loopreport/README.md
//     and the loop-file keys in the -h text of examples/loopreport/main.go
//     (tests check that every key is documented in both).
//
// In code, the skeleton of disturbances.go:
//
//	// DisturbanceSpec is the loop file's "disturbances" key.
//	type DisturbanceSpec struct{ StepAtInput float64 }
//
//	var disturbancesKey = loopKey{name: "disturbances", decode: func(v keyValue, lf *Loop) error {
//		fields, err := v.fields([]string{"step_at_input"})
//		if err != nil {
//			return err
//		}
//		lf.Disturbances = &DisturbanceSpec{}
//		for _, f := range fields {
//			if err := f.number(&lf.Disturbances.StepAtInput); err != nil {
//				return err
//			}
//		}
//		return nil
//	}}
//
//	// DisturbancesResult is the "disturbances" section of the report.
//	type DisturbancesResult struct {
//		PeakOutput Number `json:"peak_output"`
//	}
//
//	func (a *analysis) disturbances() {
//		if a.m.file.Disturbances == nil {
//			return // the key is absent: the section stays null
//		}
//		if why := a.unsettled(); why != "" {
//			a.warn("disturbances: %s; the disturbances keys are null", why)
//			return
//		}
//		a.rep.Disturbances = &DisturbancesResult{PeakOutput: ...}
//	}
//
//	func disturbancesTables(r *Report) []table {
//		if r.Disturbances == nil {
//			return nil
//		}
//		return []table{{title: "Disturbances", rows: []row{
//			{"peak output", g(r.Disturbances.PeakOutput)}}}}
//	}
//
//	var disturbancesSection = section{stage: "disturbances",
//		keys: []loopKey{disturbancesKey}, run: (*analysis).disturbances,
//		tables: disturbancesTables}
//
// The file requirements.go is a complete small section to copy, and
// section_test.go adds a worked example section to the pipeline and checks
// that its key, its run function and its table take part.
//
// # Invariants
//
// Analyze does not modify its Loop. The same Loop gives the same Report,
// byte for byte in every output form (unless WriteSettings.Timestamp is
// set). A panic inside a section becomes a warning naming the section.
package report
