package plots

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"qpoint/ac/study"
	"qpoint/bias/si"
)

// maxStudyPanels bounds how many panels a study figure stacks; more would
// leave each too short to read.
const maxStudyPanels = 4

// maxStudyCurves bounds the curves of one panel of a two-axis study.
const maxStudyCurves = 6

// StudyMark marks what a target search or an optimisation found on the
// panel of its measure: a ring at (X, Y), the varied value and the
// measure there, with a label, and for a target a dashed horizontal line
// at Target, named in the key.
type StudyMark struct {
	Measure *study.Measure
	X, Y    float64
	Label   string
	Target  float64 // NaN: not a target
}

// StudyCurves shows measures against the study's varied quantity, named
// xLabel and measured in xUnit (an SI unit symbol such as "V", or "" for a
// number). The x axis is logarithmic when the study's values are spaced
// geometrically and linear otherwise.
//
// For a study of one quantity, measures sharing a unit share a panel, one
// panel per unit, stacked on the common x axis. For a study of two
// quantities each measure has its own panel, with a curve for each of up to
// six values of the second quantity, evenly picked. At most four panels
// are drawn; the note names what is left out. A y axis of a positive
// quantity spanning two decades or more is logarithmic. Steps that did not
// solve leave gaps. Marks are drawn on the panel that shows their measure
// (matched by its text) in a study of one quantity.
func StudyCurves(r *study.Result, measures []*study.Measure, xLabel, xUnit string, marks ...StudyMark) *Figure {
	xUnit = tickUnit(xUnit)
	fig := &Figure{
		Name:   "study",
		Title:  "Study",
		Width:  vg.Points(480),
		Height: vg.Points(300),
	}
	if r == nil || len(r.Steps) == 0 {
		r = &study.Result{}
	}
	var ms []*study.Measure
	for _, m := range measures {
		if m != nil {
			ms = append(ms, m)
		}
	}
	xs := axisValues(r, 0)
	xLog := geometric(xs)
	twoAxes := r.Shape[1] > 1
	var notes []string

	// Each panel holds some measures; in a one-axis study each measure
	// is one curve, in a two-axis study each picked second value is.
	type panel struct {
		unit     string
		measures []int // indices into ms
	}
	var panels []panel
	if twoAxes {
		for k := range ms {
			panels = append(panels, panel{unit: ms[k].Unit, measures: []int{k}})
		}
	} else {
		at := map[string]int{}
		for k, m := range ms {
			i, ok := at[m.Unit]
			if !ok {
				i = len(panels)
				at[m.Unit] = i
				panels = append(panels, panel{unit: m.Unit})
			}
			panels[i].measures = append(panels[i].measures, k)
		}
	}
	if len(panels) > maxStudyPanels {
		var left []string
		for _, pn := range panels[maxStudyPanels:] {
			for _, k := range pn.measures {
				left = append(left, MeasureName(ms[k]))
			}
		}
		notes = append(notes, "not shown, to keep four panels: "+strings.Join(left, ", "))
		panels = panels[:maxStudyPanels]
	}

	var js []int // second-axis indices drawn
	if twoAxes {
		js = pickEvenly(r.Shape[1], maxStudyCurves)
	} else {
		js = []int{0}
	}

	xName := xLabel
	if xName == "" {
		xName = "Varied value"
	}
	failed := 0
	for i := range r.Steps {
		if r.Steps[i].Err != nil {
			failed++
		}
	}
	keyed := map[int]bool{}
	for pi, pn := range panels {
		p := NewPanel("", "")
		bottom := pi == len(panels)-1
		if bottom {
			p.X.Label.Text = xName
		}
		var cs []curve
		var ks []int // colour index of each curve
		for _, k := range pn.measures {
			m := ms[k]
			for ji, j := range js {
				ys := make([]float64, r.Shape[0])
				var firstErr error
				for i := range ys {
					ys[i] = math.NaN()
					if j*r.Shape[0]+i >= len(r.Steps) {
						continue // a result whose shape promises more steps than it has
					}
					st := r.At(i, j)
					v, err := m.Of(st, stepFrequencies(r, st), r.Probes)
					if err != nil {
						if st.Err == nil && firstErr == nil {
							firstErr = err
						}
						continue
					}
					ys[i] = v
				}
				if firstErr != nil && ji == 0 {
					notes = append(notes, firstErr.Error())
				}
				cs = append(cs, newCurve(xs, ys, xLog, false))
				if twoAxes {
					ks = append(ks, ji)
				} else {
					ks = append(ks, k)
				}
			}
		}
		// The marks on this panel, and their targets' lines.
		var rings []*levelMark
		var targets []float64
		if !twoAxes {
			for _, mk := range marks {
				for _, k := range pn.measures {
					if mk.Measure != nil && mk.Measure.Text == ms[k].Text && finite(mk.X) && finite(mk.Y) {
						rings = append(rings, &levelMark{x: mk.X, y: mk.Y, label: mk.Label})
						if finite(mk.Target) {
							targets = append(targets, mk.Target)
						}
					}
				}
			}
		}
		var targetCurves []curve
		if len(targets) > 0 {
			x0, x1 := axisSpan(xs, xLog)
			for _, t := range targets {
				targetCurves = append(targetCurves, newCurve([]float64{x0, x1}, []float64{t, t}, xLog, false))
			}
		}
		yLog := logWorthy(pn.unit, append(append([]curve{}, cs...), targetCurves...))
		span := spanYOf(append(append([]curve{}, cs...), targetCurves...))
		if yLog {
			for i := range cs {
				cs[i] = decadeCurve(cs[i])
			}
			for i := range targetCurves {
				targetCurves[i] = decadeCurve(targetCurves[i])
			}
			for _, g := range rings {
				g.y = math.Log10(g.y)
			}
		}
		p.Add(framePlotter{X: xTicker(xLog, xUnit)})
		for i, c := range cs {
			thumb := c.add(p, traceLine(ks[i]))
			if keyed[ks[i]] {
				continue
			}
			keyed[ks[i]] = true
			label := ""
			if twoAxes {
				label = secondAxisText(r, js[ks[i]])
			} else {
				label = MeasureName(ms[ks[i]])
			}
			fig.Key = append(fig.Key, KeyEntry{Label: label, Thumbs: []plot.Thumbnailer{thumb}})
		}
		for i, c := range targetCurves {
			thumb := c.add(p, referenceLine)
			if i == 0 {
				fig.Key = append(fig.Key, KeyEntry{Label: "target", Thumbs: []plot.Thumbnailer{thumb}})
			}
		}
		for _, g := range rings {
			p.Add(g)
		}
		// Axes last: adding the curves widened them to the raw data.
		x0, x1 := axisSpan(xs, xLog)
		p.X.Min, p.X.Max = x0, x1
		if xLog {
			p.X.Scale = plot.LogScale{}
		}
		if bottom {
			p.X.Tick.Marker = xTicker(xLog, xUnit)
		} else {
			p.X.Tick.Marker = hideLabels{xTicker(xLog, xUnit)}
		}
		if len(pn.measures) == 1 {
			p.Y.Label.Text = MeasureName(ms[pn.measures[0]]) + dbSuffix(pn.unit)
		} else {
			p.Y.Label.Text = unitGroupName(pn.unit)
		}
		setValueAxis(p, span, pn.unit, yLog)
		fig.Panels = append(fig.Panels, p)
	}
	if len(fig.Panels) == 0 {
		p := NewPanel(xName, "")
		p.Add(framePlotter{X: xTicker(xLog, xUnit)})
		p.X.Min, p.X.Max = axisSpan(xs, xLog)
		if xLog {
			p.X.Scale = plot.LogScale{}
		}
		p.X.Tick.Marker = xTicker(xLog, xUnit)
		p.Y.Min, p.Y.Max = 0, 1
		p.Y.Tick.Marker = noTicks{}
		fig.Panels = []*plot.Plot{p}
		notes = append([]string{"no measures to show"}, notes...)
	}
	fig.Height = vg.Points(150 + 170*float64(len(fig.Panels)))
	if len(fig.Panels) == 1 {
		fig.Height = vg.Points(340)
	}
	fig.Note = studyNote(r, failed, notes)
	if twoAxes && len(js) < r.Shape[1] {
		fig.Note += fmt.Sprintf(" · %d of the %d values of the second quantity shown", len(js), r.Shape[1])
	}
	return fig
}

