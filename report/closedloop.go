package report

import (
	"fmt"
	"math"
	"strings"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/closedloop"
	"github.com/loopwise/loopwise/tf"
)

// ControllerForm is the loop file's structured "controller": a controller
// named by its form and parameters in the trade's words instead of a
// transfer function, for example
//
//	"controller": {"form": "pid", "gain": 2, "integral_time_sec": 0.5,
//	               "derivative_time_sec": 0.05, "derivative_filter": 10}
//
// Forms and their keys (package tf's controller forms):
//
//	"pid"       gain, integral_time_sec, derivative_time_sec, derivative_filter (optional, 0 = unfiltered)
//	"pi"        gain, integral_time_sec
//	"pd"        gain, derivative_time_sec, derivative_filter (optional)
//	"lead_lag"  center_frequency_rad_per_sec, phase_deg, gain (optional, default 1)
//	"notch"     frequency_rad_per_sec, depth, width_rad_per_sec, gain (optional, default 1)
//
// The forms are continuous-time; a loop in z ("sample_time_sec") takes the
// text form.
type ControllerForm struct {
	// Form is "pid", "pi", "pd", "lead_lag" or "notch".
	Form string
	// Gain is the proportional gain of pid, pi, pd, and a factor of
	// lead_lag and notch.
	Gain float64
	// IntegralTimeSec and DerivativeTimeSec are the time constants of
	// the time-constant PID form; DerivativeFilter is N.
	IntegralTimeSec, DerivativeTimeSec, DerivativeFilter float64
	// CenterFrequencyRadPerSec and PhaseDeg place a lead (phase > 0) or
	// lag (phase < 0).
	CenterFrequencyRadPerSec, PhaseDeg float64
	// FrequencyRadPerSec, Depth and WidthRadPerSec describe a notch.
	FrequencyRadPerSec, Depth, WidthRadPerSec float64
}

// controllerFormKeys are the keys of a structured "controller".
var controllerFormKeys = []string{"form", "gain", "integral_time_sec", "derivative_time_sec", "derivative_filter",
	"center_frequency_rad_per_sec", "phase_deg", "frequency_rad_per_sec", "depth", "width_rad_per_sec"}

// controllerFormFields says which keys each form needs and allows.
var controllerFormFields = map[string]struct{ required, optional []string }{
	"pid":      {[]string{"gain", "integral_time_sec", "derivative_time_sec"}, []string{"derivative_filter"}},
	"pi":       {[]string{"gain", "integral_time_sec"}, nil},
	"pd":       {[]string{"gain", "derivative_time_sec"}, []string{"derivative_filter"}},
	"lead_lag": {[]string{"center_frequency_rad_per_sec", "phase_deg"}, []string{"gain"}},
	"notch":    {[]string{"frequency_rad_per_sec", "depth", "width_rad_per_sec"}, []string{"gain"}},
}

