package plots

import (
	"image/color"
	"math"
	"math/cmplx"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"qpoint/ac"
	"qpoint/bias/si"
)

// Smith is a Smith chart of each port's reflection coefficient S_ii across
// the sweep, each normalised to that port's own reference impedance. The
// grid has circles of constant normalised resistance and arcs of constant
// normalised reactance; the trace of each port carries markers at the
// first frequency (dot), the last (square) and at decades between (rings),
// labelled with their frequencies. A design frequency designHz inside the
// sweep (the signal's, where the match matters; zero for none) is marked
// on port 1's trace, the input's, with a diamond and named in the key.
func Smith(r *ac.Response, designHz float64) *Figure {
	chart := &SmithChart{}
	var key []KeyEntry
	for i := range r.Ports {
		t := SmithTrace{
			Name:        SParameter(i+1, i+1).Name + ", " + portName(r, i),
			Gamma:       values(r, SParameter(i+1, i+1)),
			FrequencyHz: frequencies(r),
			Line:        traceLine(i),
		}
		if i == 0 {
			t.DesignHz = designHz
		}
		if i < len(Palette) {
			// Colour alone tells these ports apart, and dashes would
			// break up the markers; past the palette's end the dash is
			// all that differs.
			t.Line.Dashes = nil
		}
		chart.Traces = append(chart.Traces, t)
		key = append(key, KeyEntry{Label: t.Name, Thumbs: []plot.Thumbnailer{t}})
	}
	if len(chart.Traces) > 0 && chart.Traces[0].inSweep(designHz) {
		key = append(key, KeyEntry{Label: "design frequency, " + si.Format(designHz, "Hz", 4), Thumbs: []plot.Thumbnailer{designThumb{}}})
	}
	p := NewPanel("", "")
	p.HideAxes()
	p.X.Padding, p.Y.Padding = 0, 0
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = -1, 1, -1, 1
	p.Add(chart)
	return &Figure{
		Name:   "smith",
		Title:  "Reflection coefficient",
		Note:   portsNote(r),
		Key:    key,
		Panels: []*plot.Plot{p},
		Width:  vg.Points(440),
		Height: vg.Points(475),
	}
}

// SmithTrace is one reflection coefficient across a sweep, as a Smith
// chart draws it.
type SmithTrace struct {
	Name        string
	Gamma       []complex128 // normalised to the port's reference impedance
	FrequencyHz []float64    // Gamma[i] is at FrequencyHz[i]
	Line        draw.LineStyle
	DesignHz    float64 // marked with a diamond when inside the sweep; zero for none
}

// inSweep reports whether hz lies within the trace's frequencies.
func (t SmithTrace) inSweep(hz float64) bool {
	if !(hz > 0) || len(t.FrequencyHz) == 0 {
		return false
	}
	lo, hi := t.FrequencyHz[0], t.FrequencyHz[len(t.FrequencyHz)-1]
	return hz >= math.Min(lo, hi) && hz <= math.Max(lo, hi)
}

// designThumb is the design-frequency marker, for a key.
type designThumb struct{}

func (designThumb) Thumbnail(c *draw.Canvas) { drawMarker(c, markerDesign, ink, c.Center()) }

// Thumbnail draws the trace's line with a marker, for a key.
func (t SmithTrace) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	c.StrokeLine2(t.Line, c.Min.X, y, c.Max.X, y)
	drawMarker(c, markerFirst, t.Line.Color, vg.Point{X: c.Center().X, Y: y})
}

// SmithChart draws the chart and its traces into a square centred in the
// data area, whatever the area's shape, so that circles stay circles.
type SmithChart struct {
	// Resistances are the normalised resistances r = R/Z0 of the grid
	// circles besides r = 0, the chart's rim. Nil means 0.2, 0.5, 1, 2, 5.
	Resistances []float64
	// Reactances are the magnitudes of the normalised reactances
	// x = X/Z0 of the grid arcs, each drawn for +x and -x. Nil means 0.2,
	// 0.5, 1, 2, 5.
	Reactances []float64
	Traces     []SmithTrace
}

var _ plot.Plotter = (*SmithChart)(nil)

