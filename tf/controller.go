package tf

import (
	"errors"
	"fmt"
	"math"
)

// ErrParameter reports a controller parameter outside its valid range; the
// error names the parameter.
var ErrParameter = errors.New("tf: invalid controller parameter")

func checkParam(name string, v float64, positive, allowZero bool) error {
	switch {
	case math.IsNaN(v) || math.IsInf(v, 0):
		return fmt.Errorf("%w: %s is %v (want a finite number)", ErrParameter, name, v)
	case positive && v < 0, positive && v == 0 && !allowZero:
		want := "> 0"
		if allowZero {
			want = "≥ 0"
		}
		return fmt.Errorf("%w: %s is %v (want %s)", ErrParameter, name, v, want)
	}
	return nil
}

// PID is a proportional–integral–derivative controller in the
// time-constant (standard) form
//
//	C(s) = Gain·(1 + 1/(IntegralTimeSec·s) + DerivativeTimeSec·s/(1 + DerivativeTimeSec·s/DerivativeFilter))
//
// (K. J. Åström & T. Hägglund, Advanced PID Control, ISA 2006, ch. 3, from
// memory). IntegralTimeSec = +Inf means no integral action (PD);
// DerivativeTimeSec = 0 no derivative action (PI); DerivativeFilter = 0 an
// unfiltered derivative (improper C: the closed-loop control signal then
// contains an impulse), otherwise N, typically 5 to 20 (common practice).
type PID struct {
	Gain              float64
	IntegralTimeSec   float64
	DerivativeTimeSec float64
	DerivativeFilter  float64
}

// ParallelPID is the parallel (independent-gain) form
//
//	C(s) = Proportional + Integral/s + Derivative·s/(1 + FilterTimeSec·s)
//
// with the derivative filter as a time constant (0 = unfiltered).
type ParallelPID struct {
	Proportional, Integral, Derivative float64
	FilterTimeSec                      float64
}

// Validate returns an error naming the first invalid parameter.
func (p PID) Validate() error {
	if err := checkParam("gain", p.Gain, false, false); err != nil {
		return err
	}
	if p.Gain == 0 {
		return fmt.Errorf("%w: gain is 0 (the controller would be zero)", ErrParameter)
	}
	if !math.IsInf(p.IntegralTimeSec, 1) {
		if err := checkParam("integral time", p.IntegralTimeSec, true, false); err != nil {
			return err
		}
	}
	if err := checkParam("derivative time", p.DerivativeTimeSec, true, true); err != nil {
		return err
	}
	return checkParam("derivative filter", p.DerivativeFilter, true, true)
}

// TF returns C(s) as one transfer function, coefficients from the form
// above over the common denominator IntegralTimeSec·s·(1 + DerivativeTimeSec·s/N).
func (p PID) TF() (TF, error) {
	if err := p.Validate(); err != nil {
		return TF{}, err
	}
	q, err := p.Parallel()
	if err != nil {
		return TF{}, err
	}
	return q.TF()
}

// Parallel returns the same controller in parallel form: Proportional =
// Gain, Integral = Gain/IntegralTimeSec, Derivative = Gain·DerivativeTimeSec,
// FilterTimeSec = DerivativeTimeSec/DerivativeFilter.
func (p PID) Parallel() (ParallelPID, error) {
	if err := p.Validate(); err != nil {
		return ParallelPID{}, err
	}
	q := ParallelPID{Proportional: p.Gain, Derivative: p.Gain * p.DerivativeTimeSec}
	if !math.IsInf(p.IntegralTimeSec, 1) {
		q.Integral = p.Gain / p.IntegralTimeSec
	}
	if p.DerivativeFilter > 0 {
		q.FilterTimeSec = p.DerivativeTimeSec / p.DerivativeFilter
	}
	return q, nil
}

