package plots

import (
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"

	"qpoint/ac"
)

// GroupDelay is the group delay -d(arg S21)/dω against frequency, in
// seconds on SI-prefixed ticks; for a one-port it is that of S11, as the
// sweep computes it. A flat delay means the network passes a modulated
// signal's envelope undistorted.
func GroupDelay(r *ac.Response) *Figure {
	of := "S21"
	if len(r.Ports) == 1 {
		of = "S11"
	}
	freqs := frequencies(r)
	delays := make([]float64, len(r.Points))
	for i, p := range r.Points {
		delays[i] = p.GroupDelay
	}
	c := newCurve(freqs, delays, true, false)
	p := NewPanel("Frequency", "Group delay")
	fig := &Figure{
		Name:   "group-delay",
		Title:  "Group delay of " + of,
		Note:   portsNote(r),
		Panels: []*plot.Plot{p},
		Width:  vg.Points(480),
		Height: vg.Points(300),
	}
	p.Add(framePlotter{})
	c.add(p, traceLine(0)) // one curve, named by the title: no key

	// The axes are set last: adding the curve widened them to the raw
	// data.
	x0, x1 := sweepSpan(freqs)
	setFrequencyAxis(p, x0, x1, true)
	_, _, y0, y1 := c.extent()
	// A delay that hardly changes is shown within ±10 % of itself (or
	// ±1 ps about zero), not magnified until rounding noise fills the
	// panel.
	minSpan := math.Max(0.2*math.Max(math.Abs(y0), math.Abs(y1)), 2e-12)
	p.Y.Min, p.Y.Max = linearRange(y0, y1, minSpan, 0, 1e-9, linearStep)
	p.Y.Tick.Marker = LinearTicks{Unit: "s"}
	return fig
}
