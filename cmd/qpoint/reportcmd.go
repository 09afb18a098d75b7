package main

import (
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"qpoint/bias/circuit"
	"qpoint/plots/report"
)

func newReportCmd() *cobra.Command {
	var outPath, temperature string
	var sets []string
	cmd := &cobra.Command{
		Use:   "report FILE -o REPORT.html",
		Short: "Write one self-contained HTML design report",
		Long: `report runs every analysis the circuit file's defaults ask for — bias,
small-signal response, distortion, the study, a mixer under its LO and a
pulse — and writes one HTML page with the circuit summary, Q-point and
small-signal tables, response figures (gain and phase, impedance, Smith
chart, group delay), distortion tables and figures, the study's figures,
the mixer's figures against its LO drive and every caution. The page carries its figures
inline and fetches nothing: mail it, archive it, print it.`,
		Example: `  qpoint report testdata/demo/detector.yaml -o detector.html
  qpoint report mixer.yaml -o mixer-85C.html --temperature 85C`,
		Args: exactFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			g := guardOf(cmd)
			if outPath == "" {
				return inputError(fmt.Errorf("flag -o is missing: name the HTML file to write, e.g. -o report.html"))
			}
			c, err := g.loadCircuit(cmd.ErrOrStderr(), args[0], sets, temperature)
			if err != nil {
				return err
			}
			if err := g.checkOutputsEarly("", outPath); err != nil {
				return err
			}
			doc, err := buildReport(c, temperature)
			if err != nil {
				return err
			}
			if err := g.writeFileAtomic(outPath, func(w io.Writer) error { return report.Write(w, doc) }); err != nil {
				return err
			}
			fmt.Fprintf(cmd.OutOrStdout(), "report written to %s\n", outPath)
			return nil
		},
	}
	cmd.Flags().StringVarP(&outPath, "output", "o", "", "the HTML file to write")
	cmd.Flags().StringVar(&temperature, "temperature", "", "circuit temperature, overriding the file's (e.g. 85C)")
	addSetFlag(cmd, &sets)
	return cmd
}

// buildReport builds the report of c at the --temperature flag's value
// (the file's when it is empty); a problem with the file's analysis
// requests is bad input, anything else an analysis failure.
func buildReport(c *circuit.Circuit, temperature string) (*report.Document, error) {
	var s report.Settings
	if err := quantityFlag("temperature", temperature, circuit.Temperature, &s.TemperatureK); err != nil {
		return nil, err
	}
	doc, err := report.Build(c, s)
	if err != nil {
		return nil, planError(err)
	}
	return doc, nil
}
