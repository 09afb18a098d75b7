package main

import (
	"fmt"
	"io"
	"math/cmplx"
	"os"
	"path/filepath"
	"strings"

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
	return ac.WriteTouchstone(w, r.Ports, r.Points, f, touchstoneComment(c))
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
func writeFigures(dir string, figs []*plots.Figure) error {
	if err := refuseInputs(figurePaths(dir, figs)...); err != nil {
		return err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return inputError(fmt.Errorf("flag --plots: %w", err))
	}
	for _, f := range figs {
		for _, format := range figureFormats {
			path := filepath.Join(dir, f.Name+"."+format)
			if err := writeFileAtomic(path, func(w io.Writer) error { return plots.Write(w, format, f) }); err != nil {
				return err
			}
		}
	}
	return nil
}

func writeDistortionPlots(dir string, s *distortionSetup, e *ac.Estimate, st *ac.Steady, sweep []ac.LevelPoint, extra ...*plots.Figure) error {
	comp, compressed := 0.0, false
	if len(sweep) > 1 {
		comp, compressed = ac.Compression(sweep, cmplx.Abs(e.Fundamental)/e.Drive.EMF)
	}
	return writeFigures(dir, append(distortionFigures(e, st, sweep, comp, compressed), extra...))
}

func writeDistortionFrequencyPlot(dir string, rows []frequencyRow) error {
	var f []float64
	var est []*ac.Estimate
	for _, r := range rows {
		f = append(f, r.f)
		est = append(est, r.est)
	}
	return writeFigures(dir, []*plots.Figure{plots.DistortionVsFrequency(f, est)})
}

// distortionFigures returns the harmonic spectrum and, with a level sweep,
// the output-versus-level figure.
func distortionFigures(e *ac.Estimate, st *ac.Steady, sweep []ac.LevelPoint, comp float64, compressed bool) []*plots.Figure {
	figs := []*plots.Figure{plots.HarmonicSpectrum(st, e)}
	if len(sweep) > 1 {
		figs = append(figs, plots.LevelSweep(sweep, e, comp, compressed))
	}
	return figs
}

// studyPlots returns the figures --plots writes for a study.
func studyPlots(r *study.Result, show string) ([]*plots.Figure, error) {
	figs := studyFigures(r, show)
	if len(figs) == 0 {
		return nil, inputError(fmt.Errorf("flag --show: none of the measures could be drawn"))
	}
	return figs, nil
}

// studyFigures returns the study's curves (one varied quantity) or a heat
// map per measure (two), for the measures in show or a useful default set.
func studyFigures(r *study.Result, show string) []*plots.Figure {
	var ms []*study.Measure
	if show != "" {
		for _, t := range strings.Split(show, ",") {
			if m, err := study.ParseMeasure(strings.TrimSpace(t)); err == nil {
				ms = append(ms, m)
			}
		}
	} else {
		ms = defaultStudyMeasures(r)
	}
	if len(ms) == 0 {
		return nil
	}
	xl, xu := r.Settings.Axis.Vary.Text, r.Settings.Axis.Vary.Quantity.Unit()
	if r.Settings.Second == nil {
		return []*plots.Figure{plots.StudyCurves(r, ms, xl, xu)}
	}
	yl, yu := "frequency", "Hz"
	if !r.Settings.SecondIsFrequency {
		yl, yu = r.Settings.Second.Vary.Text, r.Settings.Second.Vary.Quantity.Unit()
	}
	var figs []*plots.Figure
	for i, m := range ms {
		f := plots.HeatMap(r, m, xl, xu, yl, yu)
		if i > 0 {
			f.Name = fmt.Sprintf("%s-%d", f.Name, i+1)
		}
		figs = append(figs, f)
		if i == 2 {
			break
		}
	}
	return figs
}

// defaultStudyMeasures picks what a designer looks at first: each diode's
// current, the transmission or match at the first study frequency, and
// the detector's sensitivity or the distortion when a level is set.
func defaultStudyMeasures(r *study.Result) []*study.Measure {
	var texts []string
	first := r.FirstSolved()
	if first == nil {
		return nil
	}
	for _, d := range first.Diodes {
		texts = append(texts, "current."+d.Name)
	}
	if len(first.Responses) > 0 {
		if len(r.Ports) > 1 {
			texts = append(texts, "s21")
		}
		texts = append(texts, "s11")
	}
	if r.Settings.Drive.EMF > 0 {
		texts = append(texts, "hd2")
		if first.DCShift != 0 {
			texts = append(texts, "sensitivity")
		}
	}
	var ms []*study.Measure
	for _, t := range texts {
		if m, err := study.ParseMeasure(t); err == nil {
			ms = append(ms, m)
		}
	}
	return ms
}
