package plots

import (
	"fmt"
	"image/color"
	"math"
	"sort"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"qpoint/bias/si"
)

// NoiseDensity shows the output noise spectral density against frequency,
// both on logarithmic axes: density[i] at freqs[i], in unit (such as
// "V/√Hz"; empty means that). A positive floor is drawn as a level line and
// named in the key with its value: a reference density such as the thermal
// noise √(4kTR) of the output's reference resistance, against which the
// circuit's own noise is read. Zero, negative or NaN floors are not drawn.
func NoiseDensity(freqs []float64, density []float64, unit string, floor float64) *Figure {
	if unit == "" {
		unit = "V/√Hz"
	}
	p := NewPanel("Frequency", "Noise density")
	fig := &Figure{
		Name:   "noise-density",
		Title:  "Output noise density",
		Panels: []*plot.Plot{p},
		Width:  vg.Points(480),
		Height: vg.Points(340),
	}
	c := newCurve(freqs, density, true, true)
	_, _, y0, y1 := c.extent()
	n := 0
	for _, r := range c.runs {
		n += len(r)
	}
	onAxis := decadeCurve(c)
	p.Add(framePlotter{X: LogTicks{Unit: "Hz"}})
	hasFloor := floor > 0 && finite(floor)
	fx0, fx1 := sweepSpan(freqs)
	fx0, fx1 = frequencyRange(fx0, fx1)
	if hasFloor {
		ls := draw.LineStyle{Color: inkSoft, Width: vg.Points(1), Dashes: dashPatterns[1]}
		at := math.Log10(floor)
		line := &plotter.Line{XYs: plotter.XYs{{X: fx0, Y: at}, {X: fx1, Y: at}}, LineStyle: ls}
		p.Add(line)
	}
	thumb := onAxis.add(p, traceLine(0))
	fig.Key = []KeyEntry{{Label: "output noise", Thumbs: []plot.Thumbnailer{thumb}}}
	if hasFloor {
		fig.Key = append(fig.Key, KeyEntry{Label: "reference floor " + si.Format(floor, unit, 3), Thumbs: []plot.Thumbnailer{
			&plotter.Line{LineStyle: draw.LineStyle{Color: inkSoft, Width: vg.Points(1), Dashes: dashPatterns[1]}},
		}})
	}

	note := "1 frequency"
	if n != 1 {
		note = strconv.Itoa(n) + " frequencies"
	}
	note = "Spot noise at " + note
	if n == 0 {
		note = "No noise values"
	}
	if n > 0 {
		note += " · from " + si.Format(y0, unit, 3) + " to " + si.Format(y1, unit, 3)
	}
	if dropped := countUndrawable(freqs, density); dropped > 0 {
		note += fmt.Sprintf(" · %d points without a value left out", dropped)
	}
	fig.Note = note

	setFrequencyAxis(p, fx0, fx1, true)
	if hasFloor {
		y0, y1 = math.Min(y0, floor), math.Max(y1, floor)
		if c.empty() {
			y0, y1 = floor, floor
		}
	}
	setDecadeAxis(p, y0, y1, unit, 1e-9, 1e-6)
	return fig
}

// countUndrawable counts the points of a log-log curve that cannot be drawn.
func countUndrawable(xs, ys []float64) int {
	n := 0
	for i := range xs {
		if i >= len(ys) || !(xs[i] > 0) || !(ys[i] > 0) || !finite(xs[i]) || !finite(ys[i]) {
			n++
		}
	}
	return n
}

// maxNoiseBands is how many sources NoiseContributions shows on their own;
// the smaller ones beyond are summed into one band.
const maxNoiseBands = 6

