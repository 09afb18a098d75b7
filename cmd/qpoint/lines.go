package main

import (
	"fmt"
	"io"

	"qpoint/ac/plan"
	"qpoint/ac/steady"
	"qpoint/plots/report"
	"qpoint/smallsignal"
)

// cautionOutside says on warn, as the loader's cautions are said, where an
// analysis asked for a block or microstrip outside its data or models.
func cautionOutside(warn io.Writer, o []smallsignal.OutsideRange) {
	for _, m := range report.OutsideMessages(o) {
		fmt.Fprintf(warn, "qpoint: caution: %s\n", m)
	}
}

// steadyFor returns the steady-state method for a network a command
// would otherwise solve by shooting (nil): harmonic balance, by the
// automatic choice, when it holds lines or blocks, which shooting cannot
// carry.
func steadyFor(nw *smallsignal.Network) steady.Method {
	return plan.ForElements(nw, nil)
}

// outsideOf returns the range cautions of a distortion run: the
// waveform's (harmonic balance sees every product it solved), else the
// estimate's.
func outsideOf(res *plan.Distortion) []smallsignal.OutsideRange {
	if res.Waveform != nil && len(res.Waveform.Outside) > 0 {
		return res.Waveform.Outside
	}
	return res.Estimate.Outside
}
