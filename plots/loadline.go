package plots

import (
	"fmt"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"qpoint/bias"
	"qpoint/bias/diode"
	"qpoint/bias/si"
	"qpoint/smallsignal"
)

// OperatingPoint is the I–V figure of one diode at its Q point: the
// terminal characteristic I(V) of its model at the point's temperature
// (the junction law behind R_S, diode.Device.TerminalCurrent), the load
// line the rest of the circuit presents to it (smallsignal.LoadLine) and
// the Q point where the two cross. The window runs from below zero (or
// the Q voltage, when reverse) to where the diode carries twice the Q
// current (at least 20 I_S), so a Q point sits in the figure's upper part
// with the knee of the curve below it.
func OperatingPoint(q bias.QPoint, l smallsignal.LoadLine) *Figure {
	dev := q.Device
	iTop := math.Max(2*math.Abs(q.Current), 20*dev.SaturationCurrent)
	if !(iTop > 0) || math.IsInf(iTop, 0) {
		iTop = 1e-3
	}
	vHi := math.Max(forwardVoltage(dev, iTop), q.Voltage)
	vLo := math.Min(0, q.Voltage)
	span := vHi - vLo
	if !(span > 0) {
		span = 0.1
	}
	vLo, vHi = linearRange(vLo-0.15*span, vHi+0.05*span, 0.01, -0.1, 1, linearStep)

	const samples = 160
	vs := make([]float64, samples)
	is := make([]float64, samples)
	for k := range vs {
		v := vLo + (vHi-vLo)*float64(k)/float64(samples-1)
		vs[k] = v
		is[k], _ = dev.TerminalCurrent(v)
	}
	iLo := math.Min(0, math.Min(is[0], q.Current))
	iHi := math.Max(iTop, q.Current)
	pad := 0.08 * (iHi - iLo)
	iLo, iHi = iLo-pad, iHi+pad

	p := NewPanel("Terminal voltage", "Current")
	p.Add(framePlotter{})
	curve := newCurve(vs, is, false, false)
	key := []KeyEntry{{Label: q.Name + " I–V (" + q.Model + ")", Thumbs: []plot.Thumbnailer{curve.add(p, traceLine(0))}}}
	line := traceLine(1)
	var lx, ly []float64
	switch {
	case math.IsInf(l.Conductance, 1):
		lx, ly = []float64{l.OpenVoltage, l.OpenVoltage}, []float64{iLo, iHi}
	default:
		lx, ly = []float64{vLo, vHi}, []float64{l.At(vLo), l.At(vHi)}
	}
	lineCurve := newCurve(lx, ly, false, false)
	key = append(key, KeyEntry{Label: "load line, " + loadText(l), Thumbs: []plot.Thumbnailer{lineCurve.add(p, line)}})
	p.Add(qMark{v: q.Voltage, i: q.Current})
	key = append(key, KeyEntry{Label: "Q point", Thumbs: []plot.Thumbnailer{designThumb{}}})

	p.X.Min, p.X.Max = vLo, vHi
	p.X.Tick.Marker = LinearTicks{Unit: "V"}
	p.Y.Min, p.Y.Max = iLo, iHi
	p.Y.Tick.Marker = LinearTicks{Unit: "A"}
	return &Figure{
		Name:  "operating-point-" + q.Name,
		Title: q.Name + " operating point",
		Note: fmt.Sprintf("Q point %s, %s at %.2f °C · load: the rest of the circuit at DC, other diodes linearised at their Q points",
			si.Format(q.Voltage, "V", 4), si.Format(q.Current, "A", 4), dev.TempK-diode.ZeroCelsius),
		Key:    key,
		Panels: []*plot.Plot{p},
		Width:  vg.Points(480),
		Height: vg.Points(340),
	}
}

// forwardVoltage is the terminal voltage at which the ideal forward law
// carries current i > 0: R_S i + n V_T ln(1 + i/I_S), in logarithms so
// that a tiny I_S does not underflow.
func forwardVoltage(d *diode.Device, i float64) float64 {
	lnRatio := math.Log(i) - d.LogSaturationCurrent
	vj := d.NVT() * lnRatio
	if lnRatio < 30 {
		vj = d.NVT() * math.Log1p(math.Exp(lnRatio))
	}
	return vj + d.Params.SeriesResistance*i
}

// loadText describes a load line: its Thevenin form, or the fixed
// current or voltage it stands for.
func loadText(l smallsignal.LoadLine) string {
	switch {
	case math.IsInf(l.Conductance, 1):
		return "voltage held at " + si.Format(l.OpenVoltage, "V", 4)
	case l.Conductance == 0:
		return "current fixed at " + si.Format(l.Current, "A", 4)
	}
	return si.Format(l.OpenVoltage, "V", 4) + " behind " + si.Format(1/l.Conductance, "Ω", 4)
}

// qMark draws the Q point: a diamond with its label.
type qMark struct{ v, i float64 }

var _ plot.Plotter = qMark{}

// Plot implements plot.Plotter.
func (m qMark) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	at := vg.Point{X: trX(m.v), Y: trY(m.i)}
	if !c.Contains(at) {
		return
	}
	drawMarker(&c, markerDesign, ink, at)
	sty := textStyle(sans, smallSize, ink)
	sty.XAlign, sty.YAlign = draw.XRight, draw.YBottom
	c.FillText(sty, vg.Point{X: at.X - markerRadius*2, Y: at.Y + markerRadius*2}, "Q")
}

// DataRange implements plot.DataRanger so that the mark never widens the
// axes set by the figure.
func (m qMark) DataRange() (xmin, xmax, ymin, ymax float64) { return m.v, m.v, m.i, m.i }
