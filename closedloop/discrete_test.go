package closedloop

import (
	"math"
	"math/cmplx"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// TestDiscreteAgainstLoopSimulation checks a sampled loop against the
// difference equations of its parts run directly, sample by sample (an
// independent computation: no transfer-function algebra, no Lyapunov
// equation). Plant: the zero-order-hold equivalent of 1/(s + 1) at
// T = 0.1 s, y[k+1] = a·y[k] + b·(u[k] + d[k]), a = e^(−0.1), b = 1 − a.
// Controller: PI in the backward-rectangle form Kp + Ki·T·z/(z − 1),
// u[k] = Kp·e[k] + I[k], I[k] = I[k−1] + Ki·T·e[k].
func TestDiscreteAgainstLoopSimulation(t *testing.T) {
	const T, kp, ki = 0.1, 2.0, 3.0
	a := math.Exp(-T)
	b := 1 - a
	plant, _ := tf.NewDiscrete([]float64{b}, []float64{1, -a}, T)
	// Kp + Ki·T·z/(z − 1) = ((Kp + Ki·T)·z − Kp)/(z − 1)
	ctrl, _ := tf.NewDiscrete([]float64{kp + ki*T, -kp}, []float64{1, -1}, T)
	fs, err := Of(Loop{Plant: plant, Controller: ctrl}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !fs.InternallyStable {
		t.Fatalf("unstable: %v", fs.ClosedLoopPoles)
	}
	// simulate returns y and u for reference r, load d, noise n sequences.
	const N = 4000
	simulate := func(r, d, n func(k int) float64) (ys, us []float64) {
		y, integ := 0.0, 0.0
		for k := 0; k < N; k++ {
			e := r(k) - (y + n(k))
			integ += ki * T * e
			u := kp*e + integ
			ys, us = append(ys, y), append(us, u)
			y = a*y + b*(u+d(k))
		}
		return ys, us
	}
	zero := func(int) float64 { return 0 }
	one := func(int) float64 { return 1 }
	impulse := func(k int) float64 {
		if k == 0 {
			return 1
		}
		return 0
	}
	ys, _ := simulate(zero, one, zero)
	peak, pk := 0.0, 0
	iae, ise, itae := 0.0, 0.0, 0.0
	for k, y := range ys {
		if math.Abs(y) > math.Abs(peak) {
			peak, pk = y, k
		}
		iae += T * math.Abs(y)
		ise += T * y * y
		itae += math.Abs(y) * T * T * (float64(k) + 0.5)
	}
	last := 0
	for k, y := range ys {
		if math.Abs(y) > 0.02*math.Abs(peak) {
			last = k
		}
	}
	d, err := fs.StepDeviation(LoadDisturbance, ProcessOutput, nil)
	if err != nil {
		t.Fatal(err)
	}
	_, us := simulate(one, zero, zero)
	upeak, uk := 0.0, 0
	for k, u := range us {
		if math.Abs(u) > math.Abs(upeak)*(1+1e-13) {
			upeak, uk = u, k
		}
	}
	c, err := fs.ControlEffort(Reference)
	if err != nil {
		t.Fatal(err)
	}
	yn, un := simulate(zero, zero, impulse)
	h2y, h2u := 0.0, 0.0
	for k := range yn {
		h2y += yn[k] * yn[k]
		h2u += un[k] * un[k]
	}
	ng, err := fs.NoiseGains()
	if err != nil {
		t.Fatal(err)
	}
	// n → u at z = −1: −C/(1 + C·G) evaluated directly.
	cz, gz := ctrl.Eval(-1), plant.Eval(-1)
	hf := cmplx.Abs(cz / (1 + cz*gz))
	// Tolerances: the sums are of 4000 terms of a sequence that decays
	// like 0.9^k, summed in a different order than the realisation's
	// recursion; 1e-11 relative covers the rounding of both.
	for _, q := range []struct {
		name      string
		got, want float64
	}{
		{"peak", d.PeakDeviation, peak},
		{"peak time", d.PeakTimeSec, float64(pk) * T},
		{"recovery", d.RecoveryTimeSec, float64(last+1) * T},
		{"IAE", d.IntegratedAbsoluteError, iae},
		{"ISE", d.IntegratedSquaredError, ise},
		{"ITAE", d.IntegratedTimeAbsoluteError, itae},
		{"u[0]", c.InitialValue, kp + ki*T},
		{"u peak", c.PeakValue, upeak},
		{"u peak time", c.PeakTimeSec, float64(uk) * T},
		{"noise → y H2", ng.ToOutputH2, math.Sqrt(h2y)},
		{"noise → u H2", ng.ToControlH2, math.Sqrt(h2u)},
		{"noise → u at π/T", ng.ToControlHighFrequencyGain, hf},
	} {
		if math.Abs(q.got-q.want) > 1e-11*math.Max(math.Abs(q.want), 1e-300) {
			t.Errorf("%s = %.15g, want %.15g", q.name, q.got, q.want)
		}
	}
	if d.FinalValue != 0 && math.Abs(d.FinalValue) > 1e-14 {
		t.Errorf("residual offset %v with integral action", d.FinalValue)
	}
}

// TestDeadTimePeakExact: with dead time in the loop, the peak of
// |load → output| = |G/(1 + C·G)| comes from the exact frequency response;
// it must match a dense direct evaluation of the formula (a lower bound
// that converges to it) to 1e-9, and never lie below it.
func TestDeadTimePeakExact(t *testing.T) {
	plant, _ := tf.New([]float64{1}, []float64{1, 1})
	plant, _ = plant.WithDelay(0.5)
	ctrl, _ := tf.NewPI(0.8, 1.5)
	fs, err := Of(Loop{Plant: plant, Controller: ctrl}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !fs.DelayApproximated {
		t.Error("DelayApproximated not set")
	}
	pk, err := fs.Peak(LoadDisturbance, ProcessOutput)
	if err != nil {
		t.Fatal(err)
	}
	f := func(w float64) float64 {
		s := complex(0, w)
		g := cmplx.Exp(-0.5*s) / (s + 1)
		c := 0.8 * (1 + 1/(1.5*s))
		return cmplx.Abs(g / (1 + c*g))
	}
	best := 0.0
	for i := 0; i <= 200000; i++ {
		w := 1e-3 * math.Pow(1e5, float64(i)/200000)
		best = math.Max(best, f(w))
	}
	if pk.Value < best*(1-1e-12) || pk.Value > best*(1+1e-9) {
		t.Errorf("peak %.15g at %.6g rad/s, dense evaluation %.15g", pk.Value, pk.FrequencyRadPerSec, best)
	}
	if v := f(pk.FrequencyRadPerSec); math.Abs(v-pk.Value) > 1e-15*pk.Value {
		t.Errorf("value at the reported frequency %.15g ≠ %.15g", v, pk.Value)
	}
	// The time metrics use the exact delayed response: the offset is zero
	// (integral action), nothing moves before the dead time, and since
	// this response keeps its sign, IAE equals the integrated error
	// IE = ∫y dt = Ti/K = 1.5/0.8 = 1.875 of a load step under PI control
	// (the final-value theorem on Y(s)/s = G/(s(1 + C·G)) → 1/(K/Ti) as
	// s → 0; Åström & Hägglund, Advanced PID Control, ISA 2006, ch. 4, the
	// relation IE = Ti/K, from memory).
	d, err := fs.StepDeviation(LoadDisturbance, ProcessOutput, nil)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(d.FinalValue) > 1e-12 || !(d.PeakTimeSec > 0.5) {
		t.Errorf("load step with dead time: %+v", d)
	}
	if rel(d.IntegratedAbsoluteError, 1.875) > 1e-10 || math.Abs(d.IntegratedAbsoluteError-1.875) > d.AbsoluteErrorBound+1e-12 {
		t.Errorf("IAE %.15g (bound %.3g), want Ti/K = 1.875", d.IntegratedAbsoluteError, d.AbsoluteErrorBound)
	}
}
