package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/spf13/cobra"

	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/diode"
	"qpoint/bias/si"
)

func newBiasCmd() *cobra.Command {
	var asJSON bool
	var temperature string
	var sets []string
	cmd := &cobra.Command{
		Use:   "bias FILE",
		Short: "Find the DC operating point: node voltages and every diode's Q point",
		Long: `bias solves the circuit at DC and prints the node voltages, the source
currents and, for each diode, its Q point: terminal and junction voltage,
current, dynamic resistance, junction and diffusion capacitance, dissipated
power and the fraction of each rating used. Cautions follow the tables.

Exit status: 0 solved, 1 no operating point found (the message says what
was tried), 2 bad input or usage.`,
		Example: `  qpoint bias testdata/demo/detector.yaml
  qpoint bias mixer.yaml --temperature 85C
  qpoint bias detector.yaml --set Rbias.value=100k --set detector_low_barrier.saturation_current=2uA
  qpoint bias mixer.yaml --json > mixer-bias.json`,
		Args: exactFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			c, err := loadCircuit(cmd.ErrOrStderr(), args[0], sets, temperature)
			if err != nil {
				return err
			}
			var s bias.Settings
			if temperature != "" {
				tk, err := circuit.ParseBounded(temperature, circuit.Temperature)
				if err != nil {
					return inputError(fmt.Errorf("flag --temperature: %w", err))
				}
				s.TemperatureK = tk
			}
			p, err := bias.Solve(c, s)
			if err != nil {
				return analysisError(err)
			}
			if asJSON {
				return writeJSON(cmd.OutOrStdout(), biasDocument(p))
			}
			writeBias(cmd.OutOrStdout(), p)
			return nil
		},
	}
	cmd.Flags().BoolVar(&asJSON, "json", false, "print one JSON document (SI units) instead of tables")
	cmd.Flags().StringVar(&temperature, "temperature", "", "circuit temperature, overriding the file's (e.g. 85C or 358.15K)")
	addSetFlag(cmd, &sets)
	return cmd
}

// addSetFlag adds --set NAME=VALUE, repeatable, to a command that reads a
// circuit file.
func addSetFlag(cmd *cobra.Command, sets *[]string) {
	cmd.Flags().StringArrayVar(sets, "set", nil, "set a value for this run, NAME=VALUE: PART.value, MODEL.KEY or temperature (repeatable), e.g. Rbias.value=100k")
}

// exactFile accepts exactly one argument, the circuit file.
func exactFile(cmd *cobra.Command, args []string) error {
	if len(args) != 1 {
		return inputError(fmt.Errorf("%s needs exactly one circuit file, got %d arguments; e.g. qpoint %s testdata/demo/detector.yaml", cmd.Name(), len(args), cmd.Name()))
	}
	return nil
}

// loadCircuit reads a circuit file and applies the --set values in order;
// every failure is an input error. temperature is the command's
// --temperature flag, which a --set of the temperature may not contradict.
// The file's cautions (values that are legal but likely slips) go to
// warn, one per line, as FILE:LINE:COL: caution: ....
func loadCircuit(warn io.Writer, path string, sets []string, temperature string) (*circuit.Circuit, error) {
	inputs = append(inputs, path)
	c, err := circuit.Load(path)
	if err != nil {
		var list circuit.ErrorList
		if errors.As(err, &list) && len(list) > 1 {
			return nil, inputError(fmt.Errorf("%d problems in the circuit file:\n%w", len(list), err))
		}
		return nil, inputError(err)
	}
	// Legal but probably not meant: said on standard error, so that
	// every command shows it and no JSON document changes shape.
	for _, w := range c.Warnings {
		fmt.Fprintf(warn, "qpoint: caution: %s\n", w)
	}
	for _, s := range sets {
		if c, err = c.WithOverride(s); err != nil {
			return nil, inputError(fmt.Errorf("flag --set: %w", err))
		}
		if o := c.Overrides[len(c.Overrides)-1]; o.Target == "temperature" && temperature != "" {
			return nil, inputError(fmt.Errorf("flags --set temperature=%s and --temperature %s: give the temperature once", o.Text, temperature))
		}
	}
	return c, nil
}

// overridesLine lists the --set values a run applied, or "" for none.
func overridesLine(c *circuit.Circuit) string {
	var parts []string
	for _, o := range c.Overrides {
		parts = append(parts, o.String())
	}
	return strings.Join(parts, ", ")
}

// writeOverrides prints the header line of the --set values, if any.
func writeOverrides(w io.Writer, c *circuit.Circuit) {
	if l := overridesLine(c); l != "" {
		fmt.Fprintf(w, "  set          %s\n", l)
	}
}

func celsius(k float64) float64 { return k - diode.ZeroCelsius }

// maxListedDiodes is the most diodes a command's header names one by one;
// beyond it the header gives their count and current range.
const maxListedDiodes = 6

