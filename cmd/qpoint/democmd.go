package main

import (
	"fmt"
	"io/fs"
	"path"

	"github.com/spf13/cobra"

	"qpoint"
	"qpoint/bias"
	"qpoint/bias/circuit"
)

func newDemoCmd() *cobra.Command {
	return &cobra.Command{
		Use:   "demo",
		Short: "Run every built-in demo circuit and print its results",
		Long: `demo runs the analyses on the circuits built into qpoint: a low-barrier
detector with a bias resistor, a current-controlled shunt-diode attenuator,
an anti-parallel limiter and a two-diode mixer bias network. The circuit
files are in the source tree under testdata/demo; copy one to start your own.`,
		Example: `  qpoint demo`,
		Args:    cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			names, err := fs.Glob(qpoint.Demos, "testdata/demo/*.yaml")
			if err != nil {
				return err
			}
			w := cmd.OutOrStdout()
			fmt.Fprintf(w, "qpoint demo: %d built-in circuits\n", len(names))
			for _, name := range names {
				data, err := fs.ReadFile(qpoint.Demos, name)
				if err != nil {
					return err
				}
				c, err := circuit.Parse(path.Join("demo", path.Base(name)), data)
				if err != nil {
					return analysisError(fmt.Errorf("built-in demo %s: %w", name, err))
				}
				p, err := bias.Solve(c, bias.Settings{})
				if err != nil {
					return analysisError(err)
				}
				fmt.Fprintf(w, "\n════ %s ════\n", path.Base(name))
				writeBias(w, p)
			}
			return nil
		},
	}
}
