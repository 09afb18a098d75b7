package main

import (
	"fmt"
	"io"

	"qpoint/ac"
	"qpoint/bias/circuit"
)

func parseTouchstoneFormat(s string) (ac.Format, error) {
	f, err := ac.ParseFormat(s)
	if err != nil {
		return 0, inputError(fmt.Errorf("flag --format: %w", err))
	}
	return f, nil
}

func writeTouchstone(w io.Writer, c *circuit.Circuit, r *ac.Response, f ac.Format) error {
	comment := []string{"circuit: " + c.Name, "file: " + c.File}
	return ac.WriteTouchstone(w, r.Ports, r.Points, f, comment)
}

func writeResponsePlots(dir string, r *ac.Response) error {
	return fmt.Errorf("figures are not built yet")
}

func writeDistortionPlots(dir string, s *distortionSetup, e *ac.Estimate, st *ac.Steady, sweep []ac.LevelPoint) error {
	return fmt.Errorf("figures are not built yet")
}

func writeDistortionFrequencyPlot(dir string, rows []frequencyRow) error {
	return fmt.Errorf("figures are not built yet")
}
