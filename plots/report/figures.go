package report

import (
	"fmt"
	"strings"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/ac/steady"
	"qpoint/ac/study"
	"qpoint/bias/circuit"
	"qpoint/bias/si"
	"qpoint/plots"
)

// DistortionFigures returns the harmonic spectrum and, with a level sweep,
// the output-versus-level figure.
func DistortionFigures(e *ac.Estimate, st *steady.State, sweep []steady.LevelPoint, comp float64, compressed bool) []*plots.Figure {
	figs := []*plots.Figure{plots.HarmonicSpectrum(st, e)}
	if len(sweep) > 1 {
		figs = append(figs, plots.LevelSweep(sweep, e, comp, compressed))
	}
	return figs
}

// DistortionRunFigures returns the figures of a distortion run: the
// harmonic spectrum, with a level sweep the output against level and a
// detector's transfer curve, and with a second tone its spectrum.
func DistortionRunFigures(res *plan.Distortion) []*plots.Figure {
	figs := DistortionFigures(res.OneTone, res.Waveform, res.Sweep, res.CompressionDBm, res.Compressed)
	if res.Transfer != nil {
		figs = append(figs, plots.DetectorTransfer(res.Transfer, res.TangentialDBm))
	}
	return append(figs, TwoToneFigures(res.TwoTone, res.Estimate)...)
}

// FrequencySweepFigures returns the figure of the estimate swept over
// frequency.
func FrequencySweepFigures(rows []FrequencyRow) []*plots.Figure {
	var f []float64
	var est []*ac.Estimate
	for _, r := range rows {
		f = append(f, r.FrequencyHz)
		est = append(est, r.Estimate)
	}
	return []*plots.Figure{plots.DistortionVsFrequency(f, est)}
}

// StudyFigures returns the study's curves (one varied quantity) or a heat
// map per measure (two), for the measures in show or a useful default set.
func StudyFigures(r *study.Result, show string, marks ...plots.StudyMark) []*plots.Figure {
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
				ms = AppendMeasure(r, ms, m)
			}
		}
	} else {
		for _, m := range DefaultStudyMeasures(r) {
			ms = AppendMeasure(r, ms, m)
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

// AppendMeasure appends m unless ms already reads the same figure: the
// same name and part at the same frequency, an absent frequency being the
// study's first (or the first distortion frequency).
func AppendMeasure(r *study.Result, ms []*study.Measure, m *study.Measure) []*study.Measure {
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

// DefaultStudyMeasures picks what a designer looks at first: each diode's
// current, the transmission or match at the first study frequency, and
// the detector's sensitivity or the distortion when a level is set.
func DefaultStudyMeasures(r *study.Result) []*study.Measure {
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
