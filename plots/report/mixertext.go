package report

import (
	"fmt"
	"io"

	"qpoint/ac/mixer"
	"qpoint/ac/plan"
	"qpoint/smallsignal"
)

// writeMixerHeader prints what was run.
func WriteMixerHeader(w io.Writer, nw *smallsignal.Network, m *plan.Mixer, res *mixer.Result) {
	fmt.Fprintf(w, "%s\n", nw.Point.Circuit.Name)
	fmt.Fprintf(w, "  file         %s\n", nw.Point.Circuit.File)
	WriteOverrides(w, nw.Point.Circuit)
	fmt.Fprintf(w, "  bias         %s\n", BiasLine(nw.Point))
	for _, l := range MixerSetupLines(nw, m) {
		fmt.Fprintf(w, "  %-12s %s\n", l[0], l[1])
	}
	if res != nil {
		fmt.Fprintf(w, "  method       %s\n", MixerMethodLine(res))
	}
}
