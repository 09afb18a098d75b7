package report

import (
	"html/template"
	"io"
)

// IndexEntry is one report on an index page: its file (relative to the
// page), its title and how many cautions it carries.
type IndexEntry struct {
	File, Title string
	Cautions    int
}

// WriteIndex writes the HTML page that links a set of reports, as
// `qpoint demo` writes beside its reports.
func WriteIndex(w io.Writer, entries []IndexEntry) error {
	return indexPage.Execute(w, entries)
}

var indexPage = template.Must(template.New("index").Parse(`<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>qpoint demo reports</title>
<style>body{font:16px/1.5 -apple-system,"Segoe UI","Liberation Sans",Arial,sans-serif;max-width:720px;margin:2rem auto;padding:0 1rem;color:#23292f}
a{color:#1f6f78}li{margin:.4rem 0}.muted{color:#5d6873}</style></head>
<body><h1>qpoint demo reports</h1><ul>
{{range .}}<li><a href="{{.File}}">{{.Title}}</a>{{if .Cautions}} <span class="muted">({{.Cautions}} cautions)</span>{{end}}</li>
{{end}}</ul>
<p class="muted">Results are model estimates; confirm them by measurement.</p></body></html>
`))
