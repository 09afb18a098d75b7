package plots

import (
	"fmt"
	"image/color"
	"math"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"qpoint/ac/transient"
	"qpoint/bias/si"
	"qpoint/smallsignal"
)

// bandBins is how many columns a waveform far denser than the page is
// drawn in: each column is the span of the samples that fall in it.
const bandBins = 1200

// waveBand draws the samples (ts, ys) over [lo, hi] on p: as a line when
// they are few enough to see, else as the filled band between each
// column's least and greatest sample, which is how a carrier's waveform
// looks at this scale. A column spans at least cycle seconds (a carrier
// period), so that each holds a whole swing. It returns the key's
// thumbnail.
func waveBand(p *plot.Plot, ts, ys []float64, lo, hi, cycle float64, clr color.Color) plot.Thumbnailer {
	n := 0
	for i, t := range ts {
		if t >= lo && t <= hi && i < len(ys) {
			n++
		}
	}
	line := draw.LineStyle{Color: clr, Width: vg.Points(0.8)}
	if n <= 2*bandBins {
		xs, vs := make([]float64, 0, n), make([]float64, 0, n)
		for i, t := range ts {
			if t >= lo && t <= hi && i < len(ys) {
				xs, vs = append(xs, t), append(vs, ys[i])
			}
		}
		return newCurve(xs, vs, false, false).add(p, line)
	}
	bins := bandBins
	if cycle > 0 {
		bins = max(1, min(bins, int((hi-lo)/cycle)))
	}
	// One pass: each sample goes to the column [a, b) holding it, a =
	// lo + k width, with the same comparisons a column-by-column scan
	// would make.
	width := (hi - lo) / float64(bins)
	least, most := make([]float64, bins), make([]float64, bins)
	for k := range least {
		least[k], most[k] = math.Inf(1), math.Inf(-1)
	}
	for i, x := range ts {
		if i >= len(ys) || x < lo || x > hi || !finite(ys[i]) {
			continue
		}
		k := min(bins-1, max(0, int((x-lo)/width)))
		for k > 0 && x < lo+float64(k)*width {
			k--
		}
		for k < bins-1 && x >= lo+float64(k+1)*width {
			k++
		}
		if x < lo+float64(k)*width || x >= lo+float64(k+1)*width {
			continue
		}
		least[k], most[k] = math.Min(least[k], ys[i]), math.Max(most[k], ys[i])
	}
	var top, bottom plotter.XYs
	for k := 0; k < bins; k++ {
		if least[k] > most[k] {
			continue
		}
		a, b := lo+float64(k)*width, lo+float64(k+1)*width
		mid := (a + b) / 2
		top = append(top, plotter.XY{X: mid, Y: most[k]})
		bottom = append(bottom, plotter.XY{X: mid, Y: least[k]})
	}
	for i, j := 0, len(bottom)-1; i < j; i, j = i+1, j-1 {
		bottom[i], bottom[j] = bottom[j], bottom[i]
	}
	poly, err := plotter.NewPolygon(append(top, bottom...))
	if err == nil {
		poly.Color = clr
		poly.LineStyle = line
		p.Add(poly)
	}
	return &plotter.Line{LineStyle: draw.LineStyle{Color: clr, Width: vg.Points(4)}}
}

// finiteSpan returns the least and greatest finite ys whose ts lie in
// [lo, hi] (every one when ts is nil): the extent of their curve, without
// building it.
func finiteSpan(ts, ys []float64, lo, hi float64) (least, most float64) {
	least, most = math.Inf(1), math.Inf(-1)
	for i, y := range ys {
		if ts != nil && (i >= len(ts) || ts[i] < lo || ts[i] > hi) {
			continue
		}
		if finite(y) && (ts == nil || finite(ts[i])) {
			least, most = math.Min(least, y), math.Max(most, y)
		}
	}
	return least, most
}

// cycleOf is the longer of the carrier's and the probe's periods.
func cycleOf(r *transient.PulseResult) float64 {
	p := r.Settings.Pulse
	c := 1 / p.CarrierHz
	if p.ProbeEMF != 0 {
		c = math.Max(c, 1/p.ProbeHz)
	}
	return c
}

