package report

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/line"
	"qpoint/bias/si"
)

// LinePart is what a report says of a line or measured block: its
// characteristic impedance and effective permittivity at one frequency
// (for a microstrip, dispersive: Hammerstad and Jensen 1980, Kirschning
// and Jansen 1982), its delay and loss there, its DC behaviour and, for a
// block, its file and the range of its data.
type LinePart struct {
	Name, Type string
	Between    string  // its ports' nodes, "a–b" (and returns when not gnd)
	AtHz       float64 // where the figures hold; 0 for quasi-static
	Impedance  float64 // Z0, ohm; NaN for a block
	// EffectivePermittivity is (c/v)²: a microstrip's ε_eff, a line's
	// 1/velocity_factor²; NaN where unknown (a line given by its delay).
	EffectivePermittivity float64
	Delay                 float64 // one-way, s; NaN for a block
	LossDB                float64 // attenuation at AtHz, dB; NaN for a block
	DC                    string  // "short", "open", "through" or "resistance"
	DCResistance          float64 // ohm, for a line
	File                  string  // a block's file
	FromHz, ToHz          float64 // a block's data
}

// LineParts describes the circuit's lines and blocks at atHz (the design
// frequency; 0 for quasi-static figures).
func LineParts(c *circuit.Circuit, atHz float64) []LinePart {
	var out []LinePart
	for i := range c.Distributed {
		d := &c.Distributed[i]
		lp := LinePart{Name: d.Name, Type: d.Type, Between: between(d), AtHz: atHz, DC: d.DCText,
			Impedance: math.NaN(), EffectivePermittivity: math.NaN(), Delay: math.NaN(), LossDB: math.NaN()}
		switch {
		case d.Microstrip != nil:
			m := d.Microstrip
			lp.Impedance, lp.EffectivePermittivity = m.ImpedanceAt(atHz)
			lp.Delay = (m.Length + m.Extension) * math.Sqrt(lp.EffectivePermittivity) / line.SpeedOfLight
			lp.DCResistance = m.DCResistance()
		case d.Ideal != nil:
			l := d.Ideal
			lp.Impedance, lp.Delay, lp.DCResistance = l.Impedance, l.Delay, l.DCResistance
			if l.Length > 0 {
				v := l.Length / l.Delay / line.SpeedOfLight
				lp.EffectivePermittivity = 1 / (v * v)
			}
		case d.Block != nil:
			lp.File = d.File
			lp.FromHz, lp.ToHz = d.Block.Range()
		}
		if d.Line != nil {
			s := d.Line.At(atHz)
			lp.LossDB = 20 / math.Ln10 * real(cmplx.Sqrt(s.Z*s.Y))
		}
		out = append(out, lp)
	}
	return out
}

func between(d *circuit.Distributed) string {
	var ports []string
	for k := range d.Terminals {
		s := d.Terminals[k]
		if d.Returns[k] != circuit.Ground {
			s += "/" + d.Returns[k]
		}
		ports = append(ports, s)
	}
	return strings.Join(ports, "–")
}

// LineTable is the table of the lines and blocks at their figures'
// frequency, with each one's DC current from the bias point p (nil for
// none): the current into its first port's terminal.
func LineTable(parts []LinePart, p *bias.Point) *Table {
	if len(parts) == 0 {
		return nil
	}
	at := "quasi-static"
	if parts[0].AtHz > 0 {
		at = "at " + si.Format(parts[0].AtHz, "Hz", 4) + ", the design frequency"
	}
	t := &Table{Caption: "Lines and measured blocks (" + at + ")",
		Header: []string{"part", "type", "between", "Z0", "ε_eff", "delay", "loss", "at DC", "DC current"}}
	for i, lp := range parts {
		dc := lp.DC
		if lp.DC == "resistance" && lp.File == "" {
			dc = si.Format(lp.DCResistance, "Ω", 4)
		}
		if lp.File != "" {
			dc += ", data " + si.Format(lp.FromHz, "Hz", 3) + " to " + si.Format(lp.ToHz, "Hz", 3) + " in " + lp.File
		}
		current := "—"
		if p != nil && i < len(p.Distributed) && len(p.Distributed[i].Currents) > 0 {
			current = si.Format(p.Distributed[i].Currents[0], "A", 4)
		}
		t.Add(lp.Name, strings.ReplaceAll(lp.Type, "_", " "), lp.Between, orDash(lp.Impedance, "Ω", 4), plain(lp.EffectivePermittivity),
			orDash(lp.Delay, "s", 4), dbOrDash(lp.LossDB), dc, current)
	}
	return t
}

func orDash(v float64, unit string, digits int) string {
	if math.IsNaN(v) {
		return "—"
	}
	return si.Format(v, unit, digits)
}

func plain(v float64) string {
	if math.IsNaN(v) {
		return "—"
	}
	return fmt.Sprintf("%.4g", v)
}

func dbOrDash(v float64) string {
	if math.IsNaN(v) {
		return "—"
	}
	return fmt.Sprintf("%.3g dB", v)
}

// LineSummary says the lines and blocks in one line for a command's
// header: each microstrip's Z0 and ε_eff at the figures' frequency, each
// line's Z0 and delay, each block's file.
func LineSummary(parts []LinePart) string {
	var s []string
	for _, lp := range parts {
		switch {
		case lp.Type == circuit.TypeMicrostrip:
			s = append(s, fmt.Sprintf("%s Z0 %s, ε_eff %.4g", lp.Name, si.Format(lp.Impedance, "Ω", 4), lp.EffectivePermittivity))
		case lp.File != "":
			s = append(s, fmt.Sprintf("%s %s", lp.Name, lp.File))
		default:
			s = append(s, fmt.Sprintf("%s Z0 %s, %s", lp.Name, si.Format(lp.Impedance, "Ω", 4), si.Format(lp.Delay, "s", 4)))
		}
	}
	if len(parts) > 0 && parts[0].AtHz > 0 {
		return strings.Join(s, "; ") + " (at " + si.Format(parts[0].AtHz, "Hz", 4) + ")"
	}
	return strings.Join(s, "; ")
}
