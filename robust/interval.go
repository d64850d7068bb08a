package robust

import "math"

// interval is a closed interval [lo, hi] of reals. Every operation rounds its
// bounds outward with math.Nextafter, so the result encloses the exact result
// of the operation on every pair of points of its operands (IEEE 754 round to
// nearest is within half an ulp; one Nextafter step more than covers it).
// Reference: R. E. Moore, R. B. Kearfott & M. J. Cloud, "Introduction to
// Interval Analysis", SIAM 2009, ch. 2 (interval arithmetic, outward rounding).
type interval struct{ lo, hi float64 }

func point(x float64) interval { return interval{x, x} }

func down(x float64) float64 { return math.Nextafter(x, math.Inf(-1)) }
func up(x float64) float64   { return math.Nextafter(x, math.Inf(1)) }

func (a interval) add(b interval) interval { return interval{down(a.lo + b.lo), up(a.hi + b.hi)} }
func (a interval) sub(b interval) interval { return interval{down(a.lo - b.hi), up(a.hi - b.lo)} }
func (a interval) neg() interval           { return interval{-a.hi, -a.lo} }

func (a interval) mul(b interval) interval {
	if a.lo == a.hi && b.lo == b.hi {
		p := a.lo * b.lo
		return interval{down(p), up(p)}
	}
	p1, p2, p3, p4 := a.lo*b.lo, a.lo*b.hi, a.hi*b.lo, a.hi*b.hi
	lo := math.Min(math.Min(p1, p2), math.Min(p3, p4))
	hi := math.Max(math.Max(p1, p2), math.Max(p3, p4))
	return interval{down(lo), up(hi)}
}

// pow returns a^k for k ≥ 0 with the tight even-power rule.
func (a interval) pow(k int) interval {
	if k == 0 {
		return point(1)
	}
	r := a
	for i := 1; i < k; i++ {
		r = r.mul(a)
	}
	if k%2 == 0 && a.lo < 0 && a.hi > 0 {
		r.lo = 0
	}
	return r
}

func (a interval) contains0() bool { return a.lo <= 0 && a.hi >= 0 }
func (a interval) mid() float64    { return a.lo + (a.hi-a.lo)/2 }
func (a interval) width() float64  { return a.hi - a.lo }

// mag returns max |x| over the interval.
func (a interval) mag() float64 { return math.Max(math.Abs(a.lo), math.Abs(a.hi)) }

// mig returns min |x| over the interval (0 if it contains 0).
func (a interval) mig() float64 {
	if a.contains0() {
		return 0
	}
	return math.Min(math.Abs(a.lo), math.Abs(a.hi))
}

// trigSlack widens the bounds of math.Cos and math.Sin, which are not
// correctly rounded: Go's implementations (Cephes) are accurate to about one
// ulp for |x| < 2^19 radians; 4e-16 absolute plus 4 ulps covers it.
const trigSlack = 4e-16

// cosSin returns enclosures of cos and sin over the interval x.
func cosSin(x interval) (c, s interval) {
	if x.width() >= 2*math.Pi || math.Abs(x.lo) > 1<<19 || math.Abs(x.hi) > 1<<19 {
		return interval{-1, 1}, interval{-1, 1}
	}
	c = enclose(math.Cos(x.lo), math.Cos(x.hi))
	s = enclose(math.Sin(x.lo), math.Sin(x.hi))
	// Extrema inside: cos is ±1 at kπ, sin at π/2 + kπ.
	for k := math.Ceil(x.lo/math.Pi - 1e-12); k*math.Pi <= x.hi*(1+1e-12)+1e-12; k++ {
		if int64(k)%2 == 0 {
			c.hi = 1
		} else {
			c.lo = -1
		}
	}
	for k := math.Ceil((x.lo-math.Pi/2)/math.Pi - 1e-12); k*math.Pi+math.Pi/2 <= x.hi*(1+1e-12)+1e-12; k++ {
		if int64(k)%2 == 0 {
			s.hi = 1
		} else {
			s.lo = -1
		}
	}
	return widenTrig(c), widenTrig(s)
}

func enclose(a, b float64) interval { return interval{math.Min(a, b), math.Max(a, b)} }

func widenTrig(a interval) interval {
	return interval{math.Max(-1, down(a.lo-trigSlack-4*math.Abs(a.lo)*0x1p-52)), math.Min(1, up(a.hi+trigSlack+4*math.Abs(a.hi)*0x1p-52))}
}

// cinterval is a rectangular complex interval re + j·im.
type cinterval struct{ re, im interval }

func (a cinterval) add(b cinterval) cinterval { return cinterval{a.re.add(b.re), a.im.add(b.im)} }
func (a cinterval) mul(b cinterval) cinterval {
	return cinterval{a.re.mul(b.re).sub(a.im.mul(b.im)), a.re.mul(b.im).add(a.im.mul(b.re))}
}
func (a cinterval) mulReal(b interval) cinterval { return cinterval{a.re.mul(b), a.im.mul(b)} }

// excludes0 reports whether 0 is certainly outside the complex interval.
func (a cinterval) excludes0() bool { return !a.re.contains0() || !a.im.contains0() }