// timeAxis sets p's x axis to [lo, hi] seconds with prefixed labels.
func timeAxis(p *plot.Plot, lo, hi float64) {
	p.X.Min, p.X.Max = lo, hi
	p.X.Tick.Marker = LinearTicks{Unit: "s"}
}

// pulseSpan shades the pulses' spans lightly on p.
type pulseSpan struct {
	spans [][2]float64
}

func (s pulseSpan) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	fill := rgbaOver(0xDB8A1F, 0x1c)
	for _, sp := range s.spans {
		x0, x1 := max(trX(sp[0]), c.Min.X), min(trX(sp[1]), c.Max.X)
		if x1 <= x0 {
			continue
		}
		c.FillPolygon(fill, []vg.Point{{X: x0, Y: c.Min.Y}, {X: x1, Y: c.Min.Y}, {X: x1, Y: c.Max.Y}, {X: x0, Y: c.Max.Y}})
	}
}

func spansOf(r *transient.PulseResult) pulseSpan {
	var s pulseSpan
	for _, f := range r.Pulses {
		s.spans = append(s.spans, [2]float64{f.Start, f.End})
	}
	return s
}

// flatLine draws a horizontal reference at y across p's x range.
func flatLine(p *plot.Plot, y float64, style draw.LineStyle) plot.Thumbnailer {
	return newCurve([]float64{p.X.Min, p.X.Max}, []float64{y, y}, false, false).add(p, style)
}

var (
	referenceStyle = draw.LineStyle{Color: inkSoft, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(5), vg.Points(3)}}
	thinReference  = draw.LineStyle{Color: inkSoft, Width: vg.Points(0.8), Dashes: []vg.Length{vg.Points(2), vg.Points(2)}}
	bandColour     = rgbaOver(0x1F4E89, 0x90)
)

// PulseFigures returns a pulse run's figures: the output against time with
// its envelope and, below, the envelope power (a limiter's spike and flat
// leakage marked) or the video output (a detector's 10 and 90 % levels and
// its steady-state shift marked) — "pulse-output"; the leading and
// trailing edges of the last pulse at a scale that shows the carrier —
// "pulse-edges"; each diode's junction current — "pulse-junctions"; and,
// for a limiter with a probe, the probe's loss after the pulse against its
// value before, with the 1 and 3 dB recovery marked — "pulse-recovery".
func PulseFigures(r *transient.PulseResult, nw *smallsignal.Network) []*Figure {
	if r == nil || r.Run == nil || len(r.Run.Times) < 2 {
		return nil
	}
	figs := []*Figure{pulseOutput(r, nw), pulseEdges(r), pulseJunctions(r)}
	if r.Kind == transient.Limiter && r.Settings.Pulse.ProbeEMF != 0 && len(r.Pulses) > 0 {
		figs = append(figs, pulseRecovery(r))
	}
	return figs
}

// powerDBm converts an envelope amplitude at the output to dBm into rOut.
func powerDBm(a, rOut float64) float64 {
	w := a * a / (2 * rOut)
	if !(w > 0) {
		return math.NaN()
	}
	return 10 * math.Log10(w*1e3)
}

func outputImpedance(r *transient.PulseResult, nw *smallsignal.Network) float64 {
	if o := r.Settings.Output; o.Port >= 0 && o.Port < len(nw.Ports) {
		return nw.Ports[o.Port].Impedance
	}
	return math.NaN()
}

