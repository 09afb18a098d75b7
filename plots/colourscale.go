package plots

import (
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ColourScale is the key of a colour map: a bar of the Ramp from Min to
// Max with labelled ticks, drawn beneath the figure's title where other
// figures have their key of traces.
type ColourScale struct {
	// Label says what the colours stand for, e.g. "HD2 (dBc)".
	Label string
	// Min and Max are the values at the pale and the dark end.
	Min, Max float64
	// Log maps log10 of the value, for positive quantities that span
	// decades.
	Log bool
	// Ticks marks the bar; nil means LinearTicks (LogTicks when Log)
	// without a unit.
	Ticks plot.Ticker
	// Missing, when not empty, labels a hatched swatch after the bar: how
	// the map shows cells that have no value.
	Missing string
}

// position is where v lies along the scale, from 0 at Min to 1 at Max,
// clamped; NaN when v has no place on it.
func (s *ColourScale) position(v float64) float64 {
	lo, hi := s.Min, s.Max
	if s.Log {
		if !(v > 0) || !(lo > 0) {
			return math.NaN()
		}
		v, lo, hi = math.Log10(v), math.Log10(lo), math.Log10(hi)
	}
	if !finite(v) || !finite(lo) || !finite(hi) {
		return math.NaN()
	}
	if !(hi > lo) {
		return 0.5
	}
	return math.Min(1, math.Max(0, (v-lo)/(hi-lo)))
}

// Colour returns the colour of value v; a value that cannot be placed gets
// the grey of missing cells.
func (s *ColourScale) Colour(v float64) color.Color { return Ramp(s.position(v)) }

func (s *ColourScale) ticker() plot.Ticker {
	switch {
	case s.Ticks != nil:
		return s.Ticks
	case s.Log:
		return LogTicks{}
	}
	return LinearTicks{}
}

// Scale sizes.
var (
	scaleBarHeight = vg.Points(10)
	scaleMaxWidth  = vg.Points(300)
	scaleTickLen   = vg.Points(3)
	scaleSteps     = 128 // slices of the drawn bar
)

// draw lays the scale out in one row from the top edge y down and returns
// the bottom of the row.
func (s *ColourScale) draw(c draw.Canvas, y vg.Length) vg.Length {
	label := textStyle(sans, keySize, ink)
	label.XAlign, label.YAlign = draw.XLeft, draw.YCenter
	tick := textStyle(sans, tickSize, inkSoft)
	tick.XAlign, tick.YAlign = draw.XCenter, draw.YTop

	barTop := y
	barBottom := barTop - scaleBarHeight
	mid := barTop - scaleBarHeight/2
	x := c.Min.X
	if s.Label != "" {
		c.FillText(label, vg.Point{X: x, Y: mid}, s.Label)
		x += label.Width(s.Label)
	}
	ticks := s.ticker().Ticks(s.Min, s.Max)
	// Room for half of the end labels either side of the bar.
	half := vg.Length(0)
	for _, t := range ticks {
		if !t.IsMinor() {
			half = max(half, tick.Width(t.Label)/2)
		}
	}
	x += max(keyOuter, half+vg.Points(4))
	missingW := vg.Length(0)
	if s.Missing != "" {
		missingW = keyOuter + keySwatch + keyInner + label.Width(s.Missing)
	}
	width := min(scaleMaxWidth, c.Max.X-x-half-missingW)
	if width < vg.Points(40) {
		width = vg.Points(40) // crowded: let the row run over rather than vanish
	}
	x0, x1 := x, x+width

	for k := range scaleSteps {
		a := x0 + width*vg.Length(k)/vg.Length(scaleSteps)
		b := x0 + width*vg.Length(k+1)/vg.Length(scaleSteps)
		if k+1 < scaleSteps {
			b += vg.Points(1) // overlap the next slice: no hairline seams
		}
		c.FillPolygon(Ramp((float64(k)+0.5)/float64(scaleSteps)), []vg.Point{
			{X: a, Y: barBottom}, {X: b, Y: barBottom}, {X: b, Y: barTop}, {X: a, Y: barTop},
		})
	}
	frame := draw.LineStyle{Color: ink, Width: frameWidth}
	c.StrokeLines(frame, []vg.Point{
		{X: x0, Y: barBottom}, {X: x1, Y: barBottom}, {X: x1, Y: barTop}, {X: x0, Y: barTop}, {X: x0, Y: barBottom},
	})
	bottom := barBottom
	for _, t := range ticks {
		if t.IsMinor() {
			continue
		}
		p := s.position(t.Value)
		if math.IsNaN(p) {
			continue
		}
		tx := x0 + width*vg.Length(p)
		c.StrokeLine2(frame, tx, barBottom, tx, barBottom-scaleTickLen)
		ly := barBottom - scaleTickLen - vg.Points(1)
		c.FillText(tick, vg.Point{X: tx, Y: ly}, t.Label)
		bottom = min(bottom, ly-tick.Height(t.Label))
	}
	if s.Missing != "" {
		sx := x1 + half + keyOuter
		sw := draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{
			Min: vg.Point{X: sx, Y: barBottom}, Max: vg.Point{X: sx + keySwatch, Y: barTop},
		}}
		hatch(sw, sw.Rectangle)
		c.StrokeLines(frame, []vg.Point{
			{X: sx, Y: barBottom}, {X: sx + keySwatch, Y: barBottom}, {X: sx + keySwatch, Y: barTop}, {X: sx, Y: barTop}, {X: sx, Y: barBottom},
		})
		c.FillText(label, vg.Point{X: sx + keySwatch + keyInner, Y: mid}, s.Missing)
	}
	return bottom
}

// hatch fills r with the missing-value grey and diagonal lines, clipped to
// r.
func hatch(c draw.Canvas, r vg.Rectangle) {
	c.FillPolygon(missingFill, []vg.Point{
		r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y},
	})
	clip := draw.Canvas{Canvas: c.Canvas, Rectangle: r}
	ls := draw.LineStyle{Color: missingHatch, Width: minorWidth}
	const pitch = 4 // points between hatch lines
	h := r.Max.Y - r.Min.Y
	for x := r.Min.X - h; x < r.Max.X; x += vg.Points(pitch) {
		line := []vg.Point{{X: x, Y: r.Min.Y}, {X: x + h, Y: r.Max.Y}}
		clip.StrokeLines(ls, clip.ClipLinesXY(line)...)
	}
}
