package smallsignal_test

import (
	"fmt"

	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// Linearise a detector diode at its Q point: the junction's conductance
// g1 = dI/dV, its capacitance c1 (depletion plus diffusion) and the Taylor
// coefficient g2 that rectifies, g2/g1 = 1/(2 n V_T) for the ideal law.
// By hand at 300.15 K: V = n V_T ln(1 + I/I_S) = 39.8 mV, so
// r_d = n V_T/(I + I_S) = 2089 Ω, C_j = C_j0/√(1 - V/V_bi) = 196.3 fF and
// 1/(2 n V_T) = 18.41 per volt.
func ExampleNew() {
	c, err := circuit.Parse("example.yaml", []byte(`
diode_models:
  detector: {saturation_current: 3uA, ideality: 1.05, zero_bias_capacitance: 0.18pF, built_in_potential: 0.25V}
parts:
  - {type: current_source, name: Ibias, from: gnd, to: anode, value: 10uA}
  - {type: diode, name: D1, anode: anode, cathode: gnd, model: detector}
`))
	if err != nil {
		fmt.Println(err)
		return
	}
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		fmt.Println(err)
		return
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		fmt.Println(err)
		return
	}
	d := nw.Diodes[0]
	fmt.Printf("r_d = %.1f ohm, C = %.1f fF, g2/g1 = %.3f per volt\n", 1/d.G1, d.C1*1e15, d.G2/d.G1)
	fmt.Printf("%d unknowns in G + sC\n", nw.N)
	// Output:
	// r_d = 2089.1 ohm, C = 196.3 fF, g2/g1 = 18.411 per volt
	// 1 unknowns in G + sC
}