var defaultGridValues = []float64{0.2, 0.5, 1, 2, 5}

// chartFill tints the inside of the rim, so the chart reads as a disc.
var chartFill = rgb(0xF7F9FB)

// smithFrame maps the reflection-coefficient plane to the canvas: Γ = 0 at
// centre, |Γ| = 1 at radius.
type smithFrame struct {
	centre vg.Point
	radius vg.Length
}

func (f smithFrame) at(g complex128) vg.Point {
	return vg.Point{X: f.centre.X + f.radius*vg.Length(real(g)), Y: f.centre.Y + f.radius*vg.Length(imag(g))}
}

// Plot implements plot.Plotter.
func (s *SmithChart) Plot(c draw.Canvas, _ *plot.Plot) {
	small := textStyle(sans, smallSize, inkSoft)
	// Room outside the rim for the reactance labels.
	margin := small.Width("-j0.5") + vg.Points(6)
	side := math.Min(float64(c.Max.X-c.Min.X), float64(c.Max.Y-c.Min.Y)) - 2*float64(margin)
	if side <= 0 {
		return
	}
	f := smithFrame{centre: c.Center(), radius: vg.Length(side / 2)}
	rs, xs := s.Resistances, s.Reactances
	if rs == nil {
		rs = defaultGridValues
	}
	if xs == nil {
		xs = defaultGridValues
	}

	rim := circlePoints(0, 1, 0, 2*math.Pi)
	c.FillPolygon(chartFill, f.path(rim))
	grid := draw.LineStyle{Color: gridMajor, Width: majorWidth}
	for _, r := range rs {
		if !(r > 0) || math.IsInf(r, 0) {
			continue
		}
		centre, radius := resistanceCircle(r)
		c.StrokeLines(grid, f.path(circlePoints(centre, radius, 0, 2*math.Pi)))
	}
	for _, x := range xs {
		for _, sx := range []float64{x, -x} {
			if sx == 0 || !finite(sx) {
				continue
			}
			centre, radius, start, sweep := reactanceArc(sx)
			c.StrokeLines(grid, f.path(circlePoints(centre, radius, start, sweep)))
		}
	}
	c.StrokeLine2(draw.LineStyle{Color: zeroLine, Width: majorWidth}, f.at(-1).X, f.centre.Y, f.at(1).X, f.centre.Y)
	c.StrokeLines(draw.LineStyle{Color: ink, Width: frameWidth}, f.path(rim))

	// Resistance labels sit just above the real axis where each circle
	// meets it on the left; reactance labels sit outside the rim where
	// each arc ends.
	lab := small
	lab.XAlign, lab.YAlign = draw.XLeft, draw.YBottom
	for _, r := range rs {
		if !(r > 0) || math.IsInf(r, 0) {
			continue
		}
		pt := f.at(complex((r-1)/(r+1), 0))
		c.FillText(lab, vg.Point{X: pt.X + vg.Points(1.5), Y: pt.Y + vg.Points(1)}, formatGridValue(r))
	}
	for _, x := range xs {
		for _, sx := range []float64{x, -x} {
			if sx == 0 || !finite(sx) {
				continue
			}
			g := gammaOf(complex(0, sx))
			phi := cmplx.Phase(g)
			sty := small
			sty.XAlign = text.XAlignment(-0.5 + 0.5*math.Cos(phi))
			sty.YAlign = text.YAlignment(-0.5 + 0.5*math.Sin(phi))
			pt := f.at(g * complex(1+float64(vg.Points(3)/f.radius), 0))
			label := "j" + formatGridValue(sx)
			if sx < 0 {
				label = "-j" + formatGridValue(-sx)
			}
			c.FillText(sty, pt, label)
		}
	}

	// Traces, then all markers, then their labels, so that no line is
	// drawn over a label.
	var marks, decades []marker
	for _, t := range s.Traces {
		var run []vg.Point
		flush := func() {
			if len(run) > 1 {
				c.StrokeLines(t.Line, c.ClipLinesXY(run)...)
			}
			run = nil
		}
		for _, g := range t.Gamma {
			if cmplx.IsNaN(g) || cmplx.IsInf(g) {
				flush()
				continue
			}
			run = append(run, f.at(g))
		}
		flush()
		for _, m := range t.markers(f) {
			if m.kind == markerDecade {
				decades = append(decades, m)
			} else {
				marks = append(marks, m)
			}
		}
	}
	// A decade marker that would sit on another marker, of this trace or
	// another, is left out: half hidden, its label would seem to name the
	// marker on top.
	for _, m := range decades {
		if !crowded(m.at, marks) {
			marks = append(marks, m)
		}
	}
	// Rings first, so that where a decade falls on an end of the sweep
	// the end's own marker stays on top.
	var taken []vg.Rectangle
	for _, kind := range []markerKind{markerDecade, markerLast, markerFirst, markerDesign} {
		for _, m := range marks {
			if m.kind == kind && c.Contains(m.at) {
				drawMarker(&c, m.kind, m.color, m.at)
				taken = append(taken, square(m.at, markerRadius+vg.Points(1)))
			}
		}
	}
	// Labels are in ink, not the trace colour: the marker beside each
	// says which trace it belongs to, and pale colours make poor text.
	label := textStyle(sans, smallSize, ink)
	for pass := 0; pass < 2; pass++ {
		for _, m := range marks {
			// First and last frequencies claim their places before the
			// decades between them.
			if (m.kind == markerDecade) != (pass == 1) || !c.Contains(m.at) {
				continue
			}
			taken = placeLabel(&c, label, m, f, taken)
		}
	}
}

