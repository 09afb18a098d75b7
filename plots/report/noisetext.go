package report

import (
	"fmt"
	"io"

	"qpoint/ac/plan"
	"qpoint/smallsignal"
)

// WriteNoise writes the noise tables: density, band, sources and a
// detector's figures.
func WriteNoise(out io.Writer, nw *smallsignal.Network, o *plan.NoiseRun, rows int) {
	writeNoiseHeader(out, nw, o.Plan)
	NoiseTable(o, rows).WriteText(out)
	for _, n := range NoiseNotes(o) {
		fmt.Fprintf(out, "  %s\n", n)
	}
	if o.Band != nil {
		BandTable(o).WriteText(out)
		SourceTable(o).WriteText(out)
	}
	if o.Detection != nil {
		t, notes := DetectorTable(o)
		t.WriteText(out)
		for _, n := range notes {
			fmt.Fprintf(out, "  %s\n", n)
		}
	}
}

func writeNoiseHeader(w io.Writer, nw *smallsignal.Network, pl *plan.Noise) {
	fmt.Fprintf(w, "%s\n", nw.Point.Circuit.Name)
	fmt.Fprintf(w, "  file         %s\n", nw.Point.Circuit.File)
	WriteOverrides(w, nw.Point.Circuit)
	fmt.Fprintf(w, "  bias         %s\n", BiasLine(nw.Point))
	for _, line := range NoiseSetupLines(nw.Point.Circuit, nw, pl) {
		fmt.Fprintf(w, "  %-12s %s\n", line[0], line[1])
	}
}
