package closedloop

import (
	"testing"

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
