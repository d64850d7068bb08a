// Command million runs one Monte Carlo sweep of 10⁶ samples (stability and
// margins, no step metrics) of the order-2 pick-and-place family of the
// robust tests, to completion, and prints its wall time, its statistics and
// the Go heap high-water mark sampled every 100 ms. Run it under
// /usr/bin/time -v for the peak resident set size:
//
//	go build -o /tmp/million ./robust/testdata/million && /usr/bin/time -v /tmp/million
//
// The output is recorded in ../million.txt.
package main

import (
	"context"
	"fmt"
	"os"
	"runtime"
	"sync/atomic"
	"time"

	"github.com/loopwise/loopwise/robust"
)

func main() {
	l, err := robust.NewLoop(robust.Description{Expressions: []string{"9*g/(s^2 (m s + 1))", "(0.4 + 0.3*s)"},
		Params: []robust.Param{{Name: "g", Min: 0.8, Max: 1.2}, {Name: "m", Min: 0.05, Max: 0.08, Distribution: robust.Normal}}})
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	var peak atomic.Uint64
	stop := make(chan struct{})
	go func() {
		var ms runtime.MemStats
		for {
			select {
			case <-stop:
				return
			case <-time.After(100 * time.Millisecond):
			}
			runtime.ReadMemStats(&ms)
			if ms.HeapInuse > peak.Load() {
				peak.Store(ms.HeapInuse)
			}
		}
	}()
	start := time.Now()
	last := start
	r, err := robust.MonteCarlo(context.Background(), l, nil, &robust.SampleSettings{Samples: 1_000_000, Seed: 1,
		Progress: func(done, total int) {
			if time.Since(last) > 30*time.Second {
				last = time.Now()
				fmt.Printf("progress %d of %d after %.0f s\n", done, total, time.Since(start).Seconds())
			}
		}})
	wall := time.Since(start)
	close(stop)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	fmt.Printf("samples requested %d, done %d, partial %v, analysis errors %d, GOMAXPROCS %d\n", r.Requested, r.Done, r.Partial, r.AnalysisErrors, runtime.GOMAXPROCS(0))
	fmt.Printf("wall time %.1f s, %.0f loops/s\n", wall.Seconds(), float64(r.Done)/wall.Seconds())
	fmt.Printf("closed loop stable: %d of %d (Wilson 95 %%: %.6f to %.6f)\n", r.Stable.Passed, r.Stable.Samples, r.Stable.Low, r.Stable.High)
	s := r.Summary
	fmt.Printf("phase margin deg: min %.6g at %v, max %.6g at %v (%d finite)\n", s.PhaseMarginDeg.Min, s.PhaseMarginDeg.MinAt, s.PhaseMarginDeg.Max, s.PhaseMarginDeg.MaxAt, s.PhaseMarginDeg.Finite)
	fmt.Printf("gain margin dB: min %.6g at %v (%d finite)\n", s.GainMarginDB.Min, s.GainMarginDB.MinAt, s.GainMarginDB.Finite)
	fmt.Printf("peak sensitivity: max %.6g at %v\n", s.PeakSensitivity.Max, s.PeakSensitivity.MaxAt)
	fmt.Printf("kept samples %d; heap in use peak %.1f MiB (sampled every 100 ms), total allocated %.1f GiB, GC cycles %d\n",
		len(r.Values), float64(peak.Load())/(1<<20), float64(ms.TotalAlloc)/(1<<30), ms.NumGC)
}