func pulseOutput(r *transient.PulseResult, nw *smallsignal.Network) *Figure {
	run := r.Run
	lo, hi := run.Times[0], run.Times[len(run.Times)-1]
	top := NewPanel("", "Output (V)")
	fig := &Figure{Name: "pulse-output", Title: "Output under the pulse", Width: vg.Points(560), Height: vg.Points(520)}
	top.Add(framePlotter{}, spansOf(r))
	wave := waveBand(top, run.Times, r.Output, lo, hi, cycleOf(r), bandColour)
	var up, down []float64
	for i, a := range r.Envelope {
		base := r.Video[i]
		up, down = append(up, base+a), append(down, base-a)
	}
	envStyle := traceLine(1)
	envStyle.Dashes = nil
	env := newCurve(r.EnvelopeTimes, up, false, false).add(top, envStyle)
	newCurve(r.EnvelopeTimes, down, false, false).add(top, envStyle)
	fig.Key = append(fig.Key, KeyEntry{Label: "output", Thumbs: []plot.Thumbnailer{wave}},
		KeyEntry{Label: "its envelope at the carrier", Thumbs: []plot.Thumbnailer{env}})
	ylo, yhi := finiteSpan(run.Times, r.Output, math.Inf(-1), math.Inf(1))
	top.Y.Min, top.Y.Max = linearRange(ylo, yhi, 1e-3, -1, 1, linearStep)
	top.Y.Tick.Marker = LinearTicks{}
	timeAxis(top, lo, hi)
	top.X.Tick.Marker = hideLabels{LinearTicks{Unit: "s"}}

	bottom := NewPanel("Time", "")
	bottom.Add(framePlotter{}, spansOf(r))
	timeAxis(bottom, lo, hi)
	f := r.Figures
	var notes []string
	if r.Kind == transient.Detector {
		bottom.Y.Label.Text = "Video change (V)"
		var ch []float64
		for _, v := range r.Video {
			ch = append(ch, v-r.Baseline)
		}
		vs := traceLine(0)
		vs.Dashes = nil
		c := newCurve(r.EnvelopeTimes, ch, false, false)
		video := c.add(bottom, vs)
		fig.Key = append(fig.Key, KeyEntry{Label: "video (mean over a carrier period)", Thumbs: []plot.Thumbnailer{video}})
		ylo, yhi := spanY([]curve{c})
		ref := r.SteadyShift
		if !finite(ref) {
			ref = f.Settled
		}
		if finite(ref) {
			ylo, yhi = math.Min(ylo, ref), math.Max(yhi, ref)
		}
		bottom.Y.Min, bottom.Y.Max = linearRange(math.Min(ylo, 0), math.Max(yhi, 0), 1e-9, -1, 1, linearStep)
		bottom.Y.Tick.Marker = LinearTicks{Unit: "V"}
		bottom.Y.Label.Text = "Video change"
		if finite(r.SteadyShift) {
			th := flatLine(bottom, r.SteadyShift, referenceStyle)
			fig.Key = append(fig.Key, KeyEntry{Label: "steady-state DC shift", Thumbs: []plot.Thumbnailer{th}})
		}
		if finite(ref) {
			th := flatLine(bottom, 0.1*ref, thinReference)
			flatLine(bottom, 0.9*ref, thinReference)
			fig.Key = append(fig.Key, KeyEntry{Label: "10 and 90 %", Thumbs: []plot.Thumbnailer{th}})
		}
		notes = append(notes, "settled "+si.Format(f.Settled, "V", 4), "rise "+timeText(f.RiseTime), "fall "+timeText(f.FallTime))
	} else {
		rOut := outputImpedance(r, nw)
		var dbm []float64
		for _, a := range r.Envelope {
			dbm = append(dbm, powerDBm(a, rOut))
		}
		ps := traceLine(0)
		ps.Dashes = nil
		c := newCurve(r.EnvelopeTimes, dbm, false, false)
		th := c.add(bottom, ps)
		fig.Key = append(fig.Key, KeyEntry{Label: "output power (one carrier period)", Thumbs: []plot.Thumbnailer{th}})
		ylo, yhi := spanY([]curve{c})
		if finite(yhi) {
			ylo = math.Max(ylo, yhi-80)
		}
		bottom.Y.Min, bottom.Y.Max = linearRange(ylo, yhi, 10, -40, 0, linearStep)
		bottom.Y.Tick.Marker = LinearTicks{}
		bottom.Y.Label.Text = "Output power (dBm)"
		if f.Flat > 0 {
			flat := 10 * math.Log10(f.Flat*1e3)
			th := flatLine(bottom, flat, referenceStyle)
			fig.Key = append(fig.Key, KeyEntry{Label: fmt.Sprintf("flat leakage %.1f dBm", flat), Thumbs: []plot.Thumbnailer{th}})
			notes = append(notes, fmt.Sprintf("flat leakage %.2f dBm", flat))
		}
		if f.SpikePeak > 0 && f.SpikeEnergy > 0 {
			spike := 10 * math.Log10(f.SpikePeak*1e3)
			bottom.Add(&levelMark{x: f.SpikeTime, y: spike, label: fmt.Sprintf("spike %.1f dBm", spike)})
			notes = append(notes, fmt.Sprintf("spike %.2f dBm, %s above the flat leakage", spike, si.Format(f.SpikeEnergy, "J", 3)))
		} else if f.SpikePeak > 0 {
			notes = append(notes, "no spike: the leading edge stays within 1 dB of the flat leakage")
		}
		if r.Settings.Pulse.ProbeEMF != 0 {
			notes = append(notes, "recovery to 1 dB "+boundText(f.Recovery1dB, f.Recovery1dBBound)+", to 3 dB "+boundText(f.Recovery3dB, f.Recovery3dBBound))
		}
	}
	fig.Panels = []*plot.Plot{top, bottom}
	fig.Note = pulseNote(r) + " · " + strings.Join(notes, " · ")
	return fig
}

