package report

import (
	"bytes"
	"fmt"
	"html/template"
	"os"
	"path/filepath"
	"strings"
	"time"
)

// Figure is one plot of the report, drawn by package chart.
type Figure struct {
	// File is the base name of the files written, without extension:
	// "root-locus".
	File string
	// Title is the heading in the summaries.
	Title string
	// Caption says in words what the plot shows.
	Caption string
	// SVG and PNG are the rendered plot.
	SVG, PNG []byte
}

// plotFiles are the base names of every plot the report can hold.
var plotFiles = []string{"root-locus", "frequency-response", "nyquist", "step-response", "pole-zero-map"}

// WriteSettings controls the files of the report. A nil *WriteSettings
// means the defaults.
type WriteSettings struct {
	// Timestamp, if not zero, is written into index.html as the time the
	// report was made (in UTC, to the minute). If zero (the default), the
	// report carries no time, so that two runs on the same loop give
	// byte-identical files.
	Timestamp time.Time
}

// WriteFolder writes the report into dir: every plot as SVG and PNG,
// summary.md, report.json and index.html. It returns the path of
// index.html. Plots of an earlier run that this run did not draw are
// removed, so the folder never mixes two analyses.
func (r *Report) WriteFolder(dir string, set *WriteSettings) (string, error) {
	figs := r.Figures
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return "", err
	}
	// Remove plots of an earlier run that this run could not draw, so the
	// folder never mixes two analyses.
	drawn := map[string]bool{}
	for _, f := range figs {
		drawn[f.File] = true
	}
	for _, name := range plotFiles {
		if !drawn[name] {
			for _, ext := range []string{".svg", ".png"} {
				if err := os.Remove(filepath.Join(dir, name+ext)); err != nil && !os.IsNotExist(err) {
					return "", err
				}
			}
		}
	}
	for _, f := range figs {
		if err := os.WriteFile(filepath.Join(dir, f.File+".svg"), f.SVG, 0o644); err != nil {
			return "", err
		}
		if err := os.WriteFile(filepath.Join(dir, f.File+".png"), f.PNG, 0o644); err != nil {
			return "", err
		}
	}
	js, err := r.JSON()
	if err != nil {
		return "", err
	}
	if err := os.WriteFile(filepath.Join(dir, "report.json"), js, 0o644); err != nil {
		return "", err
	}
	if err := os.WriteFile(filepath.Join(dir, "summary.md"), r.Markdown(), 0o644); err != nil {
		return "", err
	}
	page, err := r.HTML(set)
	if err != nil {
		return "", err
	}
	index := filepath.Join(dir, "index.html")
	if err := os.WriteFile(index, page, 0o644); err != nil {
		return "", err
	}
	return index, nil
}

// mdEscape keeps table cells intact in Markdown.
func mdEscape(s string) string {
	s = strings.ReplaceAll(s, "|", `\|`)
	return strings.ReplaceAll(s, "*", `\*`)
}

// Markdown returns the Markdown summary (summary.md): the same tables as
// the text summary, the requirement verdicts, links to the plots and the
// caution.
func (r *Report) Markdown() []byte {
	figs := r.Figures
	var b bytes.Buffer
	fmt.Fprintf(&b, "# %s\n\n", mdEscape(r.Name))
	if r.Description != "" {
		fmt.Fprintf(&b, "%s\n\n", mdEscape(r.Description))
	}
	if len(r.Requirements) > 0 {
		pass, total := verdictCounts(r)
		fmt.Fprintf(&b, "## Requirements: %d of %d met\n\n| requirement | limit | measured | verdict |\n|---|---|---|---|\n", pass, total)
		for _, q := range r.Requirements {
			v := "pass"
			if !q.Pass {
				v = "**fail**"
			}
			fmt.Fprintf(&b, "| %s | %s | %s | %s |\n", mdEscape(typeset(q.Name)), withUnit(g(q.Limit), q.Unit), withUnit(g(q.Value), q.Unit), v)
		}
		b.WriteString("\n")
		for _, q := range r.Requirements {
			fmt.Fprintf(&b, "- %s\n", mdEscape(typeset(q.Message)))
		}
		b.WriteString("\n")
	}
	for _, s := range tables(r) {
		fmt.Fprintf(&b, "## %s\n\n| quantity | value |\n|---|---|\n", mdEscape(s.title))
		for _, rw := range s.rows {
			fmt.Fprintf(&b, "| %s | %s |\n", mdEscape(rw.label), mdEscape(rw.value))
		}
		b.WriteString("\n")
	}
	if len(figs) > 0 {
		b.WriteString("## Plots\n\n")
		for _, f := range figs {
			fmt.Fprintf(&b, "### %s\n\n![%s](%s.svg)\n\n%s (also as [PNG](%s.png))\n\n", f.Title, f.Title, f.File, mdEscape(typeset(f.Caption)), f.File)
		}
	}
	if len(r.Warnings) > 0 {
		b.WriteString("## Warnings\n\n")
		for _, w := range r.Warnings {
			fmt.Fprintf(&b, "- %s\n", mdEscape(typeset(w)))
		}
		b.WriteString("\n")
	}
	fmt.Fprintf(&b, "## Safety\n\n%s\n", safetyCaution)
	return b.Bytes()
}

// inlineSVG prepares an SVG file for inclusion in HTML: the XML prolog
// and any DOCTYPE are removed, and the fixed size becomes a scalable one.
func inlineSVG(svg []byte) template.HTML {
	s := string(svg)
	if i := strings.Index(s, "<svg"); i > 0 {
		s = s[i:]
	}
	return template.HTML(s)
}