// currentRange returns the diodes with the least and the greatest current
// (the first of each in file order); diodes must not be empty.
func currentRange(diodes []bias.Diode) (lo, hi bias.Diode) {
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

// biasLine returns the header line that says how the bias was solved and
// where the diodes sit: each diode's current, or for many diodes their
// count and the least and greatest current.
func biasLine(p *bias.Point) string {
	var b strings.Builder
	fmt.Fprintf(&b, "solved at %.2f °C by %s", celsius(p.TemperatureK), p.Stats.Strategy)
	if len(p.Diodes) <= maxListedDiodes {
		for _, d := range p.Diodes {
			fmt.Fprintf(&b, "; %s at %s", d.Name, si.Format(d.Current, "A", 3))
		}
		return b.String()
	}
	lo, hi := currentRange(p.Diodes)
	least, most := si.Format(lo.Current, "A", 3), si.Format(hi.Current, "A", 3)
	if least == most {
		fmt.Fprintf(&b, "; %d diodes, each at %s", len(p.Diodes), least)
	} else {
		fmt.Fprintf(&b, "; %d diodes from %s (%s) to %s (%s)", len(p.Diodes), least, lo.Name, most, hi.Name)
	}
	b.WriteString("; the bias command lists them all")
	return b.String()
}

// writeBias prints the operating point as tables.
func writeBias(w io.Writer, p *bias.Point) {
	c := p.Circuit
	fmt.Fprintf(w, "%s\n", c.Name)
	fmt.Fprintf(w, "  file         %s\n", c.File)
	writeOverrides(w, c)
	fmt.Fprintf(w, "  temperature  %.2f °C (%.2f K)\n", celsius(p.TemperatureK), p.TemperatureK)
	fmt.Fprintf(w, "  solved by    %s in %s; largest current imbalance %s\n",
		p.Stats.Strategy, plural(p.Stats.Iterations, "iteration"), si.Format(p.Stats.Residual, "A", 2))

	for _, t := range biasTables(p) {
		t.write(w)
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

func percent(f float64) string {
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

func plural(n int, word string) string {
	if n == 1 {
		return fmt.Sprintf("%d %s", n, word)
	}
	return fmt.Sprintf("%d %ss", n, word)
}

// biasTables returns the node-voltage, source-current and Q-point tables.
func biasTables(p *bias.Point) []*table {
	var tables []*table
	nodes := &table{title: "Node voltages", header: []string{"node", "voltage"}}
	for _, n := range p.Nodes {
		nodes.add(n.Name, si.Format(n.Voltage, "V", 5))
	}
	tables = append(tables, nodes)

	if len(p.Sources)+len(p.Inductors) > 0 {
		src := &table{title: "Source and inductor currents (into the + / to / first terminal)", header: []string{"part", "kind", "current"}}
		for _, s := range p.Sources {
			src.add(s.Name, s.Kind.String(), si.Format(s.Current, "A", 4))
		}
		for _, s := range p.Inductors {
			src.add(s.Name, s.Kind.String(), si.Format(s.Current, "A", 4))
		}
		tables = append(tables, src)
	}

	// One column per diode reads well for the few diodes a bias network
	// has; wide circuits print in blocks of six.
	const perBlock = 6
	for start := 0; start < len(p.Diodes); start += perBlock {
		ds := p.Diodes[start:min(start+perBlock, len(p.Diodes))]
		t := &table{title: "Diode Q points", header: []string{"quantity"}}
		if start > 0 {
			t.title = ""
		}
		for _, d := range ds {
			t.header = append(t.header, d.Name)
		}
		row := func(name string, f func(d bias.Diode) string) {
			cells := []string{name}
			for _, d := range ds {
				cells = append(cells, f(d))
			}
			t.add(cells...)
		}
		row("model", func(d bias.Diode) string { return d.Model })
		row("terminal voltage", func(d bias.Diode) string { return si.Format(d.Voltage, "V", 5) })
		row("junction voltage", func(d bias.Diode) string { return si.Format(d.JunctionVoltage, "V", 5) })
		row("current", func(d bias.Diode) string { return si.Format(d.Current, "A", 4) })
		row("dynamic resistance", func(d bias.Diode) string { return si.Format(d.DynamicResistance, "Ω", 4) })
		row("series resistance", func(d bias.Diode) string { return si.Format(d.Device.Params.SeriesResistance, "Ω", 4) })
		row("junction capacitance", func(d bias.Diode) string { return si.Format(d.JunctionCapacitance, "F", 4) })
		row("diffusion capacitance", func(d bias.Diode) string { return si.Format(d.DiffusionCapacitance, "F", 4) })
		row("power", func(d bias.Diode) string { return si.Format(d.Power, "W", 3) })
		row("of current rating", func(d bias.Diode) string { return percent(d.CurrentFraction) })
		row("of reverse-voltage rating", func(d bias.Diode) string { return percent(d.ReverseVoltageFraction) })
		row("of power rating", func(d bias.Diode) string { return percent(d.PowerFraction) })
		tables = append(tables, t)
	}

	return tables
}
