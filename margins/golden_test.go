package margins

import (
	"encoding/json"
	"math"
	"os"
	"testing"

	"github.com/loopwise/loopwise/internal/refcases"
	"github.com/loopwise/loopwise/tf"
)

// goldenLoop is one loop of testdata/refs.json, written by
// testdata/gen_refs.py (mpmath, 50 digits).
type goldenLoop struct {
	Name           string    `json:"name"`
	Order          int       `json:"order"`
	Num            []float64 `json:"num"`
	Den            []float64 `json:"den"`
	GainCrossovers []struct {
		Omega refcases.Number `json:"omega"`
		PMDeg refcases.Number `json:"pm_deg"`
	} `json:"gain_crossovers"`
	PhaseCrossovers []struct {
		Omega      refcases.Number `json:"omega"`
		GainFactor refcases.Number `json:"gain_factor"`
	} `json:"phase_crossovers"`
	Stable  bool             `json:"closed_loop_stable"`
	GM      refcases.Number  `json:"gm"`
	GMOmega refcases.Number  `json:"gm_omega"`
	PMDeg   refcases.Number  `json:"pm_deg"`
	PMOmega refcases.Number  `json:"pm_omega"`
	MS      *refcases.Number `json:"ms"`
	MSOmega *refcases.Number `json:"ms_omega"`
	MT      *refcases.Number `json:"mt"`
	MTOmega *refcases.Number `json:"mt_omega"`
}

func loadGolden(tb testing.TB) []goldenLoop {
	tb.Helper()
	b, err := os.ReadFile("testdata/refs.json")
	if err != nil {
		tb.Fatal(err)
	}
	var f struct {
		Loops []goldenLoop `json:"loops"`
	}
	if err := json.Unmarshal(b, &f); err != nil {
		tb.Fatal(err)
	}
	return f.Loops
}

// goldenTF returns the transfer function of the first golden loop that
// match accepts; the test fails when there is none.
func goldenTF(tb testing.TB, match func(goldenLoop) bool) tf.TF {
	tb.Helper()
	for _, l := range loadGolden(tb) {
		if match(l) {
			return l.tf(tb)
		}
	}
	tb.Fatal("no golden loop matches")
	return tf.TF{}
}

func (g goldenLoop) tf(tb testing.TB) tf.TF {
	tb.Helper()
	l, err := tf.New(g.Num, g.Den)
	if err != nil {
		tb.Fatal(err)
	}
	return l
}

// relErr returns |got − want|/|want| (|got − want| when want is 0); equal
// infinities and matching NaN/null give 0.
func relErr(got float64, want refcases.Number) float64 {
	if want.Null {
		if math.IsNaN(got) {
			return 0
		}
		return math.Inf(1)
	}
	if math.IsInf(want.V, 0) || math.IsInf(got, 0) {
		if got == want.V {
			return 0
		}
		return math.Inf(1)
	}
	d := math.Abs(got - want.V)
	if want.V != 0 {
		d /= math.Abs(want.V)
	}
	return d
}

// TestGolden compares every crossover and margin with the mpmath references
// of testdata/refs.json: the resonance loop with three gain crossovers and
// the benchmark family of orders 2–24. The tolerance is the target,
// 1e-12 relative (phase margins: 1e-12 relative or 1e-11° absolute, since a
// phase margin near 0 has no relative scale); Ms, Mt to 1e-12 and their
// frequencies to 1e-6 (a flat maximum is located to about √eps only).
func TestGolden(t *testing.T) {
	const tol = 1e-12
	for _, g := range loadGolden(t) {
		t.Run(g.Name, func(t *testing.T) {
			res, err := Compute(g.tf(t), nil)
			if err != nil {
				t.Fatal(err)
			}
			if len(res.GainCrossovers) != len(g.GainCrossovers) {
				t.Fatalf("gain crossovers: got %+v, want %d", res.GainCrossovers, len(g.GainCrossovers))
			}
			if len(res.PhaseCrossovers) != len(g.PhaseCrossovers) {
				t.Fatalf("phase crossovers: got %+v, want %d", res.PhaseCrossovers, len(g.PhaseCrossovers))
			}
			check := func(name string, got float64, want refcases.Number, tol float64) {
				t.Helper()
				if e := relErr(got, want); !(e <= tol) {
					t.Errorf("%s: got %.17g, want %.17g (relative error %.3g > %.3g)", name, got, want.V, e, tol)
				}
			}
			checkPM := func(name string, got float64, want refcases.Number) {
				t.Helper()
				if math.Abs(got-want.V) > 1e-11 && relErr(got, want) > tol {
					t.Errorf("%s: got %.17g, want %.17g", name, got, want.V)
				}
			}
			for i, w := range g.GainCrossovers {
				check("gain crossover ω", res.GainCrossovers[i].FrequencyRadPerSec, w.Omega, tol)
				checkPM("phase margin", res.GainCrossovers[i].PhaseMarginDeg, w.PMDeg)
			}
			for i, w := range g.PhaseCrossovers {
				check("phase crossover ω", res.PhaseCrossovers[i].FrequencyRadPerSec, w.Omega, tol)
				check("gain factor", res.PhaseCrossovers[i].GainFactor, w.GainFactor, tol)
			}
			check("gain margin", res.GainMargin, g.GM, tol)
			check("gain margin ω", res.PhaseCrossoverRadPerSec, g.GMOmega, tol)
			checkPM("phase margin", res.PhaseMarginDeg, g.PMDeg)
			check("phase margin ω", res.GainCrossoverRadPerSec, g.PMOmega, tol)
			if g.MS != nil {
				check("Ms", res.PeakSensitivity, *g.MS, tol)
				check("Ms ω", res.PeakSensitivityRadPerSec, *g.MSOmega, 1e-6)
				check("Mt", res.PeakComplementarySensitivity, *g.MT, tol)
				check("Mt ω", res.PeakComplementarySensitivityRadPerSec, *g.MTOmega, 1e-6)
			}
			if res.ClosedLoopStable != g.Stable {
				t.Errorf("closed loop stable: got %v (Z = %d), want %v", res.ClosedLoopStable, res.ClosedLoopUnstablePoles, g.Stable)
			}
		})
	}
}
