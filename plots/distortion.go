package plots

import (
	"fmt"
	"image/color"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"qpoint/ac"
	"qpoint/ac/steady"
	"qpoint/bias/si"
)

// waveformFloorDBc is where a harmonic of the steady-state waveform is
// lost in the solver's numerical noise; figures show such a harmonic as
// absent rather than plot the noise as if it were a level.
const waveformFloorDBc = -150

// HarmonicSpectrum shows the harmonics of the steady-state output waveform
// as bars, in dB relative to its fundamental (dBc), for orders 1 to K, and
// marks beside the second and third the Volterra estimate e of the same
// products: a diamond at the estimate's level and a line across the bar,
// so that agreement shows as the line sitting on the bar's top. The DC
// shift of both is given in the note. Harmonics below -150 dBc, the
// solver's numerical floor, have no bar and are labelled "floor"; a
// product the circuit's symmetry cancels is labelled "balanced". Either
// argument may be nil.
func HarmonicSpectrum(s *steady.State, e *ac.Estimate) *Figure {
	p := NewPanel("Harmonic order", "Relative to the fundamental (dBc)")
	fig := &Figure{
		Name:   "harmonics",
		Title:  "Harmonics of the output",
		Panels: []*plot.Plot{p},
		Width:  vg.Points(480),
		Height: vg.Points(340),
	}
	sp := newSpectrum(s, e)
	orders := sp.orders
	p.Add(framePlotter{X: noTicks{}})
	p.Add(sp)
	fig.Key = []KeyEntry{{Label: "steady-state waveform", Thumbs: []plot.Thumbnailer{barSwatch{}}}}
	if e != nil {
		fig.Key = append(fig.Key, KeyEntry{Label: "Volterra estimate", Thumbs: []plot.Thumbnailer{estimateSwatch{}}})
	}
	fig.Note = spectrumNote(s, e)

	lo, absent := math.Inf(1), false
	for _, v := range sp.wave {
		if v >= waveformFloorDBc {
			lo = math.Min(lo, v)
		} else {
			absent = true
		}
	}
	for _, m := range sp.est {
		if m.value >= waveformFloorDBc && !m.balanced {
			lo = math.Min(lo, m.value)
		} else {
			absent = true
		}
	}
	// Room under the lowest bar to see it is a bar; a spectrum at least
	// 40 dB deep; and down to the floor when a mark says "floor" or
	// "balanced" there.
	deepest := -40.0
	if absent {
		deepest = waveformFloorDBc
	}
	lo = math.Min(lo-5, deepest)
	// A harmonic may outgrow the fundamental (a frequency multiplier's
	// does); the top is 0 dBc or the highest bar.
	hi := 0.0
	for _, v := range sp.wave {
		if finite(v) {
			hi = math.Max(hi, v)
		}
	}
	for _, m := range sp.est {
		if finite(m.value) && !m.balanced {
			hi = math.Max(hi, m.value)
		}
	}
	p.Y.Min, hi = linearRange(lo, hi, 20, -100, 0, linearStep)
	// Above the top only the room the value labels need, off the grid.
	p.Y.Max = hi + 0.1*(hi-p.Y.Min)
	p.Y.Tick.Marker = LinearTicks{}
	p.X.Min, p.X.Max = 0.4, float64(orders)+0.6
	p.X.Tick.Marker = harmonicTicks{orders: orders, fundHz: sp.fundHz}
	return fig
}

func btoi(b bool) int {
	if b {
		return 1
	}
	return 0
}

// ratioDB is 20 log10(a/ref), NaN where either is zero or not finite.
func ratioDB(a, ref float64) float64 {
	if !(math.Abs(a) > 0) || !(math.Abs(ref) > 0) || !finite(a) || !finite(ref) {
		return math.NaN()
	}
	return 20 * math.Log10(math.Abs(a)/math.Abs(ref))
}

