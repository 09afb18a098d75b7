package plots

import (
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"qpoint/ac/steady"
	"qpoint/bias/si"
)

// DetectorTransfer shows a detector's transfer curve: the magnitude of the
// output's DC change in volts, on a logarithmic axis, against the available
// input power, from the waveform at each level (solid with dots), beside
// the square-law line V = γ P (dashed); and, below, the curve's deviation
// from that line in dB of power with the ±1 dB band. The level where the
// curve departs 1 dB is marked, and the tangential sensitivity, when
// tssDBm is finite, is a dotted vertical line: between them lies the
// detector's square-law dynamic range.
func DetectorTransfer(t *steady.Transfer, tssDBm float64) *Figure {
	top := NewPanel("", "Output DC change")
	bottom := NewPanel("Available input power (dBm)", "Deviation from square law (dB)")
	fig := &Figure{
		Name:   "detector-transfer",
		Title:  "Detector transfer curve",
		Panels: []*plot.Plot{top, bottom},
		Width:  vg.Points(480),
		Height: vg.Points(520),
	}
	var xs, vs, ds, law []float64
	for _, p := range t.Points {
		xs = append(xs, p.LevelDBm)
		vs = append(vs, math.Abs(p.Volts))
		ds = append(ds, p.DeviationDB)
		law = append(law, math.Abs(t.SensitivityVPerW)*math.Pow(10, p.LevelDBm/10)*1e-3)
	}
	x0, x1 := math.Inf(1), math.Inf(-1)
	for _, x := range xs {
		x0, x1 = math.Min(x0, x), math.Max(x1, x)
	}
	if finite(tssDBm) {
		x0, x1 = math.Min(x0, tssDBm), math.Max(x1, tssDBm)
	}
	x0, x1 = linearRange(x0, x1, 10, -60, 0, linearStep)

	wave := newCurve(xs, vs, false, true)
	line := newCurve(xs, law, false, true)
	lo, hi := spanY([]curve{wave, line})
	top.Add(framePlotter{})
	lawStyle := draw.LineStyle{Color: inkSoft, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(5), vg.Points(3)}}
	lawThumb := decadeCurve(line).add(top, lawStyle)
	waveStyle := traceLine(0)
	waveStyle.Dashes = nil
	w := decadeCurve(wave)
	waveThumb := w.add(top, waveStyle)
	dots := &plotter.Scatter{GlyphStyle: draw.GlyphStyle{Color: Palette[0], Radius: markerRadius * 0.75, Shape: draw.CircleGlyph{}}}
	for _, r := range w.runs {
		dots.XYs = append(dots.XYs, r...)
	}
	top.Add(dots)
	fig.Key = append(fig.Key,
		KeyEntry{Label: "waveform", Thumbs: []plot.Thumbnailer{waveThumb, dotThumb{Palette[0]}}},
		KeyEntry{Label: "square law, γ = " + si.Format(math.Abs(t.SensitivityVPerW), "V/W", 4), Thumbs: []plot.Thumbnailer{lawThumb}})
	setDecadeAxis(top, lo, hi, "V", 1e-9, 1)

	bottom.Add(framePlotter{})
	dev := newCurve(xs, ds, false, false)
	band := draw.LineStyle{Color: inkSoft, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(2), vg.Points(2)}}
	for _, b := range []float64{-1, 1} {
		newCurve([]float64{x0, x1}, []float64{b, b}, false, false).add(bottom, band)
	}
	devStyle := traceLine(1)
	devStyle.Dashes = nil
	devThumb := dev.add(bottom, devStyle)
	fig.Key = append(fig.Key,
		KeyEntry{Label: "deviation", Thumbs: []plot.Thumbnailer{devThumb}},
		KeyEntry{Label: "±1 dB", Thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: band}}})
	dlo, dhi := spanY([]curve{dev})
	dlo, dhi = math.Min(dlo, -2), math.Max(dhi, 2)
	bottom.Y.Min, bottom.Y.Max = linearRange(dlo, dhi, 4, -2, 2, linearStep)
	bottom.Y.Tick.Marker = LinearTicks{}

	var notes []string
	if finite(t.DeviationDBm) {
		if y := interpolate(dev, t.DeviationDBm); finite(y) {
			bottom.Add(&levelMark{x: t.DeviationDBm, y: y, label: "1 dB from square law\n" + strconv.FormatFloat(t.DeviationDBm, 'f', 1, 64) + " dBm"})
		}
		notes = append(notes, "1 dB from square law at "+strconv.FormatFloat(t.DeviationDBm, 'f', 1, 64)+" dBm")
	} else {
		notes = append(notes, "within 1 dB of square law over the sweep")
	}
	if finite(tssDBm) {
		tss := draw.LineStyle{Color: Palette[2], Width: vg.Points(1), Dashes: []vg.Length{vg.Points(1), vg.Points(2)}}
		var thumb plot.Thumbnailer
		for _, p := range []*plot.Plot{top, bottom} {
			// Both y ranges are set by now (the top one in log10).
			thumb = newCurve([]float64{tssDBm, tssDBm}, []float64{p.Y.Min, p.Y.Max}, false, false).add(p, tss)
		}
		fig.Key = append(fig.Key, KeyEntry{Label: "tangential sensitivity", Thumbs: []plot.Thumbnailer{thumb}})
		notes = append(notes, "tangential sensitivity "+strconv.FormatFloat(tssDBm, 'f', 1, 64)+" dBm")
		if dr := t.DynamicRangeDB(tssDBm); finite(dr) {
			notes = append(notes, "square-law dynamic range "+strconv.FormatFloat(dr, 'f', 1, 64)+" dB")
		}
	}
	notes = append(notes, "slope "+strconv.FormatFloat(t.LowSlope, 'f', 2, 64)+" at the lowest level, "+strconv.FormatFloat(t.HighSlope, 'f', 2, 64)+" at the highest (1: square law, ½: linear)")
	for _, p := range []*plot.Plot{top, bottom} {
		p.X.Min, p.X.Max = x0, x1
		p.X.Tick.Marker = LinearTicks{}
	}
	top.X.Tick.Marker = hideLabels{LinearTicks{}}
	fig.Note = strings.Join(notes, " · ")
	return fig
}
