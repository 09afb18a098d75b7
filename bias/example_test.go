package bias_test

import (
	"fmt"

	"qpoint/bias"
	"qpoint/bias/circuit"
)

// A silicon junction fed from 2 V through 1 kΩ: the Q point, the dynamic
// resistance n V_T / I there, and how the solver got to it. (Solving
// 2 V = 1 kΩ · I_S e^(V/V_T) + V by hand at 300.15 K gives the same
// 0.66264 V and 1.33736 mA.)
func ExampleSolve() {
	c, err := circuit.Parse("example.yaml", []byte(`
diode_models:
  junction: {saturation_current: 1e-14, ideality: 1}
parts:
  - {type: voltage_source, name: V1, plus: supply, minus: gnd, value: 2V}
  - {type: resistor, name: R1, between: [supply, anode], value: 1k}
  - {type: diode, name: D1, anode: anode, cathode: gnd, model: junction}
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
	d := p.Diodes[0]
	fmt.Printf("%s: %.4f V, %.4f mA, r_d %.2f ohm\n", d.Name, d.Voltage, d.Current*1e3, d.DynamicResistance)
	fmt.Println("converged by", p.Stats.Strategy)
	// Output:
	// D1: 0.6626 V, 1.3374 mA, r_d 19.34 ohm
	// converged by newton
}
