package poly

import (
	"math"
	"testing"
)

// TestRealRootsTransformOverflow: the continued-fraction search shifts the
// polynomial (x → x + 2ᵖ, x → x + 1), which multiplies its coefficients by
// up to 2ⁿ⁺ᵖⁿ; for coefficients near the top of the float64 range the
// shifted ones overflow to ±Inf. The search then lost every root (0 roots
// here) or, with a NaN coefficient, the local-max bound indexed coefficient
// −1 (the recovered panic in the report of 1/(s+1)^500). An overflowed node
// now sends the search to its fallback. The roots of
// 1e300·Π(x − k), k = 1 … 6, are 1 … 6 (closed form).
func TestRealRootsTransformOverflow(t *testing.T) {
	var want []complex128
	for k := 1; k <= 6; k++ {
		want = append(want, complex(float64(k), 0))
	}
	p, err := FromRoots(want)
	if err != nil {
		t.Fatal(err)
	}
	for _, scale := range []float64{1e300, 1e307, math.MaxFloat64 / 4, math.MaxFloat64} {
		m := 0.0
		for i := 0; i <= p.Degree(); i++ {
			m = math.Max(m, math.Abs(p.Coef(i)))
		}
		q := p.Scale(scale / m) // largest coefficient = scale
		if !q.IsFinite() {
			continue
		}
		rs, err := RealRootsIn(q, 0, math.Inf(1))
		if err != nil {
			t.Errorf("scale %g: %v", scale, err)
			continue
		}
		if len(rs) != 6 {
			t.Errorf("scale %g: %d roots; want 6", scale, len(rs))
			continue
		}
		for k, r := range rs {
			if math.Abs(r.Value-float64(k+1)) > 1e-9*float64(k+1) {
				t.Errorf("scale %g: root %d = %v; want %d", scale, k, r.Value, k+1)
			}
		}
	}
}
