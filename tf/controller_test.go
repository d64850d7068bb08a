package tf

import (
	"errors"
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

// TestPIDForms: the time-constant form K·(1 + 1/(Ti·s) + Td·s/(1 + Td·s/N))
// evaluated directly equals the built transfer function, and the parallel
// form converts back exactly.
func TestPIDForms(t *testing.T) {
	for _, p := range []PID{
		{Gain: 3, IntegralTimeSec: 1.2, DerivativeTimeSec: 0.25, DerivativeFilter: 10},
		{Gain: 2, IntegralTimeSec: 0.5},
		{Gain: -1.5, IntegralTimeSec: math.Inf(1), DerivativeTimeSec: 0.1, DerivativeFilter: 8},
		{Gain: 1, IntegralTimeSec: 4, DerivativeTimeSec: 0.3},
	} {
		g, err := p.TF()
		if err != nil {
			t.Fatal(err)
		}
		for _, w := range []float64{0.01, 0.7, 3, 50} {
			s := complex(0, w)
			want := 1 + complex(p.DerivativeTimeSec, 0)*s
			if p.DerivativeFilter > 0 {
				want = 1 + complex(p.DerivativeTimeSec, 0)*s/(1+complex(p.DerivativeTimeSec/p.DerivativeFilter, 0)*s)
			}
			if !math.IsInf(p.IntegralTimeSec, 1) {
				want += 1 / (complex(p.IntegralTimeSec, 0) * s)
			}
			want *= complex(p.Gain, 0)
			if got := g.Eval(s); cmplx.Abs(got-want) > 1e-14*cmplx.Abs(want) {
				t.Errorf("%v at %v rad/s: %v, want %v", p, w, got, want)
			}
		}
		q, err := p.Parallel()
		if err != nil {
			t.Fatal(err)
		}
		back, err := q.Standard()
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(back.Gain-p.Gain) > 1e-15*math.Abs(p.Gain) || math.Abs(back.DerivativeTimeSec-p.DerivativeTimeSec) > 1e-15 ||
			(math.IsInf(p.IntegralTimeSec, 1) != math.IsInf(back.IntegralTimeSec, 1)) ||
			(!math.IsInf(p.IntegralTimeSec, 1) && math.Abs(back.IntegralTimeSec-p.IntegralTimeSec) > 1e-15*p.IntegralTimeSec) ||
			math.Abs(back.DerivativeFilter-p.DerivativeFilter) > 1e-14*p.DerivativeFilter {
			t.Errorf("round trip %v → %v → %v", p, q, back)
		}
		gq, _ := q.TF()
		if !gq.EqualApprox(g, 1e-14) {
			t.Errorf("parallel TF %v ≠ %v", gq, g)
		}
	}
}

// TestLeadLagPhase: the phase of (1 + s/ωz)/(1 + s/ωp) at √(ωz·ωp) is
// asin((1 − α)/(1 + α)), the requested phase, and it is the maximum.
func TestLeadLagPhase(t *testing.T) {
	for _, l := range []LeadLag{{10, 45}, {2, 60}, {0.5, -30}} {
		g, err := l.TF()
		if err != nil {
			t.Fatal(err)
		}
		ph := func(w float64) float64 { v, _ := g.FrequencyResponse(w); return cmplx.Phase(v) * 180 / math.Pi }
		if got := ph(l.CenterFrequencyRadPerSec); math.Abs(got-l.PhaseDeg) > 1e-12*math.Abs(l.PhaseDeg) {
			t.Errorf("%v: phase %v°", l, got)
		}
		for _, f := range []float64{0.9, 1.1} {
			if math.Abs(ph(f*l.CenterFrequencyRadPerSec)) >= math.Abs(l.PhaseDeg) {
				t.Errorf("%v: phase not extreme at the centre", l)
			}
		}
		if v, _ := g.StaticGain(); v != 1 {
			t.Errorf("%v: static gain %v", l, v)
		}
	}
}

// TestNotch: magnitude Depth at the notch frequency, 1 at 0 and → 1 at ∞.
func TestNotch(t *testing.T) {
	n := Notch{FrequencyRadPerSec: 120, Depth: 0.05, WidthRadPerSec: 30}
	g, err := n.TF()
	if err != nil {
		t.Fatal(err)
	}
	v, _ := g.FrequencyResponse(120)
	if math.Abs(cmplx.Abs(v)-0.05) > 1e-14 {
		t.Errorf("|notch(jω₀)| = %v, want 0.05", cmplx.Abs(v))
	}
	if s := n.String(); !strings.Contains(s, "120 rad/s") || !strings.Contains(s, "depth 0.05") {
		t.Errorf("String %q", s)
	}
}

func TestControllerBadParameters(t *testing.T) {
	for _, c := range []struct {
		err  error
		name string
	}{
		{func() error { _, err := PID{Gain: 0, IntegralTimeSec: 1}.TF(); return err }(), "gain"},
		{func() error { _, err := PID{Gain: 1, IntegralTimeSec: -1}.TF(); return err }(), "integral time"},
		{func() error {
			_, err := PID{Gain: 1, IntegralTimeSec: 1, DerivativeTimeSec: math.NaN()}.TF()
			return err
		}(), "derivative time"},
		{func() error { _, err := PID{Gain: 1, IntegralTimeSec: 1, DerivativeFilter: -3}.TF(); return err }(), "derivative filter"},
		{func() error { _, err := NewPI(1, 0); return err }(), "integral time"},
		{func() error { _, err := (LeadLag{0, 30}).TF(); return err }(), "centre frequency"},
		{func() error { _, err := (LeadLag{1, 95}).TF(); return err }(), "phase"},
		{func() error { _, err := (Notch{10, 1.2, 2}).TF(); return err }(), "notch depth"},
		{func() error { _, err := (Notch{10, 0.1, 0}).TF(); return err }(), "notch width"},
		{func() error { _, err := (ParallelPID{}).TF(); return err }(), "every gain"},
	} {
		if !errors.Is(c.err, ErrParameter) || !strings.Contains(c.err.Error(), c.name) {
			t.Errorf("error %v, want ErrParameter naming %q", c.err, c.name)
		}
	}
}
