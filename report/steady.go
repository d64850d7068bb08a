package report

import (
	"errors"
	"fmt"

	"github.com/loopwise/loopwise/response"
)

// steadyStage fills the steady-state errors of L.
func (a *analysis) steadyStage() {
	l := a.m.open
	if reason := a.unsettled(); reason != "" {
		a.warn("steady-state errors: %s, so there is no steady state; the steady-state keys are null", reason)
		return
	}
	if l.DelaySec() > 0 && !l.IsDiscrete() {
		if a.margins == nil && a.dead == nil {
			a.warn("steady-state errors: the closed loop with dead time is not known to be stable (the Nyquist criterion could not be applied); the steady-state keys are null")
			return
		}
		// Dead time does not change the limits; stability comes from the
		// Nyquist criterion of the margins, or, with the dead time exact,
		// from the exact roots or the stability switches.
		l = l.WithoutDelay()
	}
	e, err := response.SteadyState(l)
	if err != nil {
		reason := short(err)
		if errors.Is(err, response.ErrUnstable) {
			reason = "package response finds a closed-loop pole on or beyond the stability boundary where the loop's verdict is stable (" + reason + "), so there is no steady state"
		}
		a.warn("steady-state errors: %s; the steady-state keys are null", reason)
		return
	}
	s := &a.rep.SteadyState
	t := e.SystemType
	s.SystemType = &t
	s.PositionConstant = Number(e.PositionConstant)
	s.VelocityConstant = Number(e.VelocityConstant)
	s.AccelerationConstant = Number(e.AccelerationConstant)
	s.StepError = Number(e.StepError)
	s.RampError = Number(e.RampError)
	s.ParabolaError = Number(e.ParabolaError)
}

// steadyStateTables shows the steady-state errors.
func steadyStateTables(r *Report) []table {
	var out []table
	e := r.SteadyState
	es := table{title: "Steady-state errors (unit inputs) at " + r.Loop.at}
	if e.SystemType == nil {
		es.rows = append(es.rows, row{"not available", "see the warnings"})
		out = append(out, es)
		return out
	}
	origin := "s = 0"
	if float64(r.Loop.SampleTimeSec) > 0 {
		origin = "z = 1"
	}
	es.rows = append(es.rows,
		row{"system type (poles of L at " + origin + ")", fmt.Sprint(*e.SystemType)},
		row{"position constant", g(e.PositionConstant)},
		row{"velocity constant", g(e.VelocityConstant)},
		row{"acceleration constant", g(e.AccelerationConstant)},
		row{"error to a step", g(e.StepError)},
		row{"error to a ramp", g(e.RampError)},
		row{"error to a parabola", g(e.ParabolaError)},
	)
	out = append(out, es)
	return out
}

// steadyStateSection computes steady_state.
var steadyStateSection = section{stage: "steady-state errors", run: (*analysis).steadyStage, tables: steadyStateTables}

// SteadyStateResult is the "steady_state" section: the error constants and
// the steady-state errors to unit inputs (package response).
type SteadyStateResult struct {
	// SystemType is the number of poles of L at s = 0 (z = 1).
	SystemType *int `json:"system_type"`
	// PositionConstant is Kp; null when infinite.
	PositionConstant Number `json:"position_constant"`
	// VelocityConstant is Kv; null when infinite.
	VelocityConstant Number `json:"velocity_constant"`
	// AccelerationConstant is Ka; null when infinite.
	AccelerationConstant Number `json:"acceleration_constant"`
	// StepError is the error to a unit step.
	StepError Number `json:"step_error"`
	// RampError is the error to a unit ramp; null when unbounded.
	RampError Number `json:"ramp_error"`
	// ParabolaError is the error to a unit parabola; null when unbounded.
	ParabolaError Number `json:"parabola_error"`
}