// spectrumNote states the drive, the output and the DC shift.
func spectrumNote(s *steady.State, e *ac.Estimate) string {
	var parts []string
	var d *ac.Drive
	switch {
	case s != nil:
		d = &s.Drive
	case e != nil:
		d = &e.Drive
	}
	if d == nil {
		return "No waveform and no estimate."
	}
	parts = append(parts, driveText(*d, e)+" · output "+outputText(d.Output))
	var dc []string
	if s != nil && len(s.Output) > 0 {
		fund := math.NaN()
		if len(s.Output) > 1 {
			fund = s.Output[1].Amplitude
		}
		if ratioDB(s.Output[0].Amplitude, fund) < waveformFloorDBc {
			dc = append(dc, "DC shift at the numerical floor")
		} else {
			dc = append(dc, "DC shift "+signed(s.Output[0].Amplitude, "V"))
		}
		// THD is read from harmonics 2 and up; when all of them are
		// numerical noise, so is it.
		above := false
		for _, h := range s.Output[min(2, len(s.Output)):] {
			above = above || ratioDB(h.Amplitude, fund) >= waveformFloorDBc
		}
		switch {
		case above && finite(s.THDPercent):
			dc = append(dc, "THD "+strconv.FormatFloat(s.THDPercent, 'g', 3, 64)+" %")
		case len(s.Output) > 2 && finite(fund):
			dc = append(dc, "THD at the numerical floor")
		}
	}
	if e != nil {
		what := "estimated DC shift "
		if len(dc) > 0 {
			what = "estimate "
		}
		est := what + signed(e.DCShift, "V")
		if e.Balanced(ac.DC) {
			est = what + "balanced out"
		}
		if len(dc) > 0 {
			dc[0] += " (" + est + ")"
		} else {
			dc = append(dc, est)
		}
	}
	if s == nil {
		dc = append(dc, "no waveform solved")
	}
	parts = append(parts, dc...)
	return strings.Join(parts, " · ")
}

// driveText describes a drive: frequency and level, in dBm when the
// estimate knows the generator's impedance, else as the EMF.
func driveText(d ac.Drive, e *ac.Estimate) string {
	t := "Drive " + si.Format(d.FrequencyHz, "Hz", 4)
	if d.SecondToneHz != 0 {
		t += " and " + si.Format(d.SecondToneHz, "Hz", 4)
	}
	if e != nil && e.Drive.EMF == d.EMF {
		if l := e.InputDBm(); finite(l) {
			return t + " at " + strconv.FormatFloat(l, 'f', 1, 64) + " dBm into port " + strconv.Itoa(d.Input+1)
		}
	}
	return t + ", EMF " + si.Format(d.EMF, "V", 3) + " peak at port " + strconv.Itoa(d.Input+1)
}

// outputText names where distortion is observed.
func outputText(o ac.Output) string {
	if o.Port >= 0 {
		return "port " + strconv.Itoa(o.Port+1)
	}
	if o.Node == "" {
		return "node (unnamed)"
	}
	return "node " + o.Node
}

// signed formats v with an explicit sign, as a shift is read.
func signed(v float64, unit string) string {
	s := si.Format(v, unit, 3)
	if v > 0 {
		return "+" + s
	}
	return s
}

// spectrum draws the harmonic bars and the estimate marks.
type spectrum struct {
	orders int
	fundHz float64
	wave   []float64 // dBc of orders 1..; NaN or below the floor: absent
	est    []estimateMark
}

type estimateMark struct {
	order    int
	value    float64 // dBc
	balanced bool
}

var _ plot.Plotter = (*spectrum)(nil)

// newSpectrum reads the bars from the waveform and the marks from the
// estimate; either may be nil.
func newSpectrum(s *steady.State, e *ac.Estimate) *spectrum {
	sp := &spectrum{}
	if s != nil {
		sp.fundHz = s.Drive.FrequencyHz
		fund := math.NaN()
		if len(s.Output) > 1 {
			fund = s.Output[1].Amplitude
		}
		for k := 1; k < len(s.Output); k++ {
			sp.wave = append(sp.wave, ratioDB(s.Output[k].Amplitude, fund))
		}
	}
	if e != nil {
		if sp.fundHz == 0 {
			sp.fundHz = e.Drive.FrequencyHz
		}
		sp.est = []estimateMark{
			{order: 2, value: e.HD2dBc(), balanced: e.Balanced(ac.HD2)},
			{order: 3, value: e.HD3dBc(), balanced: e.Balanced(ac.HD3)},
		}
	}
	sp.orders = max(len(sp.wave), 3*btoi(e != nil))
	if sp.orders == 0 {
		sp.orders = 3
	}
	return sp
}

// Bar geometry, in units of harmonic order.
const (
	barHalf  = 0.22 // half the width of a bar
	estDelta = 0.33 // from a bar's centre to its estimate's diamond
)

