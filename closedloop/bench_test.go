package closedloop

import (
	"github.com/loopwise/loopwise/internal/testutil"
	"runtime"
	"testing"
	"time"

	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// BenchmarkWholeLoop forms all closed-loop functions of the 6th-order
// reference loop and computes every metric of Analyze (four step
// responses, three Lyapunov equations, four frequency peaks);
// BenchmarkStepMetricsBaseline is one response.StepMetrics call on its
// reference → output function. The target: the first under 20×
// the second. Run side by side:
//
//	go test ./closedloop -run '^$' -bench 'WholeLoop|StepMetricsBaseline' -benchtime 50x -count 3
func BenchmarkWholeLoop(b *testing.B) {
	l := referenceLoop(b)
	for b.Loop() {
		fs, err := Of(l, nil)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := fs.Analyze(nil); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkStepMetricsBaseline(b *testing.B) {
	fs, err := Of(referenceLoop(b), nil)
	if err != nil {
		b.Fatal(err)
	}
	t := fs.Function(Reference, ProcessOutput).TF
	for b.Loop() {
		if _, err := response.StepMetrics(t, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// tenthOrder is a 10th-order loop: the reference PID with five more plant
// lags.
func BenchmarkWholeLoopOrder10(b *testing.B) {
	l := referenceLoop(b)
	lags := tf.MustNew([]float64{1}, []float64{1.0 / 3840, 1.0 / 128, 1.0 / 12, 1, 1})
	l.Plant, _ = l.Plant.Series(lags)
	fs, err := Of(l, nil)
	if err != nil {
		b.Fatal(err)
	}
	if !fs.InternallyStable {
		b.Fatal("unstable")
	}
	b.Run("whole", func(b *testing.B) {
		for b.Loop() {
			fs, _ := Of(l, nil)
			if _, err := fs.Analyze(nil); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("stepmetrics", func(b *testing.B) {
		t := fs.Function(Reference, ProcessOutput).TF
		for b.Loop() {
			if _, err := response.StepMetrics(t, nil); err != nil {
				b.Fatal(err)
			}
		}
	})
}

// BenchmarkRatio runs, interleaved in one loop and timed on the thread's
// CPU clock, the whole-loop analysis (Of + Analyze) and one
// response.StepMetrics of the reference → output function, for the
// 6th-order reference loop and the 10th-order loop, and reports their
// ratio (the target: under 20):
//
//	go test ./closedloop -cpu 1 -run '^$' -bench Ratio -benchtime 30x -count 3
func BenchmarkRatio(b *testing.B) {
	l6 := referenceLoop(b)
	l10 := referenceLoop(b)
	l10.Plant, _ = l10.Plant.Series(tf.MustNew([]float64{1}, []float64{1.0 / 3840, 1.0 / 128, 1.0 / 12, 1, 1}))
	for _, c := range []struct {
		name string
		l    Loop
	}{{"order=6", l6}, {"order=10", l10}} {
		b.Run(c.name, func(b *testing.B) {
			fs, err := Of(c.l, nil)
			if err != nil {
				b.Fatal(err)
			}
			t := fs.Function(Reference, ProcessOutput).TF
			runtime.LockOSThread()
			defer runtime.UnlockOSThread()
			var whole, step time.Duration
			for b.Loop() {
				t0 := testutil.ThreadCPU()
				fs, err := Of(c.l, nil)
				if err != nil {
					b.Fatal(err)
				}
				if _, err := fs.Analyze(nil); err != nil {
					b.Fatal(err)
				}
				t1 := testutil.ThreadCPU()
				if _, err := response.StepMetrics(t, nil); err != nil {
					b.Fatal(err)
				}
				whole, step = whole+t1-t0, step+testutil.ThreadCPU()-t1
			}
			b.ReportMetric(float64(whole)/float64(step), "whole/stepmetrics")
			b.ReportMetric(float64(whole.Microseconds())/float64(b.N), "whole-µs/op")
			b.ReportMetric(float64(step.Microseconds())/float64(b.N), "stepmetrics-µs/op")
		})
	}
}

// BenchmarkDeadTime times Analyze on a PI loop with dead time,
// e^(−0.5s)/((s + 1)(0.5s + 1)) under 0.8·(1 + 1/(1.5s)): "exact" uses the
// delayed responses (delayed.go), "pade8" the same plant with its dead
// time replaced by the Padé approximant of order 8 beforehand (the former
// method; a rational loop of order 11). Run side by side:
//
//	go test ./closedloop -run '^$' -bench DeadTime -benchtime 20x -count 3
func BenchmarkDeadTime(b *testing.B) {
	plant, _ := tf.MustNew([]float64{1}, []float64{0.5, 1.5, 1}).WithDelay(0.5)
	pade, err := plant.Pade(8)
	if err != nil {
		b.Fatal(err)
	}
	ctrl, _ := tf.NewPI(0.8, 1.5)
	for _, c := range []struct {
		name  string
		plant tf.TF
	}{{"exact", plant}, {"pade8", pade}} {
		b.Run(c.name, func(b *testing.B) {
			for b.Loop() {
				fs, err := Of(Loop{Plant: c.plant, Controller: ctrl}, nil)
				if err != nil {
					b.Fatal(err)
				}
				if _, err := fs.Analyze(nil); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
