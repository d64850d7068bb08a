package closedloop

import (
	"encoding/json"
	"os"
	"strconv"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// referenceLoop is the loop of testdata/gen_reference.py: G =
// 2/((s+1)(s+2)(s+4)), C = K·(1 + 1/(Ti·s) + Td·s/(1 + Td·s/N)) with K = 3,
// Ti = 1.2, Td = 0.25, N = 10, and the sensor H = 1/(0.05·s + 1).
func referenceLoop(t testing.TB) Loop {
	K, Ti, Td, N := 3.0, 1.2, 0.25, 10.0
	a := Td / N
	// numerator K·(Ti·s·(a·s + 1) + (a·s + 1) + Ti·Td·s²), denominator Ti·s·(a·s + 1)
	c, err := tf.New([]float64{K * (Ti*a + Ti*Td), K * (Ti + a), K}, []float64{Ti * a, Ti, 0})
	if err != nil {
		t.Fatal(err)
	}
	return Loop{
		Plant:      tf.MustNew([]float64{2}, []float64{1, 7, 14, 8}),
		Controller: c,
		Sensor:     tf.MustNew([]float64{1}, []float64{0.05, 1}),
	}
}

func TestMpmathReference(t *testing.T) {
	raw, err := os.ReadFile("testdata/reference.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref map[string]any
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	num := func(path ...string) float64 {
		var v any = ref
		for _, p := range path {
			v = v.(map[string]any)[p]
		}
		f, err := strconv.ParseFloat(v.(string), 64)
		if err != nil {
			t.Fatal(err)
		}
		return f
	}
	fs, err := Of(referenceLoop(t), nil)
	if err != nil {
		t.Fatal(err)
	}
	m, err := fs.Analyze(nil)
	if err != nil {
		t.Fatal(err)
	}
	// Tolerances: values and located times 1e-9 relative (the issue's
	// bar; the realisation of a 6th-order loop carries ~1e-13); the IAE and
	// ITAE sums 1e-9 and their stated bounds must be below it; ISE and H2
	// (Lyapunov through an n²×n² LU) 1e-10; the frequency peak value 1e-10
	// and its frequency 1e-6 (a flat maximum: the stationary point comes
	// from polynomial roots, its value is second-order insensitive).
	for _, q := range []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"load peak", m.LoadDisturbance.PeakDeviation, num("load", "peak"), 1e-9},
		{"load peak time", m.LoadDisturbance.PeakTimeSec, num("load", "peak_time"), 1e-9},
		{"load recovery", m.LoadDisturbance.RecoveryTimeSec, num("load", "recovery"), 1e-9},
		{"load IAE", m.LoadDisturbance.IntegratedAbsoluteError, num("load", "iae"), 1e-9},
		{"load ITAE", m.LoadDisturbance.IntegratedTimeAbsoluteError, num("load", "itae"), 1e-9},
		{"load ISE", m.LoadDisturbance.IntegratedSquaredError, num("load", "ise"), 1e-10},
		{"u(0+)", m.ReferenceControl.InitialValue, num("reference_control", "initial"), 1e-12},
		{"u peak", m.ReferenceControl.PeakValue, num("reference_control", "peak"), 1e-12},
		{"u final", m.ReferenceControl.FinalValue, num("reference_control", "final"), 1e-12},
		{"e IAE", m.ReferenceError.IntegratedAbsoluteError, num("reference_error", "iae"), 1e-9},
		{"e ITAE", m.ReferenceError.IntegratedTimeAbsoluteError, num("reference_error", "itae"), 1e-9},
		{"e ISE", m.ReferenceError.IntegratedSquaredError, num("reference_error", "ise"), 1e-10},
		{"noise→y H2", m.Noise.ToOutputH2, num("noise_to_output_h2"), 1e-10},
		{"noise→u HF gain", m.Noise.ToControlHighFrequencyGain, num("noise_to_control_hf"), 1e-12},
		{"load peak |GS|", m.LoadToOutputPeak.Value, num("load_peak", "value"), 1e-10},
		{"load peak frequency", m.LoadToOutputPeak.FrequencyRadPerSec, num("load_peak", "freq"), 1e-6},
	} {
		if rel(q.got, q.want) > q.tol {
			t.Errorf("%s = %.15g, want %.15g (rel %.2g > %.0g)", q.name, q.got, q.want, rel(q.got, q.want), q.tol)
		}
	}
	if m.LoadDisturbance.FinalValue != 0 && rel(m.LoadDisturbance.FinalValue, 0) > 0 {
		if m.LoadDisturbance.FinalValue > 1e-14 || m.LoadDisturbance.FinalValue < -1e-14 {
			t.Errorf("residual offset %v, want 0 (integral action)", m.LoadDisturbance.FinalValue)
		}
	}
	if b := m.ReferenceError.AbsoluteErrorBound; b > 1e-9*m.ReferenceError.IntegratedAbsoluteError {
		t.Errorf("IAE bound %v too loose", b)
	}
	if h := m.Noise.ToControlH2; h != h || h < 1e300 {
		t.Errorf("noise→u H2 = %v, want +Inf (biproper PID)", h)
	}
}
