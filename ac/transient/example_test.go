package transient_test

import (
	"fmt"
	"math"

	"qpoint/ac"
	"qpoint/ac/transient"
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

// A 1 kΩ generator steps a 1 nF capacitor from 0 to 1 V (a 1 ps ramp):
// one time constant later the capacitor holds 1 - 1/e of the step.
func ExampleRun() {
	nw := network(`
parts:
  - {type: capacitor, name: C1, between: [a, gnd], value: 1nF}
ports:
  - {name: in, node: a, impedance: 1k}
`)
	tau := 1e3 * 1e-9
	step := transient.PiecewiseLinear{Times: []float64{0, 1e-12}, Values: []float64{0, 1}}
	sim, err := transient.Start(nw, transient.Settings{Input: 0, Source: step, RelativeTolerance: 1e-5})
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := sim.Advance(tau); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("v(τ) = %.3f V, 1 - 1/e = %.3f\n", sim.State()[nw.Nodes["a"]], 1-math.Exp(-1))
	fmt.Println(sim.Result().Stats.Method)
	// Output:
	// v(τ) = 0.632 V, 1 - 1/e = 0.632
	// TR-BDF2 (γ = 2 - √2)
}

// An anti-parallel pair of diodes across a 50 Ω line takes a 20 ns pulse
// of a 5.8 GHz carrier at 30 dBm: the flat leakage it lets through, and
// its recovery, read with a -30 dBm probe.
func ExampleRunPulse() {
	nw := network(`
diode_models:
  clamp: {saturation_current: 50nA, ideality: 1.08, series_resistance: 4, zero_bias_capacitance: 0.12pF, built_in_potential: 0.5V, transit_time: 0.1ns}
parts:
  - {type: diode, name: Dup, anode: line, cathode: gnd, model: clamp}
  - {type: diode, name: Ddown, anode: gnd, cathode: line, model: clamp}
  - {type: inductor, name: Lreturn, between: [line, gnd], value: 33nH}
ports:
  - {name: antenna, node: line, impedance: 50, coupling: ac}
  - {name: lna, node: line, impedance: 50, coupling: ac}
`)
	p := transient.Pulse{CarrierHz: 5.8e9, CarrierEMF: ac.DBmToEMF(30, 50), Width: 20e-9, Rise: 1e-9, Fall: 1e-9}
	r, err := transient.RunPulse(nw, transient.PulseSettings{Input: 0, Output: ac.Output{Port: 1}, Pulse: p})
	if err != nil {
		fmt.Println(err)
		return
	}
	f := r.Figures
	fmt.Printf("a %v: flat leakage %.1f dBm, recovery to 1 dB at most %.0f ps\n", r.Kind, 10*math.Log10(f.Flat*1e3), f.Recovery1dB*1e12)
	// Output:
	// a limiter: flat leakage 13.2 dBm, recovery to 1 dB at most 205 ps
}
