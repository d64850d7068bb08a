package report

import (
	"errors"
	"fmt"
	"math"

	"github.com/loopwise/loopwise/margins"
)

// marginsStage fills the margins of L at the nominal gain.
func (a *analysis) marginsStage() {
	res, err := margins.Compute(a.m.analysed, nil)
	if err != nil {
		if errors.Is(err, margins.ErrBadSettings) && a.m.open.DelaySec() > 0 {
			// The settings are the package's defaults; what is too large
			// is the dead time, in the loop file's words.
			a.warn("margins: the dead time of %s s (delay_sec and the dead time in the expressions) is so long against the loop's dynamics that the phase of L passes −180° more than 100000 times where |L| still matters; the margins are not computed and the margin keys are null", g(Number(a.m.open.DelaySec())))
			return
		}
		a.warn("margins: %s; the margin keys are null", short(err))
		return
	}
	a.margins = &res
	mg := &a.rep.Margins
	mg.GainCrossovers, mg.PhaseCrossovers = []Crossover{}, []Crossover{}
	mg.GainMargin = Number(res.GainMargin)
	mg.GainMarginDB = Number(res.GainMarginDB)
	mg.PhaseCrossoverRadPerSec = Number(res.PhaseCrossoverRadPerSec)
	mg.LowerGainMargin = Number(res.LowerGainMargin)
	mg.LowerGainMarginDB = Number(res.LowerGainMarginDB)
	mg.PhaseMarginDeg = Number(res.PhaseMarginDeg)
	mg.GainCrossoverRadPerSec = Number(res.GainCrossoverRadPerSec)
	mg.DelayMarginSec = Number(res.DelayMarginSec)
	mg.PeakSensitivity = Number(res.PeakSensitivity)
	mg.PeakSensitivityRadPerSec = Number(res.PeakSensitivityRadPerSec)
	mg.PeakComplementarySensitivity = Number(res.PeakComplementarySensitivity)
	mg.PeakComplementarySensitivityRadPerS = Number(res.PeakComplementarySensitivityRadPerSec)
	mg.BandwidthRadPerSec = Number(res.BandwidthRadPerSec)
	for _, c := range res.GainCrossovers {
		mg.GainCrossovers = append(mg.GainCrossovers, Crossover{FrequencyRadPerSec: Number(c.FrequencyRadPerSec), Margin: Number(c.PhaseMarginDeg)})
	}
	for _, c := range res.PhaseCrossovers {
		db := Number(c.GainFactorDB)
		mg.PhaseCrossovers = append(mg.PhaseCrossovers, Crossover{FrequencyRadPerSec: Number(c.FrequencyRadPerSec), Margin: Number(c.GainFactor), MarginDB: &db})
	}
	a.settleVerdict(&res)
	mg.ClosedLoopStable = a.verdict.ptr()
	a.rep.ClosedLoop.Stable = a.verdict.ptr()
	if a.verdict.known && !a.verdict.stable {
		a.warn("the closed loop is unstable at %s: the margins describe an unstable loop", a.rep.Loop.at)
	}
}

// settleVerdict makes the loop's verdict final. With dead time in s the
// Nyquist criterion of package margins on the exact loop decides (the
// closed-loop poles are then those of the Padé approximation); otherwise
// the verdict of the closed-loop poles stands, and a different count by
// package margins is reported.
func (a *analysis) settleVerdict(res *margins.Result) {
	nyquist := verdict{known: true, stable: res.ClosedLoopStable, method: "the Nyquist criterion"}
	if a.m.open.DelaySec() > 0 && !a.m.open.IsDiscrete() {
		if old := a.verdict; old.known && old.stable != nyquist.stable {
			a.warn("%s say %s, the Nyquist criterion on the exact loop says %s; the report follows the Nyquist criterion", a.delayRootsName(), old.words(), nyquist.words())
		}
		a.verdict = nyquist
		return
	}
	if v := a.verdict; v.known && v.stable != nyquist.stable {
		a.warn("package margins counts the closed loop as %s, the closed-loop poles judged against their rounding uncertainty say %s; the report follows the closed-loop poles", nyquist.words(), v.words())
	}
}

