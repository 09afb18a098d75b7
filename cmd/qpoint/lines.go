package main

import (
	"fmt"
	"io"

	"qpoint/ac/plan"
	"qpoint/ac/steady"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/plots/report"
	"qpoint/smallsignal"
)

// linePartJSON is a line or block in the bias and response documents:
// its Z0 and effective permittivity at `frequency` (the design
// frequency; 0 for quasi-static figures), delay, loss in dB there, DC
// behaviour and, in the bias document, its DC current per port.
type linePartJSON struct {
	Name                  string   `json:"name"`
	Type                  string   `json:"type"`
	Between               string   `json:"between"`
	Frequency             number   `json:"frequency"`
	Impedance             number   `json:"impedance"`
	EffectivePermittivity number   `json:"effective_permittivity"`
	Delay                 number   `json:"delay"`
	LossDB                number   `json:"loss_db"`
	DC                    string   `json:"dc"`
	DCResistance          number   `json:"dc_resistance"`
	File                  string   `json:"file,omitempty"`
	DataFrom              number   `json:"data_from,omitempty"`
	DataTo                number   `json:"data_to,omitempty"`
	DCCurrents            []number `json:"dc_currents,omitempty"`
}

// lineParts returns the circuit's lines and blocks at its design
// frequency for a document, with DC currents from p when not nil.
func lineParts(c *circuit.Circuit, p *bias.Point) []linePartJSON {
	var out []linePartJSON
	for i, lp := range report.LineParts(c, plan.DesignFrequency(c)) {
		j := linePartJSON{Name: lp.Name, Type: lp.Type, Between: lp.Between, Frequency: number(lp.AtHz), Impedance: number(lp.Impedance),
			EffectivePermittivity: number(lp.EffectivePermittivity), Delay: number(lp.Delay), LossDB: number(lp.LossDB),
			DC: lp.DC, DCResistance: number(lp.DCResistance), File: lp.File, DataFrom: number(lp.FromHz), DataTo: number(lp.ToHz)}
		if p != nil && i < len(p.Distributed) {
			for _, v := range p.Distributed[i].Currents {
				j.DCCurrents = append(j.DCCurrents, number(v))
			}
		}
		out = append(out, j)
	}
	return out
}

// lineTable is the bias command's table of lines and blocks, nil for a
// circuit without them.
func lineTable(p *bias.Point) *report.Table {
	return report.LineTable(report.LineParts(p.Circuit, plan.DesignFrequency(p.Circuit)), p)
}

// outsideMessages returns the sentences of range cautions.
func outsideMessages(o []smallsignal.OutsideRange) []string {
	var m []string
	for _, x := range o {
		m = append(m, x.Message())
	}
	return m
}

// cautionOutside says on warn, as the loader's cautions are said, where an
// analysis asked for a block or microstrip outside its data or models.
func cautionOutside(warn io.Writer, o []smallsignal.OutsideRange) {
	for _, m := range outsideMessages(o) {
		fmt.Fprintf(warn, "qpoint: caution: %s\n", m)
	}
}

// writeOutside prints the range cautions of an analysis under a heading
// of their own: they concern the data and models, not the parts' safety.
func writeOutside(w io.Writer, o []smallsignal.OutsideRange) {
	if len(o) == 0 {
		return
	}
	fmt.Fprintf(w, "\nCautions (frequencies outside the data or models of lines and blocks)\n")
	for _, m := range outsideMessages(o) {
		fmt.Fprintf(w, "  ! %s\n", m)
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
