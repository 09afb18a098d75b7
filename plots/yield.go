package plots

import (
	"fmt"
	"image/color"
	"math"
	"slices"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"qpoint/ac/yield"
	"qpoint/bias/si"
)

// Histogram colours: runs that meet the target in the first trace
// colour, runs that miss it in the fourth (raspberry), both softened so
// the marker lines drawn over them stay clear.
var (
	passFill = tint(Palette[0], 0.55)
	failFill = tint(Palette[3], 0.55)
)

// YieldHistogram shows how target t's worst reading spread over the runs
// of r: a histogram of the runs, with the bars beyond the target's limit
// in a second colour, and vertical lines at the limit (dashed), the
// nominal circuit's reading (solid) and the worst-case corner's (dotted).
// A line that lies far outside the runs' range (more than the range's
// own width beyond it) is not drawn and the note gives its value.
func YieldHistogram(r *yield.Result, t int) *Figure {
	fig, _ := yieldHistogram(r, t)
	return fig
}

// yieldHistogram is YieldHistogram, also returning the bars.
func yieldHistogram(r *yield.Result, t int) (*Figure, *histogram) {
	ts := r.Targets[t]
	tg := ts.Target
	unit := tg.Measure.Unit
	name := MeasureName(tg.Measure)
	if tickUnit(unit) == "" && unit != "" {
		name += " (" + unit + ")"
	}
	p := NewPanel(name, "Runs per bin")
	fig := &Figure{
		Name:   fmt.Sprintf("yield-%d-%s", t+1, tg.Measure.Name),
		Title:  "Spread of " + tg.Text,
		Panels: []*plot.Plot{p},
		Width:  vg.Points(480),
		Height: vg.Points(320),
	}
	var xs []float64
	for i := range r.Runs {
		if v := r.Runs[i].Worst[t]; finite(v) {
			xs = append(xs, v)
		}
	}
	slices.Sort(xs)
	limited := tg.Bound != yield.Observe
	corner := math.NaN()
	for _, c := range r.Corners {
		if c.Target == t && c.Err == nil {
			corner = c.Reading
		}
	}

	lo, hi := math.NaN(), math.NaN()
	if len(xs) > 0 {
		lo, hi = xs[0], xs[len(xs)-1]
	}
	span := hi - lo
	if !(span > 0) {
		span = math.Max(math.Abs(lo)*1e-3, 1e-12)
	}
	var off []string
	near := func(v float64) bool { return finite(v) && v >= lo-span && v <= hi+span }
	marks := []struct {
		v     float64
		label string
		style draw.LineStyle
	}{
		{tg.Limit, "limit", draw.LineStyle{Color: ink, Width: vg.Points(1.2), Dashes: dashPatterns[1]}},
		{ts.Nominal, "nominal", draw.LineStyle{Color: ink, Width: vg.Points(1.2)}},
		{corner, "worst-case corner", draw.LineStyle{Color: Palette[3], Width: vg.Points(1.2), Dashes: dashPatterns[3]}},
	}
	if !limited {
		marks[0].v = math.NaN()
	}
	shown := marks[:0:0]
	for _, m := range marks {
		switch {
		case !finite(m.v):
		case len(xs) == 0 || near(m.v):
			shown = append(shown, m)
			lo, hi = math.Min(lo, m.v), math.Max(hi, m.v)
		default:
			off = append(off, m.label+" "+formatReading(m.v, unit)+" (off the scale)")
		}
	}

	// Bins: about √n of them, 10 to 60, one edge on the limit so that no
	// bar holds both passing and failing runs.
	nb := int(math.Round(math.Sqrt(float64(len(xs)))))
	nb = max(10, min(60, nb))
	if !(hi > lo) {
		hi, lo = lo+span/2, lo-span/2
	}
	width := (hi - lo) / float64(nb)
	origin := lo
	if limited && finite(tg.Limit) && tg.Limit >= lo && tg.Limit <= hi {
		origin = tg.Limit - math.Ceil((tg.Limit-lo)/width)*width
	}
	counts := map[int]int{}
	for _, x := range xs {
		counts[int(math.Floor((x-origin)/width))]++
	}
	h := &histogram{width: width, origin: origin, counts: counts, target: tg}
	p.Add(framePlotter{X: LinearTicks{Unit: tickUnit(unit)}, Y: LinearTicks{}})
	p.Add(h)
	top := 0
	for _, n := range counts {
		top = max(top, n)
	}
	for _, m := range shown {
		p.Add(&plotter.Line{XYs: plotter.XYs{{X: m.v, Y: 0}, {X: m.v, Y: float64(top) * 1.08}}, LineStyle: m.style})
	}

	fig.Key = []KeyEntry{{Label: "runs meeting the target", Thumbs: []plot.Thumbnailer{bandSwatch{passFill, passFill}}}}
	if limited {
		fig.Key = append(fig.Key, KeyEntry{Label: "runs missing it", Thumbs: []plot.Thumbnailer{bandSwatch{failFill, failFill}}})
	} else {
		fig.Key[0].Label = "runs"
	}
	for _, m := range shown {
		fig.Key = append(fig.Key, KeyEntry{Label: m.label + " " + formatReading(m.v, unit), Thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: m.style}}})
	}

	note := fmt.Sprintf("%d runs, seed %d", len(r.Runs), r.Settings.Seed)
	if len(r.TemperaturesK) > 1 {
		note += fmt.Sprintf(" · each run's worst reading over %d temperatures", len(r.TemperaturesK))
	}
	if len(xs) > 0 {
		note += " · mean " + formatReading(ts.Mean, unit) + ", standard deviation " + formatSpreadValue(ts.Std, unit)
	}
	if limited {
		note += fmt.Sprintf(" · %.2f %% meet it", 100*ts.PassFraction)
	}
	if missing := len(r.Runs) - len(xs); missing > 0 {
		note += fmt.Sprintf(" · %d runs without a reading left out", missing)
	}
	for _, o := range off {
		note += " · " + o
	}
	fig.Note = note

	x0, x1 := linearRange(origin, hi, 0, 0, 1, linearStep)
	p.X.Min, p.X.Max = x0, x1
	p.X.Tick.Marker = LinearTicks{Unit: tickUnit(unit)}
	y1 := float64(top) * 1.08
	if top == 0 {
		y1 = 1
	}
	_, p.Y.Max = linearRange(0, y1, 1, 0, 1, linearStep)
	p.Y.Min = 0
	p.Y.Tick.Marker = LinearTicks{}
	return fig, h
}