// path maps points of the Γ plane to the canvas.
func (f smithFrame) path(gs []complex128) []vg.Point {
	ps := make([]vg.Point, len(gs))
	for i, g := range gs {
		ps[i] = f.at(g)
	}
	return ps
}

// gammaOf is the reflection coefficient Γ = (z - 1)/(z + 1) of a
// normalised impedance z = Z/Z0.
func gammaOf(z complex128) complex128 { return (z - 1) / (z + 1) }

// resistanceCircle is the circle of constant normalised resistance r in
// the Γ plane: centre r/(1+r) on the real axis, radius 1/(1+r). (Pozar,
// "Microwave Engineering", 4th ed., 2012, sec. 2.4.)
func resistanceCircle(r float64) (centre complex128, radius float64) {
	return complex(r/(1+r), 0), 1 / (1 + r)
}

// reactanceArc is the arc of constant normalised reactance x inside the
// unit circle: part of the circle with centre 1 + j/x and radius 1/|x|
// (Pozar, sec. 2.4), from Γ = 1 (r = ∞) round to the rim at Γ(jx) (r = 0).
// start is the angle of Γ = 1 seen from the centre and sweep the signed
// angle to the rim, negative (clockwise) for x > 0.
func reactanceArc(x float64) (centre complex128, radius, start, sweep float64) {
	centre = complex(1, 1/x)
	radius = 1 / math.Abs(x)
	start = cmplx.Phase(1 - centre)
	end := cmplx.Phase(gammaOf(complex(0, x)) - centre)
	if x > 0 {
		sweep = -math.Mod(start-end+4*math.Pi, 2*math.Pi)
	} else {
		sweep = math.Mod(end-start+4*math.Pi, 2*math.Pi)
	}
	return centre, radius, start, sweep
}

// circlePoints samples the arc of the circle (centre, radius) from angle
// start through sweep, finely enough (a point per degree) to look smooth
// at any figure size.
func circlePoints(centre complex128, radius, start, sweep float64) []complex128 {
	n := int(math.Ceil(math.Abs(sweep)*180/math.Pi)) + 1
	if n < 2 {
		n = 2
	}
	pts := make([]complex128, n)
	for i := range pts {
		a := start + sweep*float64(i)/float64(n-1)
		pts[i] = centre + complex(radius*math.Cos(a), radius*math.Sin(a))
	}
	return pts
}

// formatGridValue writes a normalised grid value as a plain number
// ("0.2", "5"): these are ratios to Z0, where an SI prefix would mislead.
func formatGridValue(v float64) string { return strconv.FormatFloat(v, 'g', 3, 64) }

// Marker shapes on a Smith trace.
type markerKind int

