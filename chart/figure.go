package chart

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Output formats understood by Figure.Render and Figure.Save.
const (
	FormatSVG = "svg"
	FormatPNG = "png"
	FormatPDF = "pdf"
)

// Default figure size and resolution.
const (
	defaultWidthCm  = 16
	defaultHeightCm = 12
	defaultDPI      = 150
	maxSideCm       = 200 // a larger figure is almost surely a unit mistake
)

// Figure is a finished picture: one panel or several stacked vertically
// that share the width (the frequency response has two). It is written with
// Save or Render. The panels are ordinary gonum/plot plots and may be
// changed before writing (titles, extra plotters); the sizes are exported.
type Figure struct {
	// Panels are the plots from top to bottom.
	Panels []*plot.Plot
	// Title is written centred across the top of the figure, above all
	// panels (wrapped when it is wider than the figure). Empty means no
	// figure title.
	Title string
	// WidthCm and HeightCm are the size of the whole figure in
	// centimetres (0 < size ≤ 200).
	WidthCm, HeightCm float64
	// DPI is the resolution of PNG output in dots per inch (1..1200).
	// SVG and PDF are vector formats and ignore it.
	DPI int
	// Notes are lines of text written under the panels, left-aligned (the
	// numbers of the figure in words). Empty means none.
	Notes []string
	// EmbedFonts makes SVG output carry the fonts inside the file (larger,
	// but it looks the same everywhere). Without it the SVG names Liberation
	// Sans and falls back to the metric-compatible Arial or Helvetica and
	// then to any sans-serif font.
	EmbedFonts bool

	theme Theme
	// square lists panels whose two axes must have the same scale (complex
	// planes), so angles and circles look true.
	square map[int]bool
	// cols is the number of panel columns (0 or 1: one column); panels
	// fill the rows in order.
	cols int
	// side is a key drawn outside the panels, right of them, level with
	// the top of the first panel's data area; nil means none.
	side *cornerBox
	// sideDrawn is where side was last drawn.
	sideDrawn vg.Rectangle
	// layers are the text layers of the panels, whose layouts the tests
	// read after drawing.
	layers []*textLayer
	// panelTitles, if set, are written above the panels' data areas, all
	// on one line (plot titles sit at heights that depend on each panel's
	// tick labels).
	panelTitles []string
}

// sideGap is the space between the panels and a key beside them.
var sideGap = vg.Points(8)

// setSideKey puts the key box b outside the data, right of the panels,
// and widens a figure of default width by the room it takes.
func (f *Figure) setSideKey(b *cornerBox, defaultWidth bool) {
	f.side = b
	if defaultWidth {
		w, _, _, _ := b.size()
		// Whole half centimetres: sizes a user can repeat.
		f.WidthCm = math.Ceil(2*(f.WidthCm+float64((w+sideGap)/vg.Centimeter)+0.3)) / 2
	}
}

// newFigure returns a one-panel figure of the given size. The panel's
// title becomes the figure's title, written centred across the top like
// that of every figure of this package.
func newFigure(p *plot.Plot, s Size, th Theme) *Figure {
	w, h, dpi := s.resolve()
	f := &Figure{Panels: []*plot.Plot{p}, WidthCm: w, HeightCm: h, DPI: dpi, theme: th, square: map[int]bool{}}
	f.Title, p.Title.Text = p.Title.Text, ""
	return f
}

// Size is the output size shared by all Settings types.
type Size struct {
	// WidthCm is the figure width in centimetres, in (0, 200]. If zero,
	// defaults to 16.
	WidthCm float64
	// HeightCm is the figure height in centimetres, in (0, 200]. If zero,
	// defaults to 12 (16 for the two-panel frequency response).
	HeightCm float64
	// DPI is the PNG resolution in dots per inch, in [1, 1200]. If zero,
	// defaults to 150.
	DPI int
}

func (s Size) resolve() (w, h float64, dpi int) {
	w, h, dpi = s.WidthCm, s.HeightCm, s.DPI
	if w == 0 {
		w = defaultWidthCm
	}
	if h == 0 {
		h = defaultHeightCm
	}
	if dpi == 0 {
		dpi = defaultDPI
	}
	return w, h, dpi
}

func (s Size) check() error {
	for _, v := range []struct {
		name string
		x    float64
	}{{"WidthCm", s.WidthCm}, {"HeightCm", s.HeightCm}} {
		if math.IsNaN(v.x) || v.x < 0 || v.x > maxSideCm {
			return fmt.Errorf("%w: %s = %g, want 0 (default) or a value in (0, %d]", ErrSize, v.name, v.x, maxSideCm)
		}
	}
	if s.DPI < 0 || s.DPI > 1200 {
		return fmt.Errorf("%w: DPI = %d, want 0 (default) or a value in [1, 1200]", ErrSize, s.DPI)
	}
	return nil
}

