package report

// section is one part of the report: the loop-file keys it reads, the
// analysis that fills its part of the Report value (its JSON key is the
// json tag of that Report field), and its tables for the text summary,
// summary.md and index.html. See the package documentation for how to add
// one.
type section struct {
	// stage names the section in progress messages: "margins".
	stage string
	// keys are the top-level loop-file keys the section owns, beyond the
	// core keys that every loop has (plant, controller, ...). Nil for none.
	keys []loopKey
	// run computes the section from the loop and the results of the
	// sections before it, writes them into a.rep, and adds a warning
	// (a.warn) for every result it cannot compute, leaving those keys
	// null. It must not panic on any loop that build accepts.
	run func(a *analysis)
	// tables returns the section's tables for the summaries, in order;
	// nil when it has none (or shows its results elsewhere).
	tables func(r *Report) []table
}

// pipeline lists the sections in the order they run and are shown. A
// section may use what the sections above it left in the analysis (the
// stability verdict of closed_loop and margins, the step metrics, ...).
var pipeline = []section{
	loopsSection,        // open_loop, closed_loop
	locusSection,        // locus
	marginsSection,      // margins
	deadTimeSection,     // dead_time (exact roots, delay ranges)
	stepSection,         // step
	steadyStateSection,  // steady_state
	closedLoopSection,   // load_disturbance, control_effort, noise
	requirementsSection, // requirements
	designSection,       // design, plane (values that meet the requirements)
	robustSection,       // robust (uncertain parameters)
}