// MeasureName is how figures name a study measure: the trade's words for
// it, with the part and the frequency it is read at.
func MeasureName(m *study.Measure) string {
	var n string
	switch m.Name {
	case "s11", "s21", "s12", "s22":
		n = strings.ToUpper(m.Name)
	case "zin_re":
		n = "Input resistance"
	case "zin_im":
		n = "Input reactance"
	case "zin_mag":
		n = "|Zin|"
	case "probe":
		n = "Probe " + m.Part
	case "hd2", "hd3":
		n = strings.ToUpper(m.Name)
	case "dc_shift":
		n = "DC shift"
	case "sensitivity":
		n = "Detector sensitivity"
	case "noise_figure":
		n = "Noise figure"
	case "nep":
		n = "Noise-equivalent power"
	case "tss":
		n = "Tangential sensitivity"
	default:
		n = strings.ReplaceAll(m.Name, "_", " ")
		if n != "" {
			n = strings.ToUpper(n[:1]) + n[1:]
		}
		if m.Part != "" {
			n += " of " + m.Part
		}
	}
	if m.FrequencyHz != 0 {
		n += " at " + si.Format(m.FrequencyHz, "Hz", 4)
	}
	if n == "" {
		n = m.Text
	}
	return n
}

// dbSuffix is the unit a decibel axis label carries; other units are on
// the tick labels.
func dbSuffix(unit string) string {
	if unit == "dB" || unit == "dBc" || unit == "dBm" {
		return " (" + unit + ")"
	}
	return ""
}

