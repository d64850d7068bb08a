package chart

import (
	"image/color"
	"sync"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/font/liberation"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The Okabe–Ito colour set, safe for the common forms of colour-vision
// deficiency. Source: M. Okabe and K. Ito, "Color Universal Design (CUD):
// how to make figures and presentations that are friendly to colorblind
// people" (2008), the eight-colour palette.
var (
	// okBlack is the Okabe–Ito black (#000000).
	okBlack = color.NRGBA{R: 0x00, G: 0x00, B: 0x00, A: 0xff}
	// okOrange is the Okabe–Ito orange (#E69F00).
	okOrange = color.NRGBA{R: 0xe6, G: 0x9f, B: 0x00, A: 0xff}
	// okSkyBlue is the Okabe–Ito sky blue (#56B4E9).
	okSkyBlue = color.NRGBA{R: 0x56, G: 0xb4, B: 0xe9, A: 0xff}
	// okBluishGreen is the Okabe–Ito bluish green (#009E73).
	okBluishGreen = color.NRGBA{R: 0x00, G: 0x9e, B: 0x73, A: 0xff}
	// okYellow is the Okabe–Ito yellow (#F0E442).
	okYellow = color.NRGBA{R: 0xf0, G: 0xe4, B: 0x42, A: 0xff}
	// okBlue is the Okabe–Ito blue (#0072B2).
	okBlue = color.NRGBA{R: 0x00, G: 0x72, B: 0xb2, A: 0xff}
	// okVermillion is the Okabe–Ito vermillion (#D55E00).
	okVermillion = color.NRGBA{R: 0xd5, G: 0x5e, B: 0x00, A: 0xff}
	// okReddishPurple is the Okabe–Ito reddish purple (#CC79A7).
	okReddishPurple = color.NRGBA{R: 0xcc, G: 0x79, B: 0xa7, A: 0xff}
)

// OkabeIto returns the eight colours of the Okabe–Ito palette in their
// published order: black (#000000), orange (#E69F00), sky blue (#56B4E9),
// bluish green (#009E73), yellow (#F0E442), blue (#0072B2), vermillion
// (#D55E00) and reddish purple (#CC79A7).
func OkabeIto() [8]color.NRGBA {
	return [8]color.NRGBA{okBlack, okOrange, okSkyBlue, okBluishGreen, okYellow, okBlue, okVermillion, okReddishPurple}
}

// Palette returns the Okabe–Ito colours in the order this package uses them
// for successive curves (root-locus branches, for example): blue, vermillion,
// bluish green, reddish purple, orange, sky blue. okYellow and black are left
// out: yellow is too faint on white for a thin line, black is kept for poles,
// zeros and text. Each call returns a new slice.
func Palette() []color.Color {
	return []color.Color{okBlue, okVermillion, okBluishGreen, okReddishPurple, okOrange, okSkyBlue}
}

// Theme is the look shared by every figure: fonts, sizes and the neutral
// colours. Colours of data series come from Palette. A zero field takes its
// value from DefaultTheme; use DefaultTheme and change fields to customise.
type Theme struct {
	// FontSizeTitle is the size of figure and panel titles. If zero,
	// defaults to 10 pt.
	FontSizeTitle vg.Length
	// FontSizeLabel is the size of axis labels. If zero, defaults to 9 pt.
	FontSizeLabel vg.Length
	// FontSizeTick is the size of tick labels. If zero, defaults to 8 pt.
	FontSizeTick vg.Length
	// FontSizeNote is the size of annotations on the data (gains, times,
	// margins). If zero, defaults to 7.5 pt.
	FontSizeNote vg.Length
	// Text is the colour of all text. If nil, defaults to a near-black grey.
	Text color.Color
	// Axis is the colour of the axis lines and ticks. If nil, defaults to a
	// dark grey.
	Axis color.Color
	// Guide is the colour of thin guide lines (grids, asymptotes, circles).
	// If nil, defaults to a mid grey.
	Guide color.Color
	// Stable is the fill colour of the stable region and of tolerance
	// bands; it should be light. If nil, defaults to bluish green at 10 %
	// opacity.
	Stable color.Color
	// LineWidth is the width of data curves. If zero, defaults to 1.4 pt.
	LineWidth vg.Length
	// GuideWidth is the width of guide lines. If zero, defaults to 0.6 pt.
	GuideWidth vg.Length
}

// DefaultTheme returns this package's look: Liberation Sans (shipped with
// gonum/plot, so output does not depend on the fonts of the machine),
// a quiet grey frame and the Okabe–Ito colours.
func DefaultTheme() Theme {
	return Theme{
		FontSizeTitle: vg.Points(10),
		FontSizeLabel: vg.Points(9),
		FontSizeTick:  vg.Points(8),
		FontSizeNote:  vg.Points(7.5),
		Text:          color.NRGBA{R: 0x22, G: 0x22, B: 0x22, A: 0xff},
		Axis:          color.NRGBA{R: 0x55, G: 0x55, B: 0x55, A: 0xff},
		Guide:         color.NRGBA{R: 0x99, G: 0x99, B: 0x99, A: 0xff},
		Stable:        color.NRGBA{R: 0x00, G: 0x9e, B: 0x73, A: 0x1a},
		LineWidth:     vg.Points(1.4),
		GuideWidth:    vg.Points(0.6),
	}
}

// withDefaults fills zero fields from DefaultTheme.
func (t Theme) withDefaults() Theme {
	d := DefaultTheme()
	if t.FontSizeTitle <= 0 {
		t.FontSizeTitle = d.FontSizeTitle
	}
	if t.FontSizeLabel <= 0 {
		t.FontSizeLabel = d.FontSizeLabel
	}
	if t.FontSizeTick <= 0 {
		t.FontSizeTick = d.FontSizeTick
	}
	if t.FontSizeNote <= 0 {
		t.FontSizeNote = d.FontSizeNote
	}
	if t.Text == nil {
		t.Text = d.Text
	}
	if t.Axis == nil {
		t.Axis = d.Axis
	}
	if t.Guide == nil {
		t.Guide = d.Guide
	}
	if t.Stable == nil {
		t.Stable = d.Stable
	}
	if t.LineWidth <= 0 {
		t.LineWidth = d.LineWidth
	}
	if t.GuideWidth <= 0 {
		t.GuideWidth = d.GuideWidth
	}
	return t
}

var (
	handlerOnce sync.Once
	handler     text.Plain
)

// textHandler returns a plain-text handler whose font cache holds only the
// Liberation collection shipped with gonum/plot. It does not touch the
// global font cache of gonum/plot.
func textHandler() text.Plain {
	handlerOnce.Do(func() {
		handler = text.Plain{Fonts: font.NewCache(liberation.Collection())}
	})
	return handler
}

// sans returns the Liberation Sans font at the given size.
func sans(size vg.Length, bold bool) font.Font {
	f := font.Font{Typeface: "Liberation", Variant: "Sans", Size: size}
	if bold {
		f.Weight = xfont.WeightBold
	}
	return f
}

// textStyle returns a text style in the theme's colour.
func (t Theme) textStyle(size vg.Length, bold bool, xa draw.XAlignment, ya draw.YAlignment) text.Style {
	return text.Style{
		Color:   t.Text,
		Font:    sans(size, bold),
		XAlign:  xa,
		YAlign:  ya,
		Handler: textHandler(),
	}
}

// guideLine returns a thin guide line style with an optional dash pattern.
func (t Theme) guideLine(dashes ...vg.Length) draw.LineStyle {
	return draw.LineStyle{Color: t.Guide, Width: t.GuideWidth, Dashes: dashes}
}

// alpha returns c with its opacity replaced by a (0..255).
func alpha(c color.Color, a uint8) color.Color {
	n := color.NRGBAModel.Convert(c).(color.NRGBA)
	n.A = a
	return n
}