// NoiseContributions shows each noise source's share of the output noise
// power against frequency, stacked so that the bands fill 0 to 100 %:
// shares[k][i] is source k's fraction (0 to 1) at freqs[i], named
// names[k]. Each frequency's shares are rescaled to sum to one; a missing
// or NaN share counts as zero, and a frequency with no share at all leaves
// a gap. With more than six sources the five with the largest peak share
// are shown and the rest summed as "other sources".
func NoiseContributions(freqs []float64, names []string, shares [][]float64) *Figure {
	p := NewPanel("Frequency", "Share of output noise power (%)")
	fig := &Figure{
		Name:   "noise-contributions",
		Title:  "Noise contributions",
		Panels: []*plot.Plot{p},
		Width:  vg.Points(480),
		Height: vg.Points(360),
	}
	st, others := stackShares(freqs, names, shares)
	nSources := max(len(shares), len(names))
	p.Add(framePlotter{X: LogTicks{Unit: "Hz"}})
	p.Add(st)
	// The key reads top down, as the bands are stacked.
	for b := len(st.labels) - 1; b >= 0; b-- {
		fig.Key = append(fig.Key, KeyEntry{Label: st.labels[b], Thumbs: []plot.Thumbnailer{
			bandSwatch{fill: st.fills[b], edge: st.edges[b]},
		}})
	}

	note := "Share of each source in the output noise power, stacked to 100 %"
	if others > 0 {
		note += fmt.Sprintf(" · the %d smallest sources summed as one band", others)
	}
	if nSources == 0 {
		note = "No noise sources."
	}
	fig.Note = note

	fx0, fx1 := sweepSpan(freqs)
	setFrequencyAxis(p, fx0, fx1, true)
	p.Y.Min, p.Y.Max = 0, 100
	p.Y.Tick.Marker = LinearTicks{}
	return fig
}

// stackShares sorts the sources into bands, as NoiseContributions
// describes, and stacks their shares in percent at each usable frequency.
// It returns the bands and how many sources were summed into the last.
func stackShares(freqs []float64, names []string, shares [][]float64) (*stackedBands, int) {
	share := func(k, i int) float64 {
		if k >= len(shares) || i >= len(shares[k]) {
			return 0
		}
		v := shares[k][i]
		if !(v > 0) || math.IsInf(v, 0) {
			return 0
		}
		return v
	}
	name := func(k int) string {
		if k < len(names) && names[k] != "" {
			return names[k]
		}
		return "source " + strconv.Itoa(k+1)
	}
	nSources := max(len(shares), len(names))

	// Which sources get their own band.
	type band struct {
		label   string
		members []int
		clr     color.Color
	}
	var bands []band
	keep := make([]int, nSources)
	for k := range keep {
		keep[k] = k
	}
	var others []int
	if nSources > maxNoiseBands {
		peak := make([]float64, nSources)
		for k := range peak {
			for i := range freqs {
				peak[k] = math.Max(peak[k], share(k, i))
			}
		}
		sort.SliceStable(keep, func(a, b int) bool { return peak[keep[a]] > peak[keep[b]] })
		others = append(others, keep[maxNoiseBands-1:]...)
		keep = keep[:maxNoiseBands-1]
		sort.Ints(keep)
		sort.Ints(others)
	}
	for n, k := range keep {
		bands = append(bands, band{label: name(k), members: []int{k}, clr: Palette[n%len(Palette)]})
	}
	if len(others) > 0 {
		bands = append(bands, band{label: fmt.Sprintf("other sources (%d)", len(others)), members: others, clr: otherBand})
	}

	// Cumulative tops of the bands, in percent, per usable frequency.
	st := &stackedBands{}
	for i, f := range freqs {
		if !(f > 0) || !finite(f) {
			st.breakRun()
			continue
		}
		total := 0.0
		for k := range nSources {
			total += share(k, i)
		}
		if !(total > 0) || math.IsInf(total, 0) {
			st.breakRun()
			continue
		}
		tops := make([]float64, len(bands))
		acc := 0.0
		for b, bd := range bands {
			for _, k := range bd.members {
				acc += share(k, i)
			}
			tops[b] = 100 * acc / total
		}
		st.add(f, tops)
	}
	for _, b := range bands {
		st.labels = append(st.labels, b.label)
		st.fills = append(st.fills, tint(b.clr, 0.55))
		st.edges = append(st.edges, b.clr)
	}
	return st, len(others)
}

// otherBand is the neutral grey of the summed small sources.
var otherBand = rgb(0x8A939C)

// tint mixes c with white, keeping the fraction keep of the colour.
func tint(c color.Color, keep float64) color.RGBA {
	r, g, b, _ := c.RGBA()
	mix := func(v uint32) uint8 { return uint8(math.Round(float64(v>>8)*keep + 255*(1-keep))) }
	return color.RGBA{R: mix(r), G: mix(g), B: mix(b), A: 0xff}
}

