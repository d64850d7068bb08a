package report

import (
	"cmp"
	"fmt"
	"math"
	"math/cmplx"
	"regexp"
	"slices"
	"strconv"
	"strings"
)

// g formats x with 4 significant digits; infinite and missing values are
// words.
func g(x Number) string {
	v := float64(x)
	switch {
	case math.IsNaN(v):
		return "none"
	case math.IsInf(v, 1):
		return "infinite"
	case math.IsInf(v, -1):
		return "−infinite"
	}
	if v == 0 {
		return "0"
	}
	s := fmt.Sprintf("%.4g", v)
	if r, err := strconv.ParseFloat(s, 64); err == nil && math.Abs(r) >= 1e-4 && math.Abs(r) < 1e6 {
		s = strconv.FormatFloat(r, 'f', -1, 64)
	}
	if strings.Contains(s, "e") {
		mant, exp, _ := strings.Cut(s, "e")
		e := strings.TrimLeft(strings.TrimPrefix(exp, "+"), "0")
		if strings.HasPrefix(exp, "-") {
			e = "-" + strings.TrimLeft(exp[1:], "0")
		}
		s = mant + "e" + e
	}
	if strings.HasPrefix(s, "-") {
		s = "−" + s[1:]
	}
	return s
}

// gUnit formats x followed by a unit, or a word for a missing value.
func gUnit(x Number, unit string) string {
	if !finite(float64(x)) {
		return g(x)
	}
	return withUnit(g(x), unit)
}

// cplx formats a complex number, "−1.5 ± 2j" style when paired is true.
func cplx(c Complex, paired bool) string {
	re, im := float64(c.Re), float64(c.Im)
	if im == 0 {
		return g(c.Re)
	}
	sign := "+"
	if paired {
		sign = "±"
		im = math.Abs(im)
	} else if im < 0 {
		sign = "−"
		im = -im
	}
	if re == 0 {
		if paired {
			return "±" + g(Number(im)) + "j"
		}
		return strings.TrimPrefix(sign, "+") + g(Number(im)) + "j"
	}
	return fmt.Sprintf("%s %s %sj", g(c.Re), sign, g(Number(im)))
}

// rootList formats a list of roots, writing each conjugate pair once.
func rootList(cs []Complex) string {
	if cs == nil {
		return notComputed
	}
	if len(cs) == 0 {
		return "none"
	}
	var parts []string
	used := make([]bool, len(cs))
	for i, c := range cs {
		if used[i] {
			continue
		}
		used[i] = true
		paired := false
		if c.Im != 0 {
			for j := i + 1; j < len(cs); j++ {
				if !used[j] && cs[j].Re == c.Re && cs[j].Im == -c.Im {
					used[j] = true
					paired = true
					break
				}
			}
		}
		parts = append(parts, cplx(c, paired))
	}
	return strings.Join(parts, ", ")
}

// notComputed stands for a result that could not be computed (its JSON
// value is null).
const notComputed = "not computed (see the warnings)"

// intervalText formats (lo, hi) with words for unbounded ends.
func intervalText(iv Interval) string {
	lo, hi := "−∞", "∞"
	if finite(float64(iv[0])) {
		lo = g(iv[0])
	}
	if finite(float64(iv[1])) {
		hi = g(iv[1])
	}
	return "(" + lo + ", " + hi + ")"
}

// intervalList formats open intervals (lo, hi) joined by "∪".
func intervalList(ivs []Interval) string { return listIntervals(ivs, false) }

// listIntervals formats a list of intervals, open (lo, hi) joined by "∪"
// or closed [lo, hi] joined by commas; nil is "not computed", empty
// "none".
func listIntervals(ivs []Interval, closed bool) string {
	if ivs == nil {
		return notComputed
	}
	if len(ivs) == 0 {
		return "none"
	}
	parts := make([]string, len(ivs))
	for i, iv := range ivs {
		parts[i] = intervalText(iv)
		if closed {
			parts[i] = "[" + parts[i][1:len(parts[i])-1] + "]"
		}
	}
	if closed {
		return strings.Join(parts, ", ")
	}
	return strings.Join(parts, " ∪ ")
}

// stableWord describes a three-state stability flag.
func stableWord(b *bool) string {
	switch {
	case b == nil:
		return "not determined"
	case *b:
		return "stable"
	}
	return "unstable"
}