// Save writes the figure to path in the format named by its extension:
// .svg, .png or .pdf (case does not matter).
func (f *Figure) Save(path string) error {
	format := strings.ToLower(strings.TrimPrefix(filepath.Ext(path), "."))
	var buf bytes.Buffer
	if err := f.Render(&buf, format); err != nil {
		return fmt.Errorf("chart: saving %s: %w", path, err)
	}
	return os.WriteFile(path, buf.Bytes(), 0o644)
}

// Render writes the figure to w in the given format: FormatSVG, FormatPNG
// or FormatPDF. An SVG can be placed inline in an HTML page as it is.
func (f *Figure) Render(w io.Writer, format string) error {
	if f == nil || len(f.Panels) == 0 {
		return fmt.Errorf("%w: figure has no panels", ErrNoData)
	}
	if err := (Size{WidthCm: f.WidthCm, HeightCm: f.HeightCm, DPI: f.DPI}).check(); err != nil {
		return err
	}
	if f.WidthCm == 0 || f.HeightCm == 0 {
		return fmt.Errorf("%w: figure size %g × %g cm", ErrSize, f.WidthCm, f.HeightCm)
	}
	wid, hei := vg.Length(f.WidthCm)*vg.Centimeter, vg.Length(f.HeightCm)*vg.Centimeter
	switch format {
	case FormatSVG:
		c := vgsvg.NewWith(vgsvg.UseWH(wid, hei), vgsvg.EmbedFonts(f.EmbedFonts))
		f.draw(draw.New(c))
		var buf bytes.Buffer
		if _, err := c.WriteTo(&buf); err != nil {
			return err
		}
		out := buf.Bytes()
		if !f.EmbedFonts {
			out = bytes.ReplaceAll(out, []byte("font-family:Liberation Sans;"),
				[]byte("font-family:'Liberation Sans',Arial,Helvetica,sans-serif;"))
		}
		_, err := w.Write(out)
		return err
	case FormatPNG:
		dpi := f.DPI
		if dpi == 0 {
			dpi = defaultDPI
		}
		c := vgimg.NewWith(vgimg.UseWH(wid, hei), vgimg.UseDPI(dpi))
		f.draw(draw.New(c))
		_, err := vgimg.PngCanvas{Canvas: c}.WriteTo(w)
		return err
	case FormatPDF:
		c := vgpdf.New(wid, hei)
		c.EmbedFonts(true)
		f.draw(draw.New(pdfCanvas{c}))
		_, err := c.WriteTo(w)
		return err
	default:
		return fmt.Errorf("%w: %q (want svg, png or pdf)", ErrFormat, format)
	}
}

// pdfCanvas works around three limits of gonum/plot v0.17's PDF backend:
// it registers each font without its style and then asks for the bold one
// by style, which fails, so text is written in the regular weight; it
// encodes text in Windows-1252, so characters outside it are spelled out
// (pdfText); and it reads translucent colours as premultiplied, which
// darkens them, so colours are passed on unpremultiplied.
type pdfCanvas struct{ *vgpdf.Canvas }

func (c pdfCanvas) FillString(f font.Face, pt vg.Point, s string) {
	if f.Font.Weight != xfont.WeightNormal {
		fnt := f.Font
		fnt.Weight = xfont.WeightNormal
		f = textHandler().Fonts.Lookup(fnt, fnt.Size)
	}
	c.Canvas.FillString(f, pt, pdfText.Replace(s))
}

func (c pdfCanvas) SetColor(clr color.Color) {
	if clr == nil {
		clr = color.Black
	}
	c.Canvas.SetColor(straight(color.NRGBAModel.Convert(clr).(color.NRGBA)))
}

// pdfText spells out the characters this package writes that Windows-1252
// lacks.
var pdfText = strings.NewReplacer("−", "-", "σ", "sigma", "ω", "omega ", "ζ", "zeta", "∞", "infinity")

// straight is a colour whose RGBA method returns unpremultiplied
// components, which is what the PDF backend expects.
type straight color.NRGBA

func (s straight) RGBA() (r, g, b, a uint32) {
	return uint32(s.R) * 0x101, uint32(s.G) * 0x101, uint32(s.B) * 0x101, uint32(s.A) * 0x101
}

