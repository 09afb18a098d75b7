package steady_test

import (
	"fmt"

	"qpoint/ac"
	"qpoint/ac/steady"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// network loads a circuit from YAML text and linearises it at its bias.
func network(src string) *smallsignal.Network {
	c, err := circuit.Parse("example.yaml", []byte(src))
	if err != nil {
		panic(err)
	}
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		panic(err)
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		panic(err)
	}
	return nw
}

// A junction driven by an ideal voltage 0.6 V + x n V_T cos(ωt), its
// current sensed in a 10 nΩ resistor (the drive port's reference
// impedance is 10 nΩ too, so the generator is a voltage source).
const voltageDriven = `
temperature: 300.15K
diode_models:
  m: {saturation_current: 1e-14, ideality: 1}
parts:
  - {type: voltage_source, name: Vb, plus: b, minus: gnd, value: 0.6V}
  - {type: diode, name: D, anode: a, cathode: s, model: m}
  - {type: resistor, name: Rsense, between: [s, gnd], value: 10n}
ports:
  - {name: drive, node: a, return: b, impedance: 10n}
`

// The same junction solved to periodic steady state: its harmonics are
// 2 I_S e^(V0/nV_T) I_k(x) (Abramowitz and Stegun 9.6.34); with x = 1,
// I_2(1)/I_1(1) = 0.135747670/0.565159104 (Table 9.8).
func ExampleSolve() {
	nw := network(voltageDriven)
	d := ac.Drive{Input: 0, Output: ac.Output{Port: -1, Node: "s"}, FrequencyHz: 1e6, EMF: nw.Diodes[0].Device.NVT()}
	st, err := steady.Solve(nw, d, steady.Settings{Harmonics: 3})
	if err != nil {
		fmt.Println(err)
		return
	}
	h := st.DiodeCurrents[0]
	fmt.Printf("I2/I1 = %.6f (table: %.6f)\n", h[2].Amplitude/h[1].Amplitude, 0.135747670/0.565159104)
	fmt.Println("method: shooting,", st.Samples, "samples per period")
	// Output:
	// I2/I1 = 0.240194 (table: 0.240194)
	// method: shooting, 255 samples per period
}
