package study_test

import (
	"fmt"

	"qpoint/ac/study"
	"qpoint/bias/circuit"
)

// Step a bias resistor and follow the diode's current and dynamic
// resistance; then find the resistor that sets 1 mA. By hand: at 1 mA the
// junction drops V_T ln(1 mA / 10 fA) = 0.6552 V at 300.15 K, so
// Rbias = (5 V - 0.6552 V)/1 mA = 4344.8 Ω.
func ExampleRun() {
	c, err := circuit.Parse("example.yaml", []byte(`
diode_models:
  junction: {saturation_current: 1e-14, ideality: 1}
parts:
  - {type: voltage_source, name: V1, plus: supply, minus: gnd, value: 5V}
  - {type: resistor, name: Rbias, between: [supply, anode], value: 10k}
  - {type: diode, name: D1, anode: anode, cathode: gnd, model: junction}
`))
	if err != nil {
		fmt.Println(err)
		return
	}
	vary, err := c.ResolveVary("Rbias.value")
	if err != nil {
		fmt.Println(err)
		return
	}
	values, _ := study.Grid(1e3, 10e3, 4, true)
	r, err := study.Run(c, study.Settings{Axis: study.Axis{Vary: vary, Values: values}})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, st := range r.Steps {
		d := st.Diodes[0]
		fmt.Printf("Rbias %6.0f ohm: %.3f mA, r_d %.1f ohm\n", st.Values[0], d.Current*1e3, d.DynamicResistance)
	}
	m, _ := study.ParseMeasure("current.D1")
	sol, err := study.FindTarget(r, m, 1e-3, 1e-9)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("1 mA at Rbias = %.1f ohm\n", sol.Value)
	// Output:
	// Rbias   1000 ohm: 4.307 mA, r_d 6.0 ohm
	// Rbias   2154 ohm: 2.008 mA, r_d 12.9 ohm
	// Rbias   4642 ohm: 0.936 mA, r_d 27.6 ohm
	// Rbias  10000 ohm: 0.437 mA, r_d 59.2 ohm
	// 1 mA at Rbias = 4344.9 ohm
}
