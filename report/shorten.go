package report

import (
	"fmt"
	"strings"
	"unicode/utf8"
)

// Messages (errors and warnings) quote expressions and transfer functions.
// A loop file may hold a megabyte of expression, and a degree-500 loop
// prints as thousands of characters; a message shows a short excerpt
// instead, so that it stays readable on one screen.

const (
	// maxQuoted is the longest quoted text, parenthesised group or word a
	// message keeps whole.
	maxQuoted = 300
	// keepHead and keepTail are how much of a longer one stays, in runes.
	keepHead, keepTail = 100, 60
	// excerptRadius is how many runes an excerpt shows on each side of
	// the column it points at.
	excerptRadius = 30
)

// excerpt returns text if it is short, or the part of it around byte
// offset off: `…(s+1)*(s+2)/(s+|3 …` with "…" where text was cut.
func excerpt(text string, off int) string {
	if utf8.RuneCountInString(text) <= 2*excerptRadius+10 {
		return text
	}
	off = min(max(off, 0), len(text))
	start, end := off, off
	for i := 0; i < excerptRadius && start > 0; i++ {
		_, n := utf8.DecodeLastRuneInString(text[:start])
		start -= n
	}
	for i := 0; i < excerptRadius && end < len(text); i++ {
		_, n := utf8.DecodeRuneInString(text[end:])
		end += n
	}
	out := text[start:end]
	if start > 0 {
		out = "…" + out
	}
	if end < len(text) {
		out += "…"
	}
	return out
}

// shorten returns the message s with every quoted text, parenthesised
// group and word longer than maxQuoted runes cut to its head and tail
// around "…".
func shorten(s string) string {
	if utf8.RuneCountInString(s) <= maxQuoted {
		return s
	}
	var b strings.Builder
	for i := 0; i < len(s); {
		end := groupEnd(s, i)
		seg := s[i:end]
		if utf8.RuneCountInString(seg) > maxQuoted {
			seg = cutMiddle(seg)
		}
		b.WriteString(seg)
		i = end
	}
	return b.String()
}

// groupEnd returns the end of the segment of s that starts at i: a quoted
// text, a parenthesised group (to its matching parenthesis), a word (up to
// a space), or the single space or character at i.
func groupEnd(s string, i int) int {
	switch s[i] {
	case '"':
		for j := i + 1; j < len(s); j++ {
			if s[j] == '\\' {
				j++
				continue
			}
			if s[j] == '"' {
				return j + 1
			}
		}
		return len(s)
	case '(':
		depth := 0
		for j := i; j < len(s); j++ {
			switch s[j] {
			case '(':
				depth++
			case ')':
				depth--
				if depth == 0 {
					return j + 1
				}
			}
		}
		return len(s)
	case ' ':
		return i + 1
	}
	j := i
	for j < len(s) && s[j] != ' ' && s[j] != '(' && s[j] != '"' {
		j++
	}
	if j == i {
		j = i + 1
	}
	return j
}

// cutMiddle keeps the head and the tail of seg around "…", saying how
// much was left out.
func cutMiddle(seg string) string {
	runes := []rune(seg)
	n := len(runes)
	return fmt.Sprintf("%s … [%d characters] … %s", string(runes[:keepHead]), n-keepHead-keepTail, string(runes[n-keepTail:]))
}
