package report

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/response"
)

// stepStage fills the step section from the closed loop reference → output.
func (a *analysis) stepStage() {
	if a.deadTimeStep() { // deadtime.go: the exact response with dead time
		return
	}
	if a.refOut.IsZero() {
		a.warn("step response: the closed loop from reference to output could not be formed")
		return
	}
	if reason := a.unsettled(); reason != "" {
		a.warn("step response: %s, so the step response has no metrics; the step keys are null", reason)
		return
	}
	if why := a.tooSlowToSimulate(); why != "" {
		a.warn("step response: %s; the step keys are null", why)
		return
	}
	mt, err := response.StepMetrics(a.refOut, nil)
	if err != nil {
		a.warn("step response: %s; the step keys are null", stepReason(err))
		return
	}
	a.step = &mt
	s := &a.rep.Step
	s.RiseTimeSec = Number(mt.RiseTimeSec)
	s.SettlingTimeSec = Number(mt.SettlingTimeSec)
	s.OvershootPct = Number(mt.OvershootPct)
	s.UndershootPct = Number(mt.UndershootPct)
	s.Peak = Number(mt.PeakValue)
	s.PeakTimeSec = Number(mt.PeakTimeSec)
	s.FinalValue = Number(mt.FinalValue)
}

func stepReason(err error) string {
	switch {
	case errors.Is(err, response.ErrUnstable):
		// The loop's verdict is "stable" (see unsettled); package
		// response judged a pole near the boundary differently.
		return "the response could not be computed, because package response finds a closed-loop pole on or beyond the stability boundary (" + short(err) + ") where the loop's verdict is stable"
	case errors.Is(err, response.ErrZeroFinalValue):
		return "the closed loop's static gain is zero, so the step response has no level to reach"
	}
	return short(err)
}

// unsettled says why the closed loop has no settled response by the
// loop's one verdict: "the closed loop is unstable", or "" when it is
// stable.
func (a *analysis) unsettled() string {
	switch {
	case !a.verdict.known:
		return "the stability of the closed loop is not determined"
	case !a.verdict.stable:
		return "the closed loop is unstable"
	}
	return ""
}

// stepTables shows the step response.
func stepTables(r *Report) []table {
	var out []table
	st := r.Step
	ss := table{title: "Step response from reference to output at " + r.Loop.at}
	if math.IsNaN(float64(st.FinalValue)) {
		ss.rows = append(ss.rows, row{"not available", "see the warnings"})
	} else {
		ss.rows = append(ss.rows,
			row{"rise time (10 % to 90 %)", gUnit(st.RiseTimeSec, "s")},
			row{"settling time (2 % band)", gUnit(st.SettlingTimeSec, "s")},
			row{"overshoot", gUnit(st.OvershootPct, "%")},
			row{"undershoot", gUnit(st.UndershootPct, "%")},
			row{"peak", fmt.Sprintf("%s at %s", g(st.Peak), gUnit(st.PeakTimeSec, "s"))},
			row{"final value", g(st.FinalValue)},
		)
	}
	out = append(out, ss)
	return out
}

// stepSection computes step.
var stepSection = section{stage: "step response", run: (*analysis).stepStage, tables: stepTables}

// StepResult is the "step" section: the unit-step response of the closed
// loop from reference to output (package response).
type StepResult struct {
	// RiseTimeSec is the 10 % to 90 % rise time in seconds.
	RiseTimeSec Number `json:"rise_time_sec"`
	// SettlingTimeSec is the 2 % settling time in seconds.
	SettlingTimeSec Number `json:"settling_time_sec"`
	// OvershootPct is the overshoot in percent of the final value.
	OvershootPct Number `json:"overshoot_pct"`
	// UndershootPct is the initial undershoot in percent of the final value.
	UndershootPct Number `json:"undershoot_pct"`
	// Peak is the largest value of the response.
	Peak Number `json:"peak"`
	// PeakTimeSec is when it occurs, in seconds.
	PeakTimeSec Number `json:"peak_time_sec"`
	// FinalValue is the level the response settles to.
	FinalValue Number `json:"final_value"`
}

// tooSlowToSimulate says why the step response of a stable closed loop
// cannot be simulated in double precision: its slowest closed-loop pole
// decays at a rate σ so small that the time to settle, about 10/σ (the
// horizon package response uses), is not a finite double. It returns ""
// when the response can be simulated.
func (a *analysis) tooSlowToSimulate() string {
	slowest := math.Inf(1)
	T := a.m.open.SampleTimeSec()
	for _, p := range a.m.closedPoles {
		sigma := -real(p)
		if T > 0 {
			if p == 0 {
				continue // gone after one sample
			}
			sigma = -math.Log(cmplx.Abs(p)) / T
		}
		slowest = math.Min(slowest, sigma)
	}
	if horizon := 10 / slowest; slowest > 0 && (math.IsInf(horizon, 0) || horizon > 1e300) {
		span := "about " + g(Number(horizon)) + " s"
		if math.IsInf(horizon, 0) {
			span = "more than 1e308 s"
		}
		return fmt.Sprintf("the slowest closed-loop pole decays at %s 1/s, so the response would need %s to settle, beyond what double precision can simulate", g(Number(slowest)), span)
	}
	return ""
}
