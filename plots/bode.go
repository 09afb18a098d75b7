package plots

import (
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"

	"qpoint/ac"
	"qpoint/bias/si"
)

// Trace is one complex quantity read from every point of a sweep: an
// S-parameter or a probe's transfer.
type Trace struct {
	// Name labels the trace in the key, e.g. "S21" or "probe detector".
	Name string
	// At returns the quantity at p, or NaN where p does not carry it.
	At func(p ac.Point) complex128

	probe bool // a probe voltage rather than a wave ratio: the note says what it is referred to
}

// SParameter is the trace of S_(out)(in), with ports numbered from 1 as
// the trade writes them: SParameter(2, 1) is S21.
func SParameter(out, in int) Trace {
	name := "S" + strconv.Itoa(out) + strconv.Itoa(in)
	if out > 9 || in > 9 {
		name = "S" + strconv.Itoa(out) + "," + strconv.Itoa(in) // S10,1 and S1,01 read apart
	}
	return Trace{Name: name, At: func(p ac.Point) complex128 {
		i, j := out-1, in-1
		if i < 0 || j < 0 || i >= len(p.S) || j >= len(p.S[i]) {
			return cmplx.NaN()
		}
		return p.S[i][j]
	}}
}

// Probe is the trace of the named probe's voltage per volt of port 1's
// generator EMF.
func Probe(r *ac.Response, name string) (Trace, error) {
	for k, n := range r.Probes {
		if n == name {
			return Trace{Name: "probe " + name, probe: true, At: func(p ac.Point) complex128 {
				if k >= len(p.Probes) {
					return cmplx.NaN()
				}
				return p.Probes[k]
			}}, nil
		}
	}
	return Trace{}, fmt.Errorf("no probe named %q in the sweep (it has %s)", name, listOrNone(r.Probes))
}

// DefaultTraces are the traces Bode shows when given none: the forward
// transmission S21 and the input match S11 of a network with two or more
// ports, S11 alone for a one-port, and every probe.
func DefaultTraces(r *ac.Response) []Trace {
	var ts []Trace
	switch {
	case len(r.Ports) >= 2:
		ts = append(ts, SParameter(2, 1), SParameter(1, 1))
	case len(r.Ports) == 1:
		ts = append(ts, SParameter(1, 1))
	}
	for _, name := range r.Probes {
		t, _ := Probe(r, name) // cannot fail: the name comes from r
		ts = append(ts, t)
	}
	return ts
}

// Bode is the magnitude (dB) and phase (degrees) of each trace against
// frequency on a logarithmic axis, in two stacked panels that share it.
// Magnitude is 20 log10 |T|, which is the gain for a transmission and the
// negative of the return loss for a reflection; phase is unwrapped so that
// it runs on smoothly past ±180°. With no traces given it shows
// DefaultTraces.
func Bode(r *ac.Response, traces ...Trace) *Figure {
	if len(traces) == 0 {
		traces = DefaultTraces(r)
	}
	freqs := frequencies(r)
	gain := NewPanel("", "Magnitude (dB)")
	phase := NewPanel("Frequency", "Phase (°)")
	fig := &Figure{
		Name:   "gain-phase",
		Title:  "Magnitude and phase",
		Note:   portsNote(r),
		Panels: []*plot.Plot{gain, phase},
		Width:  vg.Points(480),
		Height: vg.Points(420),
	}

	var gains, phases []curve
	for _, t := range traces {
		vs := values(r, t)
		db := make([]float64, len(vs))
		for i, v := range vs {
			db[i] = decibels(v)
		}
		gains = append(gains, newCurve(freqs, db, true, false))
		phases = append(phases, newCurve(freqs, unwrapDegrees(vs), true, false))
	}

	gain.Add(framePlotter{X: LogTicks{Unit: "Hz"}})
	phase.Add(framePlotter{X: LogTicks{Unit: "Hz"}})
	probes := false
	for k, t := range traces {
		ls := traceLine(k)
		thumb := gains[k].add(gain, ls)
		phases[k].add(phase, ls)
		fig.Key = append(fig.Key, KeyEntry{Label: t.Name, Thumbs: []plot.Thumbnailer{thumb}})
		probes = probes || t.probe
	}
	if probes {
		fig.Note += " · probes per volt of port 1's EMF"
	}

	// The axes are set last: adding the curves widened them to the raw
	// data.
	fx0, fx1 := sweepSpan(freqs)
	setFrequencyAxis(gain, fx0, fx1, false)
	setFrequencyAxis(phase, fx0, fx1, true)
	gy0, gy1 := spanY(gains)
	// Deep nulls (a balanced mixer's isolation, an exact zero of
	// transmission) would squash everything else into the top of the
	// panel; below 120 dB under the largest value the curves run off the
	// bottom instead.
	gy0 = math.Max(gy0, gy1-120)
	gain.Y.Min, gain.Y.Max = linearRange(gy0, gy1, 2, -40, 0, linearStep)
	gain.Y.Tick.Marker = LinearTicks{}
	py0, py1 := spanY(phases)
	phase.Y.Min, phase.Y.Max = linearRange(py0, py1, 10, -180, 180, phaseStep)
	phase.Y.Tick.Marker = PhaseTicks{}
	return fig
}

