package design

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// TestEndsDiscrete verifies every end of a discrete gain design with all
// nine kinds (damping and step metrics bracketed) independently.
func TestEndsDiscrete(t *testing.T) {
	l, err := tf.ParseDiscrete("0.1*(z+0.9)/((z-1)*(z-0.7))", 0.1)
	if err != nil {
		t.Fatal(err)
	}
	v, _ := Gain(l)
	res, err := Solve(v, allNine(40, 6, 1.8, 0.4, 0.2, 25, 1.5, 4, 0.1), nil)
	if err != nil {
		t.Fatal(err)
	}
	// Jury: (z − 1)(z − 0.7) + 0.1k(z + 0.9) = z² + (0.1k − 1.7)z + 0.7 + 0.09k
	// is Schur-stable for 0 < k < 10/3 (a₀ < 1 ⇔ k < 10/3; p(−1) =
	// 3.4 − 0.01k > 0 and p(1) = 0.19k > 0 hold there).
	if len(res.Stable) != 1 || math.Abs(res.Stable[0].Hi-10.0/3) > 1e-12 {
		t.Errorf("stable %v, want (0, 10/3)", res.Stable)
	}
	checkEnds(t, v, res, 1e-9)
}

// TestEndsParameter: a PD derivative time Td of 4(1 + Td·s)/(s(s+1)(s+2))
// as the variable (numerator affine in Td).
func TestEndsParameter(t *testing.T) {
	v, err := ParameterText("Td", "4*(1 + Td*s)/(s*(s+1)*(s+2))")
	if err != nil {
		t.Fatal(err)
	}
	res, err := Solve(v, allNine(45, 6, 1.6, 0.4, 0.3, 20, 3, 8, 0.1), &Settings{Range: Range{0, 5}})
	if err != nil {
		t.Fatal(err)
	}
	// Routh–Hurwitz on s³ + 3s² + (2 + 4Td)s + 4: stable when
	// 3(2 + 4Td) > 4, i.e. Td > −1/6, so for the whole range.
	if len(res.Stable) != 1 || res.Stable[0].Lo != 0 || res.Stable[0].Hi != 5 {
		t.Errorf("stable %v, want the whole range", res.Stable)
	}
	checkEnds(t, v, res, 1e-9)
	if len(res.AllMet) == 0 {
		t.Logf("no value meets all: %s", res.Binding)
	}
}

// TestEndsDeadTime: with dead time the margins have no polynomial
// boundary; they are bracketed on the exact margins of package margins.
func TestEndsDeadTime(t *testing.T) {
	v, _ := Gain(tf.MustParse("exp(-0.2*s)/(s*(s+1))"))
	res, err := Solve(v, spec.Requirements{spec.MinPhaseMarginDeg(45), spec.MinGainMarginDB(6), spec.MaxPeakSensitivity(1.7)}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range res.Requirements {
		if r.Method != "bracketing" {
			t.Errorf("%s: method %s", r.Name, r.Method)
		}
	}
	checkEnds(t, v, res, 1e-9)
}

// TestDiscretePlane: PI control of the discrete plant 0.1/(z − 0.9)
// (T = 0.1 s): checks every boundary point (a root on the unit circle) and
// random interior points of every region.
func TestDiscretePlane(t *testing.T) {
	g, _ := tf.ParseDiscrete("0.1/(z-0.9)", 0.1)
	pl, err := NewPlane("Kp", "Ki", "Kp + Ki*z/(z-1)", g)
	if err != nil {
		t.Fatal(err)
	}
	pp, err := Partition(pl, &PlaneSettings{XRange: Range{-5, 25}, YRange: Range{-2, 20}})
	if err != nil {
		t.Fatal(err)
	}
	if len(pp.StableRegions) != 1 {
		t.Errorf("%d stable regions", len(pp.StableRegions))
	}
	checkBoundaryPoints(t, pl, pp, 1e-9)
	checkRegionCounts(t, pl, pp, 400)
}

// TestRequirementRegions: random points inside each requirement region
// (away from its edges) meet the requirement, checked by spec.Check.
func TestRequirementRegions(t *testing.T) {
	pl, _ := NewPlane("Kp", "Ki", "(Kp*s + Ki)/s", tf.MustParse("1/(s+1)^3"))
	req := spec.Requirements{spec.MinDampingRatio(0.3), spec.MinPhaseMarginDeg(45), spec.MaxPeakSensitivity(1.7)}
	pp, err := Partition(pl, &PlaneSettings{XRange: Range{-2, 10}, YRange: Range{-0.5, 3}, Requirements: req})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	d := math.Hypot(12, 3.5)
	for i, rr := range pp.RequirementRegions {
		checked := 0
		for _, poly := range rr.Regions {
			for range 3000 {
				p := [2]float64{-2 + 12*rng.Float64(), -0.5 + 3.5*rng.Float64()}
				// Away from the edges by more than the chord error between
				// the 81 scanlines (0.044 apart in Ki).
				if !insidePolygon(poly, p) || distanceToPolygon(poly, p) < 0.004*d {
					continue
				}
				l, _ := pl.LoopAt(p[0], p[1])
				sub := req
				if i < len(req) {
					sub = spec.Requirements{req[i]}
				}
				if rep := spec.Check(l, sub); !rep.Passed() {
					t.Errorf("%s: (%g, %g) inside the region fails:\n%s", rr.Name, p[0], p[1], rep)
				}
				checked++
			}
		}
		if checked == 0 {
			t.Errorf("%s: no point checked", rr.Name)
		}
	}
	kinds := map[string]bool{}
	for _, b := range pp.Boundaries {
		kinds[b.Kind] = true
	}
	if !kinds["damping ratio ζ = 0.3"] || !kinds["phase margin = 45°"] {
		t.Errorf("requirement boundaries missing: %v", kinds)
	}
	// Points of the ζ-line image have a closed-loop pole on the line.
	a, b, c, _ := pl.Characteristic(6)
	for _, bd := range pp.Boundaries {
		if bd.Kind != "damping ratio ζ = 0.3" {
			continue
		}
		for _, p := range bd.Points {
			rs, _ := a.Add(b.Scale(p[0])).Add(c.Scale(p[1])).Roots()
			best := math.Inf(1)
			for _, r := range rs {
				if imag(r) > 0 {
					best = math.Min(best, math.Abs(spec.DampingRatio(r, 0)-0.3))
				}
			}
			if best > 1e-9 {
				t.Errorf("ζ-line point (%g, %g): nearest damping differs by %.2g", p[0], p[1], best)
			}
		}
	}
}
