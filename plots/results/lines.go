package results

import (
	"qpoint/ac/plan"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/plots/report"
)

// LinePart is a line or block in the bias and response documents:
// its Z0 and effective permittivity at `frequency` (the design
// frequency; 0 for quasi-static figures), delay, loss in dB there, DC
// behaviour and, in the bias document, its DC current per port.
type LinePart struct {
	Name                  string   `json:"name"`
	Type                  string   `json:"type"`
	Between               string   `json:"between"`
	Frequency             Number   `json:"frequency"`
	Impedance             Number   `json:"impedance"`
	EffectivePermittivity Number   `json:"effective_permittivity"`
	Delay                 Number   `json:"delay"`
	LossDB                Number   `json:"loss_db"`
	DC                    string   `json:"dc"`
	DCResistance          Number   `json:"dc_resistance"`
	File                  string   `json:"file,omitempty"`
	DataFrom              Number   `json:"data_from,omitempty"`
	DataTo                Number   `json:"data_to,omitempty"`
	DCCurrents            []Number `json:"dc_currents,omitempty"`
}

// LinePartsOf returns the circuit's lines and blocks at its design
// frequency for a document, with DC currents from p when not nil.
func LinePartsOf(c *circuit.Circuit, p *bias.Point) []LinePart {
	var out []LinePart
	for i, lp := range report.LineParts(c, plan.DesignFrequency(c)) {
		j := LinePart{Name: lp.Name, Type: lp.Type, Between: lp.Between, Frequency: Number(lp.AtHz), Impedance: Number(lp.Impedance),
			EffectivePermittivity: Number(lp.EffectivePermittivity), Delay: Number(lp.Delay), LossDB: Number(lp.LossDB),
			DC: lp.DC, DCResistance: Number(lp.DCResistance), File: lp.File, DataFrom: Number(lp.FromHz), DataTo: Number(lp.ToHz)}
		if p != nil && i < len(p.Distributed) {
			for _, v := range p.Distributed[i].Currents {
				j.DCCurrents = append(j.DCCurrents, Number(v))
			}
		}
		out = append(out, j)
	}
	return out
}