// timeText formats a duration, or "—".
func timeText(t float64) string {
	if !finite(t) {
		return "—"
	}
	return si.Format(t, "s", 3)
}

// boundText formats a duration that may be an upper bound.
func boundText(t float64, bound bool) string {
	if bound && finite(t) {
		return "≤ " + timeText(t)
	}
	return timeText(t)
}

// pulseNote says what drove the circuit.
func pulseNote(r *transient.PulseResult) string {
	p := r.Settings.Pulse
	s := fmt.Sprintf("%s carrier, width %s, rise %s, fall %s", si.Format(p.CarrierHz, "Hz", 4), si.Format(p.Width, "s", 3), si.Format(p.Rise, "s", 3), si.Format(p.Fall, "s", 3))
	if p.Period > 0 {
		s += fmt.Sprintf(", every %s", si.Format(p.Period, "s", 3))
	}
	return s + "; pulses shaded"
}

// pulseEdges shows the last pulse's leading edge and its trailing edge
// with what follows, where the spike and the recovery happen, at a scale
// that resolves the carrier.
func pulseEdges(r *transient.PulseResult) *Figure {
	run := r.Run
	fig := &Figure{Name: "pulse-edges", Title: "The pulse's edges", Width: vg.Points(560), Height: vg.Points(520)}
	p := r.Settings.Pulse
	tc := 1 / p.CarrierHz
	k := max(p.Count, 1) - 1
	if n := len(r.Pulses); n > 0 {
		k = r.Pulses[n-1].Pulse
	}
	c := p.Corners(k)
	end := run.Times[len(run.Times)-1]
	lead := [2]float64{c[0] - 3*tc, math.Min(c[1]+math.Max(30*tc, 0.5*(c[1]-c[0])), c[2])}
	after := math.Max(40*tc, 0.2*(c[3]-c[2]))
	if f := r.Figures; finite(f.Recovery3dB) {
		after = math.Max(after, 1.5*f.Recovery3dB)
	}
	trail := [2]float64{c[2] - 10*tc, math.Min(c[3]+after, end)}
	var panels []*plot.Plot
	for i, span := range [][2]float64{lead, trail} {
		label := "Time (leading edge)"
		if i == 1 {
			label = "Time (trailing edge and after)"
		}
		pl := NewPanel(label, "Output (V)")
		pl.Add(framePlotter{}, spansOf(r))
		lo, hi := math.Max(span[0], run.Times[0]), math.Min(span[1], end)
		if !(hi > lo) {
			continue
		}
		wave := waveBand(pl, run.Times, r.Output, lo, hi, cycleOf(r), Palette[0])
		var ex, eu, ed []float64
		for j, t := range r.EnvelopeTimes {
			if t >= lo && t <= hi {
				ex, eu, ed = append(ex, t), append(eu, r.Video[j]+r.Envelope[j]), append(ed, r.Video[j]-r.Envelope[j])
			}
		}
		es := traceLine(1)
		env := newCurve(ex, eu, false, false).add(pl, es)
		newCurve(ex, ed, false, false).add(pl, es)
		if i == 0 {
			fig.Key = append(fig.Key, KeyEntry{Label: "output", Thumbs: []plot.Thumbnailer{wave}},
				KeyEntry{Label: "envelope", Thumbs: []plot.Thumbnailer{env}})
		}
		ylo, yhi := finiteSpan(run.Times, r.Output, lo, hi)
		pl.Y.Min, pl.Y.Max = linearRange(ylo, yhi, 1e-3, -1, 1, linearStep)
		pl.Y.Tick.Marker = LinearTicks{}
		timeAxis(pl, lo, hi)
		panels = append(panels, pl)
	}
	fig.Panels = panels
	fig.Note = fmt.Sprintf("Pulse %d: its rise from %s, its fall to %s; shaded while the carrier is on", k+1, si.Format(c[0], "s", 4), si.Format(c[3], "s", 4))
	return fig
}

