package plots

import (
	"math"
	"math/cmplx"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"qpoint/ac"
)

// Impedance is each port's input impedance, looking in with the other
// ports terminated in their references, against frequency: resistance R
// (solid) and reactance X (dashed) in ohms on a linear scale in the upper
// panel, and the magnitude |Z| on a logarithmic scale in the lower one,
// where a diode's kilohms at low frequency and its few ohms at resonance
// can both be read. Each port has its own colour.
func Impedance(r *ac.Response) *Figure {
	freqs := frequencies(r)
	rx := NewPanel("", "Resistance, reactance")
	mag := NewPanel("Frequency", "|Z|")
	fig := &Figure{
		Name:   "impedance",
		Title:  "Input impedance",
		Note:   portsNote(r),
		Panels: []*plot.Plot{rx, mag},
		Width:  vg.Points(480),
		Height: vg.Points(420),
	}

	type portCurves struct{ r, x, m curve }
	var pcs []portCurves
	var parts, mags []curve
	for i := range r.Ports {
		rs := make([]float64, len(freqs))
		xs := make([]float64, len(freqs))
		ms := make([]float64, len(freqs))
		for k, p := range r.Points {
			z := cmplx.NaN()
			if i < len(p.InputImpedance) {
				z = p.InputImpedance[i]
			}
			rs[k], xs[k], ms[k] = real(z), imag(z), cmplx.Abs(z)
			if cmplx.IsNaN(z) || cmplx.IsInf(z) {
				rs[k], xs[k], ms[k] = math.NaN(), math.NaN(), math.NaN()
			}
		}
		pc := portCurves{
			r: newCurve(freqs, rs, true, false),
			x: newCurve(freqs, xs, true, false),
			m: newCurve(freqs, ms, true, true),
		}
		pcs = append(pcs, pc)
		parts = append(parts, pc.r, pc.x)
		mags = append(mags, pc.m)
	}

	rx.Add(framePlotter{X: LogTicks{Unit: "Hz"}})
	mag.Add(framePlotter{X: LogTicks{Unit: "Hz"}})
	for i, pc := range pcs {
		solid := draw.LineStyle{Color: Palette[i%len(Palette)], Width: traceWidth}
		dashed := solid
		dashed.Dashes = dashPatterns[1]
		name := portName(r, i)
		tr := pc.r.add(rx, solid)
		tx := pc.x.add(rx, dashed)
		pc.m.add(mag, solid)
		fig.Key = append(fig.Key,
			KeyEntry{Label: "R, " + name, Thumbs: []plot.Thumbnailer{tr}},
			KeyEntry{Label: "X, " + name, Thumbs: []plot.Thumbnailer{tx}},
		)
	}

	// The axes are set last: adding the curves widened them to the raw
	// data.
	fx0, fx1 := sweepSpan(freqs)
	setFrequencyAxis(rx, fx0, fx1, false)
	setFrequencyAxis(mag, fx0, fx1, true)
	ry0, ry1 := spanY(parts)
	rx.Y.Min, rx.Y.Max = linearRange(ry0, ry1, 2, -100, 100, linearStep)
	rx.Y.Tick.Marker = LinearTicks{Unit: "Ω"}
	my0, my1 := spanY(mags)
	mag.Y.Min, mag.Y.Max = logRange(my0, my1, 1, 1e3)
	mag.Y.Scale = plot.LogScale{}
	mag.Y.Tick.Marker = LogTicks{Unit: "Ω"}
	return fig
}

// portName is how figures refer to port i (from 0): its own name, or its
// number when it has none.
func portName(r *ac.Response, i int) string {
	if i < len(r.Ports) && r.Ports[i].Name != "" {
		return r.Ports[i].Name
	}
	return "port " + strconv.Itoa(i+1)
}
