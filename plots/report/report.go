// Package report lays out a design report as one self-contained HTML page:
// inline SVG figures, inline styles, no scripts and nothing fetched from
// the network. It reads well on a phone (figures and tables scale or
// scroll within the page width) and prints cleanly (sections avoid page
// breaks inside figures and tables).
//
// Build runs the analyses a circuit file asks for and fills a Document
// with formatted tables, figures as SVG and notes; Write renders it.
// WriteIndex writes a page that links several reports.
//
// The same tables are the command line's text output: each analysis has a
// writer that prints what its command prints (WriteBias, WriteResponse,
// WriteDistortion, WriteDistortionFrequency, WriteNoise, WriteStudy,
// WriteYield, WritePulse, WritePulseSweep, WriteMixer, WriteMixerSweep,
// WriteHarmonics, WriteFit with WriteModelBlock), from the network and the
// plan's resolved values, and the figures a command draws come from here
// too (ResponseTable's companions: DistortionRunFigures, NoiseFigures,
// StudyFigures, YieldFigures, ...).
package report

import (
	"bytes"
	"fmt"
	"html/template"
	"io"
	"regexp"

	"qpoint/ac"
	"qpoint/bias"
)

// Document is a whole report.
type Document struct {
	Title    string
	Subtitle string   // e.g. the circuit file and temperature
	Cards    []Card   // headline figures shown first
	Cautions []string // shown prominently near the top
	Sections []Section
	Footer   []string
	// Point is the operating point the report was built at, and Response
	// its small-signal response over the file's grid (nil for a circuit
	// without ports): a front end that prints a summary beside the page
	// takes them from here.
	Point    *bias.Point
	Response *ac.Response
}

// Card is a headline figure: a label, a value and a line of context.
type Card struct {
	Label, Value, Detail string
}

// Section is a titled part of the report.
type Section struct {
	ID     string // anchor for the table of contents
	Title  string
	Intro  string
	Blocks []Block
}

// Block is a table, a figure or a note.
type Block struct {
	Table  *Table
	Figure *Figure
	Note   string
}

// Table is a formatted table: a caption, a header row and rows of cells,
// for the HTML page (Write) and the terminal (WriteText) alike. Numeric
// columns are right-aligned: Align[i] true means column i is numeric;
// without Align, a column other than the first is numeric when most of
// its cells read as numbers.
type Table struct {
	Caption string
	Header  []string
	Rows    [][]string
	Align   []bool
}

// Figure is an SVG image with a caption.
type Figure struct {
	Caption string
	SVG     []byte // a whole SVG document
}

var (
	xmlProlog = regexp.MustCompile(`(?s)^\s*<\?xml[^>]*\?>\s*(<!--.*?-->\s*)?`)
	svgSize   = regexp.MustCompile(`^<svg width="[^"]*" height="[^"]*"`)
)

// inlineSVG strips the XML prolog and fixed size of an SVG document so
// that it can sit inside HTML and scale to the page through its viewBox.
func inlineSVG(b []byte) template.HTML {
	b = xmlProlog.ReplaceAll(b, nil)
	b = svgSize.ReplaceAll(b, []byte(`<svg class="fig" preserveAspectRatio="xMidYMid meet"`))
	return template.HTML(b)
}

// Write renders the document as HTML.
func Write(w io.Writer, d *Document) error {
	var buf bytes.Buffer
	if err := page.Execute(&buf, d); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	_, err := w.Write(buf.Bytes())
	return err
}

var page = template.Must(template.New("page").Funcs(template.FuncMap{
	"svg": func(f *Figure) template.HTML { return inlineSVG(f.SVG) },
	// right lists which of t's columns are right-aligned, once a table
	// (a cell-by-cell decision reads the whole column for every cell).
	"right": func(t *Table) []bool {
		out := make([]bool, len(t.Header))
		for i := range out {
			out[i] = t.numeric(i)
		}
		return out
	},
	"at": func(b []bool, i int) bool { return i < len(b) && b[i] },
}).Parse(pageHTML))