// pulseJunctions shows each diode's junction current against time.
func pulseJunctions(r *transient.PulseResult) *Figure {
	run := r.Run
	lo, hi := run.Times[0], run.Times[len(run.Times)-1]
	p := NewPanel("Time", "Junction current")
	fig := &Figure{Name: "pulse-junctions", Title: "Junction currents under the pulse", Panels: []*plot.Plot{p}, Width: vg.Points(560), Height: vg.Points(360)}
	p.Add(framePlotter{}, spansOf(r))
	ylo, yhi := math.Inf(1), math.Inf(-1)
	var notes []string
	for k, d := range run.Diodes {
		if k == 4 {
			notes = append(notes, fmt.Sprintf("%d more diodes not drawn", len(run.Diodes)-4))
			break
		}
		clr := Palette[k%len(Palette)]
		if c, ok := clr.(color.RGBA); ok {
			clr = color.RGBA{R: uint8(uint32(c.R) * 0xb0 / 0xff), G: uint8(uint32(c.G) * 0xb0 / 0xff), B: uint8(uint32(c.B) * 0xb0 / 0xff), A: 0xb0}
		}
		th := waveBand(p, run.Times, d.Current, lo, hi, cycleOf(r), clr)
		fig.Key = append(fig.Key, KeyEntry{Label: d.Name, Thumbs: []plot.Thumbnailer{th}})
		a, b := finiteSpan(run.Times, d.Current, math.Inf(-1), math.Inf(1))
		ylo, yhi = math.Min(ylo, a), math.Max(yhi, b)
	}
	for _, d := range r.Diodes {
		notes = append(notes, fmt.Sprintf("%s peak %s", d.Name, si.Format(d.PeakCurrent, "A", 3)))
	}
	p.Y.Min, p.Y.Max = linearRange(ylo, yhi, 1e-9, -1e-3, 1e-3, linearStep)
	p.Y.Tick.Marker = LinearTicks{Unit: "A"}
	p.Y.Label.Text = "Junction current"
	timeAxis(p, lo, hi)
	fig.Note = "Current through each junction, anode to cathode (charging currents excluded) · " + strings.Join(notes, " · ")
	return fig
}

