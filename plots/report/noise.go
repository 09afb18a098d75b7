package report

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strconv"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/bias/circuit"
	"qpoint/bias/diode"
	"qpoint/bias/si"
	"qpoint/plots"
	"qpoint/smallsignal"
)

// NoiseFigures returns the noise figures of package plots: the output
// Density against frequency, with the thermal floor sqrt(k T0 Z0) that a
// 290 K source behind a matched, noiseless network leaves across an output
// port's load, and each source's share of the output noise power, stacked.
func NoiseFigures(r *ac.NoiseResult) []*plots.Figure {
	n := len(r.Points)
	freqs, dens := make([]float64, n), make([]float64, n)
	shares := make([][]float64, len(r.Sources))
	for k := range shares {
		shares[k] = make([]float64, n)
	}
	for i, pt := range r.Points {
		freqs[i], dens[i] = pt.FrequencyHz, pt.Density()
		for k, c := range pt.Contributions {
			shares[k][i] = c / pt.Total
		}
	}
	names := make([]string, len(r.Sources))
	for k, src := range r.Sources {
		names[k] = src.Label()
	}
	floor := 0.0
	if r.OutputImpedance > 0 {
		floor = math.Sqrt(diode.Boltzmann * ac.StandardNoiseTemperatureK * r.OutputImpedance)
	}
	return []*plots.Figure{plots.NoiseDensity(freqs, dens, "V/√Hz", floor), plots.NoiseContributions(freqs, names, shares)}
}

// TemperatureText prints a noise temperature.
func TemperatureText(k float64) string {
	if k == 0 {
		return "0 K (noiseless)"
	}
	return strconv.FormatFloat(k, 'f', -1, 64) + " K"
}

// NoiseSetupLines describes input, output and sweep as label, text pairs.
// NoiseSetupLines describes a noise analysis's input, output and sweep as
// label, text pairs, for a header.
func NoiseSetupLines(c *circuit.Circuit, nw *smallsignal.Network, n *plan.Noise) [][2]string {
	var lines [][2]string
	set := n.Settings
	if set.Input >= 0 {
		p := nw.Ports[set.Input]
		t := ac.StandardNoiseTemperatureK * 1.0
		if cp := c.Ports[set.Input]; cp.NoiseTemperatureSet {
			t = cp.NoiseTemperatureK
		}
		text := fmt.Sprintf("port %s, %s source at %s", p.Name, si.Format(p.Impedance, "Ω", 4), TemperatureText(t))
		if !n.Detector {
			text += " as operated; at 290 K for the noise figure"
		}
		lines = append(lines, [2]string{"input", text})
	} else {
		lines = append(lines, [2]string{"input", "none: output noise only (no port to take as the signal source)"})
	}
	if set.Output.Port >= 0 {
		p := nw.Ports[set.Output.Port]
		t := ac.StandardNoiseTemperatureK * 1.0
		if cp := c.Ports[set.Output.Port]; cp.NoiseTemperatureSet {
			t = cp.NoiseTemperatureK
		}
		text := fmt.Sprintf("port %s, %s load at %s", p.Name, si.Format(p.Impedance, "Ω", 4), TemperatureText(t))
		if n.Settings.Input >= 0 && !n.Detector {
			text += ": in the output noise, not in the noise figure"
		} else {
			text += ", counted in the output noise"
		}
		lines = append(lines, [2]string{"output", text})
	} else {
		lines = append(lines, [2]string{"output", "node " + set.Output.Node})
	}
	g := n.Grid
	what := ""
	if n.Detector && len(g) > 1 && g[0] == n.VideoBandHz[0] && g[len(g)-1] == n.VideoBandHz[1] {
		what = " (the video band)"
	}
	if len(g) == 1 {
		lines = append(lines, [2]string{"sweep", "1 point at " + si.Format(g[0], "Hz", 4)})
	} else {
		lines = append(lines, [2]string{"sweep", fmt.Sprintf("%d points, %s to %s%s", len(g), si.Format(g[0], "Hz", 4), si.Format(g[len(g)-1], "Hz", 4), what)})
	}
	return lines
}

