package plots

import (
	"fmt"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"qpoint/ac"
	"qpoint/bias/si"
)

// Match is the transmission from port in to port out, 20 log10 |S_out,in|
// in dB, above the return loss of each port, -20 log10 |S_ii| in dB
// (positive: the larger, the better the match), against frequency on a
// logarithmic axis, with the design frequency designHz marked on both
// panels when it lies inside the sweep. out < 0 (an output at a node, or
// a one-port circuit) leaves the transmission panel out.
func Match(r *ac.Response, in, out int, designHz float64) *Figure {
	freqs := frequencies(r)
	fig := &Figure{
		Name:  "match",
		Title: "Transmission and return loss",
		Note:  portsNote(r),
		Width: vg.Points(480),
	}
	lo, hi := sweepSpan(freqs)
	mark := designHz > 0 && designHz >= lo && designHz <= hi
	var panels []*plot.Plot
	k := 0
	if out >= 0 && out < len(r.Ports) && in >= 0 && in < len(r.Ports) {
		t := SParameter(out+1, in+1)
		gain := NewPanel("", "|"+t.Name+"| (dB)")
		gain.Add(framePlotter{X: LogTicks{Unit: "Hz"}})
		vs := values(r, t)
		db := make([]float64, len(vs))
		for i, v := range vs {
			db[i] = decibels(v)
		}
		c := newCurve(freqs, db, true, false)
		fig.Key = append(fig.Key, KeyEntry{Label: t.Name + ", " + portName(r, in) + " to " + portName(r, out), Thumbs: []plot.Thumbnailer{c.add(gain, traceLine(k))}})
		k++
		y0, y1 := spanY([]curve{c})
		y0 = math.Max(y0, y1-120)
		gain.Y.Min, gain.Y.Max = linearRange(y0, y1, 2, -40, 0, linearStep)
		gain.Y.Tick.Marker = LinearTicks{}
		panels = append(panels, gain)
	}
	rl := NewPanel("Frequency", "Return loss (dB)")
	rl.Add(framePlotter{X: LogTicks{Unit: "Hz"}})
	var rls []curve
	for i := range r.Ports {
		vs := values(r, SParameter(i+1, i+1))
		db := make([]float64, len(vs))
		for j, v := range vs {
			db[j] = -decibels(v)
		}
		c := newCurve(freqs, db, true, false)
		rls = append(rls, c)
		fig.Key = append(fig.Key, KeyEntry{Label: "return loss, " + portName(r, i), Thumbs: []plot.Thumbnailer{c.add(rl, traceLine(k))}})
		k++
	}
	y0, y1 := spanY(rls)
	y1 = math.Min(y1, math.Max(y0, 0)+60) // a perfect match would run off to +∞
	rl.Y.Min, rl.Y.Max = linearRange(math.Min(y0, 0), y1, 2, 0, 30, linearStep)
	rl.Y.Tick.Marker = LinearTicks{}
	panels = append(panels, rl)
	for i, p := range panels {
		setFrequencyAxis(p, lo, hi, i == len(panels)-1)
		if mark {
			p.Add(frequencyMark{hz: designHz})
		}
	}
	if mark {
		fig.Key = append(fig.Key, KeyEntry{Label: "design frequency, " + si.Format(designHz, "Hz", 4) + designValues(r, in, out, designHz), Thumbs: []plot.Thumbnailer{markThumb{}}})
	}
	fig.Panels = panels
	fig.Height = vg.Points(170 + 150*float64(len(panels)))
	return fig
}

// designValues says the transmission and input return loss at the
// design frequency, interpolated in dB between the two nearest points.
func designValues(r *ac.Response, in, out int, hz float64) string {
	at := func(t Trace) float64 {
		freqs := frequencies(r)
		for i := 1; i < len(freqs); i++ {
			if freqs[i-1] <= hz && hz <= freqs[i] {
				a, b := decibels(t.At(r.Points[i-1])), decibels(t.At(r.Points[i]))
				u := math.Log(hz/freqs[i-1]) / math.Log(freqs[i]/freqs[i-1])
				return a + u*(b-a)
			}
		}
		if len(freqs) == 1 {
			return decibels(t.At(r.Points[0]))
		}
		return math.NaN()
	}
	s := ""
	if out >= 0 && out < len(r.Ports) && in >= 0 && in < len(r.Ports) {
		if g := at(SParameter(out+1, in+1)); finite(g) {
			s += ": " + formatDB(g) + " dB"
		}
	}
	if in >= 0 && in < len(r.Ports) {
		if m := at(SParameter(in+1, in+1)); finite(m) {
			if s == "" {
				s += ":"
			} else {
				s += ","
			}
			s += " return loss " + formatDB(-m) + " dB"
		}
	}
	return s
}

func formatDB(v float64) string { return fmt.Sprintf("%.1f", v) }

// frequencyMark draws a vertical line at the design frequency.
type frequencyMark struct{ hz float64 }

var _ plot.Plotter = frequencyMark{}

var markLine = draw.LineStyle{Color: ink, Width: vg.Points(0.9), Dashes: []vg.Length{vg.Points(3), vg.Points(2.5)}}

// Plot implements plot.Plotter.
func (m frequencyMark) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	x := trX(m.hz)
	if c.ContainsX(x) {
		c.StrokeLine2(markLine, x, c.Min.Y, x, c.Max.Y)
	}
}

// markThumb is the design frequency's line, for a key.
type markThumb struct{}

func (markThumb) Thumbnail(c *draw.Canvas) {
	x := c.Center().X
	c.StrokeLine2(markLine, x, c.Min.Y, x, c.Max.Y)
}