// pulseRecovery shows the probe's loss against its value before the first
// pulse, from the last pulse's end on.
func pulseRecovery(r *transient.PulseResult) *Figure {
	f := r.Figures
	p := NewPanel("Time after the pulse's end", "Probe loss above its value before (dB)")
	fig := &Figure{Name: "pulse-recovery", Title: "Recovery after the pulse", Panels: []*plot.Plot{p}, Width: vg.Points(520), Height: vg.Points(360)}
	p.Add(framePlotter{})
	var xs, ys []float64
	for i, t := range r.EnvelopeTimes {
		if t >= f.End && finite(r.LossChange[i]) {
			xs, ys = append(xs, t-f.End), append(ys, r.LossChange[i])
		}
	}
	ls := traceLine(0)
	ls.Dashes = nil
	c := newCurve(xs, ys, false, false)
	th := c.add(p, ls)
	fig.Key = append(fig.Key, KeyEntry{Label: "probe loss change", Thumbs: []plot.Thumbnailer{th}})
	x1 := 1e-9
	if len(xs) > 0 {
		x1 = xs[len(xs)-1]
	}
	timeAxis(p, 0, x1)
	ylo, yhi := spanY([]curve{c})
	p.Y.Min, p.Y.Max = linearRange(math.Max(-5, math.Min(0, ylo)), math.Max(4, math.Min(yhi, 60)), 4, 0, 4, linearStep)
	p.Y.Tick.Marker = LinearTicks{}
	band := flatLine(p, 1, thinReference)
	flatLine(p, 3, thinReference)
	if ylo < -1 {
		// The loss fell below its value before: the band is two-sided.
		flatLine(p, -1, thinReference)
		flatLine(p, -3, thinReference)
	}
	fig.Key = append(fig.Key, KeyEntry{Label: "1 and 3 dB", Thumbs: []plot.Thumbnailer{band}})
	// side returns the sign of the loss change just before t: the side of
	// the band the curve comes back through.
	side := func(t float64) float64 {
		sgn := 1.0
		for i, x := range xs {
			if x > t {
				break
			}
			if ys[i] < 0 {
				sgn = -1
			} else {
				sgn = 1
			}
		}
		return sgn
	}
	var notes []string
	for _, m := range []struct {
		t, db float64
		bound bool
	}{{f.Recovery3dB, 3, f.Recovery3dBBound}, {f.Recovery1dB, 1, f.Recovery1dBBound}} {
		switch {
		case m.bound:
			notes = append(notes, fmt.Sprintf("within %g dB at the first reading: recovery ≤ %s", m.db, si.Format(m.t, "s", 3)))
		case finite(m.t):
			p.Add(&levelMark{x: m.t, y: side(m.t) * m.db, label: fmt.Sprintf("%g dB: %s", m.db, si.Format(m.t, "s", 3))})
		default:
			notes = append(notes, fmt.Sprintf("not back within %g dB by the end of the run", m.db))
		}
	}
	notes = append([]string{fmt.Sprintf("Probe %s at %s; its loss before the pulse %.3f dB (small-signal %.3f dB); read over a triangular window two probe periods long",
		si.Format(r.Settings.Pulse.ProbeEMF, "V", 3)+" EMF", si.Format(r.Settings.Pulse.ProbeHz, "Hz", 4), r.LossBefore, r.SmallSignalLoss)}, notes...)
	fig.Note = strings.Join(notes, " · ")
	return fig
}

