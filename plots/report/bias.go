package report

import (
	"fmt"
	"math"
	"strings"

	"qpoint/bias"
	"qpoint/bias/diode"
	"qpoint/bias/si"
)

// Celsius converts kelvin to degrees Celsius.
func Celsius(k float64) float64 { return k - diode.ZeroCelsius }

// MaxListedDiodes is the most diodes a command's header names one by one;
// beyond it the header gives their count and current range.
const MaxListedDiodes = 6

// CurrentRange returns the diodes with the least and the greatest current
// (the first of each in file order); diodes must not be empty.
func CurrentRange(diodes []bias.QPoint) (lo, hi bias.QPoint) {
	lo, hi = diodes[0], diodes[0]
	for _, d := range diodes[1:] {
		if d.Current < lo.Current {
			lo = d
		}
		if d.Current > hi.Current {
			hi = d
		}
	}
	return lo, hi
}

// BiasLine returns the header line that says how the bias was solved and
// where the diodes sit: each diode's current, or for many diodes their
// count and the least and greatest current.
func BiasLine(p *bias.Point) string {
	var b strings.Builder
	fmt.Fprintf(&b, "solved at %.2f °C by %s", Celsius(p.TemperatureK), p.Stats.Strategy)
	if len(p.Diodes) <= MaxListedDiodes {
		for _, d := range p.Diodes {
			fmt.Fprintf(&b, "; %s at %s", d.Name, si.Format(d.Current, "A", 3))
		}
		return b.String()
	}
	lo, hi := CurrentRange(p.Diodes)
	least, most := si.Format(lo.Current, "A", 3), si.Format(hi.Current, "A", 3)
	if least == most {
		fmt.Fprintf(&b, "; %d diodes, each at %s", len(p.Diodes), least)
	} else {
		fmt.Fprintf(&b, "; %d diodes from %s (%s) to %s (%s)", len(p.Diodes), least, lo.Name, most, hi.Name)
	}
	b.WriteString("; the bias command lists them all")
	return b.String()
}

// Percent prints a fraction of a rating, "no rating" for NaN.
func Percent(f float64) string {
	switch {
	case math.IsNaN(f):
		return "no rating"
	case f == 0:
		return "0 %"
	case f < 0.001:
		return "<0.1 %"
	}
	return fmt.Sprintf("%.1f %%", 100*f)
}

// Plural writes a count with its noun, "1 step", "3 steps".
func Plural(n int, word string) string {
	if n == 1 {
		return fmt.Sprintf("%d %s", n, word)
	}
	return fmt.Sprintf("%d %ss", n, word)
}

// BiasTables returns the node-voltage, source-current and Q-point tables.
func BiasTables(p *bias.Point) []*Table {
	var tables []*Table
	nodes := &Table{Caption: "Node voltages", Header: []string{"node", "voltage"}}
	for _, n := range p.Nodes {
		nodes.Add(n.Name, si.Format(n.Voltage, "V", 5))
	}
	tables = append(tables, nodes)

	if len(p.Sources)+len(p.Inductors) > 0 {
		src := &Table{Caption: "Source and inductor currents (into the + / to / first terminal)", Header: []string{"part", "kind", "current"}}
		for _, s := range p.Sources {
			src.Add(s.Name, s.Kind.String(), si.Format(s.Current, "A", 4))
		}
		for _, s := range p.Inductors {
			src.Add(s.Name, s.Kind.String(), si.Format(s.Current, "A", 4))
		}
		tables = append(tables, src)
	}

	// One column per diode reads well for the few diodes a bias network
	// has; wide circuits print in blocks of six.
	const perBlock = 6
	for start := 0; start < len(p.Diodes); start += perBlock {
		ds := p.Diodes[start:min(start+perBlock, len(p.Diodes))]
		t := &Table{Caption: "Diode Q points", Header: []string{"quantity"}}
		if start > 0 {
			t.Caption = ""
		}
		for _, d := range ds {
			t.Header = append(t.Header, d.Name)
		}
		row := func(name string, f func(d bias.QPoint) string) {
			cells := []string{name}
			for _, d := range ds {
				cells = append(cells, f(d))
			}
			t.Add(cells...)
		}
		row("model", func(d bias.QPoint) string { return d.Model })
		row("terminal voltage", func(d bias.QPoint) string { return si.Format(d.Voltage, "V", 5) })
		row("junction voltage", func(d bias.QPoint) string { return si.Format(d.JunctionVoltage, "V", 5) })
		row("current", func(d bias.QPoint) string { return si.Format(d.Current, "A", 4) })
		row("dynamic resistance", func(d bias.QPoint) string { return si.Format(d.DynamicResistance, "Ω", 4) })
		row("series resistance", func(d bias.QPoint) string { return si.Format(d.Device.Params.SeriesResistance, "Ω", 4) })
		row("junction capacitance", func(d bias.QPoint) string { return si.Format(d.JunctionCapacitance, "F", 4) })
		row("diffusion capacitance", func(d bias.QPoint) string { return si.Format(d.DiffusionCapacitance, "F", 4) })
		row("power", func(d bias.QPoint) string { return si.Format(d.Power, "W", 3) })
		row("of current rating", func(d bias.QPoint) string { return Percent(d.CurrentFraction) })
		row("of reverse-voltage rating", func(d bias.QPoint) string { return Percent(d.ReverseVoltageFraction) })
		row("of power rating", func(d bias.QPoint) string { return Percent(d.PowerFraction) })
		tables = append(tables, t)
	}

	return tables
}
