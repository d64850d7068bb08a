package design

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// checkBoundaryPoints verifies that at every traced point of the
// D-partition's stability boundaries the characteristic polynomial has a
// root on the boundary (|Re s| or ||z| − 1| ≤ tol relative to |s|, 1).
func checkBoundaryPoints(t *testing.T, pl Plane, pp PlanePartition, tol float64) {
	t.Helper()
	a, b, c, err := pl.Characteristic(6)
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for _, bd := range pp.Boundaries {
		if bd.Kind == "degree drop" || !isStabilityKind(bd.Kind) {
			continue
		}
		for _, p := range bd.Points {
			q := a.Add(b.Scale(p[0])).Add(c.Scale(p[1]))
			rs, err := q.Roots()
			if err != nil {
				t.Fatal(err)
			}
			best := math.Inf(1)
			for _, r := range rs {
				var d float64
				if pl.SampleTimeSec() > 0 {
					d = math.Abs(math.Hypot(real(r), imag(r)) - 1)
				} else {
					d = math.Abs(real(r)) / math.Max(1, math.Hypot(real(r), imag(r)))
				}
				best = math.Min(best, d)
			}
			if !(best <= tol) {
				t.Errorf("%s point (%g, %g): nearest root %.3g from the boundary", bd.Kind, p[0], p[1], best)
			}
			checked++
		}
	}
	if checked == 0 {
		t.Error("no boundary point checked")
	}
}

func isStabilityKind(k string) bool {
	for _, p := range []string{"imaginary-axis", "unit-circle", "real root", "singular"} {
		if len(k) >= len(p) && k[:len(p)] == p {
			return true
		}
	}
	return false
}

// checkRegionCounts samples random points inside each region polygon, away
// from its edges (2 % of the diagonal, so that the chords between scanlines
// do not matter), and compares the number of unstable roots.
func checkRegionCounts(t *testing.T, pl Plane, pp PlanePartition, n int) {
	t.Helper()
	a, b, c, _ := pl.Characteristic(6)
	rng := rand.New(rand.NewPCG(1, 1))
	d := math.Hypot(pp.XRange.Max-pp.XRange.Min, pp.YRange.Max-pp.YRange.Min)
	checked := 0
	for _, rg := range pp.Regions {
		for range n {
			p := [2]float64{pp.XRange.Min + rng.Float64()*(pp.XRange.Max-pp.XRange.Min), pp.YRange.Min + rng.Float64()*(pp.YRange.Max-pp.YRange.Min)}
			if !insidePolygon(rg.Polygon, p) || distanceToPolygon(rg.Polygon, p) < 0.02*d {
				continue
			}
			got := unstableRoots(a.Add(b.Scale(p[0])).Add(c.Scale(p[1])), pl.SampleTimeSec())
			if got != rg.UnstableRoots {
				t.Errorf("point (%g, %g): %d unstable roots, region says %d", p[0], p[1], got, rg.UnstableRoots)
			}
			checked++
		}
	}
	if checked < n/4 {
		t.Errorf("only %d interior points checked", checked)
	}
}

func insidePolygon(poly [][2]float64, p [2]float64) bool {
	in := false
	for i := 0; i+1 < len(poly); i++ {
		a, b := poly[i], poly[i+1]
		if (a[1] > p[1]) != (b[1] > p[1]) && p[0] < a[0]+(p[1]-a[1])*(b[0]-a[0])/(b[1]-a[1]) {
			in = !in
		}
	}
	return in
}

func distanceToPolygon(poly [][2]float64, p [2]float64) float64 {
	best := math.Inf(1)
	for i := 0; i+1 < len(poly); i++ {
		a, b := poly[i], poly[i+1]
		dx, dy := b[0]-a[0], b[1]-a[1]
		t := 0.0
		if l := dx*dx + dy*dy; l > 0 {
			t = math.Max(0, math.Min(1, ((p[0]-a[0])*dx+(p[1]-a[1])*dy)/l))
		}
		best = math.Min(best, math.Hypot(p[0]-a[0]-t*dx, p[1]-a[1]-t*dy))
	}
	return best
}

