package margins

import (
	"math"
	"testing"

	"github.com/loopwise/loopwise/internal/refcases"
	"github.com/loopwise/loopwise/internal/testutil"
	"github.com/loopwise/loopwise/tf"
)

// refMargins is the "margins" part of a reference case (see
// ../shared/refcases/README.md, Conventions, Margins).
type refMargins struct {
	GainCrossovers []struct {
		Omega refcases.Number `json:"omega"`
		PMDeg refcases.Number `json:"pm_deg"`
	} `json:"gain_crossovers"`
	PhaseCrossovers []struct {
		Omega        refcases.Number `json:"omega"`
		GainFactor   refcases.Number `json:"gain_factor"`
		GainFactorDB refcases.Number `json:"gain_factor_db"`
	} `json:"phase_crossovers"`
	GM               refcases.Number `json:"gm"`
	GMDB             refcases.Number `json:"gm_db"`
	GMOmega          refcases.Number `json:"gm_omega"`
	GMLower          refcases.Number `json:"gm_lower"`
	GMLowerDB        refcases.Number `json:"gm_lower_db"`
	GMLowerOmega     refcases.Number `json:"gm_lower_omega"`
	PMDeg            refcases.Number `json:"pm_deg"`
	PMOmega          refcases.Number `json:"pm_omega"`
	Method           string          `json:"closed_loop_method"`
	OpenUnstable     int             `json:"open_loop_unstable_poles"`
	ClosedUnstable   int             `json:"closed_loop_unstable_poles"`
	Stable           bool            `json:"closed_loop_stable"`
	DelayMargin      refcases.Number `json:"delay_margin"`
	DelayMarginOmega refcases.Number `json:"delay_margin_omega"`
	MS               refcases.Number `json:"ms"`
	MSOmega          refcases.Number `json:"ms_omega"`
	MT               refcases.Number `json:"mt"`
	MTOmega          refcases.Number `json:"mt_omega"`
}

// num converts a result value to a refcases.Number: NaN is "does not exist".
func num(v float64) refcases.Number {
	if math.IsNaN(v) {
		return refcases.Number{Null: true, V: math.NaN()}
	}
	return refcases.Number{V: v}
}

// TestReferenceCases checks every "margins" reference case (computed at 50
// digits with mpmath, ../shared/refcases) within the tolerance the case
// states: tolerance.rel/abs for crossovers and margins, and
// tolerance.omega_of_peak_rel for the frequencies of the flat maxima Ms, Mt.
func TestReferenceCases(t *testing.T) {
	cases, err := refcases.ByType("margins")
	if err != nil {
		t.Fatal(err)
	}
	if len(cases) < 8 {
		t.Fatalf("got %d margins cases, want at least 8", len(cases))
	}
	for _, c := range cases {
		t.Run(c.ID, func(t *testing.T) {
			var q struct {
				K        float64 `json:"K"`
				OmegaMax float64 `json:"omega_max"`
			}
			if err := c.DecodeQuery(&q); err != nil {
				t.Fatal(err)
			}
			var want refMargins
			if err := c.Decode(&want); err != nil {
				t.Fatal(err)
			}
			g, err := tf.NewDiscrete(c.Loop.Num, c.Loop.Den, c.Loop.SampleTime)
			if err != nil {
				t.Fatal(err)
			}
			if g, err = g.Scale(q.K); err != nil {
				t.Fatal(err)
			}
			if g, err = g.WithDelay(c.Loop.Delay); err != nil {
				t.Fatal(err)
			}
			res, err := Compute(g, &Settings{OmegaMaxRadPerSec: q.OmegaMax})
			if err != nil {
				t.Fatal(err)
			}
			tol := c.Tolerance
			check := func(name string, got float64, w refcases.Number) {
				t.Helper()
				if !tol.Within(num(got), w) {
					t.Errorf("%s: got %.17g, want %.17g (null %v)", name, got, w.V, w.Null)
				}
			}
			if len(res.GainCrossovers) != len(want.GainCrossovers) {
				t.Fatalf("gain crossovers: got %+v, want %d", res.GainCrossovers, len(want.GainCrossovers))
			}
			for i, w := range want.GainCrossovers {
				check("gain crossover ω", res.GainCrossovers[i].FrequencyRadPerSec, w.Omega)
				check("gain crossover PM", res.GainCrossovers[i].PhaseMarginDeg, w.PMDeg)
			}
			if len(res.PhaseCrossovers) != len(want.PhaseCrossovers) {
				t.Fatalf("phase crossovers: got %+v, want %d", res.PhaseCrossovers, len(want.PhaseCrossovers))
			}
			for i, w := range want.PhaseCrossovers {
				check("phase crossover ω", res.PhaseCrossovers[i].FrequencyRadPerSec, w.Omega)
				check("phase crossover k", res.PhaseCrossovers[i].GainFactor, w.GainFactor)
				check("phase crossover k dB", res.PhaseCrossovers[i].GainFactorDB, w.GainFactorDB)
			}
			check("gm", res.GainMargin, want.GM)
			check("gm_db", res.GainMarginDB, want.GMDB)
			check("gm_omega", res.PhaseCrossoverRadPerSec, want.GMOmega)
			check("gm_lower", res.LowerGainMargin, want.GMLower)
			check("gm_lower_db", res.LowerGainMarginDB, want.GMLowerDB)
			check("gm_lower_omega", res.LowerPhaseCrossoverRadPerSec, want.GMLowerOmega)
			check("pm_deg", res.PhaseMarginDeg, want.PMDeg)
			check("pm_omega", res.GainCrossoverRadPerSec, want.PMOmega)
			check("delay_margin", res.DelayMarginSec, want.DelayMargin)
			check("delay_margin_omega", res.DelayMarginRadPerSec, want.DelayMarginOmega)
			check("ms", res.PeakSensitivity, want.MS)
			check("mt", res.PeakComplementarySensitivity, want.MT)
			peakTol := refcases.Tolerance{Rel: tol.OmegaOfPeakRel, Abs: tol.OmegaOfPeakRel}
			if !peakTol.Within(num(res.PeakSensitivityRadPerSec), want.MSOmega) {
				t.Errorf("ms_omega: got %.17g, want %.17g", res.PeakSensitivityRadPerSec, want.MSOmega.V)
			}
			if !peakTol.Within(num(res.PeakComplementarySensitivityRadPerSec), want.MTOmega) {
				t.Errorf("mt_omega: got %.17g, want %.17g", res.PeakComplementarySensitivityRadPerSec, want.MTOmega.V)
			}
			if res.StabilityMethod != want.Method || res.ClosedLoopStable != want.Stable ||
				res.ClosedLoopUnstablePoles != want.ClosedUnstable || res.OpenLoopUnstablePoles != want.OpenUnstable {
				t.Errorf("stability: got %q stable=%v Z=%d P=%d, want %q stable=%v Z=%d P=%d",
					res.StabilityMethod, res.ClosedLoopStable, res.ClosedLoopUnstablePoles, res.OpenLoopUnstablePoles,
					want.Method, want.Stable, want.ClosedUnstable, want.OpenUnstable)
			}
			_ = testutil.Close
		})
	}
}
