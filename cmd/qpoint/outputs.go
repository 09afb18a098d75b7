package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"

	"qpoint/plots"

	"qpoint/ac"
	"qpoint/ac/study"
	"qpoint/bias/circuit"
)

func parseTouchstoneFormat(s string) (ac.Format, error) {
	f, err := ac.ParseFormat(s)
	if err != nil {
		return 0, inputError(fmt.Errorf("flag --format: %w", err))
	}
	return f, nil
}

func writeTouchstone(w io.Writer, c *circuit.Circuit, r *ac.Response, f ac.Format) error {
	comment := []string{"circuit: " + c.Name, "file: " + c.File}
	return ac.WriteTouchstone(w, r.Ports, r.Points, f, comment)
}

// writeFigures writes each figure as SVG and PNG into dir, creating it.
func writeFigures(dir string, figs []*plots.Figure) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return inputError(fmt.Errorf("flag --plots: %w", err))
	}
	for _, f := range figs {
		for _, format := range []string{"svg", "png"} {
			path := filepath.Join(dir, f.Name+"."+format)
			if err := writeFileAtomic(path, func(w io.Writer) error { return plots.Write(w, format, f) }); err != nil {
				return err
			}
		}
	}
	return nil
}

func writeResponsePlots(dir string, r *ac.Response) error {
	return writeFigures(dir, plots.ResponseFigures(r))
}

func writeDistortionPlots(dir string, s *distortionSetup, e *ac.Estimate, st *ac.Steady, sweep []ac.LevelPoint) error {
	return fmt.Errorf("figures are not built yet")
}

func writeDistortionFrequencyPlot(dir string, rows []frequencyRow) error {
	return fmt.Errorf("figures are not built yet")
}

func writeStudyPlots(dir string, r *study.Result, show string) error {
	return fmt.Errorf("study figures are not built yet")
}

func distortionFigures(e *ac.Estimate, st *ac.Steady, sweep []ac.LevelPoint, comp float64, compressed bool) []*plots.Figure {
	return nil
}

func studyFigures(r *study.Result, show string) []*plots.Figure {
	return nil
}
