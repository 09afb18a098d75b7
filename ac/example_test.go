package ac_test

import (
	"fmt"
	"math"
	"math/cmplx"

	"qpoint/ac"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// network loads a circuit, solves its bias and linearises it: the path
// every analysis starts from.
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

// A series diode attenuator: about 2 mA through a junction between two
// 50 Ω ports, fed and returned through 10 µH chokes. Its S21 follows the
// series-impedance law 2 Z0/(2 Z0 + r_d) (Pozar, Microwave Engineering,
// 4th ed., ch. 4) to within the chokes' loading.
func ExampleRun() {
	nw := network(`
diode_models:
  pin: {saturation_current: 1nA, ideality: 1.8}
parts:
  - {type: voltage_source, name: Vb, plus: supply, minus: gnd, value: 5V}
  - {type: resistor, name: Rb, between: [supply, feed], value: 2k}
  - {type: inductor, name: Lfeed, between: [feed, in], value: 10uH}
  - {type: diode, name: D1, anode: in, cathode: out, model: pin}
  - {type: inductor, name: Lret, between: [out, gnd], value: 10uH}
ports:
  - {name: in, node: in, impedance: 50, coupling: ac}
  - {name: out, node: out, impedance: 50, coupling: ac}
`)
	freqs, err := ac.LogGrid(100e6, 1e9, 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := ac.Run(nw, freqs, ac.Settings{})
	if err != nil {
		fmt.Println(err)
		return
	}
	rd := 1 / nw.Diodes[0].G1
	for _, p := range r.Points {
		fmt.Printf("%4.0f MHz: |S21| = %.2f dB\n", p.FrequencyHz/1e6, 20*math.Log10(cmplx.Abs(p.S[1][0])))
	}
	fmt.Printf("series law with r_d = %.2f ohm: %.2f dB\n", rd, 20*math.Log10(100/(100+rd)))
	// Output:
	//  100 MHz: |S21| = -1.71 dB
	// 1000 MHz: |S21| = -1.70 dB
	// series law with r_d = 21.55 ohm: -1.70 dB
}

// A junction driven by an ideal voltage V0 + V cos ωt: the Volterra
// estimate gives HD2 = x/4 and HD3 = x²/24 in the small-signal limit,
// x = V/(n V_T) (Gray, Hurst, Lewis, Meyer, ch. 5), and the third-order
// fundamental 1 + x²/8 times the linear one (Abramowitz and Stegun
// 9.6.10).
func ExampleVolterra() {
	nw := network(voltageDriven)
	x := 0.1
	d := ac.Drive{Input: 0, Output: ac.Output{Port: -1, Node: "s"}, FrequencyHz: 1e6, EMF: x * nw.Diodes[0].Device.NVT()}
	e, err := ac.Volterra(nw, d)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("HD2 %.2f dBc (x/4: %.2f dBc)\n", e.HD2dBc(), 20*math.Log10(x/4))
	fmt.Printf("HD3 %.2f dBc (x²/24: %.2f dBc)\n", e.HD3dBc(), 20*math.Log10(x*x/24))
	fmt.Printf("gain change %+.5f dB (1 + x²/8: %+.5f dB)\n", e.GainChangeDB(), 20*math.Log10(1+x*x/8))
	// Output:
	// HD2 -32.04 dBc (x/4: -32.04 dBc)
	// HD3 -67.60 dBc (x²/24: -67.60 dBc)
	// gain change +0.01085 dB (1 + x²/8: +0.01085 dB)
}

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
