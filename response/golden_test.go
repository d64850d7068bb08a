package response

import (
	"encoding/json"
	"math"
	"os"
	"sync"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// golden is testdata/reference.json, written by testdata/gen_reference.py
// (mpmath partial fractions at 50 digits).
type golden struct {
	Cases []struct {
		Title      string
		Num, Den   []float64
		Times      []float64
		Step       []float64
		Impulse    []float64
		DirectTerm float64 `json:"direct_term"`
		Metrics    *goldenMetrics
	}
	BenchmarkFamily []familyMember `json:"benchmark_family"`
}

type goldenMetrics struct {
	FinalValue     float64  `json:"final_value"`
	T10            float64  `json:"t10"`
	T90            float64  `json:"t90"`
	RiseTime       float64  `json:"rise_time"`
	Settling       float64  `json:"settling_time"`
	PeakValue      *float64 `json:"peak_value"`
	PeakTime       *float64 `json:"peak_time"`
	OvershootPct   float64  `json:"overshoot_pct"`
	UndershootPct  float64  `json:"undershoot_pct"`
	UndershootTime *float64 `json:"undershoot_time"`
}

type familyMember struct {
	Order      int
	Num, Den   []float64
	HorizonSec float64 `json:"horizon_sec"`
	StepSec    float64 `json:"step_sec"`
	Count      int
	Index      []int
	Step       []float64
	Peak       float64
	Metrics    *goldenMetrics
}

var loadGolden = sync.OnceValues(func() (*golden, error) {
	b, err := os.ReadFile("testdata/reference.json")
	if err != nil {
		return nil, err
	}
	var g golden
	if err := json.Unmarshal(b, &g); err != nil {
		return nil, err
	}
	return &g, nil
})

func orNaN(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}

// checkMetrics compares m with the mpmath metrics. Times are located to
// about 1e-13 relative for moderate systems; the issue asks for 1e-9, which
// is the tolerance (plus 1e-11 absolute for values near zero). The stiff
// case (‖A‖·t ≈ 4e6 at settling) reaches 4e-10: the matrix exponential is
// accurate relative to ‖A‖, so the slow mode carries about eps·‖A‖·t.
func checkMetrics(t *testing.T, m Metrics, w *goldenMetrics) {
	t.Helper()
	const rel, abs = 1e-9, 1e-11
	for _, f := range []struct {
		name      string
		got, want float64
	}{
		{"final value", m.FinalValue, w.FinalValue},
		{"t10", m.RiseStartSec, w.T10},
		{"t90", m.RiseEndSec, w.T90},
		{"rise time", m.RiseTimeSec, w.RiseTime},
		{"settling time", m.SettlingTimeSec, w.Settling},
		{"peak value", m.PeakValue, orNaN(w.PeakValue)},
		{"peak time", m.PeakTimeSec, orNaN(w.PeakTime)},
		{"overshoot", m.OvershootPct, w.OvershootPct},
		{"undershoot", m.UndershootPct, w.UndershootPct},
		{"undershoot time", m.UndershootTimeSec, orNaN(w.UndershootTime)},
	} {
		if math.IsNaN(f.want) != math.IsNaN(f.got) || (!math.IsNaN(f.want) && math.Abs(f.got-f.want) > abs+rel*math.Abs(f.want)) {
			t.Errorf("%s = %.17g, want %.17g", f.name, f.got, f.want)
		}
	}
}

func TestGoldenCases(t *testing.T) {
	// Non-minimum-phase (one and two right-half-plane zeros: initial
	// undershoot), fifth order with a zero, a proper system with a direct
	// term, and a stiff system with negative gain (poles 1e-3 and 1e3),
	// against mpmath partial fractions.
	g, err := loadGolden()
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range g.Cases {
		t.Run(c.Title, func(t *testing.T) {
			sys, err := tf.New(c.Num, c.Den)
			if err != nil {
				t.Fatal(err)
			}
			times := append([]float64{0}, c.Times...)
			ones := make([]float64, len(times))
			for i := range ones {
				ones[i] = 1
			}
			step, err := Simulate(sys, times, ones, nil)
			if err != nil {
				t.Fatal(err)
			}
			imp, err := Impulse(sys, &Settings{HorizonSec: 7.5, StepSec: 0.05})
			if err != nil {
				t.Fatal(err)
			}
			if imp.DirectTerm != c.DirectTerm {
				t.Errorf("direct term %v, want %v", imp.DirectTerm, c.DirectTerm)
			}
			// Exact samples carry rounding only: 1e-12 relative to the
			// largest value. Measured ≤ 3e-15 on the moderate cases and
			// 1.6e-13 on the stiff one, whose bound is eps·‖A‖·t ≈
			// 2.2e-16·1000·7.5 ≈ 1.7e-12.
			scale := 0.0
			for _, v := range append(append([]float64(nil), c.Impulse...), c.Step...) {
				scale = math.Max(scale, math.Abs(v))
			}
			for i, tq := range c.Times {
				if d := math.Abs(step.Output[i+1] - c.Step[i]); d > 1e-12*scale {
					t.Errorf("step(%v) = %.17g, want %.17g", tq, step.Output[i+1], c.Step[i])
				}
				k := int(math.Round(tq / 0.05))
				if d := math.Abs(imp.Output[k] - c.Impulse[i]); d > 1e-12*scale {
					t.Errorf("impulse(%v) = %.17g, want %.17g", tq, imp.Output[k], c.Impulse[i])
				}
			}
			if c.Metrics != nil {
				m, err := StepMetrics(sys, nil)
				if err != nil {
					t.Fatal(err)
				}
				checkMetrics(t, m, c.Metrics)
			}
		})
	}
}

// stepErrors runs Step on a family member and returns the maximum error
// over the reference samples divided by the peak.
func familyError(t testing.TB, f familyMember) (relErr float64, out []float64) {
	sys, err := tf.New(f.Num, f.Den)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Step(sys, &Settings{HorizonSec: f.HorizonSec, StepSec: f.StepSec})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Output) != f.Count+1 {
		t.Fatalf("order %d: %d samples, want %d", f.Order, len(r.Output), f.Count+1)
	}
	worst := 0.0
	for i, k := range f.Index {
		worst = math.Max(worst, math.Abs(r.Output[k]-f.Step[i]))
	}
	return worst / f.Peak, r.Output
}

func TestFamilyAccuracy(t *testing.T) {
	// Target of the issue: error ≤ 1e-12 of the peak at every order up to
	// 24, against mpmath partial fractions.
	g, err := loadGolden()
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range g.BenchmarkFamily {
		e, _ := familyError(t, f)
		t.Logf("order %2d: max error / peak = %.2g over %d samples", f.Order, e, f.Count+1)
		if e > 1e-12 {
			t.Errorf("order %d: max error / peak = %g > 1e-12", f.Order, e)
		}
		if f.Metrics != nil {
			sys, _ := tf.New(f.Num, f.Den)
			m, err := StepMetrics(sys, nil)
			if err != nil {
				t.Fatal(err)
			}
			checkMetrics(t, m, f.Metrics)
		}
	}
}