// Density prints a noise Density.
func Density(v float64, unit string) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	return si.Format(v, unit, 4)
}

// FigureText prints a noise figure in dB to two decimals, ∞ for no
// signal, or a dash.
func FigureText(db float64) string {
	if math.IsNaN(db) {
		return "—"
	}
	if math.IsInf(db, 1) {
		return "∞"
	}
	if math.Abs(db) < 0.005 {
		db = 0 // no "-0.00"
	}
	return strconv.FormatFloat(db, 'f', 2, 64) + " dB"
}

// ShareText prints a fraction as a percentage to a tenth, or a dash.
func ShareText(f float64) string {
	if math.IsNaN(f) {
		return "—"
	}
	return strconv.FormatFloat(100*f, 'f', 1, 64) + " %"
}

// Largest returns the label and share of the largest of contributions.
func Largest(sources []ac.NoiseSource, contributions []float64, total float64) string {
	k := 0
	for i, c := range contributions {
		if c > contributions[k] {
			k = i
		}
	}
	if len(contributions) == 0 || !(total > 0) {
		return "—"
	}
	return fmt.Sprintf("%s %s", sources[k].Label(), ShareText(contributions[k]/total))
}

// NoiseTable lists the output noise density, the input-referred noise and
// the noise figure at up to rows frequencies of the sweep.
func NoiseTable(o *plan.NoiseRun, rows int) *Table {
	r := o.Result
	hasInput := r.Settings.Input >= 0
	t := &Table{Caption: "Noise at the output", Header: []string{"frequency", "output noise"}}
	switch {
	case o.Detection != nil:
		t.Header = append(t.Header, "noise-equivalent power", "video response")
	case hasInput:
		t.Header = append(t.Header, "input-referred", "noise figure")
	}
	t.Header = append(t.Header, "largest source")
	for _, i := range PickRows(len(r.Points), rows) {
		pt := r.Points[i]
		cells := []string{si.Format(pt.FrequencyHz, "Hz", 4), Density(pt.Density(), "V/√Hz")}
		switch {
		case o.Detection != nil:
			cells = append(cells, Density(o.NEP(i), "W/√Hz"), FigureText(20*math.Log10(cmplx.Abs(o.Video[i])/math.Abs(o.Detection.Sensitivity))))
		case hasInput:
			cells = append(cells, Density(pt.InputReferred(), "V/√Hz"), FigureText(pt.FigureDB()))
		}
		cells = append(cells, Largest(r.Sources, pt.Contributions, pt.Total))
		t.Add(cells...)
	}
	return t
}

// NoiseNotes say what the noise table's columns are referred to.
func NoiseNotes(o *plan.NoiseRun) []string {
	notes := []string{"output noise: every source as operated, each port's termination at its noise temperature"}
	if o.Detection != nil {
		notes = append(notes, "noise-equivalent power: output noise over the voltage sensitivity at that video frequency",
			"video response: that sensitivity relative to its DC value")
	} else if o.Result.Settings.Input >= 0 {
		notes = append(notes, fmt.Sprintf("input-referred: the circuit's own noise as an EMF in series with port %s's generator", o.Plan.InputName),
			"noise figure: source at 290 K, output load left out (IEEE); F = 1 + e_n²/(4 k 290 K Z0)")
	}
	return append(notes, "small-signal noise at the DC bias point: no large signal (a mixer's local oscillator) pumps the diodes")
}

// BandTable lists the noise integrated over the band: at the output and,
// with an input, referred to it, with the band's average noise figure.
func BandTable(o *plan.NoiseRun) *Table {
	b := o.Band
	t := &Table{Caption: fmt.Sprintf("Integrated from %s to %s", si.Format(b.FromHz, "Hz", 4), si.Format(b.ToHz, "Hz", 4)), Header: []string{"quantity", "value"}}
	t.Add("output noise", si.Format(b.RMS(), "V", 4)+" rms")
	if o.Result.Settings.Input >= 0 && o.Detection == nil {
		t.Add("input-referred", si.Format(b.InputReferredRMS(), "V", 4)+" rms (EMF)")
		t.Add("average noise figure", FigureText(10*math.Log10(b.AverageFactor())))
	}
	t.Add("integration grid", fmt.Sprintf("%d per decade, converged to %.0e", b.PerDecade, math.Max(b.Change, 1e-16)))
	return t
}