// factorText returns the factors of a polynomial with the given roots, as
// "s·(s + 2)·(s^2 + 7.2s + 144)": real roots give first-order factors,
// conjugate pairs second-order ones; numbers have 4 significant digits.
func factorText(roots []complex128, v string) string {
	// Slowest factors first, as on paper: s·(s + 2)·(s^2 + ...)·(s + 40).
	roots = slices.Clone(roots)
	slices.SortStableFunc(roots, func(a, b complex128) int {
		return cmp.Or(cmp.Compare(cmplx.Abs(a), cmplx.Abs(b)), cmp.Compare(imag(b), imag(a)))
	})
	var parts []string
	used := make([]bool, len(roots))
	for i, r := range roots {
		if used[i] {
			continue
		}
		used[i] = true
		if imag(r) == 0 {
			switch {
			case real(r) == 0:
				parts = append(parts, v)
			case real(r) < 0:
				parts = append(parts, fmt.Sprintf("(%s + %s)", v, g(Number(-real(r)))))
			default:
				parts = append(parts, fmt.Sprintf("(%s − %s)", v, g(Number(real(r)))))
			}
			continue
		}
		for j := i + 1; j < len(roots); j++ {
			if !used[j] && roots[j] == complex(real(r), -imag(r)) {
				used[j] = true
				break
			}
		}
		b := -2 * real(r)
		c := real(r)*real(r) + imag(r)*imag(r)
		mid := ""
		switch {
		case b > 0:
			mid = fmt.Sprintf(" + %s%s", g(Number(b)), v)
		case b < 0:
			mid = fmt.Sprintf(" − %s%s", g(Number(-b)), v)
		}
		parts = append(parts, fmt.Sprintf("(%s^2%s + %s)", v, mid, g(Number(c))))
	}
	if len(parts) == 0 {
		return "1"
	}
	// Repeated factors as powers: s^2·(s + 1)^3, not s·s·(s + 1)·…
	var grouped []string
	for i := 0; i < len(parts); {
		j := i
		for j < len(parts) && parts[j] == parts[i] {
			j++
		}
		if j-i > 1 {
			grouped = append(grouped, fmt.Sprintf("%s^%d", parts[i], j-i))
		} else {
			grouped = append(grouped, parts[i])
		}
		i = j
	}
	return strings.Join(grouped, "·")
}

// factoredText writes k·∏(v − zᵢ)/∏(v − pⱼ) with the dead time, in the
// form an engineer writes on paper.
func factoredText(gain float64, zeros, poles []complex128, v string, delaySec float64, discrete bool) string {
	s := g(Number(gain))
	if len(zeros) > 0 {
		s += "·" + factorText(zeros, v)
	}
	if len(poles) > 0 {
		d := factorText(poles, v)
		if len(poles) > 1 && strings.Contains(d, "·") {
			d = "(" + d + ")"
		}
		s += "/" + d
	}
	if delaySec > 0 {
		if discrete {
			s += fmt.Sprintf(" with %s s of dead time", g(Number(delaySec)))
		} else {
			s += fmt.Sprintf("·e^(−%ss)", g(Number(delaySec)))
		}
	}
	return s
}

// withUnit appends a unit to a formatted number ("50°", "10 dB", "0.1 s");
// words ("none", "infinite") and unitless ratios stay as they are.
func withUnit(s, unit string) string {
	if unit == "" || s == "none" || strings.HasSuffix(s, "infinite") {
		return s
	}
	if unit == "°" {
		return s + unit
	}
	return s + nbsp + unit
}

// nbsp joins a number to its unit ("10 dB", "0.92 %") so that a line is
// never broken between them: the one number format of every output.
const nbsp = "\u00a0"

var (
	// signedNumber finds an ASCII hyphen-minus used as the sign of a
	// number: at the start, or after a space, a bracket, "=", "," or ":".
	signedNumber = regexp.MustCompile(`(^|[\s(\[=,:;/^])-([0-9]|\.[0-9])`)
	// exponent finds the exponent of a number written by strconv or fmt:
	// 1e+308, 1.5e-07.
	exponent = regexp.MustCompile(`([0-9])e([+-])0*([0-9]+)`)
	// numberUnit finds a number followed by a space and a unit.
	numberUnit = regexp.MustCompile(`([0-9]) (%|dB|rad/s|s\b)`)
)

// typeset brings a sentence written by another package (a requirement
// message, a warning) to the number format of the report: the minus sign
// U+2212, exponents without "+" and leading zeros (1e308, 1.5e−7), and a
// no-break space between a number and its unit. Expressions echoed from
// the loop file are not passed through it, so they stay valid input.
func typeset(s string) string {
	s = exponent.ReplaceAllStringFunc(s, func(m string) string {
		sub := exponent.FindStringSubmatch(m)
		sign := ""
		if sub[2] == "-" {
			sign = "−"
		}
		return sub[1] + "e" + sign + sub[3]
	})
	for range 2 { // a second pass for adjacent matches such as "(-1,-2"
		s = signedNumber.ReplaceAllString(s, "${1}−${2}")
	}
	return numberUnit.ReplaceAllString(s, "${1}"+nbsp+"${2}")
}
