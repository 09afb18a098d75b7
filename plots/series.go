package plots

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg/draw"
)

// finite reports whether v can be placed on a linear axis.
func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// decibels is 20 log10 |v|, NaN where |v| is zero or not finite so that
// the point is left out rather than sent to -∞.
func decibels(v complex128) float64 {
	m := cmplx.Abs(v)
	if !(m > 0) || math.IsInf(m, 0) {
		return math.NaN()
	}
	return 20 * math.Log10(m)
}

// unwrapDegrees returns the phase of vs in degrees with the 360° jumps of
// the principal value removed, so that a phase running past ±180° is drawn
// as the smooth curve it is. Points whose value is zero or not finite get
// NaN and are skipped: the next good point is unwrapped against the last
// good one.
func unwrapDegrees(vs []complex128) []float64 {
	out := make([]float64, len(vs))
	prev, have := 0.0, false
	for i, v := range vs {
		if cmplx.IsNaN(v) || cmplx.IsInf(v) || v == 0 {
			out[i] = math.NaN()
			continue
		}
		d := cmplx.Phase(v) * 180 / math.Pi
		if have {
			d -= 360 * math.Round((d-prev)/360)
		}
		out[i], prev, have = d, d, true
	}
	return out
}

// curve is one trace of a panel: its points, with the ones that cannot be
// drawn already taken out and the trace split where they were.
type curve struct {
	runs []plotter.XYs
}

// newCurve pairs xs with ys, dropping points that are not finite (or not
// positive, on a logarithmic axis) and starting a new run after each drop.
func newCurve(xs, ys []float64, xLog, yLog bool) curve {
	var c curve
	var run plotter.XYs
	ok := func(v float64, log bool) bool { return finite(v) && (!log || v > 0) }
	for i := range xs {
		if i < len(ys) && ok(xs[i], xLog) && ok(ys[i], yLog) {
			run = append(run, plotter.XY{X: xs[i], Y: ys[i]})
			continue
		}
		if len(run) > 0 {
			c.runs = append(c.runs, run)
			run = nil
		}
	}
	if len(run) > 0 {
		c.runs = append(c.runs, run)
	}
	return c
}

func (c curve) empty() bool { return len(c.runs) == 0 }

// extent returns the range of the curve's values.
func (c curve) extent() (xmin, xmax, ymin, ymax float64) {
	xmin, ymin = math.Inf(1), math.Inf(1)
	xmax, ymax = math.Inf(-1), math.Inf(-1)
	for _, r := range c.runs {
		for _, p := range r {
			xmin, xmax = math.Min(xmin, p.X), math.Max(xmax, p.X)
			ymin, ymax = math.Min(ymin, p.Y), math.Max(ymax, p.Y)
		}
	}
	return
}

// add draws the curve on p with the given line style and returns the
// thumbnail for the figure's key. A run of a single point has no line to
// draw, so it gets a dot in the line's colour instead; otherwise a
// one-frequency sweep would show nothing.
func (c curve) add(p *plot.Plot, ls draw.LineStyle) plot.Thumbnailer {
	thumb := &plotter.Line{LineStyle: ls}
	for _, r := range c.runs {
		if len(r) == 1 {
			p.Add(&plotter.Scatter{XYs: r, GlyphStyle: draw.GlyphStyle{
				Color: ls.Color, Radius: markerRadius, Shape: draw.CircleGlyph{},
			}})
			continue
		}
		p.Add(&plotter.Line{XYs: r, LineStyle: ls})
	}
	return thumb
}