// String prints the parameters back in words.
func (p PID) String() string {
	s := fmt.Sprintf("PID: gain %g", p.Gain)
	if math.IsInf(p.IntegralTimeSec, 1) {
		s += ", no integral action"
	} else {
		s += fmt.Sprintf(", integral time %g s", p.IntegralTimeSec)
	}
	s += fmt.Sprintf(", derivative time %g s", p.DerivativeTimeSec)
	if p.DerivativeFilter > 0 {
		s += fmt.Sprintf(", derivative filter %g", p.DerivativeFilter)
	} else if p.DerivativeTimeSec > 0 {
		s += ", unfiltered derivative"
	}
	return s
}

// Validate returns an error naming the first invalid parameter.
func (q ParallelPID) Validate() error {
	for _, c := range []struct {
		name string
		v    float64
		pos  bool
	}{{"proportional gain", q.Proportional, false}, {"integral gain", q.Integral, false}, {"derivative gain", q.Derivative, false}, {"filter time", q.FilterTimeSec, true}} {
		if err := checkParam(c.name, c.v, c.pos, true); err != nil {
			return err
		}
	}
	if q.Proportional == 0 && q.Integral == 0 && q.Derivative == 0 {
		return fmt.Errorf("%w: every gain is 0", ErrParameter)
	}
	return nil
}

// TF returns C(s) = (Kd·s² + Kp·s·(1 + Tf·s) + Ki·(1 + Tf·s)) / (s·(1 + Tf·s)),
// the form above over one denominator; without integral action the factor
// s is left out.
func (q ParallelPID) TF() (TF, error) {
	if err := q.Validate(); err != nil {
		return TF{}, err
	}
	kp, ki, kd, tf := q.Proportional, q.Integral, q.Derivative, q.FilterTimeSec
	// Over s·(Tf·s + 1): Kp·s·(Tf·s + 1) + Ki·(Tf·s + 1) + Kd·s².
	num := []float64{kp*tf + kd, kp + ki*tf, ki}
	den := []float64{tf, 1, 0}
	if ki == 0 {
		// Over (Tf·s + 1): Kp·(Tf·s + 1) + Kd·s.
		num, den = []float64{kp*tf + kd, kp}, []float64{tf, 1}
	}
	return New(num, den)
}

// Standard returns the same controller in time-constant form. It needs
// Proportional ≠ 0 (the time-constant form has the gain as a common
// factor); an integral gain of 0 gives IntegralTimeSec = +Inf.
func (q ParallelPID) Standard() (PID, error) {
	if err := q.Validate(); err != nil {
		return PID{}, err
	}
	if q.Proportional == 0 {
		return PID{}, fmt.Errorf("%w: proportional gain is 0, which the time-constant form cannot express", ErrParameter)
	}
	p := PID{Gain: q.Proportional, IntegralTimeSec: math.Inf(1), DerivativeTimeSec: q.Derivative / q.Proportional}
	if q.Integral != 0 {
		p.IntegralTimeSec = q.Proportional / q.Integral
	}
	if q.FilterTimeSec > 0 && p.DerivativeTimeSec != 0 {
		p.DerivativeFilter = p.DerivativeTimeSec / q.FilterTimeSec
	}
	return p, p.Validate()
}

// String prints the parameters back in words.
func (q ParallelPID) String() string {
	return fmt.Sprintf("parallel PID: proportional gain %g, integral gain %g 1/s, derivative gain %g s, filter time %g s",
		q.Proportional, q.Integral, q.Derivative, q.FilterTimeSec)
}

// NewPI returns the PI controller Gain·(1 + 1/(IntegralTimeSec·s)).
func NewPI(gain, integralTimeSec float64) (TF, error) {
	return PID{Gain: gain, IntegralTimeSec: integralTimeSec}.TF()
}

// NewPD returns the PD controller Gain·(1 + DerivativeTimeSec·s/(1 +
// DerivativeTimeSec·s/derivativeFilter)); derivativeFilter 0 leaves the
// derivative unfiltered (improper).
func NewPD(gain, derivativeTimeSec, derivativeFilter float64) (TF, error) {
	return PID{Gain: gain, IntegralTimeSec: math.Inf(1), DerivativeTimeSec: derivativeTimeSec, DerivativeFilter: derivativeFilter}.TF()
}

