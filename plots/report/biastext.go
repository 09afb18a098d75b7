package report

import (
	"fmt"
	"io"

	"qpoint/ac/plan"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/si"
)

// WriteOverrides prints the header line of the --set values, if any.
func WriteOverrides(w io.Writer, c *circuit.Circuit) {
	if l := OverridesLine(c); l != "" {
		fmt.Fprintf(w, "  set          %s\n", l)
	}
}

// WriteBias prints the operating point as tables.
func WriteBias(w io.Writer, p *bias.Point) {
	c := p.Circuit
	fmt.Fprintf(w, "%s\n", c.Name)
	fmt.Fprintf(w, "  file         %s\n", c.File)
	WriteOverrides(w, c)
	fmt.Fprintf(w, "  temperature  %.2f °C (%.2f K)\n", Celsius(p.TemperatureK), p.TemperatureK)
	fmt.Fprintf(w, "  solved by    %s in %s; largest current imbalance %s\n",
		p.Stats.Strategy, Plural(p.Stats.Iterations, "iteration"), si.Format(p.Stats.Residual, "A", 2))

	for _, t := range BiasTables(p) {
		t.WriteText(w)
	}
	if t := lineTable(p); t != nil {
		t.WriteText(w)
	}

	header := "\nCautions\n"
	for _, x := range p.Warnings {
		if x.Kind == bias.Wiring {
			continue // said on standard error when the file loaded
		}
		fmt.Fprintf(w, "%s  ! %s: %s\n", header, x.Part, x.Message)
		header = ""
	}
	fmt.Fprintln(w)
}

// lineTable is the bias command's table of lines and blocks, nil for a
// circuit without them.
func lineTable(p *bias.Point) *Table {
	return LineTable(LineParts(p.Circuit, plan.DesignFrequency(p.Circuit)), p)
}