// formatReading prints a measure's value with its unit.
func formatReading(v float64, unit string) string {
	switch unit {
	case "dB", "dBc", "dBm":
		return strconv.FormatFloat(v, 'f', 2, 64) + " " + unit
	}
	return si.Format(v, tickUnit(unit), 4)
}

// formatSpreadValue prints a standard deviation: decibels to three
// decimals.
func formatSpreadValue(v float64, unit string) string {
	switch unit {
	case "dB", "dBc", "dBm":
		return strconv.FormatFloat(v, 'f', 3, 64) + " " + unit
	}
	return si.Format(v, tickUnit(unit), 3)
}

// histogram draws the bars: bin k covers [origin + k w, origin + (k+1) w).
type histogram struct {
	width, origin float64
	counts        map[int]int
	target        yield.Target
}

func (h *histogram) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	keys := make([]int, 0, len(h.counts))
	for k := range h.counts {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	for _, k := range keys {
		a := h.origin + float64(k)*h.width
		b := a + h.width
		fill := passFill
		// A whole bin lies on one side of the limit; its middle says which.
		if !h.target.Passes((a + b) / 2) {
			fill = failFill
		}
		x0, x1 := trX(a), trX(b)
		y0, y1 := trY(0), trY(float64(h.counts[k]))
		c.FillPolygon(fill, c.ClipPolygonXY([]vg.Point{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}}))
		c.StrokeLines(draw.LineStyle{Color: color.White, Width: vg.Points(0.5)}, c.ClipLinesXY([]vg.Point{{X: x1, Y: y0}, {X: x1, Y: y1}})...)
	}
}
