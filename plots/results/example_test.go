package results_test

import (
	"bytes"
	"encoding/json"
	"fmt"

	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/plots/results"
)

// The bias document of a diode fed from 5 V through 4.3 kΩ, as `qpoint
// bias --json` prints it; a rating the model does not give is null. The current checks by hand: the junction
// takes about 0.7 V at 1 mA for this saturation current (n V_T ln(I/I_S)
// with I_S = 1 fA at 27 °C, common practice for a small silicon
// junction), so I ≈ (5 - 0.7 V) / 4.3 kΩ ≈ 1 mA.
func ExampleBiasOf() {
	c, err := circuit.Parse("example.yaml", []byte(`
name: Forward-biased junction
diode_models:
  si: {saturation_current: 1fA}
parts:
  - {type: voltage_source, name: V1, plus: top, minus: gnd, value: 5V}
  - {type: resistor, name: R1, between: [top, a], value: 4.3k}
  - {type: diode, name: D1, anode: a, cathode: gnd, model: si}
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
	// The document as --json prints it, read back to show its shape (full
	// precision is in the document; rounded here).
	var b bytes.Buffer
	if err := results.Write(&b, results.BiasOf(p)); err != nil {
		fmt.Println(err)
		return
	}
	var doc struct {
		Circuit     string             `json:"circuit"`
		Temperature float64            `json:"temperature"`
		Nodes       map[string]float64 `json:"nodes"`
		Diodes      []map[string]any   `json:"diodes"`
		Solver      struct {
			Strategy string `json:"strategy"`
		} `json:"solver"`
	}
	if err := json.Unmarshal(b.Bytes(), &doc); err != nil {
		fmt.Println(err)
		return
	}
	d := doc.Diodes[0]
	fmt.Printf("%s at %.2f K, solved by %s\n", doc.Circuit, doc.Temperature, doc.Solver.Strategy)
	fmt.Printf("node a: %.4f V\n", doc.Nodes["a"])
	fmt.Printf("%s: %.4g A, r_d %.4g ohm, ratings %v\n", d["name"], d["current"], d["dynamic_resistance"], d["rating_fractions"])
	// Output:
	// Forward-biased junction at 300.15 K, solved by newton
	// node a: 0.7146 V
	// D1: 0.0009966 A, r_d 25.95 ohm, ratings map[current:<nil> power:<nil> reverse_voltage:<nil>]
}