// frequencies lists the sweep's frequencies in order.
func frequencies(r *ac.Response) []float64 {
	fs := make([]float64, len(r.Points))
	for i, p := range r.Points {
		fs[i] = p.FrequencyHz
	}
	return fs
}

// values reads a trace at every point of the sweep.
func values(r *ac.Response, t Trace) []complex128 {
	vs := make([]complex128, len(r.Points))
	for i, p := range r.Points {
		if t.At == nil {
			vs[i] = cmplx.NaN()
			continue
		}
		vs[i] = t.At(p)
	}
	return vs
}

// setFrequencyAxis makes p's x axis a logarithmic frequency axis over the
// sweep, labelled only when it is the bottom panel of a stack.
func setFrequencyAxis(p *plot.Plot, lo, hi float64, labelled bool) {
	p.X.Scale = plot.LogScale{}
	p.X.Min, p.X.Max = frequencyRange(lo, hi)
	if labelled {
		p.X.Tick.Marker = LogTicks{Unit: "Hz"}
	} else {
		p.X.Tick.Marker = hideLabels{LogTicks{Unit: "Hz"}}
	}
}

// sweepSpan is the range of the sweep's usable frequencies, the x range
// of every frequency panel whether or not its traces have values there.
func sweepSpan(freqs []float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, f := range freqs {
		if f > 0 && finite(f) {
			lo, hi = math.Min(lo, f), math.Max(hi, f)
		}
	}
	return lo, hi
}

// spanY is the extent of a set of curves' values, infinite (and so
// rejected by the range helpers) when there is nothing to draw.
func spanY(cs []curve) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, c := range cs {
		_, _, y0, y1 := c.extent()
		lo, hi = math.Min(lo, y0), math.Max(hi, y1)
	}
	return lo, hi
}

// portsNote names the ports and the reference impedances that every
// S-parameter and Smith chart is referred to, and counts the points.
func portsNote(r *ac.Response) string {
	if len(r.Points) == 0 {
		return "The sweep has no points."
	}
	var parts []string
	for i, p := range r.Ports {
		parts = append(parts, si.Format(p.Impedance, "Ω", 3)+" ("+portName(r, i)+")")
	}
	points := fmt.Sprintf("%d points", len(r.Points))
	if len(r.Points) == 1 {
		points = "1 point"
	}
	switch len(parts) {
	case 0:
		return points + ", no ports"
	case 1:
		return "Reference impedance " + parts[0] + " · " + points
	}
	return "Reference impedances " + strings.Join(parts, ", ") + " · " + points
}

func listOrNone(names []string) string {
	if len(names) == 0 {
		return "none"
	}
	return strings.Join(names, ", ")
}