// marginsTables shows the margins. A margin measures how far a stable
// closed loop is from instability; for an unstable loop the rows say in
// words what the crossovers mean instead, and the margins are left out.
func marginsTables(r *Report) []table {
	mg := r.Margins
	ms := table{title: "Margins at " + r.Loop.at}
	switch {
	case mg.GainCrossovers == nil:
		ms.rows = append(ms.rows, row{"not available", "see the warnings"})
	case mg.ClosedLoopStable == nil:
		ms.rows = append(ms.rows, row{"not available", "the stability of the closed loop is not determined (see the warnings)"})
	case !*mg.ClosedLoopStable:
		ms.rows = unstableMarginRows(r)
	default:
		ms.rows = stableMarginRows(mg)
	}
	return []table{ms}
}

// stableMarginRows describes the margins of a stable closed loop.
func stableMarginRows(mg MarginsResult) []row {
	var rows []row
	gm := "none"
	if finite(float64(mg.GainMargin)) {
		gm = fmt.Sprintf("%s (gain factor %s) at %s", gUnit(mg.GainMarginDB, "dB"), g(mg.GainMargin), gUnit(mg.PhaseCrossoverRadPerSec, "rad/s"))
	} else if isInf(mg.GainMargin) {
		gm = "infinite (the gain can rise without limit)"
	}
	rows = append(rows, row{"gain margin", gm})
	if finite(float64(mg.LowerGainMargin)) {
		rows = append(rows, row{"lower gain margin", fmt.Sprintf("%s (gain factor %s): the gain may fall only this far", gUnit(mg.LowerGainMarginDB, "dB"), g(mg.LowerGainMargin))})
	}
	pm := "none (no gain crossover)"
	if finite(float64(mg.PhaseMarginDeg)) {
		pm = fmt.Sprintf("%s at %s", gUnit(mg.PhaseMarginDeg, "°"), gUnit(mg.GainCrossoverRadPerSec, "rad/s"))
	}
	rows = append(rows, row{"phase margin", pm})
	rows = append(rows, row{"delay margin", gUnit(mg.DelayMarginSec, "s")})
	ps := g(mg.PeakSensitivity)
	if finite(float64(mg.PeakSensitivity)) {
		ps = fmt.Sprintf("%s %s", g(mg.PeakSensitivity), atFrequency(mg.PeakSensitivityRadPerSec))
	}
	rows = append(rows, row{"peak sensitivity", ps})
	if finite(float64(mg.PeakComplementarySensitivity)) {
		rows = append(rows, row{"peak complementary sensitivity", fmt.Sprintf("%s %s", g(mg.PeakComplementarySensitivity), atFrequency(mg.PeakComplementarySensitivityRadPerS))})
	}
	if finite(float64(mg.BandwidthRadPerSec)) {
		rows = append(rows, row{"bandwidth of L/(1 + L) (−3" + nbsp + "dB)", gUnit(mg.BandwidthRadPerSec, "rad/s")})
	}
	rows = append(rows, row{"closed loop", "stable"})
	for _, c := range mg.GainCrossovers {
		rows = append(rows, row{"gain crossover at " + gUnit(c.FrequencyRadPerSec, "rad/s"), "phase margin " + gUnit(c.Margin, "°")})
	}
	for _, c := range mg.PhaseCrossovers {
		rows = append(rows, row{"phase crossover at " + gUnit(c.FrequencyRadPerSec, "rad/s"), "gain factor " + g(c.Margin)})
	}
	return rows
}

