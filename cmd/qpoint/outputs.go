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
	"qpoint/ac/touchstone"
	"qpoint/bias/circuit"
	"qpoint/bias/si"
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

func writeDistortionPlots(dir string, s *distortionSetup, e *ac.Estimate, st *ac.Steady, sweep []ac.LevelPoint, t *ac.Transfer, tssDBm float64, extra ...*plots.Figure) error {
	comp, compressed := 0.0, false
	if len(sweep) > 1 {
		comp, compressed = ac.Compression(sweep, cmplx.Abs(e.Linear)/e.Drive.EMF)
	}
	figs := distortionFigures(e, st, sweep, comp, compressed)
	if t != nil {
		figs = append(figs, plots.DetectorTransfer(t, tssDBm))
	}
	return writeFigures(dir, append(figs, extra...))
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
func studyPlots(r *study.Result, show string, marks ...plots.StudyMark) ([]*plots.Figure, error) {
	figs := studyFigures(r, show, marks...)
	if len(figs) == 0 {
		return nil, inputError(fmt.Errorf("flag --show: none of the measures could be drawn"))
	}
	return figs, nil
}

// studyFigures returns the study's curves (one varied quantity) or a heat
// map per measure (two), for the measures in show or a useful default set.
func studyFigures(r *study.Result, show string, marks ...plots.StudyMark) []*plots.Figure {
	var ms []*study.Measure
	// A marked measure (the goal's) is always shown, first.
	for _, mk := range marks {
		if mk.Measure != nil {
			ms = append(ms, mk.Measure)
		}
	}
	if show != "" {
		for _, t := range strings.Split(show, ",") {
			if m, err := study.ParseMeasure(strings.TrimSpace(t)); err == nil {
				ms = appendMeasure(r, ms, m)
			}
		}
	} else {
		for _, m := range defaultStudyMeasures(r) {
			ms = appendMeasure(r, ms, m)
		}
	}
	if len(ms) == 0 {
		return nil
	}
	xl, xu := r.Settings.Axis.Vary.Text, r.Settings.Axis.Vary.Quantity.Unit()
	if r.Settings.Second == nil {
		return []*plots.Figure{plots.StudyCurves(r, ms, xl, xu, marks...)}
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

// appendMeasure appends m unless ms already reads the same figure: the
// same name and part at the same frequency, an absent frequency being the
// study's first (or the first distortion frequency).
func appendMeasure(r *study.Result, ms []*study.Measure, m *study.Measure) []*study.Measure {
	at := func(x *study.Measure) float64 {
		if x.FrequencyHz != 0 {
			return x.FrequencyHz
		}
		fs := r.Settings.FrequenciesHz
		if x.AtDistortion() {
			fs = r.Settings.DistortionFrequencies()
		}
		if len(fs) > 0 {
			return fs[0]
		}
		return 0
	}
	for _, x := range ms {
		if x.Name == m.Name && x.Part == m.Part && at(x) == at(m) {
			return ms
		}
	}
	return append(ms, m)
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
	// A study that varies a current would plot each diode's current
	// against (nearly) itself: show the diode's voltage instead.
	q := "current."
	if r.Settings.Axis.Vary.Quantity == circuit.Current {
		q = "voltage."
	}
	for _, d := range first.Diodes {
		texts = append(texts, q+d.Name)
	}
	if len(first.Responses) > 0 {
		if len(r.Ports) > 1 {
			texts = append(texts, "s21")
		}
		texts = append(texts, "s11")
	}
	if len(first.NoiseFigureDB) > 0 {
		texts = append(texts, "noise_figure")
	}
	for i, d := range first.Distortion {
		// The first distortion frequency is the measures' default.
		at := ""
		if i > 0 {
			at = "@" + strings.ReplaceAll(si.Format(d.FrequencyHz, "Hz", 6), " ", "")
		}
		texts = append(texts, "hd2"+at)
		if d.DCShift != 0 {
			texts = append(texts, "sensitivity"+at)
		}
	}
	if first.Detection != nil && first.Detection.Detects {
		texts = append(texts, "tss")
	}
	var ms []*study.Measure
	for _, t := range texts {
		if m, err := study.ParseMeasure(t); err == nil {
			ms = append(ms, m)
		}
	}
	return ms
}

// designFrequency is the frequency a circuit is designed for, as figures
// mark it: the file's distortion frequency, or zero when it names none.
func designFrequency(c *circuit.Circuit) float64 {
	if d := c.Analysis.Distortion; d.Set {
		return d.FrequencyHz
	}
	return 0
}
