package report

import (
	"fmt"
	"io"

	"qpoint/ac/mixer"
	"qpoint/ac/plan"
	"qpoint/smallsignal"
)

// WriteMixerHeader writes what a mixer run drives: the circuit, its bias,
// ports, LO and RF; res, when not nil, adds the method that solved it.
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

// WriteMixer writes a mixer analysis as text: the header, the conversion,
// port, LO, diode and noise tables, and the cautions.
func WriteMixer(w io.Writer, nw *smallsignal.Network, m *plan.Mixer, res *mixer.Result) {
	WriteMixerHeader(w, nw, m, res)
	for _, t := range []*Table{MixerTable(res), MixerPortTable(nw, m, res), MixerLOTable(m, res), MixerDiodeTable(res), MixerNoiseTable(res, 6)} {
		t.WriteText(w)
	}
	WriteCautions(w, MixerCautionMessages(res))
}

// WriteMixerSweep writes a mixer analysis repeated over LO levels as text:
// the header and a row per level.
func WriteMixerSweep(w io.Writer, nw *smallsignal.Network, m *plan.Mixer, pts []mixer.LevelPoint) {
	WriteMixerHeader(w, nw, m, nil)
	MixerSweepTable(pts).WriteText(w)
	fmt.Fprintf(w, "  cautions name their kinds; run one level (--lo-level) to read them in full\n")
}