// unitGroupName labels a panel of several measures that share a unit.
func unitGroupName(unit string) string {
	switch unit {
	case "dB":
		return "Magnitude (dB)"
	case "dBc":
		return "Relative to the fundamental (dBc)"
	case "dBm":
		return "Power (dBm)"
	case "ohm":
		return "Resistance, reactance"
	case "V":
		return "Voltage"
	case "A":
		return "Current"
	case "F":
		return "Capacitance"
	case "V/W":
		return "Voltage sensitivity"
	case "A/W":
		return "Current sensitivity"
	}
	return unit
}

// tickUnit is the unit symbol tick labels carry for a measure unit: none
// for decibels, which are plain numbers.
func tickUnit(unit string) string {
	switch unit {
	case "dB", "dBc", "dBm":
		return ""
	case "ohm":
		return "Ω"
	}
	return unit
}

// logWorthy reports whether values in unit are best on a logarithmic
// axis: all positive and spanning two decades or more. Decibels never.
func logWorthy(unit string, cs []curve) bool {
	if unit == "dB" || unit == "dBc" || unit == "dBm" {
		return false
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, c := range cs {
		for _, r := range c.runs {
			for _, p := range r {
				if !(p.Y > 0) {
					return false
				}
				lo, hi = math.Min(lo, p.Y), math.Max(hi, p.Y)
			}
		}
	}
	return lo > 0 && hi/lo >= 100
}

// spanYOf is spanY as a pair.
func spanYOf(cs []curve) [2]float64 {
	lo, hi := spanY(cs)
	return [2]float64{lo, hi}
}

// setValueAxis sets a measure panel's y axis over span; a logarithmic one
// is a decade axis, whose curves carry log10 of their values.
func setValueAxis(p *plot.Plot, span [2]float64, unit string, log bool) {
	lo, hi := span[0], span[1]
	u := tickUnit(unit)
	if log {
		setDecadeAxis(p, lo, hi, u, 1, 10)
		return
	}
	// A measure that hardly changes is shown within ±5 % of itself, or
	// over 1 dB, not magnified until rounding fills the panel.
	minSpan, empty0, empty1 := 1.0, -40.0, 0.0
	if u != "" {
		minSpan = math.Max(0.1*math.Max(math.Abs(lo), math.Abs(hi)), 1e-15)
		empty0, empty1 = 0, 1
	}
	p.Y.Min, p.Y.Max = linearRange(lo, hi, minSpan, empty0, empty1, linearStep)
	p.Y.Tick.Marker = LinearTicks{Unit: u}
}

// axisValues returns the values of a study's axis (0 or 1) in step order.
func axisValues(r *study.Result, axis int) []float64 {
	n := r.Shape[axis]
	vs := make([]float64, n)
	for i := range vs {
		vs[i] = math.NaN()
		idx := [2]int{}
		idx[axis] = i
		if idx[1]*r.Shape[0]+idx[0] < len(r.Steps) {
			vs[i] = r.At(idx[0], idx[1]).Values[axis]
		}
	}
	// The settings hold the values even where a step never ran.
	var set []float64
	switch {
	case axis == 0:
		set = r.Settings.Axis.Values
	case r.Settings.Second != nil:
		set = r.Settings.Second.Values
	}
	if len(set) == n {
		copy(vs, set)
	}
	return vs
}

// geometric reports whether vs are spaced by a constant ratio rather than
// a constant step: all of one sign, at least three, and the ratio of
// neighbours the same throughout while the differences are not.
func geometric(vs []float64) bool {
	if len(vs) < 3 {
		return false
	}
	for _, v := range vs {
		if !(v > 0) || !finite(v) {
			return false
		}
	}
	ratio := vs[1] / vs[0]
	if math.Abs(ratio-1) < 1e-9 {
		return false
	}
	for i := 2; i < len(vs); i++ {
		if math.Abs(vs[i]/vs[i-1]-ratio) > 1e-6*ratio {
			return false
		}
	}
	return true
}

// axisSpan is the x range of a study axis.
func axisSpan(xs []float64, log bool) (float64, float64) {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range xs {
		if finite(x) && (!log || x > 0) {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
	}
	if log {
		if !(lo > 0) || math.IsInf(hi, 0) {
			return 1, 10
		}
		if lo == hi {
			return lo / math.Sqrt(10), lo * math.Sqrt(10)
		}
		return lo, hi
	}
	switch {
	case math.IsInf(lo, 0) || math.IsInf(hi, 0):
		return 0, 1
	case lo == hi:
		d := math.Max(math.Abs(lo)/2, 0.5)
		return lo - d, hi + d
	}
	return lo, hi
}

func xTicker(log bool, unit string) plot.Ticker {
	if log {
		return LogTicks{Unit: unit}
	}
	return LinearTicks{Unit: unit}
}

// pickEvenly returns up to k indices of 0..n-1, evenly spread and
// including both ends.
func pickEvenly(n, k int) []int {
	if n <= k {
		out := make([]int, n)
		for i := range out {
			out[i] = i
		}
		return out
	}
	out := make([]int, k)
	for i := range out {
		out[i] = int(math.Round(float64(i) * float64(n-1) / float64(k-1)))
	}
	return out
}

// stepFrequencies are the frequencies a step's responses were computed
// at: the study's, or the step's own when frequency is the second axis.
func stepFrequencies(r *study.Result, st *study.Step) []float64 {
	if r.Settings.SecondIsFrequency {
		return []float64{st.Values[1]}
	}
	return r.Settings.FrequenciesHz
}

// secondAxis names the second varied quantity and its unit symbol.
func secondAxis(r *study.Result) (name, unit string) {
	switch {
	case r.Settings.SecondIsFrequency:
		return "frequency", "Hz"
	case r.Settings.Second != nil && r.Settings.Second.Vary != nil:
		v := r.Settings.Second.Vary
		return v.Text, tickUnit(v.Quantity.Unit())
	}
	return "second value", ""
}

// secondAxisText labels the curve of the second axis' j-th value.
func secondAxisText(r *study.Result, j int) string {
	name, unit := secondAxis(r)
	vs := axisValues(r, 1)
	if j >= len(vs) {
		return name
	}
	return name + " " + si.Format(vs[j], unit, 3)
}

// studyNote says what was varied and how many steps failed.
func studyNote(r *study.Result, failed int, notes []string) string {
	var parts []string
	n := len(r.Steps)
	if n == 0 {
		return "The study has no steps."
	}
	what := ""
	if r.Settings.Axis.Vary != nil {
		what = r.Settings.Axis.Vary.Text
	}
	if r.Shape[1] > 1 {
		second, _ := secondAxis(r)
		if what != "" {
			what += " × " + second
		}
		parts = append(parts, fmt.Sprintf("%d × %d steps", r.Shape[0], r.Shape[1]))
	} else {
		parts = append(parts, plural(n, "step"))
	}
	if what != "" {
		parts[0] = "Varied " + what + ", " + parts[0]
	}
	switch {
	case failed == n:
		parts = append(parts, "none solved")
	case failed > 0:
		parts = append(parts, fmt.Sprintf("%d did not solve (left out)", failed))
	}
	seen := map[string]bool{}
	for _, s := range notes {
		if !seen[s] {
			seen[s] = true
			parts = append(parts, s)
		}
	}
	return strings.Join(parts, " · ")
}

func plural(n int, what string) string {
	if n == 1 {
		return "1 " + what
	}
	return strconv.Itoa(n) + " " + what + "s"
}

// HeatMap shows measure m over a study of two quantities as a colour map:
// the first quantity (xLabel, in xUnit) across, the second (yLabel, in
// yUnit) up, each cell the colour of the measure at that step on the
// house Ramp, from pale for the lowest values to dark for the highest.
// The colour scale above the map is labelled; it is logarithmic for a
// positive quantity spanning two decades or more. An axis whose values are
// spaced geometrically is logarithmic. Cells whose step did not solve, or
// where the measure has no value, are hatched grey.
func HeatMap(r *study.Result, m *study.Measure, xLabel, xUnit, yLabel, yUnit string) *Figure {
	xUnit, yUnit = tickUnit(xUnit), tickUnit(yUnit)
	p := NewPanel(xLabel, yLabel)
	fig := &Figure{
		Name:   "study-map",
		Title:  "Study map",
		Panels: []*plot.Plot{p},
		Width:  vg.Points(480),
		Height: vg.Points(440),
	}
	if r == nil {
		r = &study.Result{}
	}
	xs, ys := axisValues(r, 0), axisValues(r, 1)
	if r.Shape[1] <= 1 && r.Settings.Second == nil {
		ys = []float64{0}
	}
	xLog, yLog := geometric(xs), geometric(ys)
	cm := &colourMap{xs: xs, ys: ys, xLog: xLog, yLog: yLog}
	cm.values = make([][]float64, len(xs))
	failed := 0
	var measureErr error
	for i := range xs {
		cm.values[i] = make([]float64, len(ys))
		for j := range ys {
			cm.values[i][j] = math.NaN()
			if j*r.Shape[0]+i >= len(r.Steps) || m == nil {
				continue
			}
			st := r.At(i, j)
			if st.Err != nil {
				failed++
				continue
			}
			v, err := m.Of(st, stepFrequencies(r, st), r.Probes)
			if err != nil {
				if measureErr == nil {
					measureErr = err
				}
				continue
			}
			cm.values[i][j] = v
		}
	}
	unit := ""
	label := "no measure"
	if m != nil {
		unit = m.Unit
		label = MeasureName(m) + dbSuffix(unit)
		fig.Title = MeasureName(m)
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	positive := true
	missing := false
	for _, col := range cm.values {
		for _, v := range col {
			if !finite(v) {
				missing = true
				continue
			}
			lo, hi = math.Min(lo, v), math.Max(hi, v)
			positive = positive && v > 0
		}
	}
	scale := &ColourScale{Label: label}
	if positive && unit != "dB" && unit != "dBc" && unit != "dBm" && lo > 0 && hi/lo >= 100 {
		scale.Log = true
		scale.Min, scale.Max = logRange(lo, hi, 1, 10)
		scale.Ticks = LogTicks{Unit: tickUnit(unit)}
	} else {
		minSpan := 1.0
		if tickUnit(unit) != "" {
			minSpan = math.Max(0.1*math.Max(math.Abs(lo), math.Abs(hi)), 1e-15)
		}
		scale.Min, scale.Max = linearRange(lo, hi, minSpan, 0, 1, linearStep)
		scale.Ticks = LinearTicks{Unit: tickUnit(unit)}
	}
	if missing {
		scale.Missing = "no value"
	}
	cm.scale = scale
	fig.Scale = scale
	p.Add(cm)

	_, _, p.X.Min, p.X.Max = cellEdges(xs, xLog)
	_, _, p.Y.Min, p.Y.Max = cellEdges(ys, yLog)
	if xLog {
		p.X.Scale = plot.LogScale{}
	}
	if yLog {
		p.Y.Scale = plot.LogScale{}
	}
	p.X.Tick.Marker = xTicker(xLog, xUnit)
	p.Y.Tick.Marker = xTicker(yLog, yUnit)
	if r.Shape[1] <= 1 && r.Settings.Second == nil {
		p.Y.Tick.Marker = noTicks{}
	}

	var notes []string
	if measureErr != nil {
		notes = append(notes, measureErr.Error())
	}
	if m == nil {
		notes = append(notes, "no measure given")
	}
	fig.Note = studyNote(r, failed, notes)
	if r.Shape[1] <= 1 && r.Settings.Second == nil {
		fig.Height = vg.Points(260) // a single row needs no height
		if len(r.Steps) > 0 {
			fig.Note += " · one varied quantity: a single row"
		}
	}
	return fig
}

// cellEdges returns the lower and upper edge of each cell centred on vs:
// halfway to the neighbours (geometrically on a logarithmic axis), the end
// cells as wide again outside; and the span of all the cells, for the
// axis. A lone value gets a cell of half its size either side (half a
// decade on a logarithmic axis).
func cellEdges(vs []float64, log bool) (lo, hi []float64, from, to float64) {
	n := len(vs)
	f, inv := func(v float64) float64 { return v }, func(v float64) float64 { return v }
	if log {
		f, inv = math.Log10, func(v float64) float64 { return math.Pow(10, v) }
	}
	t := make([]float64, n)
	for i, v := range vs {
		t[i] = f(v)
	}
	lo, hi = make([]float64, n), make([]float64, n)
	for i := range t {
		var below, above float64
		switch {
		case n == 1:
			d := 0.5
			if !log && t[0] != 0 {
				d = math.Abs(t[0]) / 2
			}
			below, above = t[0]-d, t[0]+d
		case i == 0:
			below, above = t[0]-(t[1]-t[0])/2, (t[0]+t[1])/2
		case i == n-1:
			below, above = (t[i-1]+t[i])/2, t[i]+(t[i]-t[i-1])/2
		default:
			below, above = (t[i-1]+t[i])/2, (t[i]+t[i+1])/2
		}
		if below > above { // values running downwards
			below, above = above, below
		}
		lo[i], hi[i] = inv(below), inv(above)
	}
	from, to = math.Inf(1), math.Inf(-1)
	for i := range lo {
		if finite(lo[i]) && finite(hi[i]) {
			from, to = math.Min(from, lo[i]), math.Max(to, hi[i])
		}
	}
	if !finite(from) || !finite(to) || !(to > from) {
		from, to = 0, 1
		if log {
			from, to = 1, 10
		}
	}
	return lo, hi, from, to
}

// colourMap draws the cells of a two-axis study, with a frame and short
// outward tick marks, since grid lines would cut up the colours.
type colourMap struct {
	xs, ys     []float64
	xLog, yLog bool
	values     [][]float64 // [i][j]: first axis, second axis
	scale      *ColourScale
}

var _ plot.Plotter = (*colourMap)(nil)

// Plot implements plot.Plotter.
func (m *colourMap) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	xlo, xhi, _, _ := cellEdges(m.xs, m.xLog)
	ylo, yhi, _, _ := cellEdges(m.ys, m.yLog)
	seam := vg.Points(1) // overlap the neighbours drawn next: no hairline seams
	for i := range m.xs {
		for j := range m.ys {
			ax, bx := trX(xlo[i]), trX(xhi[i])
			ay, by := trY(ylo[j]), trY(yhi[j])
			if !finite(float64(ax)) || !finite(float64(bx)) || !finite(float64(ay)) || !finite(float64(by)) || bx <= ax || by <= ay {
				continue
			}
			r := vg.Rectangle{Min: vg.Point{X: ax, Y: ay}, Max: vg.Point{X: bx, Y: by}}
			v := math.NaN()
			if i < len(m.values) && j < len(m.values[i]) {
				v = m.values[i][j]
			}
			if !finite(v) {
				hatch(c, r)
				continue
			}
			r.Max.X = min(r.Max.X+seam, c.Max.X)
			r.Max.Y = min(r.Max.Y+seam, c.Max.Y)
			c.FillPolygon(m.scale.Colour(v), []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}})
		}
	}
	frame := draw.LineStyle{Color: ink, Width: frameWidth}
	for _, t := range p.X.Tick.Marker.Ticks(p.X.Min, p.X.Max) {
		if x := trX(t.Value); !t.IsMinor() && c.ContainsX(x) {
			c.StrokeLine2(frame, x, c.Min.Y, x, c.Min.Y-scaleTickLen)
		}
	}
	for _, t := range p.Y.Tick.Marker.Ticks(p.Y.Min, p.Y.Max) {
		if y := trY(t.Value); !t.IsMinor() && c.ContainsY(y) {
			c.StrokeLine2(frame, c.Min.X, y, c.Min.X-scaleTickLen, y)
		}
	}
	c.StrokeLines(frame, []vg.Point{
		{X: c.Min.X, Y: c.Min.Y}, {X: c.Max.X, Y: c.Min.Y},
		{X: c.Max.X, Y: c.Max.Y}, {X: c.Min.X, Y: c.Max.Y}, {X: c.Min.X, Y: c.Min.Y},
	})
}

// referenceLine draws a target or other reference level: thin, dashed,
// in the soft ink, so no curve is mistaken for it.
var referenceLine = draw.LineStyle{Color: inkSoft, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(4), vg.Points(3)}}