var (
	barFill   = Palette[0]
	estColour = Palette[1]
	estInk    = rgb(0x9A5E0E) // the estimate's amber, dark enough for small type
)

// Plot implements plot.Plotter.
func (sp *spectrum) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	small := textStyle(sans, smallSize, inkSoft)
	small.XAlign, small.YAlign = draw.XCenter, draw.YBottom
	unit := trX(2) - trX(1)
	base := c.Min.Y
	room := func(s string) bool { return small.Width(s) < unit*vg.Length(2*barHalf+0.2) }
	absent := func(x vg.Length, row int, what string, sty text.Style) {
		sty.XAlign, sty.YAlign = draw.XCenter, draw.YBottom
		if small.Width(what) < unit*0.9 {
			c.FillText(sty, vg.Point{X: x, Y: base + vg.Points(2) + vg.Length(row)*sty.Height("M")}, what)
		}
	}
	for i, v := range sp.wave {
		k := float64(i + 1)
		x := trX(k)
		if !(v >= waveformFloorDBc) {
			absent(x, 0, "floor", small)
			continue
		}
		top := min(trY(v), c.Max.Y)
		x0, x1 := trX(k-barHalf), trX(k+barHalf)
		if top > base {
			c.FillPolygon(barFill, []vg.Point{{X: x0, Y: base}, {X: x1, Y: base}, {X: x1, Y: top}, {X: x0, Y: top}})
		}
		label := strconv.FormatFloat(v, 'f', 1, 64)
		if i == 0 {
			label = "0"
		}
		if room(label) && top+vg.Points(2)+small.Height(label) < c.Max.Y {
			c.FillText(small, vg.Point{X: x, Y: top + vg.Points(2)}, label)
		}
	}
	estLabel := textStyle(sans, smallSize, estInk)
	for _, m := range sp.est {
		k := float64(m.order)
		x := trX(k)
		if m.balanced || !(m.value >= waveformFloorDBc) {
			what := "balanced"
			if !m.balanced {
				what = "floor"
			}
			absent(x+unit*estDelta, 1, what, estLabel)
			continue
		}
		y := trY(m.value)
		if y < c.Min.Y || y > c.Max.Y {
			continue
		}
		line := draw.LineStyle{Color: estColour, Width: vg.Points(2)}
		c.StrokeLine2(line, trX(k-barHalf-0.04), y, x+unit*estDelta, y)
		drawDiamond(&c, vg.Point{X: x + unit*estDelta, Y: y}, estColour)
		label := strconv.FormatFloat(m.value, 'f', 1, 64)
		estLabel.XAlign, estLabel.YAlign = draw.XLeft, draw.YCenter
		lx := x + unit*estDelta + markerRadius + vg.Points(3)
		if lx+estLabel.Width(label) < trX(k+1-barHalf)-vg.Points(2) {
			c.FillText(estLabel, vg.Point{X: lx, Y: y}, label)
		}
	}
}

// drawDiamond draws the estimate's mark: a filled diamond with a white
// halo, so that it stands off the bar behind it.
func drawDiamond(c *draw.Canvas, at vg.Point, clr color.Color) {
	r := markerRadius * 1.35
	var p vg.Path
	p.Move(vg.Point{X: at.X, Y: at.Y + r})
	p.Line(vg.Point{X: at.X + r, Y: at.Y})
	p.Line(vg.Point{X: at.X, Y: at.Y - r})
	p.Line(vg.Point{X: at.X - r, Y: at.Y})
	p.Close()
	c.SetColor(clr)
	c.Fill(p)
	c.SetLineStyle(draw.LineStyle{Color: background, Width: vg.Points(1)})
	c.Stroke(p)
}

// barSwatch is the key's sample of a waveform bar.
type barSwatch struct{}

func (barSwatch) Thumbnail(c *draw.Canvas) {
	w := (c.Max.X - c.Min.X) / 4
	mid := c.Center().X
	c.FillPolygon(barFill, []vg.Point{
		{X: mid - w, Y: c.Min.Y}, {X: mid + w, Y: c.Min.Y}, {X: mid + w, Y: c.Max.Y}, {X: mid - w, Y: c.Max.Y},
	})
}

// estimateSwatch is the key's sample of an estimate mark.
type estimateSwatch struct{}

