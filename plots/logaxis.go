package plots

import (
	"math"

	"gonum.org/v1/plot"
)

// A decade axis is a logarithmic y axis built as a linear axis of log10 of
// the values: the curves are given log10 y, the axis runs over log10 of
// its range, and decadeTicks labels it in the values themselves. It looks
// exactly like a plot.LogScale axis, but gonum/plot places a centred axis
// label at the axis' arithmetic mid-value, which on a logarithmic scale
// lies near the top, and then pads the panel to fit a long label there;
// stacked panels would no longer line up.

// decadeScale normalises log10 values linearly. It is its own type, not
// plot.LinearScale, so that framePlotter draws no zero line at log10 = 0.
type decadeScale struct{}

func (decadeScale) Normalize(min, max, x float64) float64 {
	return (x - min) / (max - min)
}

// decadeTicks marks a decade axis as LogTicks marks the values.
type decadeTicks struct{ LogTicks }

func (t decadeTicks) Ticks(min, max float64) []plot.Tick {
	ts := t.LogTicks.Ticks(math.Pow(10, min), math.Pow(10, max))
	for i := range ts {
		ts[i].Value = math.Log10(ts[i].Value)
	}
	return ts
}

// setDecadeAxis makes p's y axis a decade axis over the values lo to hi
// (widened by logRange), labelled in unit; the curves on it must carry
// log10 of their values (see decadeCurve).
func setDecadeAxis(p *plot.Plot, lo, hi float64, unit string, empty0, empty1 float64) {
	lo, hi = logRange(lo, hi, empty0, empty1)
	p.Y.Scale = decadeScale{}
	p.Y.Min, p.Y.Max = math.Log10(lo), math.Log10(hi)
	p.Y.Tick.Marker = decadeTicks{LogTicks{Unit: unit}}
}

// decadeCurve returns c with log10 of its y values, for a decade axis;
// points that are not positive are dropped and break the curve.
func decadeCurve(c curve) curve {
	var xs, ys []float64
	for i, r := range c.runs {
		if i > 0 {
			xs, ys = append(xs, math.NaN()), append(ys, math.NaN())
		}
		for _, p := range r {
			y := math.NaN()
			if p.Y > 0 {
				y = math.Log10(p.Y)
			}
			xs, ys = append(xs, p.X), append(ys, y)
		}
	}
	return newCurve(xs, ys, false, false)
}
