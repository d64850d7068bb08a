// Package words formats the numbers of the example programs as readable
// text with units. It is shared by the examples and is not part of the
// library's API.
package words

import (
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/loopwise/loopwise/poly"
)

// Printer writes formatted text and keeps the first write error, so that a
// report can be written line by line and the error checked once.
type Printer struct {
	w   io.Writer
	err error
}

// NewPrinter returns a Printer that writes to w.
func NewPrinter(w io.Writer) *Printer { return &Printer{w: w} }

// F writes formatted text (fmt.Fprintf) unless an earlier write failed.
func (p *Printer) F(format string, args ...any) {
	if p.err == nil {
		_, p.err = fmt.Fprintf(p.w, format, args...)
	}
}

// Err returns the first write error, or nil.
func (p *Printer) Err() error { return p.err }

// Heading writes a title underlined with '='.
func (p *Printer) Heading(title string) {
	p.F("%s\n%s\n\n", title, strings.Repeat("=", len([]rune(title))))
}

// Point writes a complex point in the form "-3.6 + 3.7j" (4 significant
// digits); a real point is written as a real number.
func Point(z complex128) string {
	if imag(z) == 0 {
		return fmt.Sprintf("%.4g", real(z))
	}
	sign := "+"
	if imag(z) < 0 {
		sign = "-"
	}
	return fmt.Sprintf("%.4g %s %.4gj", real(z), sign, math.Abs(imag(z)))
}

// Points lists points, writing each conjugate pair once as "a ± bj".
// Points with negative imaginary part are assumed to be the partners of
// listed ones and are skipped.
func Points(zs []complex128) string {
	var parts []string
	for _, z := range zs {
		switch {
		case imag(z) < 0:
			continue
		case imag(z) > 0:
			parts = append(parts, fmt.Sprintf("%.4g ± %.4gj", real(z), imag(z)))
		default:
			parts = append(parts, fmt.Sprintf("%.4g", real(z)))
		}
	}
	if len(parts) == 0 {
		return "none"
	}
	return strings.Join(parts, ", ")
}

// Angles lists angles in degrees, each with its ° sign.
func Angles(deg []float64) string {
	parts := make([]string, len(deg))
	for i, a := range deg {
		parts[i] = strings.ReplaceAll(fmt.Sprintf("%.4g°", a), "-", "−")
	}
	return strings.Join(parts, ", ")
}

// Interval writes the open interval lo < name < hi with its unit; an
// infinite upper end gives "name > lo".
func Interval(lo, hi float64, name, unit string) string {
	if math.IsInf(hi, 1) {
		return fmt.Sprintf("%s > %.4g %s", name, lo, unit)
	}
	return fmt.Sprintf("%.4g < %s < %.4g %s", lo, name, hi, unit)
}

// GainMargin writes a gain margin factor with its decibels and frequency,
// or says that it is infinite or does not exist.
func GainMargin(k, db, omegaRadPerSec float64) string {
	switch {
	case math.IsInf(k, 1):
		return "infinite (the phase never reaches −180°)"
	case math.IsNaN(k):
		return "does not exist"
	}
	return fmt.Sprintf("%.4g (%+.2f dB) at %.4g rad/s", k, db, omegaRadPerSec)
}

// Seconds writes a time in ms below one second and in s above.
func Seconds(t float64) string {
	switch {
	case math.IsInf(t, 1):
		return "infinite"
	case math.IsNaN(t):
		return "undefined"
	case math.Abs(t) < 1:
		return fmt.Sprintf("%.4g ms", 1000*t)
	}
	return fmt.Sprintf("%.4g s", t)
}

// Roots lists polynomial roots like Points, with the multiplicity written
// as "(double)", "(triple)" or "(×n)" after a repeated root.
func Roots(rs []poly.Root) string {
	var parts []string
	for _, r := range rs {
		z := r.Value
		if imag(z) < 0 {
			continue
		}
		s := fmt.Sprintf("%.4g", real(z))
		if imag(z) > 0 {
			s = fmt.Sprintf("%.4g ± %.4gj", real(z), imag(z))
		}
		switch r.Multiplicity {
		case 1:
		case 2:
			s += " (double)"
		case 3:
			s += " (triple)"
		default:
			s += fmt.Sprintf(" (×%d)", r.Multiplicity)
		}
		parts = append(parts, s)
	}
	if len(parts) == 0 {
		return "none"
	}
	return strings.Join(parts, ", ")
}

// Polynomial writes p in the variable v with 6 significant digits per
// coefficient, highest power first: "3.72727 z - 3.54545".
func Polynomial(p poly.Poly, v string) string {
	c := p.Coeffs()
	n := len(c) - 1
	var b strings.Builder
	for i, a := range c {
		if a == 0 && n > 0 {
			continue
		}
		pow := n - i
		switch {
		case b.Len() == 0 && a < 0:
			b.WriteString("-")
		case b.Len() > 0 && a < 0:
			b.WriteString(" - ")
		case b.Len() > 0:
			b.WriteString(" + ")
		}
		mag := math.Abs(a)
		coef := fmt.Sprintf("%.6g", mag)
		switch {
		case pow == 0:
			b.WriteString(coef)
		case mag == 1:
			b.WriteString(v)
		default:
			b.WriteString(coef + " " + v)
		}
		if pow > 1 {
			fmt.Fprintf(&b, "^%d", pow)
		}
	}
	if b.Len() == 0 {
		return "0"
	}
	return b.String()
}

// Rational writes num/den in the variable v as "(num)/(den)" with 6
// significant digits per coefficient.
func Rational(num, den poly.Poly, v string) string {
	return "(" + Polynomial(num, v) + ")/(" + Polynomial(den, v) + ")"
}
