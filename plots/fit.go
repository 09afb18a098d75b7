package plots

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"qpoint/bias/diode"
	"qpoint/bias/extract"
	"qpoint/bias/si"
)

// FitFigures returns the figures of a fitted diode model: the forward
// current, the reverse current when the I–V points include reverse ones,
// and the capacitance when C–V points were fitted.
func FitFigures(r *extract.Result) []*Figure {
	figs := []*Figure{ForwardFit(r)}
	if len(r.Reverse) > 0 {
		figs = append(figs, ReverseFit(r))
	}
	if len(r.Capacitance) > 0 {
		figs = append(figs, CapacitanceFit(r))
	}
	return figs
}

// fitSet is one temperature's (or one kind of) points beside the model.
type fitSet struct {
	label          string
	colour         int
	filled         bool      // filled markers; rings otherwise
	x, y           []float64 // measured points
	curveX, curveY []float64 // the model, drawn as a line (may be empty)
	residual       []float64 // deviation of the model, in percent, at x
}

// deviation is the model's deviation from a measured value in percent,
// 100 (model/measured - 1), from the residual ln(model/measured).
func deviation(res float64) float64 { return 100 * math.Expm1(res) }

// ForwardFit shows the forward I–V points against the fitted law on a
// logarithmic current axis (one colour per temperature), and beneath it
// the model's deviation from each point in percent.
func ForwardFit(r *extract.Result) *Figure {
	sets := temperatureSets(r.Forward, r.CurrentAt)
	note := valuesNote(r, "saturation_current", "ideality", "series_resistance") +
		fmt.Sprintf(" · rms deviation %.2g %% over %d points", 100*r.Residuals.Forward, len(r.Forward))
	return fitFigure("fit-forward", "Forward current: measured and fitted", note, "Current", "A", true, sets)
}

// temperatureSets groups fitted points by temperature, one colour each,
// with the model drawn over each group's voltage span.
func temperatureSets(rs []extract.Residual, model func(v, tempK float64) float64) []fitSet {
	groups := byTemperature(rs)
	var sets []fitSet
	for k, t := range sortedKeys(groups) {
		s := fitSet{label: temperatureLabel(t), colour: k}
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, p := range groups[t] {
			s.x = append(s.x, p.Voltage)
			s.y = append(s.y, p.Measured)
			s.residual = append(s.residual, deviation(p.Residual))
			lo, hi = math.Min(lo, p.Voltage), math.Max(hi, p.Voltage)
		}
		s.curveX, s.curveY = sample(lo, hi, func(v float64) float64 { return model(v, t) })
		sets = append(sets, s)
	}
	return sets
}

// ReverseFit shows the reverse I–V points at measured_at against the model
// (the magnitude of the current on a logarithmic axis), those the knee was
// fitted to filled and those below breakdown as rings, and the model's
// deviation from each.
func ReverseFit(r *extract.Result) *Figure {
	fitted := map[int]bool{}
	for _, p := range r.Breakdown {
		fitted[p.Index] = true
	}
	in := fitSet{label: "in breakdown, fitted", colour: 3, filled: true}
	below := fitSet{label: "below breakdown, not fitted", colour: 0}
	lo := 0.0
	for _, p := range r.Reverse {
		s := &below
		if fitted[p.Index] {
			s = &in
		}
		s.x = append(s.x, p.Voltage)
		s.y = append(s.y, -p.Measured)
		s.residual = append(s.residual, deviation(p.Residual))
		lo = math.Min(lo, p.Voltage)
	}
	t0 := r.Model.MeasuredAtK
	model := fitSet{label: "model at " + temperatureLabel(t0), colour: 0}
	model.curveX, model.curveY = sample(lo, math.Min(-1e-3, lo/1000), func(v float64) float64 { return -r.CurrentAt(v, t0) })
	sets := []fitSet{model}
	for _, s := range []fitSet{below, in} {
		if len(s.x) > 0 {
			sets = append(sets, s)
		}
	}
	note := "No knee fitted: the model's reverse current is -I_S"
	if v := r.Value("breakdown_voltage"); v != nil && v.Status == extract.Fitted {
		note = fmt.Sprintf("Breakdown voltage %s ± %s at %s", si.Format(v.Value, "V", 4), si.Format(v.Error, "V", 2),
			si.Format(r.Model.BreakdownCurrent, "A", 3))
		if len(r.Breakdown) > 0 {
			note += fmt.Sprintf(" · rms deviation %.2g %% over %d points in breakdown", 100*r.Residuals.Breakdown, len(r.Breakdown))
		}
	}
	return fitFigure("fit-reverse", "Reverse current: measured and model", note, "Reverse current", "A", true, sets)
}