func (estimateSwatch) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	c.StrokeLine2(draw.LineStyle{Color: estColour, Width: vg.Points(2)}, c.Min.X, y, c.Max.X, y)
	drawDiamond(c, c.Center(), estColour)
}

// harmonicTicks labels each order with its frequency beneath.
type harmonicTicks struct {
	orders int
	fundHz float64
}

func (h harmonicTicks) Ticks(min, max float64) []plot.Tick {
	var ts []plot.Tick
	for k := 1; k <= h.orders; k++ {
		if float64(k) < min || float64(k) > max {
			continue
		}
		label := strconv.Itoa(k)
		if h.fundHz > 0 && finite(h.fundHz) {
			label += "\n" + si.Format(float64(k)*h.fundHz, "Hz", 3)
		}
		ts = append(ts, plot.Tick{Value: float64(k), Label: label})
	}
	return ts
}

// noTicks marks nothing: a panel axis that wants no grid lines.
type noTicks struct{}

func (noTicks) Ticks(_, _ float64) []plot.Tick { return nil }

// Products of a level sweep, in the order their traces take colours.
var levelProducts = []struct {
	order int // harmonic order; 0 for the DC shift
	name  string
	slope float64 // dB per dB of input level, in the weakly nonlinear range
}{
	{1, "fundamental", 1},
	{2, "2nd harmonic", 2},
	{3, "3rd harmonic", 3},
	{0, "DC shift", 2},
}

