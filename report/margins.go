package report

import (
	"fmt"

	"github.com/loopwise/loopwise/margins"
)

// marginsStage fills the margins of L at the nominal gain.
func (a *analysis) marginsStage() {
	res, err := margins.Compute(a.m.open, nil)
	if err != nil {
		a.warn("margins: %s; the margin keys are null", short(err))
		return
	}
	a.margins = &res
	mg := &a.rep.Margins
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
	stable := res.ClosedLoopStable
	mg.ClosedLoopStable = &stable
	for _, c := range res.GainCrossovers {
		mg.GainCrossovers = append(mg.GainCrossovers, Crossover{FrequencyRadPerSec: Number(c.FrequencyRadPerSec), Margin: Number(c.PhaseMarginDeg)})
	}
	for _, c := range res.PhaseCrossovers {
		db := Number(c.GainFactorDB)
		mg.PhaseCrossovers = append(mg.PhaseCrossovers, Crossover{FrequencyRadPerSec: Number(c.FrequencyRadPerSec), Margin: Number(c.GainFactor), MarginDB: &db})
	}
	// The Nyquist verdict is exact with dead time; the closed-loop poles
	// above are then those of the Padé approximation.
	cl := a.rep.ClosedLoop.Stable
	if cl != nil && *cl != stable {
		a.warn("the closed-loop poles of the Padé approximation say %s, the Nyquist criterion on the exact loop says %s; the report follows the Nyquist criterion", stableWord(cl), stableWord(&stable))
	}
	a.rep.ClosedLoop.Stable = &stable
	if !stable {
		a.warn("the closed loop is unstable at %s: the margins describe an unstable loop", a.rep.Loop.at)
	}
}

// marginsTables shows the margins.
func marginsTables(r *Report) []table {
	var out []table
	mg := r.Margins
	ms := table{title: "Margins at " + r.Loop.at}
	gm := g(mg.GainMargin)
	if finite(float64(mg.GainMargin)) {
		gm = fmt.Sprintf("%s (gain factor %s) at %s", gUnit(mg.GainMarginDB, "dB"), g(mg.GainMargin), gUnit(mg.PhaseCrossoverRadPerSec, "rad/s"))
	} else if isInf(mg.GainMargin) {
		gm = "infinite (the gain can rise without limit)"
	}
	ms.rows = append(ms.rows, row{"gain margin", gm})
	if finite(float64(mg.LowerGainMargin)) {
		ms.rows = append(ms.rows, row{"lower gain margin", fmt.Sprintf("%s (gain factor %s): the gain may fall only this far", gUnit(mg.LowerGainMarginDB, "dB"), g(mg.LowerGainMargin))})
	}
	pm := "none (no gain crossover)"
	if finite(float64(mg.PhaseMarginDeg)) {
		pm = fmt.Sprintf("%s at %s", gUnit(mg.PhaseMarginDeg, "°"), gUnit(mg.GainCrossoverRadPerSec, "rad/s"))
	}
	ms.rows = append(ms.rows, row{"phase margin", pm})
	ms.rows = append(ms.rows, row{"delay margin", gUnit(mg.DelayMarginSec, "s")})
	ps := g(mg.PeakSensitivity)
	if finite(float64(mg.PeakSensitivity)) {
		ps = fmt.Sprintf("%s %s", g(mg.PeakSensitivity), atFrequency(mg.PeakSensitivityRadPerSec))
	}
	ms.rows = append(ms.rows, row{"peak sensitivity", ps})
	if finite(float64(mg.PeakComplementarySensitivity)) {
		ms.rows = append(ms.rows, row{"peak complementary sensitivity", fmt.Sprintf("%s %s", g(mg.PeakComplementarySensitivity), atFrequency(mg.PeakComplementarySensitivityRadPerS))})
	}
	if finite(float64(mg.BandwidthRadPerSec)) {
		ms.rows = append(ms.rows, row{"bandwidth of L/(1 + L) (−3 dB)", gUnit(mg.BandwidthRadPerSec, "rad/s")})
	}
	ms.rows = append(ms.rows, row{"closed loop (Nyquist)", stableWord(mg.ClosedLoopStable)})
	for _, c := range mg.GainCrossovers {
		ms.rows = append(ms.rows, row{"gain crossover at " + gUnit(c.FrequencyRadPerSec, "rad/s"), "phase margin " + gUnit(c.Margin, "°")})
	}
	for _, c := range mg.PhaseCrossovers {
		ms.rows = append(ms.rows, row{"phase crossover at " + gUnit(c.FrequencyRadPerSec, "rad/s"), "gain factor " + g(c.Margin)})
	}
	out = append(out, ms)
	return out
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