// TestPIThirdOrderLag: PI control C = Kp + Ki/s of the third-order lag
// G = 1/(s + 1)³. The characteristic polynomial s⁴ + 3s³ + 3s² +
// (1 + Kp)s + Ki is Hurwitz, by the Routh–Hurwitz conditions for a quartic
// (a₃a₂ > a₄a₁ and a₃a₂a₁ > a₄a₁² + a₃²a₀, all coefficients positive;
// Hurwitz 1895), exactly when −1 < Kp < 8 and 0 < Ki < (1 + Kp)(8 − Kp)/9.
func TestPIThirdOrderLag(t *testing.T) {
	pl, err := NewPlane("Kp", "Ki", "(Kp*s + Ki)/s", tf.MustParse("1/(s+1)^3"))
	if err != nil {
		t.Fatal(err)
	}
	pp, err := Partition(pl, &PlaneSettings{XRange: Range{-2, 10}, YRange: Range{-1, 3}})
	if err != nil {
		t.Fatal(err)
	}
	if len(pp.StableRegions) != 1 {
		t.Fatalf("%d stable regions, want 1", len(pp.StableRegions))
	}
	// Every vertex of the stable polygon lies on the closed-form boundary
	// (or on the rectangle's edge), to rounding.
	for _, p := range pp.StableRegions[0] {
		kp, ki := p[0], p[1]
		onCurve := math.Abs(ki-(1+kp)*(8-kp)/9) <= 1e-12*math.Max(1, math.Abs(ki))
		onAxis := math.Abs(ki) <= 1e-12
		if !onCurve && !onAxis {
			t.Errorf("stable-region vertex (%.15g, %.15g) is not on the Routh–Hurwitz boundary", kp, ki)
		}
	}
	// The crossing curve: Kp = 3ω² − 1, Ki = 3ω² − ω⁴.
	for _, bd := range pp.Boundaries {
		if bd.Kind != "imaginary-axis crossing" {
			continue
		}
		for i, p := range bd.Points {
			w := bd.FrequencyRadPerSec[i]
			if math.Abs(p[0]-(3*w*w-1)) > 1e-12*math.Max(1, math.Abs(p[0])) || math.Abs(p[1]-(3*w*w-w*w*w*w)) > 1e-12*math.Max(1, math.Abs(p[1])) {
				t.Errorf("crossing point at ω = %g: (%g, %g)", w, p[0], p[1])
			}
		}
	}
	checkBoundaryPoints(t, pl, pp, 1e-9)
	checkRegionCounts(t, pl, pp, 400)
}

// TestVyshnegradsky: the stability diagram of s³ + x·s² + y·s + 1
// (I. A. Vyshnegradsky, 1876, the first parameter-plane stability diagram,
// from memory; the classic example of D-partition): stable exactly for
// x > 0, y > 0, x·y > 1. The crossing curve is x = 1/ω², y = ω²: the
// hyperbola xy = 1; the region below it in the positive quadrant has two
// unstable roots.
func TestVyshnegradsky(t *testing.T) {
	pl, err := PlaneFunc("x", "y", func(x, y float64) (tf.TF, error) {
		// Loop (x s² + y s)/(s³ + 1): characteristic s³ + x s² + y s + 1.
		return tf.FromPolys(poly.MustNew(x, y, 0), poly.MustNew(1, 0, 0, 1), 0)
	})
	if err != nil {
		t.Fatal(err)
	}
	pp, err := Partition(pl, &PlaneSettings{XRange: Range{0.1, 4}, YRange: Range{0.1, 4}})
	if err != nil {
		t.Fatal(err)
	}
	for _, bd := range pp.Boundaries {
		for _, p := range bd.Points {
			if math.Abs(p[0]*p[1]-1) > 1e-12 {
				t.Errorf("%s point (%g, %g) is off the hyperbola xy = 1", bd.Kind, p[0], p[1])
			}
		}
	}
	counts := map[int]int{}
	for _, r := range pp.Regions {
		counts[r.UnstableRoots]++
	}
	if counts[0] != 1 || counts[2] != 1 || len(pp.Regions) != 2 {
		t.Errorf("regions %v, want one stable and one with 2 unstable roots", counts)
	}
	checkBoundaryPoints(t, pl, pp, 1e-9)
	checkRegionCounts(t, pl, pp, 400)
}

func TestPlaneErrors(t *testing.T) {
	g := tf.MustParse("1/(s+1)^2")
	if _, err := NewPlane("Kp", "Ki", "(Kp*Ki*s + 1)/s", g); !errors.Is(err, ErrNotAffine) {
		t.Errorf("bilinear: %v", err)
	} else {
		t.Log(err)
	}
	if _, err := NewPlane("Kp", "Ti", "Kp*(1 + 1/(Ti*s))", g); !errors.Is(err, ErrNotAffine) {
		t.Errorf("non-affine: %v", err)
	} else {
		t.Log(err)
	}
	if _, err := NewPlane("Kp", "Kp", "Kp", g); !errors.Is(err, ErrInvalidInput) {
		t.Errorf("same names: %v", err)
	}
	pl, _ := NewPlane("Kp", "Ki", "(Kp*s + Ki)/s", g)
	if _, err := Partition(pl, nil); !errors.Is(err, ErrInvalidInput) {
		t.Errorf("nil settings: %v", err)
	}
	if _, err := Partition(pl, &PlaneSettings{XRange: Range{0, 1}, YRange: Range{0, math.Inf(1)}}); !errors.Is(err, ErrInvalidInput) {
		t.Errorf("infinite range: %v", err)
	}
}