// LevelSweep shows the output's fundamental, second and third harmonics
// and DC shift against the available input power, from the steady-state
// waveform at each level (solid lines with dots), and the Volterra
// estimate e extended as the straight lines of the weakly nonlinear range
// (dashed): slope 1 dB/dB for the fundamental, 2 for the second harmonic
// and the DC shift, 3 for the third. The fundamental's line is the
// small-signal gain, so the waveform's fall below it is the compression;
// compressionDBm, when compressed is true, marks the 1 dB compression
// point. Output levels are the power into the output port's reference
// impedance in dBm (the DC shift as the power a resistor of that value
// would take), or 20 log10 of the peak volts (dBV) for a bare node or
// without an estimate to say which it is. Harmonics and DC shifts below
// -150 dBc, the solver's numerical floor, are left out; the y axis spans
// at most 100 dB below the top, or down to the fundamental's lowest point,
// and a product lying wholly below it is left out of the key.
func LevelSweep(points []steady.LevelPoint, e *ac.Estimate, compressionDBm float64, compressed bool) *Figure {
	p := NewPanel("Available input power (dBm)", "")
	fig := &Figure{
		Name:   "level-sweep",
		Title:  "Output against input level",
		Panels: []*plot.Plot{p},
		Width:  vg.Points(480),
		Height: vg.Points(400),
	}
	// offset turns 20 log10 |V| into the power in dBm: P_e - 20 log10 |F_e|.
	offset, dBm := 0.0, false
	if e != nil {
		if pe, ok := e.OutputDBm(); ok {
			if f := cmplx.Abs(e.Linear); f > 0 && finite(pe) {
				offset, dBm = pe-20*math.Log10(f), true
			}
		}
	}
	level := func(order int, v float64) float64 {
		l := ratioDB(v, 1) + offset
		if order == 0 && dBm {
			l += 10 * math.Log10(2) // V²/R, not V²/(2R)
		}
		return l
	}
	if dBm {
		p.Y.Label.Text = "Output power (dBm)"
	} else {
		p.Y.Label.Text = "Output level (dBV, peak)"
	}

	var xs []float64
	ys := make([][]float64, len(levelProducts))
	for _, lp := range points {
		if lp.Steady == nil {
			continue
		}
		out := lp.Steady.Output
		fund := math.NaN()
		if len(out) > 1 {
			fund = out[1].Amplitude
		}
		xs = append(xs, lp.LevelDBm)
		for k, pr := range levelProducts {
			v := math.NaN()
			if pr.order < len(out) {
				v = out[pr.order].Amplitude
			}
			if pr.order != 1 && !(ratioDB(v, fund) >= waveformFloorDBc) {
				v = math.NaN()
			}
			ys[k] = append(ys[k], level(pr.order, v))
		}
	}
	curves := make([]curve, len(levelProducts))
	for k := range levelProducts {
		curves[k] = newCurve(xs, ys[k], false, false)
	}

	// The x span: the sweep's, or 20 dB round the estimate's level.
	x0, x1 := math.Inf(1), math.Inf(-1)
	for _, x := range xs {
		if finite(x) {
			x0, x1 = math.Min(x0, x), math.Max(x1, x)
		}
	}
	inDBm := math.NaN()
	if e != nil {
		inDBm = e.InputDBm()
	}
	if math.IsInf(x0, 1) && finite(inDBm) {
		x0, x1 = inDBm-20, inDBm+20
	}
	x0, x1 = linearRange(x0, x1, 10, -40, 0, linearStep)

	// Asymptotes through the estimate.
	var lines []curve
	var lineOf []int
	if e != nil && finite(inDBm) {
		est := []complex128{e.Linear, e.HD2, e.HD3, complex(e.DCShift, 0)}
		prods := []ac.Product{"", ac.HD2, ac.HD3, ac.DC}
		for k, pr := range levelProducts {
			if prods[k] != "" && e.Balanced(prods[k]) {
				continue
			}
			at := level(pr.order, cmplx.Abs(est[k]))
			if !finite(at) {
				continue
			}
			ys := []float64{at + pr.slope*(x0-inDBm), at + pr.slope*(x1-inDBm)}
			lines = append(lines, newCurve([]float64{x0, x1}, ys, false, false))
			lineOf = append(lineOf, k)
		}
	}

	// The compression point sits on the waveform's fundamental.
	var mark *levelMark
	if compressed && finite(compressionDBm) {
		if y := interpolate(curves[0], compressionDBm); finite(y) {
			mark = &levelMark{x: compressionDBm, y: y, label: "1 dB compression\n" + strconv.FormatFloat(compressionDBm, 'f', 1, 64) + " dBm"}
		}
	}

	// The y span: the waveform's values, and the estimate's lines only
	// up to 20 dB above them. Products far below the top are let run off
	// the bottom, 100 dB down, so that a third harmonic falling steeply
	// at low levels does not squash the rest; the fundamental is always
	// shown whole.
	y0, y1 := spanY(curves)
	if mark != nil {
		y1 = math.Max(y1, mark.y)
	}
	ly0, ly1 := spanY(lines)
	if math.IsInf(y1, -1) {
		y0, y1 = ly0, ly1
	} else if finite(ly1) {
		y1 = math.Max(y1, math.Min(ly1, y1+20))
	}
	f0, _ := spanY(curves[:1])
	y0 = math.Min(math.Max(y0, y1-100), f0)
	ymin, ymax := linearRange(y0, y1, 10, -100, 0, linearStep)
	visible := func(c curve) bool {
		for _, r := range c.runs {
			for _, pt := range r {
				if pt.Y >= ymin && pt.Y <= ymax {
					return true
				}
			}
		}
		return false
	}

	p.Add(framePlotter{})
	for i, l := range lines {
		ls := draw.LineStyle{Color: Palette[lineOf[i]], Width: vg.Points(1), Dashes: []vg.Length{vg.Points(5), vg.Points(3)}}
		l.add(p, ls)
	}
	for k, pr := range levelProducts {
		ls := draw.LineStyle{Color: Palette[k], Width: traceWidth}
		if !visible(curves[k]) {
			continue
		}
		thumb := curves[k].add(p, ls)
		dots := &plotter.Scatter{GlyphStyle: draw.GlyphStyle{Color: Palette[k], Radius: markerRadius * 0.75, Shape: draw.CircleGlyph{}}}
		for _, r := range curves[k].runs {
			dots.XYs = append(dots.XYs, r...)
		}
		p.Add(dots)
		fig.Key = append(fig.Key, KeyEntry{Label: pr.name, Thumbs: []plot.Thumbnailer{thumb, dotThumb{Palette[k]}}})
	}
	if len(lines) > 0 {
		fig.Key = append(fig.Key, KeyEntry{Label: "Volterra estimate, extended", Thumbs: []plot.Thumbnailer{
			&plotter.Line{LineStyle: draw.LineStyle{Color: inkSoft, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(5), vg.Points(3)}}},
		}})
	}
	if mark != nil {
		p.Add(mark)
	}
	// The axes are set last: adding the curves widened them to the raw
	// data.
	p.Y.Min, p.Y.Max = ymin, ymax
	p.Y.Tick.Marker = LinearTicks{}
	p.X.Min, p.X.Max = x0, x1
	p.X.Tick.Marker = LinearTicks{}

	fig.Note = levelNote(points, e, dBm, offset, compressionDBm, compressed, mark != nil)
	return fig
}

