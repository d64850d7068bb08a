package locus

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"strconv"
	"testing"
)

type delayRangeRefs struct {
	FirstOrderLag []struct {
		T, Tau       float64
		Omega, Kstar string
	}
	ThirdOrder struct {
		Tau               float64
		PositiveCrossings []struct{ Omega, Gain string }
	}
	Switches struct {
		Den, Num []float64
		Gain     float64
		Events   []struct {
			DelaySec, Omega string
			Direction       int
		}
	}
}

func loadRangeRefs(t *testing.T) delayRangeRefs {
	t.Helper()
	b, err := os.ReadFile("testdata/delay_ranges.json")
	if err != nil {
		t.Fatal(err)
	}
	var r delayRangeRefs
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return r
}

func num64(t *testing.T, s string) float64 {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// TestDelayedStableGainsFirstOrderLag: K·e^(−sτ)/(Ts + 1) is stable for
// −1 < K < K*, K* = √(1 + (ωT)²) with ωT = −tan(ωτ) (a textbook result,
// from memory; 50-digit values in testdata/delay_ranges.py). The interval
// ends are crossing values, exact to rounding: 1e-13 relative.
func TestDelayedStableGainsFirstOrderLag(t *testing.T) {
	for _, c := range loadRangeRefs(t).FirstOrderLag {
		loop := delayedLoop(t, []float64{1}, []float64{c.T, 1}, c.Tau)
		kstar := num64(t, c.Kstar)
		got, err := DelayedStableGains(loop, nil)
		if err != nil {
			t.Fatal(err)
		}
		if len(got.StableIntervals) != 1 || got.StableIntervals[0].Lo != 0 || math.Abs(got.StableIntervals[0].Hi-kstar) > 1e-13*kstar {
			t.Errorf("T=%v τ=%v: %v, want (0, %v)", c.T, c.Tau, got.StableIntervals, kstar)
		}
		all, err := DelayedStableGains(loop, &Settings{Range: Range{Min: math.Inf(-1), Max: math.Inf(1)}})
		if err != nil {
			t.Fatal(err)
		}
		if len(all.StableIntervals) != 1 || math.Abs(all.StableIntervals[0].Lo+1) > 1e-15 || math.Abs(all.StableIntervals[0].Hi-kstar) > 1e-13*kstar {
			t.Errorf("T=%v τ=%v, all gains: %v, want (−1, %v)", c.T, c.Tau, all.StableIntervals, kstar)
		}
		fin, err := DelayedStableGains(loop, &Settings{Range: Range{Min: 0, Max: 2 * kstar}})
		if err != nil {
			t.Fatal(err)
		}
		if len(fin.StableIntervals) != 1 || math.Abs(fin.StableIntervals[0].Hi-kstar) > 1e-13*kstar {
			t.Errorf("finite range: %v", fin.StableIntervals)
		}
	}
}

// TestDelayedStableGainsThirdOrder: k·e^(−0.4s)/(s+1)³; positive crossings
// at ω·0.4 + 3·atan ω = (2q+1)π (testdata/delay_ranges.py).
func TestDelayedStableGainsThirdOrder(t *testing.T) {
	r := loadRangeRefs(t).ThirdOrder
	loop := delayedLoop(t, []float64{1}, []float64{1, 3, 3, 1}, r.Tau)
	got, err := DelayedStableGains(loop, &Settings{Range: Range{Min: 0, Max: 3e4}})
	if err != nil {
		t.Fatal(err)
	}
	var pos []DelayCrossing
	for _, c := range got.Crossings {
		if c.Value > 0 {
			pos = append(pos, c)
		}
	}
	if len(pos) != len(r.PositiveCrossings) {
		t.Fatalf("crossings %v", got.Crossings)
	}
	for i, w := range r.PositiveCrossings {
		wg, ww := num64(t, w.Gain), num64(t, w.Omega)
		if math.Abs(pos[i].Value-wg) > 1e-13*wg || math.Abs(pos[i].FrequencyRadPerSec-ww) > 1e-13*ww || pos[i].Direction != 1 {
			t.Errorf("crossing %d: %+v, want k=%v ω=%v", i, pos[i], wg, ww)
		}
	}
	k0 := num64(t, r.PositiveCrossings[0].Gain)
	if len(got.StableIntervals) != 1 || math.Abs(got.StableIntervals[0].Hi-k0) > 1e-13*k0 {
		t.Errorf("stable %v, want (0, %v)", got.StableIntervals, k0)
	}
}

// TestDelayedStableDelaysSwitches: s² + 0.1s + 1 + 0.5·e^(−sτ) switches
// stability several times (Cooke & van den Driessche 1986); switch delays
// from the closed form in testdata/delay_ranges.py, and the stability of
// each stretch cross-checked by counting roots (DelayedRoots, argument
// principle).
func TestDelayedStableDelaysSwitches(t *testing.T) {
	r := loadRangeRefs(t).Switches
	loop := delayedLoop(t, r.Num, r.Den, 0)
	got, err := DelayedStableDelays(loop, r.Gain)
	if err != nil {
		t.Fatal(err)
	}
	// The walk stops once 2·(number of crossing frequencies) = 4 roots
	// are unstable: here after the 7th switch.
	if len(got.Switches) != 7 {
		t.Fatalf("%d switches, want 7: %+v", len(got.Switches), got.Switches)
	}
	for i, e := range r.Events[:7] {
		want := num64(t, e.DelaySec)
		if math.Abs(got.Switches[i].DelaySec-want) > 1e-13*want || got.Switches[i].Direction != e.Direction {
			t.Errorf("switch %d: %+v, want τ = %v, direction %d", i, got.Switches[i], want, e.Direction)
		}
	}
	if len(got.StableDelayIntervals) < 2 {
		t.Errorf("stable delay intervals %v: expected a return to stability", got.StableDelayIntervals)
	}
	// Cross-check each stretch between switches by counting roots.
	prev := 0.0
	for _, sw := range got.Switches {
		mid := 0.5 * (prev + sw.DelaySec)
		prev = sw.DelaySec
		l := delayedLoop(t, r.Num, r.Den, mid)
		rr, err := DelayedRoots(l, r.Gain, &DelaySettings{Region: Above, MinRealPart: 0})
		if err != nil {
			t.Fatal(err)
		}
		inStable := false
		for _, iv := range got.StableDelayIntervals {
			inStable = inStable || (mid > iv.Lo && mid < iv.Hi)
		}
		if (rr.Count == 0) != inStable {
			t.Errorf("τ = %v: %d roots in Re s > 0, intervals say stable = %v", mid, rr.Count, inStable)
		}
	}
}

// TestDelayedStableDelaysHayes: ẋ = −a·x(t − τ) is stable exactly for
// aτ < π/2 (Hayes 1950); the delay margin of a loop with τ₀ is π/(2a) − τ₀.
func TestDelayedStableDelaysHayes(t *testing.T) {
	const a = 3.0
	loop := delayedLoop(t, []float64{1}, []float64{1, 0}, 0.1)
	got, err := DelayedStableDelays(loop, a)
	if err != nil {
		t.Fatal(err)
	}
	want := math.Pi / (2 * a)
	if len(got.StableDelayIntervals) != 1 || math.Abs(got.StableDelayIntervals[0].Hi-want) > 1e-15 {
		t.Errorf("intervals %v, want [0, %v)", got.StableDelayIntervals, want)
	}
	if !got.StableAtDelay || math.Abs(got.DelayMarginSec-(want-0.1)) > 1e-15 {
		t.Errorf("delay margin %v, want %v", got.DelayMarginSec, want-0.1)
	}
	// A loop with |D(jω)| > |k·N(jω)| everywhere is stable for every delay.
	ind, err := DelayedStableDelays(delayedLoop(t, []float64{1}, []float64{1, 2}, 0), 1)
	if err != nil {
		t.Fatal(err)
	}
	if !ind.DelayIndependent || !math.IsInf(ind.DelayMarginSec, 1) {
		t.Errorf("delay-independent case: %+v", ind)
	}
}

func TestDelayedRangesBadInput(t *testing.T) {
	bip := delayedLoop(t, []float64{1, 2}, []float64{1, 1}, 0.5)
	if _, err := DelayedStableGains(bip, nil); !errors.Is(err, ErrUnsupported) {
		t.Errorf("biproper gains: %v", err)
	}
	if _, err := DelayedStableDelays(bip, 2); !errors.Is(err, ErrUnsupported) {
		t.Errorf("biproper delays with |k n| ≥ |d|: %v", err)
	}
	if _, err := DelayedStableDelays(bip, math.Inf(1)); !errors.Is(err, ErrNotFinite) {
		t.Errorf("infinite gain: %v", err)
	}
	if _, err := DelayedStableGains(bip, &Settings{Range: Range{Min: 1, Max: 0}}); !errors.Is(err, ErrInvalidRange) {
		t.Errorf("bad range: %v", err)
	}
}
