package bias

import (
	"fmt"
	"testing"

	"qpoint/bias/circuit"
)

// TestOverdrivenCaution: the caution that nothing limits a junction's
// current rests on the circuit and the current, not on the forward voltage
// alone. The currents below follow from Ohm's law and the junction law
// (common practice); the thresholds are the package's (1 mA forced, 10 A
// whatever sets it).
func TestOverdrivenCaution(t *testing.T) {
	cases := []struct {
		name         string
		tempK        float64
		supply, ohms float64 // ohms 0: the source sits across the junction
		want         bool
	}{
		// 0.98 mA through 1 kΩ at 77 K: the junction sits at 1.02 V,
		// far above 60 n V_T, and the resistor sets the current.
		{"77K through 1k", 77, 2, 1e3, false},
		{"10K through 1k", 10, 2, 1e3, false},
		// 1 kV through 1.62 Ω: 617 A, set by the resistor.
		{"617 A", 300.15, 1000, 1.62, true},
		// 1 MV through 6.5 µΩ: 153 GA.
		{"153 GA", 300.15, 1e6, 6.5e-6, true},
		// 0.75 V straight across a 1e-14 A junction: about 40 mA that
		// only the exponential sets.
		{"forced 40 mA", 300.15, 0.75, 0, true},
		// 0.2 V straight across: 23 pA, forced but harmless.
		{"forced 23 pA", 300.15, 0.2, 0, false},
		// 3 V straight across: the law is beyond 1e30 A.
		{"forced 3 V", 300.15, 3, 0, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			nt := newNet(c.name)
			nt.model("si", 1e-14, 1)
			nt.V("Vs", "in", circuit.Ground, c.supply)
			anode := "in"
			if c.ohms > 0 {
				nt.R("R1", "in", "a", c.ohms)
				anode = "a"
			}
			nt.D("D1", anode, circuit.Ground, "si")
			p, err := Solve(nt.c, Settings{TemperatureK: c.tempK})
			if err != nil {
				t.Fatal(err)
			}
			got := false
			var msgs []string
			for _, w := range p.Warnings {
				msgs = append(msgs, fmt.Sprintf("%s: %s", w.Kind, w.Message))
				if w.Kind == Overdriven {
					got = true
				}
			}
			if got != c.want {
				t.Errorf("D1 at %.4g V carrying %.4g A: overdriven caution %v, want %v; cautions %q",
					p.Diodes[0].JunctionVoltage, p.Diodes[0].Current, got, c.want, msgs)
			}
		})
	}
}
