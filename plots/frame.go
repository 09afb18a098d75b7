package plots

import (
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// framePlotter draws a panel's background furniture: faint lines at the
// minor ticks, stronger ones at the labelled ticks, the zero of a linear
// axis and a thin frame round the data area. It is added to a panel first
// so that the traces lie on top of it.
type framePlotter struct {
	// X and Y give the tick positions. They may differ from the axes' own
	// tickers, whose labels are hidden on the upper panels of a stack
	// while the lines still belong there.
	X, Y plot.Ticker
}

var _ plot.Plotter = framePlotter{}

// Plot implements plot.Plotter.
func (f framePlotter) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	minor := draw.LineStyle{Color: gridMinor, Width: minorWidth}
	major := draw.LineStyle{Color: gridMajor, Width: majorWidth}
	xt, yt := f.X, f.Y
	if xt == nil {
		xt = p.X.Tick.Marker
	}
	if yt == nil {
		yt = p.Y.Tick.Marker
	}
	xticks := xt.Ticks(p.X.Min, p.X.Max)
	yticks := yt.Ticks(p.Y.Min, p.Y.Max)
	for _, pass := range []struct {
		style draw.LineStyle
		major bool
	}{{minor, false}, {major, true}} {
		for _, t := range xticks {
			if t.IsMinor() == pass.major {
				continue
			}
			if x := trX(t.Value); c.ContainsX(x) {
				c.StrokeLine2(pass.style, x, c.Min.Y, x, c.Max.Y)
			}
		}
		for _, t := range yticks {
			if t.IsMinor() == pass.major {
				continue
			}
			if y := trY(t.Value); c.ContainsY(y) {
				c.StrokeLine2(pass.style, c.Min.X, y, c.Max.X, y)
			}
		}
	}
	if _, lin := p.Y.Scale.(plot.LinearScale); lin && p.Y.Min < 0 && p.Y.Max > 0 {
		y := trY(0)
		c.StrokeLine2(draw.LineStyle{Color: zeroLine, Width: majorWidth}, c.Min.X, y, c.Max.X, y)
	}
	c.StrokeLines(draw.LineStyle{Color: ink, Width: frameWidth}, []vg.Point{
		{X: c.Min.X, Y: c.Min.Y}, {X: c.Max.X, Y: c.Min.Y},
		{X: c.Max.X, Y: c.Max.Y}, {X: c.Min.X, Y: c.Max.Y}, {X: c.Min.X, Y: c.Min.Y},
	})
}

// Default axis spans for a panel with nothing to show.
const (
	defaultFromHz = 1e6
	defaultToHz   = 1e9
)

// frequencyRange is the x range of a frequency panel: the sweep's own
// span, or half a decade either side of a single frequency.
func frequencyRange(lo, hi float64) (float64, float64) {
	switch {
	case !(lo > 0) || !finite(hi) || hi < lo:
		return defaultFromHz, defaultToHz
	case lo == hi:
		return lo / math.Sqrt(10), lo * math.Sqrt(10)
	}
	return lo, hi
}

// linearRange widens [lo, hi] out to the nearest labelled lines of a
// ticker whose step for a range is given by step, so that the data never
// ends between grid lines. A flat curve is given minSpan around its value;
// an empty one gets [empty0, empty1].
func linearRange(lo, hi, minSpan, empty0, empty1 float64, step func(lo, hi float64) float64) (float64, float64) {
	if !finite(lo) || !finite(hi) || hi < lo {
		return empty0, empty1
	}
	if hi-lo < minSpan {
		mid := (lo + hi) / 2
		lo, hi = mid-minSpan/2, mid+minSpan/2
	}
	s := step(lo, hi)
	if s == 0 {
		return lo, hi
	}
	return math.Floor(lo/s+1e-9) * s, math.Ceil(hi/s-1e-9) * s
}

// linearStep is LinearTicks' step for a range.
func linearStep(lo, hi float64) float64 { return niceStep(lo, hi, 6) }

// logRange widens [lo, hi] out to the nearest 1, 2 or 5 times a power of
// ten, and gives a flat curve a factor of two either side.
func logRange(lo, hi, empty0, empty1 float64) (float64, float64) {
	if !(lo > 0) || !finite(hi) || hi < lo {
		return empty0, empty1
	}
	if hi/lo < 1.5 {
		mid := math.Sqrt(lo * hi)
		lo, hi = mid/2, mid*2
	}
	down := func(v float64) float64 {
		p := math.Pow10(int(math.Floor(math.Log10(v))))
		for _, m := range []float64{5, 2, 1} {
			if m*p <= v*(1+1e-9) {
				return m * p
			}
		}
		return p
	}
	up := func(v float64) float64 {
		p := math.Pow10(int(math.Floor(math.Log10(v))))
		for _, m := range []float64{1, 2, 5, 10} {
			if m*p >= v*(1-1e-9) {
				return m * p
			}
		}
		return 10 * p
	}
	return down(lo), up(hi)
}
