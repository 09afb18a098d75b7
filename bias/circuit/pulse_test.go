package circuit

import "testing"

// TestPulseDefaults reads an analysis.pulse block into SI units.
func TestPulseDefaults(t *testing.T) {
	c, err := Parse("pulse.yaml", []byte(`
parts:
  - {type: resistor, name: R1, between: [a, out], value: 1k}
  - {type: resistor, name: R2, between: [out, gnd], value: 1k}
ports:
  - {name: rf, node: a, impedance: 50}
analysis:
  pulse: {input: rf, output: out, carrier: 3GHz, level: 40dBm, width: 1us, rise: 10ns, fall: 20ns, period: 10us, pulses: 2}
`))
	if err != nil {
		t.Fatal(err)
	}
	p := c.Analysis.Pulse
	want := PulseDefaults{Set: true, Input: "rf", Output: "out", CarrierHz: 3e9, Level: Level{DBm: 40, IsPower: true},
		Width: 1e-6, Rise: 10e-9, Fall: 20e-9, Period: 10e-6, Pulses: 2, Pos: p.Pos}
	if p != want {
		t.Errorf("pulse defaults %+v; want %+v", p, want)
	}
}