// stackedBands draws bands stacked from 0 to 100 % against frequency.
type stackedBands struct {
	runs   [][]stackColumn
	open   bool
	labels []string // of the bands, bottom up
	fills  []color.Color
	edges  []color.Color
}

type stackColumn struct {
	x    float64
	tops []float64
}

func (s *stackedBands) add(x float64, tops []float64) {
	if !s.open {
		s.runs = append(s.runs, nil)
		s.open = true
	}
	s.runs[len(s.runs)-1] = append(s.runs[len(s.runs)-1], stackColumn{x, tops})
}

func (s *stackedBands) breakRun() { s.open = false }

// Plot implements plot.Plotter.
func (s *stackedBands) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	edge := func(b int) draw.LineStyle { return draw.LineStyle{Color: s.edges[b], Width: vg.Points(1)} }
	for _, run := range s.runs {
		if len(run) == 0 {
			continue
		}
		if len(run) == 1 {
			// One frequency: a narrow stacked bar.
			x := trX(run[0].x)
			w := vg.Points(4)
			below := trY(0)
			for b := range s.fills {
				top := trY(run[0].tops[b])
				pts := []vg.Point{{X: x - w, Y: below}, {X: x + w, Y: below}, {X: x + w, Y: top}, {X: x - w, Y: top}}
				c.FillPolygon(s.fills[b], c.ClipPolygonXY(pts))
				c.StrokeLines(edge(b), c.ClipLinesXY([]vg.Point{{X: x - w, Y: top}, {X: x + w, Y: top}})...)
				below = top
			}
			continue
		}
		for b := range s.fills {
			var poly, upper []vg.Point
			for _, col := range run {
				pt := vg.Point{X: trX(col.x), Y: trY(col.tops[b])}
				poly = append(poly, pt)
				upper = append(upper, pt)
			}
			for i := len(run) - 1; i >= 0; i-- {
				lower := 0.0
				if b > 0 {
					lower = run[i].tops[b-1]
				}
				poly = append(poly, vg.Point{X: trX(run[i].x), Y: trY(lower)})
			}
			c.FillPolygon(s.fills[b], c.ClipPolygonXY(poly))
			if b < len(s.fills)-1 { // the top band's edge is the frame
				c.StrokeLines(edge(b), c.ClipLinesXY(upper)...)
			}
		}
	}
	// The labelled grid lines, faint over the bands, to read shares by.
	grid := draw.LineStyle{Color: rgbaOver(0xFFFFFF, 0x80), Width: majorWidth}
	for _, t := range p.Y.Tick.Marker.Ticks(p.Y.Min, p.Y.Max) {
		if y := trY(t.Value); !t.IsMinor() && y > c.Min.Y+1 && y < c.Max.Y-1 {
			c.StrokeLine2(grid, c.Min.X, y, c.Max.X, y)
		}
	}
	for _, t := range p.X.Tick.Marker.Ticks(p.X.Min, p.X.Max) {
		if x := trX(t.Value); !t.IsMinor() && x > c.Min.X+1 && x < c.Max.X-1 {
			c.StrokeLine2(grid, x, c.Min.Y, x, c.Max.Y)
		}
	}
	// The frame again, over the bands' edges.
	c.StrokeLines(draw.LineStyle{Color: ink, Width: frameWidth}, []vg.Point{
		{X: c.Min.X, Y: c.Min.Y}, {X: c.Max.X, Y: c.Min.Y},
		{X: c.Max.X, Y: c.Max.Y}, {X: c.Min.X, Y: c.Max.Y}, {X: c.Min.X, Y: c.Min.Y},
	})
}

// bandSwatch is the key's sample of a band.
type bandSwatch struct {
	fill, edge color.Color
}

func (b bandSwatch) Thumbnail(c *draw.Canvas) {
	h := (c.Max.Y - c.Min.Y) * 0.8
	y0 := c.Center().Y - h/2
	r := []vg.Point{{X: c.Min.X, Y: y0}, {X: c.Max.X, Y: y0}, {X: c.Max.X, Y: y0 + h}, {X: c.Min.X, Y: y0 + h}}
	c.FillPolygon(b.fill, r)
	c.StrokeLine2(draw.LineStyle{Color: b.edge, Width: vg.Points(1)}, c.Min.X, y0+h, c.Max.X, y0+h)
}
