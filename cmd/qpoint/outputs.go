package main

import (
	"fmt"
	"io"
	"math/cmplx"
	"os"
	"path/filepath"

	"qpoint/plots"
	"qpoint/plots/report"

	"qpoint/ac"
	"qpoint/ac/steady"
	"qpoint/ac/study"
	"qpoint/ac/touchstone"
	"qpoint/bias/circuit"
)

func parseTouchstoneFormat(s string) (touchstone.Format, error) {
	f, err := touchstone.ParseFormat(s)
	if err != nil {
		return 0, inputError(fmt.Errorf("flag --format: %w", err))
	}
	return f, nil
}

func writeTouchstone(w io.Writer, c *circuit.Circuit, r *ac.Response, f touchstone.Format) error {
	pts := make([]touchstone.Point, len(r.Points))
	for i, p := range r.Points {
		pts[i] = touchstone.Point{FrequencyHz: p.FrequencyHz, S: p.S}
	}
	return touchstone.Write(w, touchstonePorts(r.Ports), pts, f, touchstoneComment(c))
}

// touchstonePorts gives a sweep's ports as the file format names them.
func touchstonePorts(ports []ac.PortInfo) []touchstone.Port {
	out := make([]touchstone.Port, len(ports))
	for i, p := range ports {
		out[i] = touchstone.Port{Name: p.Name, Impedance: p.Impedance}
	}
	return out
}

// touchstoneComment is the comment a Touchstone file opens with.
func touchstoneComment(c *circuit.Circuit) []string {
	return []string{"circuit: " + c.Name, "file: " + c.File}
}

// figureFormats are the files each figure is written as.
var figureFormats = []string{"svg", "png"}

// figurePaths returns the files writeFigures would write.
func figurePaths(dir string, figs []*plots.Figure) []string {
	var paths []string
	for _, f := range figs {
		for _, format := range figureFormats {
			paths = append(paths, filepath.Join(dir, f.Name+"."+format))
		}
	}
	return paths
}

// writeFigures writes each figure as SVG and PNG into dir, creating it.
// A figure that would overwrite an input stops it before any is written.
func (g *fileGuard) writeFigures(dir string, figs []*plots.Figure) error {
	if err := g.refuseInputs(figurePaths(dir, figs)...); err != nil {
		return err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return inputError(fmt.Errorf("flag --plots: %w", err))
	}
	for _, f := range figs {
		for _, format := range figureFormats {
			path := filepath.Join(dir, f.Name+"."+format)
			if err := g.writeFileAtomic(path, func(w io.Writer) error { return plots.Write(w, format, f) }); err != nil {
				return err
			}
		}
	}
	return nil
}

func (g *fileGuard) writeDistortionPlots(dir string, s *distortionSetup, e *ac.Estimate, st *steady.State, sweep []steady.LevelPoint, t *steady.Transfer, tssDBm float64, extra ...*plots.Figure) error {
	comp, compressed := 0.0, false
	if len(sweep) > 1 {
		comp, compressed = steady.Compression(sweep, cmplx.Abs(e.Linear)/e.Drive.EMF)
	}
	figs := report.DistortionFigures(e, st, sweep, comp, compressed)
	if t != nil {
		figs = append(figs, plots.DetectorTransfer(t, tssDBm))
	}
	return g.writeFigures(dir, append(figs, extra...))
}

func (g *fileGuard) writeDistortionFrequencyPlot(dir string, rows []report.FrequencyRow) error {
	var f []float64
	var est []*ac.Estimate
	for _, r := range rows {
		f = append(f, r.FrequencyHz)
		est = append(est, r.Estimate)
	}
	return g.writeFigures(dir, []*plots.Figure{plots.DistortionVsFrequency(f, est)})
}

// studyPlots returns the figures --plots writes for a study.
func studyPlots(r *study.Result, show string, marks ...plots.StudyMark) ([]*plots.Figure, error) {
	figs := report.StudyFigures(r, show, marks...)
	if len(figs) == 0 {
		return nil, inputError(fmt.Errorf("flag --show: none of the measures could be drawn"))
	}
	return figs, nil
}

// designFrequency is the frequency a circuit is designed for, as figures
// mark it: the file's distortion frequency, or zero when it names none.
func designFrequency(c *circuit.Circuit) float64 {
	if d := c.Analysis.Distortion; d.Set {
		return d.FrequencyHz
	}
	return 0
}