// LeadLag is the first-order compensator (1 + s/ωz)/(1 + s/ωp) with unit
// static gain, placed so that its phase is extreme at
// CenterFrequencyRadPerSec = √(ωz·ωp): a lead for PhaseDeg > 0
// (ωz < ωp), a lag for PhaseDeg < 0. With α = (1 − sin φ)/(1 + sin φ),
// ωz = ω·√α and ωp = ω/√α (the maximum-phase formula sin φ = (1 −
// α)/(1 + α); K. Ogata, Modern Control Engineering, 5th ed., Sec. 7-11,
// from memory).
type LeadLag struct {
	CenterFrequencyRadPerSec float64
	PhaseDeg                 float64
}

// TF returns the compensator. Errors name a non-positive frequency or a
// phase outside (−90°, 90°) or equal to 0.
func (l LeadLag) TF() (TF, error) {
	if err := checkParam("centre frequency", l.CenterFrequencyRadPerSec, true, false); err != nil {
		return TF{}, err
	}
	if err := checkParam("phase", l.PhaseDeg, false, false); err != nil {
		return TF{}, err
	}
	if !(math.Abs(l.PhaseDeg) < 90) || l.PhaseDeg == 0 {
		return TF{}, fmt.Errorf("%w: phase %v° (want 0 < |phase| < 90°)", ErrParameter, l.PhaseDeg)
	}
	wz, wp := l.Corners()
	return New([]float64{1 / wz, 1}, []float64{1 / wp, 1})
}

// Corners returns ωz and ωp in rad/s.
func (l LeadLag) Corners() (zeroRadPerSec, poleRadPerSec float64) {
	s := math.Sin(l.PhaseDeg * math.Pi / 180)
	alpha := (1 - s) / (1 + s)
	return l.CenterFrequencyRadPerSec * math.Sqrt(alpha), l.CenterFrequencyRadPerSec / math.Sqrt(alpha)
}

// String prints the parameters back in words.
func (l LeadLag) String() string {
	kind := "lead"
	if l.PhaseDeg < 0 {
		kind = "lag"
	}
	wz, wp := l.Corners()
	return fmt.Sprintf("%s: phase %g° at %g rad/s (zero at %.6g rad/s, pole at %.6g rad/s)", kind, l.PhaseDeg, l.CenterFrequencyRadPerSec, wz, wp)
}

// Notch is the second-order notch filter
//
//	(s² + 2·Depth·ζ·ω·s + ω²)/(s² + 2·ζ·ω·s + ω²),  ζ = WidthRadPerSec/(2ω)
//
// with unit gain far from ω = FrequencyRadPerSec, magnitude Depth (0 ≤
// Depth < 1; 0 = a full notch) at ω, and −3 dB width about WidthRadPerSec
// for a deep notch (the denominator's bandwidth 2ζω; common practice).
type Notch struct {
	FrequencyRadPerSec float64
	Depth              float64
	WidthRadPerSec     float64
}

// TF returns the filter. Errors name a non-positive frequency or width, or
// a depth outside [0, 1).
func (n Notch) TF() (TF, error) {
	if err := checkParam("notch frequency", n.FrequencyRadPerSec, true, false); err != nil {
		return TF{}, err
	}
	if err := checkParam("notch width", n.WidthRadPerSec, true, false); err != nil {
		return TF{}, err
	}
	if err := checkParam("notch depth", n.Depth, true, true); err != nil {
		return TF{}, err
	}
	if n.Depth >= 1 {
		return TF{}, fmt.Errorf("%w: notch depth %v (want 0 ≤ depth < 1, the gain at the notch frequency)", ErrParameter, n.Depth)
	}
	w, bw := n.FrequencyRadPerSec, n.WidthRadPerSec
	return New([]float64{1, n.Depth * bw, w * w}, []float64{1, bw, w * w})
}

// String prints the parameters back in words.
func (n Notch) String() string {
	return fmt.Sprintf("notch: %g rad/s, depth %g (%.3g dB), width %g rad/s", n.FrequencyRadPerSec, n.Depth, 20*math.Log10(n.Depth), n.WidthRadPerSec)
}
