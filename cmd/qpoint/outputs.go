package main

import (
	"fmt"
	"io"

	"qpoint/ac"
	"qpoint/bias/circuit"
)

// Placeholders until the Touchstone writer and the figures land.
type touchstoneFormat int

func parseTouchstoneFormat(s string) (touchstoneFormat, error) { return 0, nil }

func writeTouchstone(w io.Writer, c *circuit.Circuit, r *ac.Response, f touchstoneFormat) error {
	return fmt.Errorf("touchstone output is not built yet")
}

func writeResponsePlots(dir string, r *ac.Response) error {
	return fmt.Errorf("figures are not built yet")
}