// levelNote states what the curves are and where the compression is.
func levelNote(points []steady.LevelPoint, e *ac.Estimate, dBm bool, offset, compDBm float64, compressed, marked bool) string {
	var parts []string
	var d *ac.Drive
	n := 0
	for _, lp := range points {
		if lp.Steady != nil {
			n++
			if d == nil {
				d = &lp.Steady.Drive
			}
		}
	}
	if d == nil && e != nil {
		d = &e.Drive
	}
	if d != nil {
		out := "output " + outputText(d.Output)
		if dBm {
			z0 := 1e3 / (2 * math.Pow(10, offset/10))
			out += " into " + si.Format(z0, "Ω", 3)
		}
		parts = append(parts, si.Format(d.FrequencyHz, "Hz", 4)+" into port "+strconv.Itoa(d.Input+1)+", "+out)
	}
	switch n {
	case 0:
		parts = append(parts, "no waveform solved")
	case 1:
		parts = append(parts, "waveform at 1 level")
	default:
		parts = append(parts, fmt.Sprintf("waveform at %d levels", n))
	}
	if e != nil {
		if l := e.InputDBm(); finite(l) {
			parts = append(parts, "estimate at "+strconv.FormatFloat(l, 'f', 1, 64)+" dBm")
		}
	}
	switch {
	case compressed && marked:
		parts = append(parts, "1 dB compression at "+strconv.FormatFloat(compDBm, 'f', 1, 64)+" dBm input")
	case compressed:
		parts = append(parts, "1 dB compression at "+strconv.FormatFloat(compDBm, 'f', 1, 64)+" dBm input, off the waveform's curve")
	case n > 0:
		parts = append(parts, "no 1 dB compression within the sweep")
	}
	return strings.Join(parts, " · ")
}

// interpolate returns the curve's value at x, linearly between its points,
// NaN outside its runs.
func interpolate(c curve, x float64) float64 {
	for _, r := range c.runs {
		for i := range r {
			if r[i].X == x {
				return r[i].Y
			}
			if i > 0 && (r[i-1].X-x)*(r[i].X-x) < 0 {
				f := (x - r[i-1].X) / (r[i].X - r[i-1].X)
				return r[i-1].Y + f*(r[i].Y-r[i-1].Y)
			}
		}
	}
	return math.NaN()
}

// dotThumb adds the waveform's dot to a line's key sample.
type dotThumb struct{ clr color.Color }

func (d dotThumb) Thumbnail(c *draw.Canvas) {
	c.DrawGlyph(draw.GlyphStyle{Color: d.clr, Radius: markerRadius * 0.75, Shape: draw.CircleGlyph{}}, c.Center())
}

// levelMark is a ring on a curve with a label above and to its left, where
// a rising curve leaves room.
type levelMark struct {
	x, y  float64
	label string
}

func (m *levelMark) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	at := vg.Point{X: trX(m.x), Y: trY(m.y)}
	if !c.Contains(at) {
		return
	}
	ring := circlePath(at, markerRadius*1.6)
	c.SetLineStyle(draw.LineStyle{Color: ink, Width: vg.Points(1.2)})
	c.Stroke(ring)
	sty := textStyle(sans, smallSize, ink)
	sty.XAlign, sty.YAlign = draw.XRight, draw.YBottom
	pos := vg.Point{X: at.X - vg.Points(6), Y: at.Y + vg.Points(6)}
	if pos.X-sty.Width(m.label) < c.Min.X {
		sty.XAlign = draw.XLeft
		pos.X = at.X + vg.Points(6)
	}
	if pos.Y+sty.Height(m.label) > c.Max.Y {
		sty.YAlign = draw.YTop
		pos.Y = at.Y - vg.Points(6)
	}
	c.FillText(sty, pos, m.label)
}

