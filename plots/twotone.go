package plots

import (
	"math"
	"math/cmplx"
	"sort"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"qpoint/ac"
	"qpoint/ac/steady"
	"qpoint/bias/si"
)

// twoToneOrder is the highest order of mixing product the two-tone
// spectrum shows.
const twoToneOrder = 3

// TwoToneSpectrum shows the mixing products m·f1 + n·f2 of a two-tone
// steady state up to the third order, as bars in dB relative to the
// output at f1, grouped by the harmonic of the carrier they sit near
// (m + n = 0: the difference products; 1: the tones and their
// third-order intermodulation; 2 and 3: the harmonic clusters), each
// group in order of frequency and labelled with the product and its
// frequency. Beside the products the Volterra estimate e gives (IM2 at
// f2 - f1 and f1 + f2, IM3 at 2f1 - f2, HD2 at 2f1, HD3 at 3f1) it marks
// the estimate's level, as HarmonicSpectrum does. Products below -150
// dBc, the solvers' numerical floor, are labelled "floor"; those the
// circuit's symmetry cancels in the estimate, "balanced". e may be nil.
func TwoToneSpectrum(s *steady.State, e *ac.Estimate) *Figure {
	p := NewPanel("Mixing product", "Relative to the output at f1 (dBc)")
	fig := &Figure{
		Name:   "two-tone",
		Title:  "Two-tone products at the output",
		Panels: []*plot.Plot{p},
		Width:  vg.Points(720),
		Height: vg.Points(360),
	}
	bars := newProductBars(s, e)
	p.Add(framePlotter{X: noTicks{}})
	p.Add(bars)
	fig.Key = []KeyEntry{{Label: "steady-state waveform (" + s.Method + ")", Thumbs: []plot.Thumbnailer{barSwatch{}}}}
	if e != nil {
		fig.Key = append(fig.Key, KeyEntry{Label: "Volterra estimate", Thumbs: []plot.Thumbnailer{estimateSwatch{}}})
	}
	note := driveText(s.Drive, e) + " · output " + outputText(s.Drive.Output)
	if v := s.IM3dBc(); finite(v) {
		note += " · IM3 " + strconv.FormatFloat(v, 'f', 1, 64) + " dBc"
	}
	fig.Note = note

	lo, hi, absent := math.Inf(1), 0.0, false
	for _, b := range bars.items {
		for _, v := range []float64{b.wave, b.est} {
			if v >= waveformFloorDBc {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			} else if !math.IsNaN(v) || b.balanced {
				absent = true
			}
		}
	}
	deepest := -40.0
	if absent {
		deepest = waveformFloorDBc
	}
	lo = math.Min(lo-5, deepest)
	p.Y.Min, hi = linearRange(lo, hi, 20, -100, 0, linearStep)
	p.Y.Max = hi + 0.1*(hi-p.Y.Min)
	p.Y.Tick.Marker = LinearTicks{}
	p.X.Min, p.X.Max = -0.6, bars.width-0.4
	p.X.Tick.Marker = productTicks{bars.items}
	return fig
}

// productBar is one product's place, waveform level and estimate.
type productBar struct {
	x        float64
	m, n     int
	freqHz   float64
	wave     float64 // dBc; NaN or below the floor: absent
	est      float64 // dBc of the estimate; NaN where it gives none
	balanced bool    // the estimate cancels by symmetry
}

type productBars struct {
	items []productBar
	width float64
}

var _ plot.Plotter = (*productBars)(nil)

func newProductBars(s *steady.State, e *ac.Estimate) *productBars {
	f1, _ := s.Product(1, 0)
	groups := map[int][]productBar{}
	for _, p := range s.Products {
		m, n := p.Orders[0], p.Orders[1]
		if (m == 0 && n == 0) || absInt(m)+absInt(n) > twoToneOrder {
			continue
		}
		b := productBar{m: m, n: n, freqHz: p.FrequencyHz, wave: ratioDB(p.Amplitude, f1.Amplitude), est: math.NaN()}
		if p.Amplitude <= s.NoiseFloor {
			b.wave = math.NaN()
		}
		if e != nil {
			fund := cmplx.Abs(e.Linear)
			mark := func(v complex128, pr ac.Product) {
				b.est = ratioDB(cmplx.Abs(v), fund)
				b.balanced = e.Balanced(pr)
			}
			switch [2]int{m, n} {
			case [2]int{-1, 1}, [2]int{1, -1}:
				mark(e.IM2Diff, ac.IM2Diff)
			case [2]int{1, 1}:
				mark(e.IM2Sum, ac.IM2Sum)
			case [2]int{2, -1}:
				mark(e.IM3, ac.IM3)
			case [2]int{2, 0}:
				mark(e.HD2, ac.HD2)
			case [2]int{3, 0}:
				mark(e.HD3, ac.HD3)
			}
		}
		groups[m+n] = append(groups[m+n], b)
	}
	pb := &productBars{}
	var keys []int
	for k := range groups {
		keys = append(keys, k)
	}
	sort.Ints(keys)
	x := 0.0
	for gi, k := range keys {
		g := groups[k]
		sort.Slice(g, func(i, j int) bool { return g[i].freqHz < g[j].freqHz })
		if gi > 0 {
			x += 0.6 // a gap between clusters
		}
		for _, b := range g {
			b.x = x
			pb.items = append(pb.items, b)
			x++
		}
	}
	pb.width = x
	return pb
}