// CapacitanceFit shows the C–V points against the fitted depletion law
// (one colour per temperature) and the model's deviation from each.
func CapacitanceFit(r *extract.Result) *Figure {
	sets := temperatureSets(r.Capacitance, r.CapacitanceAt)
	note := valuesNote(r, "zero_bias_capacitance", "built_in_potential", "grading_coefficient") +
		fmt.Sprintf(" · rms deviation %.2g %% over %d points", 100*r.Residuals.Capacitance, len(r.Capacitance))
	return fitFigure("fit-capacitance", "Junction capacitance: measured and fitted", note, "Capacitance", "F", false, sets)
}

// fitFigure draws sets on two stacked panels sharing the voltage axis:
// the values (log10 on a decade axis when logY) with the model's lines,
// and the deviations in percent.
func fitFigure(name, title, note, yLabel, yUnit string, logY bool, sets []fitSet) *Figure {
	top := NewPanel("", yLabel)
	bottom := NewPanel("Voltage", "Model − measured (%)")
	fig := &Figure{Name: name, Title: title, Note: note, Panels: []*plot.Plot{top, bottom},
		Width: vg.Points(480), Height: vg.Points(460)}
	top.Add(framePlotter{X: LinearTicks{Unit: "V"}})
	bottom.Add(framePlotter{X: LinearTicks{Unit: "V"}})
	xlo, xhi := math.Inf(1), math.Inf(-1)
	ylo, yhi := math.Inf(1), math.Inf(-1)
	dev := 0.0
	axisY := func(v float64) float64 {
		if logY {
			if !(v > 0) {
				return math.NaN()
			}
			return math.Log10(v)
		}
		return v
	}
	for _, s := range sets {
		colour := Palette[s.colour%len(Palette)]
		if len(s.curveX) > 0 {
			ys := make([]float64, len(s.curveY))
			for i, v := range s.curveY {
				ys[i] = axisY(v)
				if finite(ys[i]) {
					ylo, yhi = math.Min(ylo, v), math.Max(yhi, v)
				}
			}
			c := newCurve(s.curveX, ys, false, false)
			thumb := c.add(top, draw.LineStyle{Color: colour, Width: traceWidth})
			if len(s.x) == 0 {
				fig.Key = append(fig.Key, KeyEntry{Label: s.label, Thumbs: []plot.Thumbnailer{thumb}})
			} else {
				fig.Key = append(fig.Key, KeyEntry{Label: "fitted law, " + s.label, Thumbs: []plot.Thumbnailer{thumb}})
			}
			for _, x := range s.curveX {
				xlo, xhi = math.Min(xlo, x), math.Max(xhi, x)
			}
		}
		if len(s.x) == 0 {
			continue
		}
		glyph := draw.GlyphStyle{Color: colour, Radius: markerRadius * 0.8, Shape: draw.RingGlyph{}}
		if s.filled {
			glyph.Shape = draw.CircleGlyph{}
		}
		var pts, devs plotter.XYs
		for i, x := range s.x {
			if y := axisY(s.y[i]); finite(y) && finite(x) {
				pts = append(pts, plotter.XY{X: x, Y: y})
				ylo, yhi = math.Min(ylo, s.y[i]), math.Max(yhi, s.y[i])
				xlo, xhi = math.Min(xlo, x), math.Max(xhi, x)
			}
			if d := s.residual[i]; finite(d) && finite(x) {
				devs = append(devs, plotter.XY{X: x, Y: d})
				dev = math.Max(dev, math.Abs(d))
			}
		}
		marks := &plotter.Scatter{XYs: pts, GlyphStyle: glyph}
		top.Add(marks)
		bottom.Add(&plotter.Scatter{XYs: devs, GlyphStyle: glyph})
		fig.Key = append(fig.Key, KeyEntry{Label: "measured, " + s.label, Thumbs: []plot.Thumbnailer{marks}})
	}
	if !(xlo < xhi) {
		xlo, xhi = xlo-0.5, xlo+0.5
		if !finite(xlo) {
			xlo, xhi = 0, 1
		}
	}
	x0, x1 := linearRange(xlo, xhi, 0.1, 0, 1, linearStep)
	for _, p := range []*plot.Plot{top, bottom} {
		p.X.Min, p.X.Max = x0, x1
	}
	top.X.Tick.Marker = hideLabels{LinearTicks{Unit: "V"}}
	bottom.X.Tick.Marker = LinearTicks{Unit: "V"}
	if logY {
		setDecadeAxis(top, ylo, yhi, yUnit, 1e-9, 1e-1)
	} else {
		top.Y.Min, top.Y.Max = linearRange(math.Min(0, ylo), yhi, 1e-15, 0, 1e-12, linearStep)
		top.Y.Tick.Marker = LinearTicks{Unit: yUnit}
	}
	span := math.Max(1.1*dev, 0.5)
	bottom.Y.Min, bottom.Y.Max = linearRange(-span, span, 1, -1, 1, linearStep)
	bottom.Y.Tick.Marker = LinearTicks{}
	return fig
}