// NoiseRole says what part a source plays for the noise figure.
func NoiseRole(r *ac.NoiseResult, src ac.NoiseSource) string {
	switch {
	case src.Port >= 0 && src.Port == r.Settings.Input:
		return "signal source"
	case src.Port >= 0 && src.Port == r.Settings.Output.Port:
		return "load"
	case src.Port >= 0:
		return "other port"
	}
	return "circuit"
}

// SourceTable lists each noise source with its share of the integrated
// output noise power.
func SourceTable(o *plan.NoiseRun) *Table {
	b := o.Band
	t := &Table{Caption: "Where the noise comes from (share of the integrated output noise power)",
		Header: []string{"source", "role", "temperature", "output noise", "share"}}
	order := make([]int, len(b.Sources))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(i, j int) bool { return b.Contributions[order[i]] > b.Contributions[order[j]] })
	for _, k := range order {
		src := b.Sources[k]
		temp := "—"
		if src.Kind == ac.ThermalNoise {
			temp = TemperatureText(src.TemperatureK)
		}
		rms := si.Format(math.Sqrt(b.Contributions[k]), "V", 4) + " rms"
		if b.Contributions[k] < 1e-24*b.Total {
			rms = "≈ 0" // balanced out, or no path to the output
		}
		t.Add(src.Label(), NoiseRole(o.Result, src), temp, rms, ShareText(b.Contributions[k]/b.Total))
	}
	return t
}

// DetectorTable lists a detector's sensitivity, noise-equivalent power
// and tangential sensitivity, and returns notes on how they were found.
func DetectorTable(o *plan.NoiseRun) (*Table, []string) {
	d := o.Detection
	t := &Table{Caption: "Detector sensitivity", Header: []string{"quantity", "value"}}
	t.Add("carrier", si.Format(d.CarrierHz, "Hz", 5))
	t.Add("voltage sensitivity", fmt.Sprintf("%s (%s mV/µW)", si.Format(d.Sensitivity, "V/W", 4), strconv.FormatFloat(d.Sensitivity*1e-3, 'g', 4, 64)))
	t.Add("video band", fmt.Sprintf("%s to %s", si.Format(d.Video.FromHz, "Hz", 4), si.Format(d.Video.ToHz, "Hz", 4)))
	t.Add("video noise", si.Format(d.Video.RMS(), "V", 4)+" rms")
	t.Add("noise-equivalent power", fmt.Sprintf("%s at %s", Density(d.NEP, "W/√Hz"), si.Format(d.SpotHz, "Hz", 4)))
	t.Add("tangential sensitivity", fmt.Sprintf("%.2f dBm (%s)", d.TangentialDBm(), si.Format(d.TangentialW, "W", 3)))
	notes := []string{
		fmt.Sprintf("voltage sensitivity γ: DC shift at %s per watt available from port %s, square-law limit (Volterra)", o.Plan.OutputName, o.Plan.InputName),
		"NEP = v_n / |γ| at the band's geometric centre; tangential sensitivity = 2.5 V_n / |γ| with V_n the rms video noise,",
		"  a video signal-to-noise ratio of 8 dB (Cowley and Sorensen 1966)",
	}
	if r := d.TopResponse; r < math.Sqrt(0.5) {
		notes = append(notes, fmt.Sprintf("the video circuit passes %.1f dB of the signal at %s, the top of the video band: pulses that need",
			20*math.Log10(r), si.Format(d.Video.ToHz, "Hz", 4)),
			"  the whole band will not reach full height; narrow --video-bandwidth or speed up the video circuit")
	}
	return t, notes
}