type htmlFigure struct {
	Title, Caption, File string
	SVG                  template.HTML
}

type htmlData struct {
	Name, Description string
	Generated         string // empty for no time
	Requirements      []RequirementResult
	Pass, Total       int
	Sections          []htmlSection
	Figures           []htmlFigure
	Warnings          []string
	Caution           string
}

type htmlSection struct {
	Title string
	Rows  []htmlRow
}

type htmlRow struct{ Label, Value string }

var pageTemplate = template.Must(template.New("page").Funcs(template.FuncMap{"g": g, "unit": withUnit, "typeset": typeset}).Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Name}} — loop report</title>
<style>
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, "Liberation Sans", Arial, sans-serif; color: #1b1b1b; margin: 0 auto; max-width: 64rem; padding: 1.5rem; line-height: 1.45; }
h1 { font-size: 1.6rem; margin-bottom: 0.2rem; }
h2 { font-size: 1.25rem; margin-top: 2rem; border-bottom: 1px solid #ccc; padding-bottom: 0.2rem; }
table { border-collapse: collapse; margin: 0.5rem 0; width: 100%; }
th, td { text-align: left; padding: 0.3rem 0.6rem; border-bottom: 1px solid #e4e4e4; vertical-align: top; }
th { background: #f3f3f3; }
td.num { font-variant-numeric: tabular-nums; text-align: right; white-space: nowrap; }
table.kv { table-layout: fixed; }
table.kv td:first-child { width: 40%; }
table.kv td + td { font-variant-numeric: tabular-nums; }
.pass { color: #00704a; font-weight: 600; }
.fail { color: #b00020; font-weight: 700; }
.caution { border-left: 4px solid #e69f00; background: #fff8e6; padding: 0.7rem 1rem; margin: 1.2rem 0; }
.warnings li { margin: 0.2rem 0; }
figure { margin: 1.2rem 0; }
figure svg { width: 100%; height: auto; display: block; }
figcaption { color: #444; font-size: 0.95rem; }
.muted { color: #666; font-size: 0.9rem; }
nav a { margin-right: 1rem; }
</style>
</head>
<body>
<h1>{{.Name}}</h1>
{{if .Description}}<p>{{.Description}}</p>{{end}}
<p class="muted">Loop report{{if .Generated}} generated {{.Generated}}{{end}} by loopreport (loopwise).</p>
<nav><a href="#requirements">Requirements</a><a href="#results">Results</a><a href="#plots">Plots</a>{{if .Warnings}}<a href="#warnings">Warnings</a>{{end}}</nav>
<div class="caution"><strong>Caution.</strong> {{.Caution}}</div>
<h2 id="requirements">Requirements{{if .Total}}: {{.Pass}} of {{.Total}} met{{end}}</h2>
{{if .Requirements}}<table>
<tr><th>requirement</th><th>limit</th><th>measured</th><th>verdict</th><th>in words</th></tr>
{{range .Requirements}}<tr><td>{{typeset .Name}}</td><td class="num">{{unit (g .Limit) .Unit}}</td><td class="num">{{unit (g .Value) .Unit}}</td><td>{{if .Pass}}<span class="pass">pass</span>{{else}}<span class="fail">fail</span>{{end}}</td><td>{{typeset .Message}}</td></tr>
{{end}}</table>{{else}}<p>The loop file states no requirements.</p>{{end}}
<div id="results">
{{range .Sections}}<h2>{{.Title}}</h2>
<table class="kv">
{{range .Rows}}<tr><td>{{.Label}}</td><td>{{.Value}}</td></tr>
{{end}}</table>
{{end}}</div>
<h2 id="plots">Plots</h2>
{{if not .Figures}}<p>No plots were drawn (see the warnings).</p>{{end}}
{{range .Figures}}<figure id="{{.File}}">
<h3>{{.Title}}</h3>
{{.SVG}}
<figcaption>{{.Caption}} Also written as {{.File}}.svg and {{.File}}.png.</figcaption>
</figure>
{{end}}
{{if .Warnings}}<h2 id="warnings">Warnings</h2>
<ul class="warnings">{{range .Warnings}}<li>{{typeset .}}</li>{{end}}</ul>{{end}}
</body>
</html>
`))

// HTML returns the self-contained index.html: plots inlined as SVG,
// tables of the results, requirement verdicts and the safety caution. It
// refers to no external file, script, style sheet or font.
func (r *Report) HTML(set *WriteSettings) ([]byte, error) {
	figs := r.Figures
	pass, total := verdictCounts(r)
	generated := ""
	if set != nil && !set.Timestamp.IsZero() {
		generated = set.Timestamp.UTC().Format("2006-01-02 15:04 UTC")
	}
	d := htmlData{
		Name: r.Name, Description: r.Description,
		Generated:    generated,
		Requirements: r.Requirements, Pass: pass, Total: total,
		Warnings: r.Warnings, Caution: safetyCaution,
	}
	for _, s := range tables(r) {
		hs := htmlSection{Title: s.title}
		for _, rw := range s.rows {
			hs.Rows = append(hs.Rows, htmlRow{rw.label, rw.value})
		}
		d.Sections = append(d.Sections, hs)
	}
	for _, f := range figs {
		d.Figures = append(d.Figures, htmlFigure{Title: f.Title, Caption: typeset(f.Caption), File: f.File, SVG: inlineSVG(f.SVG)})
	}
	var b bytes.Buffer
	if err := pageTemplate.Execute(&b, d); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}
