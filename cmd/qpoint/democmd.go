package main

import (
	"fmt"
	"html/template"
	"io"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"qpoint"
	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/plots/report"
	"qpoint/smallsignal"
)

func newDemoCmd() *cobra.Command {
	var dir string
	cmd := &cobra.Command{
		Use:   "demo",
		Short: "Run every built-in demo circuit and write a design report for each",
		Long: `demo runs the analyses on the circuits built into qpoint — a low-barrier
detector with a bias resistor, a current-controlled shunt-diode attenuator,
an anti-parallel limiter and a single-balanced diode mixer — prints each
one's operating point and response, and writes a full HTML report for each
into a folder (qpoint-demo by default) with an index page.

The circuit files are in the source tree under testdata/demo; copy one to
start your own.`,
		Example: `  qpoint demo
  qpoint demo --dir /tmp/reports`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			g := guardOf(cmd)
			names, err := fs.Glob(qpoint.Demos, "testdata/demo/*.yaml")
			if err != nil {
				return err
			}
			if err := os.MkdirAll(dir, 0o755); err != nil {
				return inputError(fmt.Errorf("flag --dir: %w", err))
			}
			w := cmd.OutOrStdout()
			fmt.Fprintf(w, "qpoint demo: %d built-in circuits, reports in %s\n", len(names), dir)
			var index []demoEntry
			for _, name := range names {
				data, err := fs.ReadFile(qpoint.Demos, name)
				if err != nil {
					return err
				}
				base := strings.TrimSuffix(path.Base(name), ".yaml")
				c, err := circuit.Parse(path.Join("demo", path.Base(name)), data)
				if err != nil {
					return analysisError(fmt.Errorf("built-in demo %s: %w", name, err))
				}
				begin := time.Now()
				p, err := bias.Solve(c, bias.Settings{})
				if err != nil {
					return analysisError(err)
				}
				fmt.Fprintf(w, "\n════ %s ════\n", base)
				report.WriteBias(w, p)
				if err := demoResponse(w, c, p); err != nil {
					return err
				}
				doc, err := buildReport(c, "")
				if err != nil {
					return err
				}
				out := filepath.Join(dir, base+".html")
				if err := g.writeFileAtomic(out, func(fw io.Writer) error { return report.Write(fw, doc) }); err != nil {
					return err
				}
				fmt.Fprintf(w, "report: %s (%s)\n", out, time.Since(begin).Round(time.Millisecond))
				index = append(index, demoEntry{File: base + ".html", Title: c.Name, Cautions: len(doc.Cautions)})
			}
			idx := filepath.Join(dir, "index.html")
			if err := g.writeFileAtomic(idx, func(fw io.Writer) error { return demoIndex.Execute(fw, index) }); err != nil {
				return err
			}
			fmt.Fprintf(w, "\nOpen %s in a browser for all four reports.\n", idx)
			return nil
		},
	}
	cmd.Flags().StringVar(&dir, "dir", "qpoint-demo", "folder for the reports")
	return cmd
}

// demoResponse prints a short response table from the file's defaults.
func demoResponse(w io.Writer, c *circuit.Circuit, p *bias.Point) error {
	if len(c.Ports) == 0 {
		return nil
	}
	grid, err := plan.ResponseGrid(c, plan.Grid{})
	if err != nil {
		return err
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		return analysisError(err)
	}
	r, err := ac.Run(nw, grid, ac.Settings{})
	if err != nil {
		return analysisError(err)
	}
	report.ResponseTable(r, 5).WriteText(w)
	fmt.Fprintln(w)
	return nil
}

type demoEntry struct {
	File, Title string
	Cautions    int
}

var demoIndex = template.Must(template.New("index").Parse(`<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>qpoint demo reports</title>
<style>body{font:16px/1.5 -apple-system,"Segoe UI","Liberation Sans",Arial,sans-serif;max-width:720px;margin:2rem auto;padding:0 1rem;color:#23292f}
a{color:#1f6f78}li{margin:.4rem 0}.muted{color:#5d6873}</style></head>
<body><h1>qpoint demo reports</h1><ul>
{{range .}}<li><a href="{{.File}}">{{.Title}}</a>{{if .Cautions}} <span class="muted">({{.Cautions}} cautions)</span>{{end}}</li>
{{end}}</ul>
<p class="muted">Results are model estimates; confirm them by measurement.</p></body></html>
`))