const (
	markerFirst  markerKind = iota // filled dot at the first frequency
	markerLast                     // filled square at the last
	markerDecade                   // ring at each decade between
	markerDesign                   // diamond at the design frequency
)

type marker struct {
	kind  markerKind
	at    vg.Point
	gamma complex128
	label string
	color color.Color
}

// markers returns the trace's first, last and decade markers.
func (t SmithTrace) markers(f smithFrame) []marker {
	first, last := -1, -1
	for i, g := range t.Gamma {
		if i < len(t.FrequencyHz) && !cmplx.IsNaN(g) && !cmplx.IsInf(g) && t.FrequencyHz[i] > 0 && finite(t.FrequencyHz[i]) {
			if first < 0 {
				first = i
			}
			last = i
		}
	}
	if first < 0 {
		return nil
	}
	mk := func(kind markerKind, g complex128, hz float64) marker {
		return marker{kind: kind, at: f.at(g), gamma: g, label: si.Format(hz, "Hz", 3), color: t.Line.Color}
	}
	ms := []marker{mk(markerFirst, t.Gamma[first], t.FrequencyHz[first])}
	if last == first {
		return ms
	}
	ms = append(ms, mk(markerLast, t.Gamma[last], t.FrequencyHz[last]))
	if t.inSweep(t.DesignHz) {
		if g, ok := t.interpolate(t.DesignHz); ok {
			d := mk(markerDesign, g, t.DesignHz)
			d.color = ink
			ms = append(ms, d)
		}
	}
	lo, hi := t.FrequencyHz[first], t.FrequencyHz[last]
	if lo > hi {
		lo, hi = hi, lo
	}
	// Decades well clear of the ends (a fifth of a decade), at most six
	// of them: over a wide sweep every second or third decade.
	e0 := int(math.Ceil(math.Log10(lo) + 0.2))
	e1 := int(math.Floor(math.Log10(hi) - 0.2))
	stride := 1 + (e1-e0)/6
	for e := e0; e <= e1; e++ {
		if floorMod(e, stride) != 0 {
			continue
		}
		hz := math.Pow10(e)
		g, ok := t.interpolate(hz)
		if !ok {
			continue
		}
		m := mk(markerDecade, g, hz)
		// A decade that lands on a marker already there (a trace lingering
		// near one impedance) would only hide it.
		if !crowded(m.at, ms) {
			ms = append(ms, m)
		}
	}
	return ms
}

// crowded reports whether a marker at p would overlap one of ms.
func crowded(p vg.Point, ms []marker) bool {
	for _, m := range ms {
		dx, dy := p.X-m.at.X, p.Y-m.at.Y
		if dx*dx+dy*dy < 4*markerRadius*markerRadius {
			return true
		}
	}
	return false
}

// interpolate returns Γ at hz, linear in log frequency between the two
// sweep points either side of it, both of which must be finite.
func (t SmithTrace) interpolate(hz float64) (complex128, bool) {
	n := min(len(t.Gamma), len(t.FrequencyHz))
	good := func(g complex128) bool { return !cmplx.IsNaN(g) && !cmplx.IsInf(g) }
	for i := 0; i < n; i++ {
		if t.FrequencyHz[i] == hz {
			return t.Gamma[i], good(t.Gamma[i])
		}
	}
	for i := 0; i+1 < n; i++ {
		f0, f1 := t.FrequencyHz[i], t.FrequencyHz[i+1]
		if !(f0 > 0 && f1 > 0) || (hz-f0)*(hz-f1) >= 0 {
			continue
		}
		g0, g1 := t.Gamma[i], t.Gamma[i+1]
		if !good(g0) || !good(g1) {
			return 0, false
		}
		u := math.Log(hz/f0) / math.Log(f1/f0)
		return g0 + complex(u, 0)*(g1-g0), true
	}
	return 0, false
}

