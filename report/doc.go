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
// stay null and Report.Warnings says why. Frequencies are in rad/s, times
// in seconds, angles in degrees; names carry the unit.
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
//     the loop model a.m (a.m.open is L at the nominal gain), the results
//     of earlier sections (a.rep.ClosedLoop.Stable is the loop's one
//     stability verdict, a.refOut the closed loop), writes its result into
//     a.rep and calls a.warn for every quantity it cannot compute;
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
// The file requirements.go is a complete small section to copy.
//
// # Invariants
//
// Analyze does not modify its Loop. The same Loop gives the same Report,
// byte for byte in every output form.
package report
