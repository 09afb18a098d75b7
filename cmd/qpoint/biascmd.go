package main

import (
	"errors"
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"qpoint/bias/circuit"
	"qpoint/plots/report"
	"qpoint/plots/results"
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
			g := guardOf(cmd)
			c, err := g.loadCircuit(cmd.ErrOrStderr(), args[0], sets, temperature)
			if err != nil {
				return err
			}
			p, err := solveWithTemperature(c, temperature)
			if err != nil {
				return err
			}
			if asJSON {
				return results.Write(cmd.OutOrStdout(), results.BiasOf(p))
			}
			report.WriteBias(cmd.OutOrStdout(), p)
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
func (g *fileGuard) loadCircuit(warn io.Writer, path string, sets []string, temperature string) (*circuit.Circuit, error) {
	g.read(path)
	c, err := circuit.Load(path)
	if err != nil {
		var list circuit.ErrorList
		if errors.As(err, &list) && len(list) > 1 {
			return nil, inputError(fmt.Errorf("%d problems in the circuit file:\n%w", len(list), err))
		}
		return nil, inputError(err)
	}
	// A measured block's file is an input too: no output may replace it.
	for _, d := range c.Distributed {
		if d.Path != "" {
			g.read(d.Path)
		}
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