// drawMarker draws one marker glyph, outlined in white so that it stands
// off the trace beneath it.
func drawMarker(c *draw.Canvas, kind markerKind, clr color.Color, at vg.Point) {
	r := markerRadius
	halo := draw.LineStyle{Color: background, Width: vg.Points(1)}
	switch kind {
	case markerFirst:
		p := circlePath(at, r)
		c.SetColor(clr)
		c.Fill(p)
		c.SetLineStyle(halo)
		c.Stroke(p)
	case markerDesign:
		q := r * 1.5
		var p vg.Path
		p.Move(vg.Point{X: at.X, Y: at.Y + q})
		p.Line(vg.Point{X: at.X + q, Y: at.Y})
		p.Line(vg.Point{X: at.X, Y: at.Y - q})
		p.Line(vg.Point{X: at.X - q, Y: at.Y})
		p.Close()
		c.SetColor(background)
		c.Fill(p)
		c.SetLineStyle(draw.LineStyle{Color: clr, Width: vg.Points(1.4)})
		c.Stroke(p)
	case markerLast:
		q := r * 0.9
		p := square(at, q).Path()
		c.SetColor(clr)
		c.Fill(p)
		c.SetLineStyle(halo)
		c.Stroke(p)
	default:
		p := circlePath(at, r)
		c.SetColor(background)
		c.Fill(p)
		c.SetLineStyle(draw.LineStyle{Color: clr, Width: vg.Points(1.2)})
		c.Stroke(p)
	}
}

func circlePath(at vg.Point, r vg.Length) vg.Path {
	var p vg.Path
	p.Move(vg.Point{X: at.X + r, Y: at.Y})
	p.Arc(at, r, 0, 2*math.Pi)
	p.Close()
	return p
}

func square(at vg.Point, half vg.Length) vg.Rectangle {
	return vg.Rectangle{Min: vg.Point{X: at.X - half, Y: at.Y - half}, Max: vg.Point{X: at.X + half, Y: at.Y + half}}
}

// placeLabel puts m's frequency label in the first of eight places round
// the marker, trying the direction away from the chart's centre first,
// that stays on the canvas and clear of the markers and labels already
// placed. A label with no such place is left out: its marker still shows
// where the frequency falls, and a pile of overlapping labels would show
// nothing. It returns taken with the new label's box added.
func placeLabel(c *draw.Canvas, sty text.Style, m marker, f smithFrame, taken []vg.Rectangle) []vg.Rectangle {
	out := math.Pi / 4
	if cmplx.Abs(m.gamma) > 0.15 {
		out = cmplx.Phase(m.gamma)
	}
	gap := markerRadius + vg.Points(2.5)
	for _, k := range []float64{0, 1, -1, 2, -2, 3, -3, 4} {
		phi := out + k*math.Pi/4
		s := sty
		s.XAlign = text.XAlignment(-0.5 + 0.5*math.Cos(phi))
		s.YAlign = text.YAlignment(-0.5 + 0.5*math.Sin(phi))
		at := vg.Point{X: m.at.X + gap*vg.Length(math.Cos(phi)), Y: m.at.Y + gap*vg.Length(math.Sin(phi))}
		box := s.Rectangle(m.label).Add(at)
		if !inside(c.Rectangle, box) || overlapsAny(box, taken) {
			continue
		}
		// A white ground under the text keeps it legible over grid lines.
		pad := vg.Points(1)
		ground := vg.Rectangle{Min: vg.Point{X: box.Min.X - pad, Y: box.Min.Y}, Max: vg.Point{X: box.Max.X + pad, Y: box.Max.Y}}
		c.SetColor(labelGround)
		c.Fill(ground.Path())
		c.FillText(s, at, m.label)
		return append(taken, box)
	}
	return taken
}

// labelGround is white, slightly see-through so that a trace passing
// under a label still shows.
var labelGround = rgbaOver(0xFFFFFF, 0xD0)

func inside(outer, r vg.Rectangle) bool {
	return r.Min.X >= outer.Min.X && r.Min.Y >= outer.Min.Y && r.Max.X <= outer.Max.X && r.Max.Y <= outer.Max.Y
}

func overlapsAny(r vg.Rectangle, taken []vg.Rectangle) bool {
	for _, t := range taken {
		if r.Min.X < t.Max.X && t.Min.X < r.Max.X && r.Min.Y < t.Max.Y && t.Min.Y < r.Max.Y {
			return true
		}
	}
	return false
}
