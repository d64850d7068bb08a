package robust

import (
	"math"
	"testing"

	"github.com/loopwise/loopwise/spec"
)

// L = k/(s(s + 1)), k ∈ [0.5, 2]. Closed forms: the gain crossover solves
// ω²(ω² + 1) = k², the phase margin is atan(1/ω); at k = 2, ω² = (√17 − 1)/2
// and PM = 38.668°; the closed-loop s² + s + k has ζ = 1/(2√k), worst
// 1/(2√2) at k = 2; no phase crossover, so the gain margin is infinite.
func TestWorstCasesClosedForm(t *testing.T) {
	l := mustLoop(t, Description{Expressions: []string{"k/(s*(s+1))"}, Params: []Param{{Name: "k", Min: 0.5, Max: 2}}})
	w, st, err := WorstCases(l, nil)
	if err != nil {
		t.Fatal(err)
	}
	if st.Verdict != StableForBox {
		t.Fatalf("verdict %v", st.Verdict)
	}
	omega := math.Sqrt((math.Sqrt(17) - 1) / 2)
	pm := math.Atan(1/omega) * 180 / math.Pi
	zeta := 1 / (2 * math.Sqrt(2))
	for _, c := range []struct {
		q    Quantity
		want float64
	}{{PhaseMargin, pm}, {DampingRatio, zeta}} {
		got := w[c.q]
		if math.Abs(got.Value-c.want) > 1e-9*c.want || got.At[0] != 2 {
			t.Errorf("%v = %.12g at %v, want %.12g at k = 2", c.q, got.Value, got.At, c.want)
		}
		if !(got.Bound <= got.Value) || got.Bound < 0.99*c.want {
			t.Errorf("%v bound %v not in [0.99·%v, value]", c.q, got.Bound, c.want)
		}
	}
	if !math.IsInf(w[GainMargin].Value, 1) {
		t.Errorf("gain margin %v, want +Inf", w[GainMargin].Value)
	}
}

// The bound proofs must fail just beyond the true worst value (soundness) and
// succeed a little inside it.
func TestBoundSoundness(t *testing.T) {
	l := pickLoop(t)
	w, _, err := WorstCases(l, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range w {
		if math.IsNaN(c.Bound) || math.IsInf(c.Value, 0) {
			continue
		}
		beyond := c.Value * 1.01
		inside := c.Value * 0.95
		if c.Quantity == PeakSensitivity {
			beyond, inside = c.Value*0.99, c.Value*1.05
		}
		if l.prove(c.Quantity, beyond, 20000) {
			t.Errorf("%v proven at %v, beyond the value %v the loop has at %v", c.Quantity, beyond, c.Value, c.At)
		}
		if !l.prove(c.Quantity, inside, 20000) {
			t.Errorf("%v not proven at %v, inside the worst value %v", c.Quantity, inside, c.Value)
		}
		// the worst value is a value the loop has at At
		v, err := l.pointValues(l.scaledOf(c.At))
		if err != nil || math.Abs(v[c.Quantity]-c.Value) > 1e-12*math.Abs(c.Value) {
			t.Errorf("%v: %v at %v, recomputed %v", c.Quantity, c.Value, c.At, v[c.Quantity])
		}
	}
}

func TestCheckRequirements(t *testing.T) {
	l := pickLoop(t)
	req := spec.Requirements{spec.MinPhaseMarginDeg(45), spec.MinPhaseMarginDeg(55), spec.MaxPeakSensitivity(1.4), spec.MaxOvershootPct(50), spec.MaxOvershootPct(1)}
	res, err := CheckRequirements(l, req, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	want := []RequirementVerdict{MetForBox, ViolatedAtPoint, MetForBox, RequirementUndecided, ViolatedAtPoint}
	for k, r := range res {
		if r.Verdict != want[k] {
			t.Errorf("%v: %v (%s), want %v", req[k], r.Verdict, r.Message, want[k])
		}
		if r.Verdict == ViolatedAtPoint {
			g, _ := l.At(r.At)
			if spec.Check(g, spec.Requirements{req[k]}).Passed() {
				t.Errorf("%v: reported violated at %v but passes there", req[k], r.At)
			}
		}
	}
}