// draw lays the panels out on the canvas.
func (f *Figure) draw(c draw.Canvas) {
	th := f.theme.withDefaults()
	c.SetColor(th.background())
	c.Fill(c.Rectangle.Path())
	pad := vg.Points(6)
	c = draw.Crop(c, pad, -pad, pad, -pad)
	if f.Title != "" {
		sty := th.textStyle(th.FontSizeTitle*1.1, true, draw.XCenter, draw.YTop)
		var lines []string
		for _, l := range wrapText(f.Title, c.Max.X-c.Min.X, sty.Width) {
			lines = append(lines, strings.TrimSpace(l))
		}
		for _, l := range lines {
			c.FillText(sty, vg.Point{X: (c.Min.X + c.Max.X) / 2, Y: c.Max.Y}, l)
			c.Max.Y -= sty.Rectangle(l).Size().Y
		}
		c.Max.Y -= vg.Points(5)
	}
	if len(f.Notes) > 0 {
		sty := th.textStyle(th.FontSizeLabel*0.95, false, draw.XLeft, draw.YBottom)
		lineH := sty.Rectangle("Ag").Size().Y * 1.2
		var lines []string
		for _, n := range f.Notes {
			lines = append(lines, wrapText(n, c.Max.X-c.Min.X-vg.Points(8), sty.Width)...)
		}
		y := c.Min.Y
		for i := len(lines) - 1; i >= 0; i-- {
			c.FillText(sty, vg.Point{X: c.Min.X + vg.Points(4), Y: y}, lines[i])
			y += lineH
		}
		c.Min.Y = y + vg.Points(4)
	}
	if f.side != nil && len(f.side.Entries) > 0 {
		w, _, _, _ := f.side.size()
		c.Max.X -= w + sideGap
	}
	ptStyle := th.textStyle(th.FontSizeTitle, true, draw.XCenter, draw.YBottom)
	titleY := c.Max.Y
	if len(f.panelTitles) > 0 {
		c.Max.Y -= ptStyle.Rectangle("Ag").Size().Y + vg.Points(6)
	}
	n := len(f.Panels)
	cols := max(f.cols, 1)
	rows := (n + cols - 1) / cols
	col := make([][]*plot.Plot, rows)
	for r := range col {
		col[r] = make([]*plot.Plot, cols)
	}
	at := func(i int) (int, int) { return i / cols, i % cols }
	for i, p := range f.Panels {
		r, k := at(i)
		col[r][k] = p
	}
	tiles := draw.Tiles{Rows: rows, Cols: cols, PadY: vg.Points(10), PadX: vg.Points(14)}
	// Square panels need their data area known before their ranges are
	// final; two passes settle tick-label widths. The requested ranges are
	// put back afterwards so that rendering leaves the panels unchanged.
	type box struct{ x0, x1, y0, y1 float64 }
	saved := map[int]box{}
	for i, p := range f.Panels {
		if f.square[i] {
			saved[i] = box{p.X.Min, p.X.Max, p.Y.Min, p.Y.Max}
		}
	}
	defer func() {
		for i, b := range saved {
			p := f.Panels[i]
			p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = b.x0, b.x1, b.y0, b.y1
		}
	}()
	for pass := 0; pass < 2 && len(saved) > 0; pass++ {
		cans := plot.Align(col, tiles, c)
		for i := range saved {
			p := f.Panels[i]
			r, k := at(i)
			equalScale(p, p.DataCanvas(cans[r][k]))
		}
	}
	cans := plot.Align(col, tiles, c)
	for i, p := range f.Panels {
		r, k := at(i)
		p.Draw(cans[r][k])
	}
	top := vg.Length(math.Inf(-1))
	for i, p := range f.Panels {
		r, k := at(i)
		top = max(top, p.DataCanvas(cans[r][k]).Max.Y)
	}
	for i, t := range f.panelTitles {
		if i >= len(f.Panels) || t == "" {
			continue
		}
		r, k := at(i)
		dc := f.Panels[i].DataCanvas(cans[r][k])
		y := min(top+vg.Points(6), titleY-ptStyle.Rectangle(t).Size().Y)
		c.FillText(ptStyle, vg.Point{X: (dc.Min.X + dc.Max.X) / 2, Y: y}, t)
	}
	if f.side != nil && len(f.side.Entries) > 0 {
		w, h, _, _ := f.side.size()
		top := f.Panels[0].DataCanvas(cans[0][0]).Max.Y
		x0 := c.Max.X + sideGap
		f.sideDrawn = vg.Rectangle{Min: vg.Point{X: x0, Y: top - h}, Max: vg.Point{X: x0 + w, Y: top}}
		f.side.drawAt(c, f.sideDrawn)
	}
}

// wrapText breaks s into lines no wider than w, after "; " separators
// where possible and otherwise between words.
func wrapText(s string, w vg.Length, width func(string) vg.Length) []string {
	if width(s) <= w {
		return []string{s}
	}
	var lines []string
	var cur string
	words := strings.Fields(s)
	for _, word := range words {
		try := word
		if cur != "" {
			try = cur + " " + word
		}
		if width(try) > w && cur != "" {
			lines = append(lines, cur)
			cur = "  " + word
			continue
		}
		cur = try
	}
	if cur != "" {
		lines = append(lines, cur)
	}
	return lines
}

// equalScale widens the shorter axis range of p so that one data unit has
// the same length on both axes of the data canvas dc.
func equalScale(p *plot.Plot, dc draw.Canvas) {
	w := float64(dc.Max.X - dc.Min.X)
	h := float64(dc.Max.Y - dc.Min.Y)
	if w <= 0 || h <= 0 {
		return
	}
	dx, dy := p.X.Max-p.X.Min, p.Y.Max-p.Y.Min
	if dx <= 0 || dy <= 0 {
		return
	}
	sx, sy := dx/w, dy/h // data units per point
	switch {
	case sx > sy:
		grow := sx*h - dy
		p.Y.Min -= grow / 2
		p.Y.Max += grow / 2
	case sy > sx:
		grow := sy*w - dx
		p.X.Min -= grow / 2
		p.X.Max += grow / 2
	}
}