// decodeController reads "controller": a transfer function as text, or a
// structured controller form.
func decodeController(v keyValue, lf *Loop) error {
	if valueKind(v.f.raw) != "an object" {
		return v.text(&lf.Controller)
	}
	fields, err := v.fields(controllerFormKeys)
	if err != nil {
		return err
	}
	cf := &ControllerForm{}
	seen := map[string]bool{}
	for _, g := range fields {
		key := g.f.key[len("controller."):]
		seen[key] = true
		var dst *float64
		switch key {
		case "form":
			if err := g.text(&cf.Form); err != nil {
				return err
			}
			continue
		case "gain":
			dst = &cf.Gain
		case "integral_time_sec":
			dst = &cf.IntegralTimeSec
		case "derivative_time_sec":
			dst = &cf.DerivativeTimeSec
		case "derivative_filter":
			dst = &cf.DerivativeFilter
		case "center_frequency_rad_per_sec":
			dst = &cf.CenterFrequencyRadPerSec
		case "phase_deg":
			dst = &cf.PhaseDeg
		case "frequency_rad_per_sec":
			dst = &cf.FrequencyRadPerSec
		case "depth":
			dst = &cf.Depth
		case "width_rad_per_sec":
			dst = &cf.WidthRadPerSec
		}
		if err := g.number(dst); err != nil {
			return err
		}
	}
	where := at(v.data, v.f.valOff)
	spec, ok := controllerFormFields[cf.Form]
	if !ok {
		return badInput("key \"controller.form\" %s: unknown form %q; use one of \"pid\", \"pi\", \"pd\", \"lead_lag\", \"notch\"", where, cf.Form)
	}
	for _, k := range spec.required {
		if !seen[k] {
			return badInput("key \"controller\" %s: the form %q needs the key %q", where, cf.Form, k)
		}
	}
	for k := range seen {
		if k != "form" && !contains(spec.required, k) && !contains(spec.optional, k) {
			return badInput("key \"controller.%s\" %s: the form %q has no such parameter (it takes %s)", k, where, cf.Form, strings.Join(append(append([]string{}, spec.required...), spec.optional...), ", "))
		}
	}
	if !seen["gain"] {
		cf.Gain = 1
	}
	g, err := cf.TF()
	if err != nil {
		return badInput("key \"controller\" %s: %s", where, strings.TrimPrefix(err.Error(), "tf: "))
	}
	lf.ControllerForm = cf
	lf.Controller = g.String()
	return nil
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// TF returns the controller's transfer function (package tf's forms).
func (cf *ControllerForm) TF() (tf.TF, error) {
	var g tf.TF
	var err error
	switch cf.Form {
	case "pid":
		g, err = tf.PID{Gain: cf.Gain, IntegralTimeSec: cf.IntegralTimeSec, DerivativeTimeSec: cf.DerivativeTimeSec, DerivativeFilter: cf.DerivativeFilter}.TF()
	case "pi":
		g, err = tf.NewPI(cf.Gain, cf.IntegralTimeSec)
	case "pd":
		g, err = tf.NewPD(cf.Gain, cf.DerivativeTimeSec, cf.DerivativeFilter)
	case "lead_lag":
		if g, err = (tf.LeadLag{CenterFrequencyRadPerSec: cf.CenterFrequencyRadPerSec, PhaseDeg: cf.PhaseDeg}).TF(); err == nil {
			g, err = g.Scale(cf.Gain)
		}
	case "notch":
		if g, err = (tf.Notch{FrequencyRadPerSec: cf.FrequencyRadPerSec, Depth: cf.Depth, WidthRadPerSec: cf.WidthRadPerSec}).TF(); err == nil {
			g, err = g.Scale(cf.Gain)
		}
	default:
		return tf.TF{}, fmt.Errorf("%w: unknown controller form %q", tf.ErrParameter, cf.Form)
	}
	return g, err
}

// LoadDisturbanceResult is the "load_disturbance" section: the output after
// a unit step of load disturbance at the plant input (package closedloop).
type LoadDisturbanceResult struct {
	// PeakDeviation is the output's largest deviation (signed) and
	// PeakTimeSec its time (null when the output creeps to its final
	// value, which is then the peak).
	PeakDeviation Number `json:"peak_deviation"`
	PeakTimeSec   Number `json:"peak_time_sec"`
	// RecoveryTimeSec is when the output is back for good within 2 % of
	// the peak deviation around its final value (common practice).
	RecoveryTimeSec Number `json:"recovery_time_sec"`
	// FinalValue is the residual offset: 0 with integral action.
	FinalValue Number `json:"final_value"`
	// IntegratedAbsoluteError and IntegratedSquaredError are ∫|y| dt and
	// ∫y² dt (null when infinite: a residual offset).
	IntegratedAbsoluteError Number `json:"integrated_absolute_error"`
	IntegratedSquaredError  Number `json:"integrated_squared_error"`
}

// ControlEffortResult is the "control_effort" section: the control signal
// after a unit reference step.
type ControlEffortResult struct {
	// Initial is u(0+), the proportional and derivative kick.
	Initial Number `json:"initial"`
	// Peak is the value of u of largest magnitude and PeakTimeSec its time
	// (null when |u| creeps up to its final value, which is then the peak).
	Peak        Number `json:"peak"`
	PeakTimeSec Number `json:"peak_time_sec"`
	// FinalValue is u(∞).
	FinalValue Number `json:"final_value"`
}

// NoiseResult is the "noise" section: how measurement noise reaches the
// control signal and the output.
type NoiseResult struct {
	// ToControlH2 and ToOutputH2 are the H2 norms of noise → u and
	// noise → y (null when infinite: a controller with direct feedthrough).
	ToControlH2 Number `json:"to_control_h2"`
	// ToControlHighFrequencyGain is |noise → u| as ω → ∞ (at π/T in z).
	ToControlHighFrequencyGain Number `json:"to_control_high_frequency_gain"`
	ToOutputH2                 Number `json:"to_output_h2"`
}

// closedLoopState keeps what the plots need.
type closedLoopState struct {
	fs *closedloop.Functions
	m  closedloop.Metrics
}

// loopParts returns the loop's parts for package closedloop: the
// controller, the plant with the loop's dead time, the sensor and the gain.
//
// A loop with "discretize" is analysed as the sampled-data loop it
// describes (see sampledParts and sampledDescription).
func (a *analysis) loopParts() (closedloop.Loop, error) {
	m := a.m
	plant := m.plant
	if d := m.file.DelaySec; d > 0 {
		var err error
		if plant, err = plant.WithDelay(plant.DelaySec() + d); err != nil {
			return closedloop.Loop{}, err
		}
	}
	l := closedloop.Loop{Plant: plant, Controller: m.controller, Sensor: m.sensor, Gain: m.gain}
	if m.delayIgnored {
		// The dead time is negligible against the loop's dynamics and the
		// other sections leave it out (build.go, negligibleDelay): so do
		// these.
		l.Plant, l.Controller, l.Sensor = l.Plant.WithoutDelay(), l.Controller.WithoutDelay(), l.Sensor.WithoutDelay()
	}
	if d := m.file.Discretize; d != nil {
		return sampledParts(l, d, m.unitySensor)
	}
	return l, nil
}

// sampledParts turns the continuous parts of a loop with "discretize" into
// the sampled-data loop: the controller converted to z by the file's
// method (the digital controller), and the plant, with its dead time, seen
// through a zero-order hold at the sampling instants (its exact pulse
// transfer function: the control signal is held between samples and a
// step of load disturbance is constant, so the output at the sampling
// instants is exact; between them it is not seen). A sensor other than 1
// is converted to z on its own by the file's method, as a digital filter of
// the sampled measurement (for an analogue sensor ahead of the sampler
// this is an approximation, and the description says so).
//
// This is not the loop converted as a whole that the other sections
// analyse (the conversion of C·G·H in one piece): with "zoh" that one
// holds the error ahead of the controller, here the control signal is held
// ahead of the plant. The description names the difference.
func sampledParts(l closedloop.Loop, d *Discretize, unitySensor bool) (closedloop.Loop, error) {
	T := d.SampleTimeSec
	if !l.Controller.IsProper() && d.Method != "tustin" {
		return closedloop.Loop{}, fmt.Errorf("the controller %s is improper (a derivative without filter), and \"discretize.method\" %q cannot convert it to z on its own; use \"tustin\" or give the derivative a filter", l.Controller, d.Method)
	}
	c, err := discretize(l.Controller, d)
	if err != nil {
		return closedloop.Loop{}, fmt.Errorf("the controller cannot be converted to z on its own: %s", strings.TrimPrefix(short(err), "key \"discretize\": the loop cannot be converted to z: "))
	}
	g, err := l.Plant.Discretize(T, tf.ZeroOrderHold, nil)
	if err != nil {
		return closedloop.Loop{}, fmt.Errorf("the plant cannot be sampled through a zero-order hold at %s s: %s", g2(T), strings.TrimPrefix(short(err), "tf: "))
	}
	out := closedloop.Loop{Plant: g, Controller: c, Gain: l.Gain}
	if !unitySensor {
		if out.Sensor, err = discretize(l.Sensor, d); err != nil {
			return closedloop.Loop{}, fmt.Errorf("the sensor cannot be converted to z on its own: %s", strings.TrimPrefix(short(err), "key \"discretize\": the loop cannot be converted to z: "))
		}
	}
	return out, nil
}

// sampledDescription says in words what the whole-loop sections compute
// for a loop with "discretize" ("" otherwise).
func (a *analysis) sampledDescription() string {
	d := a.m.file.Discretize
	if d == nil {
		return ""
	}
	what := fmt.Sprintf("computed for the sampled-data loop: the controller converted to z by %q at %s s and the plant (with its dead time) seen through a zero-order hold at the sampling instants, exact there (the output between samples is not seen); values are those of the sample sequences, integrals those of the held signals (T·Σ), H2 norms per sample. This loop holds the control signal ahead of the plant; the sections above convert controller·plant·sensor in one piece, so their closed-loop poles can differ", d.Method, g2(d.SampleTimeSec))
	if !a.m.unitySensor {
		what += fmt.Sprintf("; the sensor is converted to z on its own by %q, as a digital filter of the sampled measurement (an approximation for an analogue sensor ahead of the sampler)", d.Method)
	}
	return what
}

func g2(x float64) string { return g(Number(x)) }

// closedLoopStage fills load_disturbance, control_effort and noise.
func (a *analysis) closedLoopStage() {
	const keys = "the load_disturbance, control_effort and noise keys are null"
	parts, err := a.loopParts()
	if err != nil {
		a.warn("load disturbance, control effort and noise: %s; %s", err, keys)
		return
	}
	if what := a.sampledDescription(); what != "" {
		a.warn("load disturbance, control effort and noise: %s", what)
	}
	fs, err := closedloop.Of(parts, &closedloop.Settings{PadeOrder: padeOrder})
	if err != nil {
		a.warn("load disturbance, control effort and noise: %s; %s", short(err), keys)
		return
	}
	if !fs.InternallyStable {
		why := fmt.Sprintf("the closed loop is internally unstable (closed-loop poles %s)", polesText(fs.UnstablePoles))
		if len(fs.HiddenModes) > 0 {
			why = fmt.Sprintf("the closed loop is internally unstable: the unstable mode(s) %s cancel between plant, controller and sensor, so they are hidden from some closed-loop transfer functions but still grow inside the loop", polesText(fs.HiddenModes))
		}
		a.warn("load disturbance, control effort and noise: %s; %s", why, keys)
		return
	}
	if why := a.unsettled(); why != "" {
		a.warn("load disturbance, control effort and noise: %s; %s", why, keys)
		return
	}
	if fs.DelayApproximated {
		a.warn("load disturbance, control effort and noise: the responses, peaks, recovery time, IAE and ISE are those of the exact dead time (method of steps), the noise H2 norms use its Padé approximation of order %d", padeOrder)
	}
	var m closedloop.Metrics
	var errs [8]error
	m.LoadDisturbance, errs[0] = fs.StepDeviation(closedloop.LoadDisturbance, closedloop.ProcessOutput, nil)
	m.ReferenceControl, errs[1] = fs.ControlEffort(closedloop.Reference)
	m.Noise, errs[2] = fs.NoiseGains()
	m.LoadToOutputPeak, errs[3] = fs.Peak(closedloop.LoadDisturbance, closedloop.ProcessOutput)
	m.NoiseToControlPeak, errs[4] = fs.Peak(closedloop.Noise, closedloop.Control)
	m.SensitivityPeak, errs[5] = fs.Peak(closedloop.OutputDisturbance, closedloop.ProcessOutput)
	m.ComplementaryPeak, errs[6] = fs.Peak(closedloop.LoadDisturbance, closedloop.Control)
	a.closed = &closedLoopState{fs: fs, m: m}
	if err := errs[0]; err != nil {
		a.warn("load disturbance: %s; the load_disturbance keys are null", short(err))
	} else {
		d := m.LoadDisturbance
		a.rep.LoadDisturbance = &LoadDisturbanceResult{
			PeakDeviation: Number(d.PeakDeviation), PeakTimeSec: Number(d.PeakTimeSec), RecoveryTimeSec: Number(d.RecoveryTimeSec),
			FinalValue: Number(d.FinalValue), IntegratedAbsoluteError: Number(d.IntegratedAbsoluteError), IntegratedSquaredError: Number(d.IntegratedSquaredError),
		}
	}
	if err := errs[1]; err != nil {
		a.warn("control effort: %s; the control_effort keys are null", short(err))
	} else {
		e := m.ReferenceControl
		a.rep.ControlEffort = &ControlEffortResult{Initial: Number(e.InitialValue), Peak: Number(e.PeakValue), PeakTimeSec: Number(e.PeakTimeSec), FinalValue: Number(e.FinalValue)}
	}
	if err := errs[2]; err != nil {
		a.warn("noise: %s; the noise keys are null", short(err))
	} else {
		n := m.Noise
		a.rep.Noise = &NoiseResult{ToControlH2: Number(n.ToControlH2), ToControlHighFrequencyGain: Number(n.ToControlHighFrequencyGain), ToOutputH2: Number(n.ToOutputH2)}
	}
	for _, err := range errs[3:] {
		if err != nil {
			a.warn("closed-loop peaks: %s", short(err))
			a.closed = nil // the figure needs every peak
			break
		}
	}
}

func polesText(ps []complex128) string {
	var parts []string
	for _, p := range ps {
		if math.Abs(imag(p)) < 1e-12*math.Max(1, math.Abs(real(p))) {
			parts = append(parts, g(Number(real(p))))
		} else {
			parts = append(parts, fmt.Sprintf("%s ± %sj", g(Number(real(p))), g(Number(math.Abs(imag(p))))))
		}
	}
	return strings.Join(parts, ", ")
}

// closedLoopTables shows the three sections.
func closedLoopTables(r *Report) []table {
	var out []table
	if d := r.LoadDisturbance; d != nil {
		out = append(out, table{title: "Load disturbance (unit step at the plant input) at " + r.Loop.at, rows: []row{
			{"peak output deviation", g(d.PeakDeviation) + peakAt(d.PeakTimeSec)},
			{"recovery time (2 % of the peak)", gUnit(d.RecoveryTimeSec, "s")},
			{"residual offset", g(d.FinalValue)},
			{"integrated absolute error (IAE)", g(d.IntegratedAbsoluteError)},
			{"integrated squared error (ISE)", g(d.IntegratedSquaredError)},
		}})
	}
	if c := r.ControlEffort; c != nil {
		out = append(out, table{title: "Control signal (unit reference step)", rows: []row{
			{"initial value u(0+)", g(c.Initial)},
			{"peak", g(c.Peak) + peakAt(c.PeakTimeSec)},
			{"final value", g(c.FinalValue)},
		}})
	}
	if n := r.Noise; n != nil {
		out = append(out, table{title: "Measurement noise", rows: []row{
			{"to the control signal: H2 norm", g(n.ToControlH2)},
			{"to the control signal: high-frequency gain", g(n.ToControlHighFrequencyGain)},
			{"to the output: H2 norm", g(n.ToOutputH2)},
		}})
	}
	return out
}

// peakAt says when a peak is reached: at a time, or approached as t → ∞
// (a signal that creeps to its final value).
func peakAt(t Number) string {
	if math.IsInf(float64(t), 1) {
		return ", approached as t → ∞ (no overshoot)"
	}
	return " at " + gUnit(t, "s")
}

// closedLoopPlots draws the four closed-loop magnitudes, the
// load-disturbance response and the control signal with plots' add.
func (a *analysis) closedLoopPlots(add func(title, file, caption string, draw func() (*chart.Figure, error))) {
	c := a.closed
	if c == nil {
		return
	}
	ts := c.fs.SampleTimeSec
	add("Closed-loop functions", "closed-loop-functions",
		"Magnitudes of the sensitivity S, the complementary sensitivity T, the load disturbance → output G·S and the measurement noise → control C·S, with their peaks.",
		func() (*chart.Figure, error) {
			mag, err := c.fs.Magnitudes(c.fs.FrequencyGrid(400))
			if err != nil {
				return nil, err
			}
			return chart.ClosedLoopMagnitudes(mag, &c.m, &chart.ClosedLoopSettings{SampleTimeSec: ts})
		})
	if a.rep.LoadDisturbance != nil {
		add("Load-disturbance response", "load-disturbance",
			"Output after a unit step of load disturbance at the plant input: the peak deviation, the recovery band (2 % of the peak) and the recovery time.",
			func() (*chart.Figure, error) {
				r, err := c.fs.StepResponse(closedloop.LoadDisturbance, closedloop.ProcessOutput)
				if err != nil {
					return nil, err
				}
				return chart.LoadDisturbanceResponse(r, &c.m.LoadDisturbance, 0, nil)
			})
	}
	if a.rep.ControlEffort != nil {
		add("Control signal", "control-signal",
			"Control signal after a unit reference step: the initial kick u(0+), the peak and the final value.",
			func() (*chart.Figure, error) {
				r, err := c.fs.StepResponse(closedloop.Reference, closedloop.Control)
				if err != nil {
					return nil, err
				}
				return chart.ControlSignal(r, &c.m.ReferenceControl, nil)
			})
	}
}

// closedLoopSection computes load_disturbance, control_effort and noise
// (package closedloop).
var closedLoopSection = section{stage: "load disturbance, control effort and noise", run: (*analysis).closedLoopStage, tables: closedLoopTables}