// The look is our own: a quiet slate and teal scheme, system fonts, and a
// single column that narrows gracefully.
const pageHTML = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Title}}</title>
<style>
:root { --ink:#23292f; --muted:#5d6873; --rule:#d5dbe1; --band:#eef2f5; --accent:#1f6f78; --warn:#8a4b08; --warnbg:#fdf3e4; }
* { box-sizing:border-box; }
body { margin:0; color:var(--ink); background:#fff; font:15px/1.5 -apple-system, "Segoe UI", "Liberation Sans", Helvetica, Arial, sans-serif; }
header { background:var(--band); border-bottom:3px solid var(--accent); padding:1.4rem 1rem 1rem; }
header h1 { margin:0; font-size:1.55rem; letter-spacing:.01em; }
header p { margin:.25rem 0 0; color:var(--muted); }
main { max-width:980px; margin:0 auto; padding:0 1rem 2rem; }
nav { margin:1rem 0; font-size:.92rem; }
nav a { color:var(--accent); text-decoration:none; margin-right:1rem; white-space:nowrap; }
.cards { display:grid; grid-template-columns:repeat(auto-fit, minmax(180px, 1fr)); gap:.6rem; margin:1rem 0; }
.card { border:1px solid var(--rule); border-left:4px solid var(--accent); padding:.55rem .7rem; border-radius:3px; background:#fff; }
.card .label { color:var(--muted); font-size:.8rem; text-transform:uppercase; letter-spacing:.06em; }
.card .value { font-size:1.25rem; font-weight:600; font-variant-numeric:tabular-nums; }
.card .detail { color:var(--muted); font-size:.82rem; }
.cautions { background:var(--warnbg); border:1px solid #e9c98f; border-left:4px solid var(--warn); padding:.6rem .9rem; margin:1rem 0; border-radius:3px; }
.cautions h2 { margin:0 0 .3rem; font-size:1rem; color:var(--warn); border:0; padding:0; }
.cautions ul { margin:0; padding-left:1.2rem; }
section { margin-top:2rem; }
section h2 { font-size:1.2rem; border-bottom:1px solid var(--rule); padding-bottom:.25rem; margin-bottom:.6rem; }
.intro { color:var(--muted); margin:.2rem 0 .8rem; }
.tablewrap { overflow-x:auto; margin:.6rem 0 1rem; }
table { border-collapse:collapse; font-size:.88rem; font-variant-numeric:tabular-nums; min-width:50%; }
caption { text-align:left; font-weight:600; padding:.2rem 0 .35rem; }
th, td { padding:.22rem .6rem; border-bottom:1px solid var(--rule); text-align:left; white-space:nowrap; }
th { background:var(--band); font-weight:600; }
td.num, th.num { text-align:right; }
figure { margin:1rem 0 1.4rem; }
figure svg.fig { width:100%; height:auto; max-width:720px; display:block; }
figcaption { color:var(--muted); font-size:.86rem; margin-top:.3rem; }
.note { font-size:.9rem; color:var(--muted); margin:.4rem 0 .8rem; }
footer { max-width:980px; margin:0 auto; padding:1rem; color:var(--muted); font-size:.85rem; border-top:1px solid var(--rule); }
@media print {
  header { background:none; border-bottom:2px solid #000; }
  nav { display:none; }
  section, figure, .tablewrap, .cards { break-inside:avoid; }
  .tablewrap { overflow:visible; }
  body { font-size:11pt; }
}
</style>
</head>
<body>
<header>
<h1>{{.Title}}</h1>
{{if .Subtitle}}<p>{{.Subtitle}}</p>{{end}}
</header>
<main>
{{if .Sections}}<nav>{{range .Sections}}<a href="#{{.ID}}">{{.Title}}</a> {{end}}</nav>{{end}}
{{if .Cards}}<div class="cards">{{range .Cards}}<div class="card"><div class="label">{{.Label}}</div><div class="value">{{.Value}}</div>{{if .Detail}}<div class="detail">{{.Detail}}</div>{{end}}</div>{{end}}</div>{{end}}
{{if .Cautions}}<div class="cautions"><h2>Cautions</h2><ul>{{range .Cautions}}<li>{{.}}</li>{{end}}</ul></div>{{end}}
{{range .Sections}}<section id="{{.ID}}">
<h2>{{.Title}}</h2>
{{if .Intro}}<p class="intro">{{.Intro}}</p>{{end}}
{{range .Blocks}}{{if .Table}}{{$t := .Table}}{{$num := right $t}}<div class="tablewrap"><table>{{if $t.Caption}}<caption>{{$t.Caption}}</caption>{{end}}
<thead><tr>{{range $i, $h := $t.Header}}<th{{if at $num $i}} class="num"{{end}}>{{$h}}</th>{{end}}</tr></thead>
<tbody>{{range $t.Rows}}<tr>{{range $i, $c := .}}<td{{if at $num $i}} class="num"{{end}}>{{$c}}</td>{{end}}</tr>
{{end}}</tbody></table></div>
{{else if .Figure}}<figure>{{svg .Figure}}{{if .Figure.Caption}}<figcaption>{{.Figure.Caption}}</figcaption>{{end}}</figure>
{{else if .Note}}<p class="note">{{.Note}}</p>
{{end}}{{end}}
</section>
{{end}}
</main>
<footer>{{range .Footer}}<p>{{.}}</p>{{end}}</footer>
</body>
</html>
`