func absInt(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// Plot implements plot.Plotter.
func (pb *productBars) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	small := textStyle(sans, smallSize, inkSoft)
	small.XAlign, small.YAlign = draw.XCenter, draw.YBottom
	unit := trX(1) - trX(0)
	base := c.Min.Y
	estLabel := textStyle(sans, smallSize, estInk)
	for _, b := range pb.items {
		x := trX(b.x)
		// The bar's value goes above the bar and above the estimate's
		// line when that lies higher, so that neither hides the other.
		labelAt := base
		if b.est >= waveformFloorDBc && !b.balanced {
			labelAt = max(labelAt, min(trY(b.est), c.Max.Y)+vg.Points(2))
		}
		if !(b.wave >= waveformFloorDBc) {
			c.FillText(small, vg.Point{X: x, Y: base + vg.Points(2)}, "floor")
		} else {
			top := min(trY(b.wave), c.Max.Y)
			x0, x1 := trX(b.x-barHalf), trX(b.x+barHalf)
			if top > base {
				c.FillPolygon(barFill, []vg.Point{{X: x0, Y: base}, {X: x1, Y: base}, {X: x1, Y: top}, {X: x0, Y: top}})
			}
			label := strconv.FormatFloat(b.wave, 'f', 1, 64)
			if b.m == 1 && b.n == 0 {
				label = "0"
			}
			y := max(top, labelAt) + vg.Points(2)
			if small.Width(label) < unit*0.95 && y+small.Height(label) < c.Max.Y {
				c.FillText(small, vg.Point{X: x, Y: y}, label)
			}
		}
		if b.balanced || (math.IsNaN(b.est) && !b.balanced) {
			if b.balanced {
				sty := estLabel
				sty.XAlign, sty.YAlign = draw.XCenter, draw.YBottom
				c.FillText(sty, vg.Point{X: x + unit*estDelta, Y: base + vg.Points(2) + sty.Height("M")}, "balanced")
			}
			continue
		}
		if !(b.est >= waveformFloorDBc) {
			continue
		}
		y := trY(b.est)
		if y < c.Min.Y || y > c.Max.Y {
			continue
		}
		c.StrokeLine2(draw.LineStyle{Color: estColour, Width: vg.Points(2)}, trX(b.x-barHalf-0.04), y, x+unit*estDelta, y)
		drawDiamond(&c, vg.Point{X: x + unit*estDelta, Y: y}, estColour)
	}
}

// productTicks labels each bar with its product and frequency.
type productTicks struct{ items []productBar }

func (t productTicks) Ticks(min, max float64) []plot.Tick {
	// As few digits as keep every product's frequency apart from the
	// others' (close tones need more).
	digits := 3
	for ; digits < 8; digits++ {
		seen, clash := map[string]bool{}, false
		for _, b := range t.items {
			f := si.Format(b.freqHz, "Hz", digits)
			clash = clash || seen[f]
			seen[f] = true
		}
		if !clash {
			break
		}
	}
	var ts []plot.Tick
	for _, b := range t.items {
		if b.x < min || b.x > max {
			continue
		}
		ts = append(ts, plot.Tick{Value: b.x, Label: productLabel(b.m, b.n) + "\n" + si.Format(b.freqHz, "Hz", digits)})
	}
	return ts
}

// productLabel writes m·f1 + n·f2 with the positive term first, as the
// tables do: "2f1-f2", "f2-f1".
func productLabel(m, n int) string {
	term := func(c int, f string) string {
		if c == 1 {
			return f
		}
		return strconv.Itoa(c) + f
	}
	switch {
	case n == 0:
		return term(m, "f1")
	case m == 0:
		return term(n, "f2")
	case m > 0 && n > 0:
		return term(m, "f1") + "+" + term(n, "f2")
	case m > 0:
		return term(m, "f1") + "-" + term(-n, "f2")
	default:
		return term(n, "f2") + "-" + term(-m, "f1")
	}
}
