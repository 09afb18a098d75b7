package circuit_test

import (
	"fmt"

	"qpoint/bias/circuit"
)

// Parse reads a circuit file's text; values carry SI prefixes and units,
// and every problem names its line and column.
func ExampleParse() {
	c, err := circuit.Parse("example.yaml", []byte(`
name: bias network
diode_models:
  detector: {saturation_current: 3uA, ideality: 1.05}
parts:
  - {type: voltage_source, name: Vcc, plus: vcc, minus: gnd, value: 3.3V}
  - {type: resistor, name: Rbias, between: [vcc, anode], value: 220k}
  - {type: diode, name: D1, anode: anode, cathode: gnd, model: detector}
`))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(c.Name, "at", c.TemperatureK, "K")
	for _, p := range c.Parts {
		fmt.Println(p.Name, p.Kind, p.Nodes, p.Value)
	}
	_, err = circuit.Parse("bad.yaml", []byte(`
parts:
  - {type: resistor, name: R1, between: [a, gnd], value: 4.7kV}
`))
	fmt.Println(err)
	// Output:
	// bias network at 300.15 K
	// Vcc voltage_source [vcc gnd] 3.3
	// Rbias resistor [vcc anode] 220000
	// D1 diode [anode gnd] 0
	// bad.yaml:3:58: value of resistor `R1`: `4.7kV` is not a valid resistance: V is a unit of voltage, not of resistance; accepted: a number with an optional SI prefix (f p n u µ m k M G T) and unit ohm or Ω, e.g. 4.7k or 4.7kohm
}
