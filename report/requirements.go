package report

import (
	"fmt"
	"slices"
	"strings"

	"github.com/loopwise/loopwise/spec"
)

// Requirement is one limit checked against the loop: a key of
// "requirements" in a loop file, such as "min_phase_margin_deg", and its
// limit in the unit the key names.
type Requirement struct {
	// Key is one of the requirement keys (package spec, spec.ByKey).
	Key string
	// Limit is the bound, in the key's unit.
	Limit float64
}

// requirementKeys lists the keys accepted inside "requirements", in the
// order in which the report lists them.
var requirementKeys = []string{
	"min_phase_margin_deg",
	"min_gain_margin_db",
	"min_delay_margin_sec",
	"max_peak_sensitivity",
	"min_damping_ratio",
	"max_overshoot_pct",
	"max_rise_time_sec",
	"max_settling_time_sec",
	"max_steady_state_error",
	"max_disturbance_peak",
	"max_recovery_time_sec",
	"max_control_peak",
	"max_integrated_absolute_error",
	"max_noise_to_control_gain",
}

// requirementsKey reads "requirements": {"min_phase_margin_deg": 45, ...}.
var requirementsKey = loopKey{name: "requirements", decode: func(v keyValue, lf *Loop) error {
	fields, err := v.fields(requirementKeys)
	if err != nil {
		return err
	}
	for _, g := range fields {
		var limit float64
		if err := g.number(&limit); err != nil {
			return err
		}
		key := g.f.key[len("requirements."):]
		if _, err := spec.ByKey(key, limit); err != nil {
			return badInput("key %q %s: %s", g.f.key, at(g.data, g.f.valOff), strings.TrimPrefix(err.Error(), spec.ErrInvalidRequirement.Error()+": "))
		}
		lf.Requirements = append(lf.Requirements, Requirement{Key: key, Limit: limit})
	}
	return nil
}}

// requirementsStage checks the loop file's requirements with package spec.
func (a *analysis) requirementsStage() {
	lf := a.m.file
	if len(lf.Requirements) == 0 {
		return
	}
	var req spec.Requirements
	for _, r := range lf.Requirements {
		q, err := spec.ByKey(r.Key, r.Limit)
		if err != nil {
			a.warn("requirement %q: %s", r.Key, short(err))
			continue
		}
		req = append(req, q)
	}
	// The damping ratio and the step metrics keep the dead time exact as
	// the rest of the report does (spec's dominant exact roots and exact
	// delayed step), and use the Padé approximation where the report does
	// ("dead_time_model": "pade"; spec itself takes Padé for a biproper
	// loop).
	set := &spec.Settings{PadeOrder: padeOrder, PadeDeadTime: a.m.file.DeadTimeModel == deadTimePade}
	if !a.m.unitySensor && a.refOut.Den().Degree() > 0 {
		set.ReferenceToOutput = a.refOut
	}
	set.Loop, _ = a.loopParts() // closedloop.go; the zero Loop makes those requirements say why
	for _, res := range spec.CheckWith(a.m.analysed, req, set).Results {
		q := RequirementResult{
			Name: res.Name, Limit: Number(res.Limit), Value: Number(res.Value), Unit: res.Requirement.Unit(), Pass: res.Pass, Message: res.Message,
		}
		a.applyVerdict(&q, res.Requirement)
		a.rep.Requirements = append(a.rep.Requirements, q)
	}
}

// marginKeys are the requirements on a margin: quantities that exist only
// for a stable closed loop.
var marginKeys = []string{"min_phase_margin_deg", "min_gain_margin_db", "min_delay_margin_sec", "max_peak_sensitivity"}

// applyVerdict makes a requirement's verdict agree with the loop's one
// stability verdict: no requirement is met by a loop that is unstable or
// whose stability is not determined, and a margin of an unstable loop is
// left out (null) rather than quoted.
func (a *analysis) applyVerdict(q *RequirementResult, r spec.Requirement) {
	v := a.verdict
	if v.known && v.stable {
		return
	}
	if slices.Contains(marginKeys, r.Key()) {
		q.Value = nan
	}
	if !v.known {
		q.Pass = false
		q.Message = fmt.Sprintf("The stability of the closed loop is not determined (see the warnings), so the requirement (%s) is not met.", r)
		return
	}
	if q.Pass {
		q.Pass = false
		q.Message = fmt.Sprintf("The closed loop is unstable (judged from %s), so the requirement (%s) is not met.", v.method, r)
	}
}

// requirementsSection checks requirements. Its verdicts are shown apart
// from the tables (first in summary.md and index.html, last in the text
// summary), so it has no tables.
var requirementsSection = section{stage: "requirements", keys: []loopKey{requirementsKey}, run: (*analysis).requirementsStage}

// RequirementResult is one verdict of the "requirements" section.
type RequirementResult struct {
	// Name says the requirement in words.
	Name string `json:"name"`
	// Limit is the bound from the loop file.
	Limit Number `json:"limit"`
	// Value is the measured value; null when it could not be measured.
	Value Number `json:"value"`
	// Unit is the unit of Limit and Value.
	Unit string `json:"unit"`
	// Pass reports whether the requirement is met.
	Pass bool `json:"pass"`
	// Message says the verdict in a sentence.
	Message string `json:"message"`
}