// PulseLevelSweep shows a limiter's flat leakage and spike peak against the
// carrier's available power, beside the line of no limiting, and its
// recovery times below; or a detector's video change and steady-state
// shift, and its rise and fall times.
func PulseLevelSweep(pts []transient.LevelPoint) *Figure {
	top := NewPanel("", "")
	bottom := NewPanel("Available carrier power (dBm)", "")
	fig := &Figure{Name: "pulse-level-sweep", Panels: []*plot.Plot{top, bottom}, Width: vg.Points(500), Height: vg.Points(520)}
	top.Add(framePlotter{})
	bottom.Add(framePlotter{})
	detector := false
	for _, p := range pts {
		if p.Result != nil {
			detector = p.Result.Kind == transient.Detector
			break
		}
	}
	var xs []float64
	series := make([][]float64, 4)
	for _, p := range pts {
		xs = append(xs, p.LevelDBm)
		vals := []float64{math.NaN(), math.NaN(), math.NaN(), math.NaN()}
		if r := p.Result; r != nil && len(r.Pulses) > 0 {
			f := r.Figures
			if detector {
				vals = []float64{f.Settled, r.SteadyShift, f.RiseTime, f.FallTime}
			} else {
				dbm := func(w float64) float64 {
					if !(w > 0) {
						return math.NaN()
					}
					return 10 * math.Log10(w*1e3)
				}
				vals = []float64{dbm(f.Flat), dbm(f.SpikePeak), f.Recovery1dB, f.Recovery3dB}
			}
		}
		for k := range series {
			series[k] = append(series[k], vals[k])
		}
	}
	labels := []string{"flat leakage", "spike peak", "recovery to 1 dB", "recovery to 3 dB"}
	fig.Title = "Limiter against pulse power"
	top.Y.Label.Text = "Output power (dBm)"
	bottom.Y.Label.Text = "Recovery time"
	if detector {
		labels = []string{"video change at the pulse's end", "steady-state DC shift", "rise 10-90 %", "fall 90-10 %"}
		fig.Title = "Detector against pulse power"
		top.Y.Label.Text = "Video change"
		bottom.Y.Label.Text = "Time"
	}
	var topCurves, bottomCurves []curve
	for k, ys := range series {
		pl := top
		if k >= 2 {
			pl = bottom
		}
		st := traceLine(k % 2)
		c := newCurve(xs, ys, false, false)
		th := c.add(pl, st)
		dots := &plotter.Scatter{GlyphStyle: draw.GlyphStyle{Color: st.Color, Radius: markerRadius * 0.7, Shape: draw.CircleGlyph{}}}
		for _, run := range c.runs {
			dots.XYs = append(dots.XYs, run...)
		}
		pl.Add(dots)
		fig.Key = append(fig.Key, KeyEntry{Label: labels[k], Thumbs: []plot.Thumbnailer{th}})
		if k < 2 {
			topCurves = append(topCurves, c)
		} else {
			bottomCurves = append(bottomCurves, c)
		}
	}
	x0, x1 := math.Inf(1), math.Inf(-1)
	for _, x := range xs {
		x0, x1 = math.Min(x0, x), math.Max(x1, x)
	}
	x0, x1 = linearRange(x0, x1, 5, -10, 10, linearStep)
	for _, pl := range []*plot.Plot{top, bottom} {
		pl.X.Min, pl.X.Max = x0, x1
		pl.X.Tick.Marker = LinearTicks{}
	}
	top.X.Tick.Marker = hideLabels{LinearTicks{}}
	ylo, yhi := spanY(topCurves)
	if !detector {
		// The line of no limiting: the available power itself.
		th := newCurve([]float64{x0, x1}, []float64{x0, x1}, false, false).add(top, referenceStyle)
		fig.Key = append(fig.Key, KeyEntry{Label: "available power (no limiting)", Thumbs: []plot.Thumbnailer{th}})
		ylo, yhi = math.Min(ylo, x0), math.Max(yhi, math.Min(x1, yhi+10))
		top.Y.Tick.Marker = LinearTicks{}
	} else {
		top.Y.Tick.Marker = LinearTicks{Unit: "V"}
	}
	top.Y.Min, top.Y.Max = linearRange(ylo, yhi, 1e-9, -10, 10, linearStep)
	blo, bhi := spanY(bottomCurves)
	bottom.Y.Min, bottom.Y.Max = linearRange(math.Min(0, blo), bhi, 1e-12, 0, 1e-9, linearStep)
	bottom.Y.Tick.Marker = LinearTicks{Unit: "s"}
	notes := []string{fmt.Sprintf("%d levels; each a run of its own from the DC point", len(pts))}
	// Where a diode first passes a rating: the limiter's own limit.
	rated := math.NaN()
	bounds := 0
	for _, p := range pts {
		r := p.Result
		if r == nil {
			continue
		}
		for _, c := range r.Cautions {
			switch c.Kind {
			case transient.CurrentRating, transient.ReverseRating, transient.PowerRating, transient.SmallJunction:
				if math.IsNaN(rated) {
					rated = p.LevelDBm
				}
			}
		}
		if r.Figures.Recovery1dBBound || r.Figures.Recovery3dBBound {
			bounds++
		}
	}
	if finite(rated) {
		st := draw.LineStyle{Color: Palette[3], Width: vg.Points(1), Dashes: []vg.Length{vg.Points(1), vg.Points(2)}}
		var th plot.Thumbnailer
		for _, pl := range []*plot.Plot{top, bottom} {
			th = newCurve([]float64{rated, rated}, []float64{pl.Y.Min, pl.Y.Max}, false, false).add(pl, st)
		}
		fig.Key = append(fig.Key, KeyEntry{Label: "a rating first exceeded", Thumbs: []plot.Thumbnailer{th}})
		notes = append(notes, fmt.Sprintf("a diode's rating is exceeded from %.1f dBm", rated))
	}
	if bounds > 0 && !detector {
		notes = append(notes, fmt.Sprintf("at %d levels the recovery was within the probe's reading time: drawn at that upper bound", bounds))
	}
	fig.Note = strings.Join(notes, " · ")
	return fig
}
