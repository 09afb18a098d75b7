package main

import (
	"fmt"
	"io"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"qpoint"
	"qpoint/bias/circuit"
	"qpoint/plots/report"
)

func newDemoCmd() *cobra.Command {
	var dir string
	cmd := &cobra.Command{
		Use:   "demo",
		Short: "Run every built-in demo circuit and write a design report for each",
		Long: `demo runs the analyses on the circuits built into qpoint — a low-barrier
detector with a bias resistor, a current-controlled shunt-diode attenuator,
an anti-parallel limiter, a line-and-stub matched detector at 5.8 GHz and
a single-balanced diode mixer — prints each one's operating point and
response, and writes a full HTML report for each into a folder
(qpoint-demo by default) with an index page.

The circuit files are in the source tree under testdata/demo; copy one to
start your own.`,
		Example: `  qpoint demo
  qpoint demo --dir /tmp/reports`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error { return runDemo(guardOf(cmd), cmd.OutOrStdout(), dir) },
	}
	cmd.Flags().StringVar(&dir, "dir", "qpoint-demo", "folder for the reports")
	return cmd
}

// runDemo prints each built-in circuit's operating point and response
// and writes its report into dir, with the index page.
func runDemo(g *fileGuard, w io.Writer, dir string) error {
	names, err := fs.Glob(qpoint.Demos, "testdata/demo/*.yaml")
	if err != nil {
		return err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return inputError(fmt.Errorf("flag --dir: %w", err))
	}
	fmt.Fprintf(w, "qpoint demo: %d built-in circuits, reports in %s\n", len(names), dir)
	var index []report.IndexEntry
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
		doc, err := buildReport(c, "")
		if err != nil {
			return err
		}
		fmt.Fprintf(w, "\n════ %s ════\n", base)
		report.WriteBias(w, doc.Point)
		if doc.Response != nil {
			report.ResponseTable(doc.Response, 5).WriteText(w)
			fmt.Fprintln(w)
		}
		out := filepath.Join(dir, base+".html")
		if err := g.writeFileAtomic(out, func(fw io.Writer) error { return report.Write(fw, doc) }); err != nil {
			return err
		}
		fmt.Fprintf(w, "report: %s (%s)\n", out, time.Since(begin).Round(time.Millisecond))
		index = append(index, report.IndexEntry{File: base + ".html", Title: c.Name, Cautions: len(doc.Cautions)})
	}
	idx := filepath.Join(dir, "index.html")
	if err := g.writeFileAtomic(idx, func(fw io.Writer) error { return report.WriteIndex(fw, index) }); err != nil {
		return err
	}
	fmt.Fprintf(w, "\nOpen %s in a browser for all %d reports.\n", idx, len(index))
	return nil
}