// unstableMarginRows describes the crossovers of L for an unstable closed
// loop: there is no margin; a phase crossover is where the Nyquist curve
// passes through −1 when the gain is multiplied by its factor (the number
// of unstable closed-loop poles changes there), and the gain that
// stabilises the loop is read from the locus.
func unstableMarginRows(r *Report) []row {
	mg := r.Margins
	rows := []row{{"closed loop", "unstable: no gain, phase or delay margin (a margin measures the distance from instability of a stable loop)"}}
	if lo := r.Locus; lo.Variable == "gain" && lo.StableIntervals != nil {
		stab := "no gain in the range of the locus makes it stable"
		if len(lo.StableIntervals) > 0 {
			stab = "stable for k in " + intervalList(lo.StableIntervals) + " (root locus)"
		}
		rows = append(rows, row{"gain that stabilises it", stab})
	}
	for _, c := range mg.PhaseCrossovers {
		rows = append(rows, row{"phase crossover at " + gUnit(c.FrequencyRadPerSec, "rad/s"),
			fmt.Sprintf("multiplying the gain by %s (%s) puts −1 on the Nyquist curve: the number of unstable closed-loop poles changes there", g(c.Margin), gUnit(Number(20*math.Log10(float64(c.Margin))), "dB"))})
	}
	for _, c := range mg.GainCrossovers {
		rows = append(rows, row{"gain crossover at " + gUnit(c.FrequencyRadPerSec, "rad/s"),
			fmt.Sprintf("|L| = 1 with the phase of L at %s", gUnit(Number(float64(c.Margin)-180), "°"))})
	}
	return rows
}

// marginsSection computes margins, and the stability verdict of the
// Nyquist criterion.
var marginsSection = section{stage: "margins", run: (*analysis).marginsStage, tables: marginsTables}

// Crossover is one gain crossover (|L| = 1) or phase crossover (phase of L
// at −180° modulo 360°).
type Crossover struct {
	// FrequencyRadPerSec is the frequency of the crossover in rad/s.
	FrequencyRadPerSec Number `json:"frequency_rad_per_sec"`
	// Margin is the phase margin in degrees for a gain crossover and the
	// gain factor for a phase crossover.
	Margin Number `json:"margin"`
	// MarginDB is the gain factor in dB (phase crossovers only).
	MarginDB *Number `json:"margin_db,omitempty"`
}

// MarginsResult is the "margins" section: the stability margins of L at the
// nominal gain (package margins; exact with dead time).
type MarginsResult struct {
	// GainMargin is the factor by which the gain may rise before instability; null when infinite.
	GainMargin Number `json:"gain_margin"`
	// GainMarginDB is GainMargin in dB.
	GainMarginDB Number `json:"gain_margin_db"`
	// PhaseCrossoverRadPerSec is where the gain margin is read, in rad/s.
	PhaseCrossoverRadPerSec Number `json:"phase_crossover_rad_per_sec"`
	// LowerGainMargin is the factor (< 1) to which the gain may fall; null when none.
	LowerGainMargin Number `json:"lower_gain_margin"`
	// LowerGainMarginDB is LowerGainMargin in dB.
	LowerGainMarginDB Number `json:"lower_gain_margin_db"`
	// PhaseMarginDeg is the phase margin in degrees; null without a gain crossover.
	PhaseMarginDeg Number `json:"phase_margin_deg"`
	// GainCrossoverRadPerSec is where the phase margin is read, in rad/s.
	GainCrossoverRadPerSec Number `json:"gain_crossover_rad_per_sec"`
	// DelayMarginSec is the dead time the loop tolerates, in seconds.
	DelayMarginSec Number `json:"delay_margin_sec"`
	// PeakSensitivity is the largest |1/(1 + L)|.
	PeakSensitivity Number `json:"peak_sensitivity"`
	// PeakSensitivityRadPerSec is where it occurs, in rad/s.
	PeakSensitivityRadPerSec Number `json:"peak_sensitivity_rad_per_sec"`
	// PeakComplementarySensitivity is the largest |L/(1 + L)|.
	PeakComplementarySensitivity Number `json:"peak_complementary_sensitivity"`
	// PeakComplementarySensitivityRadPerS is where it occurs, in rad/s.
	PeakComplementarySensitivityRadPerS Number `json:"peak_complementary_sensitivity_rad_per_sec"`
	// BandwidthRadPerSec is the −3 dB bandwidth of L/(1 + L), in rad/s.
	BandwidthRadPerSec Number `json:"bandwidth_rad_per_sec"`
	// ClosedLoopStable is the Nyquist verdict.
	ClosedLoopStable *bool `json:"closed_loop_stable"`
	// GainCrossovers are every gain crossover with its phase margin.
	GainCrossovers []Crossover `json:"gain_crossovers"`
	// PhaseCrossovers are every phase crossover with its gain factor.
	PhaseCrossovers []Crossover `json:"phase_crossovers"`
}