// sample evaluates f at 200 voltages from lo to hi.
func sample(lo, hi float64, f func(float64) float64) (xs, ys []float64) {
	if !(hi > lo) {
		return nil, nil
	}
	const n = 200
	for k := range n + 1 {
		v := lo + (hi-lo)*float64(k)/n
		xs = append(xs, v)
		ys = append(ys, f(v))
	}
	return xs, ys
}

func byTemperature(rs []extract.Residual) map[float64][]extract.Residual {
	g := map[float64][]extract.Residual{}
	for _, p := range rs {
		g[p.TemperatureK] = append(g[p.TemperatureK], p)
	}
	return g
}

func sortedKeys(m map[float64][]extract.Residual) []float64 {
	keys := make([]float64, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}

// temperatureLabel names a temperature in degrees Celsius, also for a
// single temperature, so that the key says where the points were taken.
func temperatureLabel(tk float64) string {
	return fmt.Sprintf("%.4g °C", tk-diode.ZeroCelsius)
}

// valuesNote lists fitted values with their standard errors, and says
// "default" for the others.
func valuesNote(r *extract.Result, keys ...string) string {
	symbol := map[string]string{
		"saturation_current": "I_S", "ideality": "n", "series_resistance": "R_S",
		"zero_bias_capacitance": "C_j0", "built_in_potential": "V_bi", "grading_coefficient": "m",
	}
	var parts []string
	for _, k := range keys {
		v := r.Value(k)
		if v == nil {
			continue
		}
		unit := v.Unit
		if unit == "ohm" {
			unit = "Ω"
		}
		format := func(x float64, digits int) string {
			if unit == "" {
				return strconv.FormatFloat(x, 'g', digits, 64)
			}
			return si.Format(x, unit, digits)
		}
		text := symbol[k] + " = " + format(v.Value, 4)
		if v.Status == extract.Fitted {
			text += " ± " + format(v.Error, 2)
		} else {
			text += " (" + v.Status.String() + ")"
		}
		parts = append(parts, text)
	}
	return strings.Join(parts, ", ")
}
