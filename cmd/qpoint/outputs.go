package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"

	"qpoint/ac/study"
	"qpoint/ac/touchstone"
	"qpoint/plots"
	"qpoint/plots/report"
)

func parseTouchstoneFormat(s string) (touchstone.Format, error) {
	f, err := touchstone.ParseFormat(s)
	if err != nil {
		return 0, inputError(fmt.Errorf("flag --format: %w", err))
	}
	return f, nil
}

// writtenTo says on out which files a run wrote: pairs are a kind of
// output and its path, and an output with no path is not mentioned.
func writtenTo(out io.Writer, pairs ...string) {
	for i := 0; i+1 < len(pairs); i += 2 {
		if pairs[i+1] != "" {
			fmt.Fprintf(out, "%s written to %s\n", pairs[i], pairs[i+1])
		}
	}
}

// figurePaths returns the files writeFigures would write.
func figurePaths(dir string, figs []*plots.Figure) []string {
	return plots.Files(dir, figs)
}

// writeFigures writes each figure as SVG and PNG into dir, creating it.
// A figure that would overwrite an input stops it before any is written.
func (g *fileGuard) writeFigures(dir string, figs []*plots.Figure) error {
	if dir == "" {
		return nil
	}
	if err := g.refuseInputs(figurePaths(dir, figs)...); err != nil {
		return err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return inputError(fmt.Errorf("flag --plots: %w", err))
	}
	for _, f := range figs {
		for _, format := range plots.Formats {
			path := filepath.Join(dir, f.Name+"."+format)
			if err := g.writeFileAtomic(path, func(w io.Writer) error { return plots.Write(w, format, f) }); err != nil {
				return err
			}
		}
	}
	return nil
}

// writeIfNamed writes the file path names, if it names one (see
// writeFileAtomic).
func (g *fileGuard) writeIfNamed(path string, write func(io.Writer) error) error {
	if path == "" {
		return nil
	}
	return g.writeFileAtomic(path, write)
}

// studyPlots returns the figures --plots writes for a study.
func studyPlots(r *study.Result, show string, marks ...plots.StudyMark) ([]*plots.Figure, error) {
	figs := report.StudyFigures(r, show, marks...)
	if len(figs) == 0 {
		return nil, inputError(fmt.Errorf("flag --show: none of the measures could be drawn"))
	}
	return figs, nil
}
