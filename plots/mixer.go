package plots

import (
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"qpoint/ac/mixer"
)

// MixerLevelSweep shows a mixer against its LO drive, the curve a
// designer chooses the drive on: above, the conversion loss, the image
// conversion loss and the single-sideband noise figure in dB; below, the
// LO power the mixer absorbs beside the available power (the dashed line
// of a perfect match). A level whose pump takes a junction past its
// breakdown knee, or breaks a rating, is drawn as a hollow dot; a level
// that failed is a gap. nominalDBm, when finite, marks the file's LO
// level with a dotted line.
func MixerLevelSweep(pts []mixer.LevelPoint, nominalDBm float64) *Figure {
	top := NewPanel("", "Loss, noise figure (dB)")
	bottom := NewPanel("LO available power (dBm)", "LO absorbed (dBm)")
	fig := &Figure{Name: "mixer-lo-sweep", Title: "Mixer against LO drive", Panels: []*plot.Plot{top, bottom},
		Width: vg.Points(500), Height: vg.Points(520)}
	top.Add(framePlotter{})
	bottom.Add(framePlotter{})
	var xs []float64
	series := make([][]float64, 4)
	var stressed []bool
	for _, p := range pts {
		xs = append(xs, p.LevelDBm)
		vals := []float64{math.NaN(), math.NaN(), math.NaN(), math.NaN()}
		bad := false
		if r := p.Result; r != nil {
			abs := math.NaN()
			if r.LO.AbsorbedW > 0 {
				abs = 10 * math.Log10(r.LO.AbsorbedW*1e3)
			}
			vals = []float64{r.ConversionLossDB, r.ImageConversionLossDB, r.Noise.FigureSSBDB, abs}
			for _, c := range r.Cautions {
				bad = bad || c.Kind == mixer.StressCaution || c.Kind == mixer.BreakdownCaution
			}
		}
		for k := range series {
			series[k] = append(series[k], vals[k])
		}
		stressed = append(stressed, bad)
	}
	labels := []string{"conversion loss", "image conversion loss", "noise figure, SSB", "LO absorbed"}
	var topCurves, bottomCurves []curve
	for k, ys := range series {
		pl, colour := top, k
		if k == 3 {
			pl, colour = bottom, 3
		}
		st := traceLine(colour)
		if k == 1 {
			st.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
		}
		c := newCurve(xs, ys, false, false)
		th := c.add(pl, st)
		full := &plotter.Scatter{GlyphStyle: draw.GlyphStyle{Color: st.Color, Radius: markerRadius * 0.7, Shape: draw.CircleGlyph{}}}
		hollow := &plotter.Scatter{GlyphStyle: draw.GlyphStyle{Color: st.Color, Radius: markerRadius * 0.9, Shape: draw.RingGlyph{}}}
		for i, y := range ys {
			if !finite(y) {
				continue
			}
			if stressed[i] {
				hollow.XYs = append(hollow.XYs, plotter.XY{X: xs[i], Y: y})
			} else {
				full.XYs = append(full.XYs, plotter.XY{X: xs[i], Y: y})
			}
		}
		if k != 1 {
			pl.Add(full, hollow)
		}
		fig.Key = append(fig.Key, KeyEntry{Label: labels[k], Thumbs: []plot.Thumbnailer{th}})
		if k == 3 {
			bottomCurves = append(bottomCurves, c)
		} else {
			topCurves = append(topCurves, c)
		}
	}
	x0, x1 := math.Inf(1), math.Inf(-1)
	for _, x := range xs {
		x0, x1 = math.Min(x0, x), math.Max(x1, x)
	}
	x0, x1 = linearRange(x0, x1, 5, -10, 10, linearStep)
	for _, pl := range []*plot.Plot{top, bottom} {
		pl.X.Min, pl.X.Max = x0, x1
		pl.X.Tick.Marker = LinearTicks{}
	}
	top.X.Tick.Marker = hideLabels{LinearTicks{}}
	th := newCurve([]float64{x0, x1}, []float64{x0, x1}, false, false).add(bottom, referenceStyle)
	fig.Key = append(fig.Key, KeyEntry{Label: "available (matched)", Thumbs: []plot.Thumbnailer{th}})
	lo, hi := spanY(topCurves)
	lo = math.Min(lo, 0)
	top.Y.Min, top.Y.Max = linearRange(lo, hi, 3, 0, 20, linearStep)
	top.Y.Tick.Marker = LinearTicks{}
	blo, bhi := spanY(bottomCurves)
	blo, bhi = math.Min(blo, x0), math.Max(bhi, math.Min(x1, bhi+3))
	bottom.Y.Min, bottom.Y.Max = linearRange(blo, bhi, 3, -10, 10, linearStep)
	bottom.Y.Tick.Marker = LinearTicks{}
	var notes []string
	if finite(nominalDBm) {
		mark := draw.LineStyle{Color: Palette[4], Width: vg.Points(1.2), Dashes: []vg.Length{vg.Points(1), vg.Points(2)}}
		var thumb plot.Thumbnailer
		for _, p := range []*plot.Plot{top, bottom} {
			thumb = newCurve([]float64{nominalDBm, nominalDBm}, []float64{p.Y.Min, p.Y.Max}, false, false).add(p, mark)
		}
		fig.Key = append(fig.Key, KeyEntry{Label: "the file's LO level", Thumbs: []plot.Thumbnailer{thumb}})
	}
	best, bestX := math.Inf(1), math.NaN()
	for i, y := range series[0] {
		if finite(y) && y < best {
			best, bestX = y, xs[i]
		}
	}
	if finite(best) {
		notes = append(notes, "least loss "+strconv.FormatFloat(best, 'f', 2, 64)+" dB at "+strconv.FormatFloat(bestX, 'f', 1, 64)+" dBm")
	}
	for _, s := range stressed {
		if s {
			notes = append(notes, "hollow: a rating exceeded or the breakdown knee reached")
			break
		}
	}
	fig.Note = strings.Join(notes, " · ")
	return fig
}