// DistortionVsFrequency shows the Volterra estimates of HD2 and HD3 and,
// when the estimates are of two tones, IM3 (2 f1 - f2), all in dBc, against
// the drive frequency on a logarithmic axis. est[i] is the estimate at
// freqs[i]; a nil estimate, or a product the circuit's symmetry cancels
// (ac.Estimate.Balanced), leaves a gap, and the note says so.
func DistortionVsFrequency(freqs []float64, est []*ac.Estimate) *Figure {
	p := NewPanel("Frequency", "Relative to the fundamental (dBc)")
	fig := &Figure{
		Name:   "distortion-frequency",
		Title:  "Distortion against frequency",
		Panels: []*plot.Plot{p},
		Width:  vg.Points(480),
		Height: vg.Points(340),
	}
	type product struct {
		name string
		prod ac.Product
		of   func(*ac.Estimate) float64
	}
	prods := []product{
		{"HD2", ac.HD2, (*ac.Estimate).HD2dBc},
		{"HD3", ac.HD3, (*ac.Estimate).HD3dBc},
	}
	var first *ac.Estimate
	twoTone := false
	for _, e := range est {
		if e != nil {
			if first == nil {
				first = e
			}
			twoTone = twoTone || e.Drive.SecondToneHz != 0
		}
	}
	if twoTone {
		prods = append(prods, product{"IM3 (2f₁ − f₂)", ac.IM3, (*ac.Estimate).IM3dBc})
	}
	var curves []curve
	var notes []string
	allBalanced := make([]bool, len(prods))
	for k, pr := range prods {
		ys := make([]float64, len(freqs))
		balanced := 0
		for i := range ys {
			ys[i] = math.NaN()
			if i >= len(est) || est[i] == nil {
				continue
			}
			if est[i].Balanced(pr.prod) {
				balanced++
				continue
			}
			if v := pr.of(est[i]); v > -400 { // -Inf from an exact zero
				ys[i] = v
			}
		}
		curves = append(curves, newCurve(freqs, ys, true, false))
		switch {
		case balanced > 0 && balanced == countNonNil(est, len(freqs)):
			allBalanced[k] = true
			notes = append(notes, pr.name+" balanced out")
		case balanced > 0:
			notes = append(notes, fmt.Sprintf("%s balanced out at %d frequencies", pr.name, balanced))
		}
	}
	p.Add(framePlotter{X: LogTicks{Unit: "Hz"}})
	for k, pr := range prods {
		thumb := curves[k].add(p, traceLine(k))
		label := pr.name
		if curves[k].empty() && allBalanced[k] {
			label += " (balanced out)"
		}
		fig.Key = append(fig.Key, KeyEntry{Label: label, Thumbs: []plot.Thumbnailer{thumb}})
	}

	var parts []string
	if first != nil {
		lvl := "Volterra estimate"
		if l := first.InputDBm(); finite(l) {
			lvl += " at " + strconv.FormatFloat(l, 'f', 1, 64) + " dBm"
			if twoTone {
				lvl += " per tone"
			}
		}
		parts = append(parts, lvl+", port "+strconv.Itoa(first.Drive.Input+1)+" to "+outputText(first.Drive.Output))
		if twoTone {
			parts = append(parts, toneSpacing(freqs, est))
		}
	} else {
		parts = append(parts, "No estimates.")
	}
	parts = append(parts, notes...)
	fig.Note = strings.Join(parts, " · ")

	fx0, fx1 := sweepSpan(freqs)
	setFrequencyAxis(p, fx0, fx1, true)
	y0, y1 := spanY(curves)
	y0 = math.Max(y0, y1-120)
	p.Y.Min, p.Y.Max = linearRange(y0, y1, 10, -100, 0, linearStep)
	p.Y.Tick.Marker = LinearTicks{}
	return fig
}

func countNonNil(est []*ac.Estimate, n int) int {
	c := 0
	for i, e := range est {
		if i < n && e != nil {
			c++
		}
	}
	return c
}

// toneSpacing describes where the second tone sits.
func toneSpacing(freqs []float64, est []*ac.Estimate) string {
	spacing, same := math.NaN(), true
	for _, e := range est {
		if e == nil || e.Drive.SecondToneHz == 0 {
			continue
		}
		d := e.Drive.SecondToneHz - e.Drive.FrequencyHz
		if math.IsNaN(spacing) {
			spacing = d
		} else if math.Abs(d-spacing) > 1e-6*math.Abs(spacing) {
			same = false
		}
	}
	switch {
	case math.IsNaN(spacing):
		return "second tone absent"
	case !same:
		return "second tone at varying offsets"
	case spacing > 0:
		return "second tone " + si.Format(spacing, "Hz", 3) + " above"
	}
	return "second tone " + si.Format(-spacing, "Hz", 3) + " below"
}
