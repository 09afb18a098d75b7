package bias

import (
	"math"
	"os"
	"path/filepath"
	"testing"

	"qpoint/bias/circuit"
)

// TestDistributedDC: lines and blocks at DC, against node analysis by
// hand (Ohm's and Kirchhoff's laws): a 1 V source behind 100 Ω drives
//
//	a line with 10 Ω conductors and returns [gnd, e] (its return conductor
//	joins e to gnd), then a block whose DC resistance matrix is the T of
//	20 Ω, 100 Ω (shunt) and 5 Ω, [[120, 100], [100, 105]], into 50 Ω,
//
// and a second circuit where a block joins its terminals (dc through).
func TestDistributedDC(t *testing.T) {
	dir := t.TempDir()
	s2p := "# GHz S RI R 50\n1 0 0 1 0 1 0 0 0\n"
	if err := os.WriteFile(filepath.Join(dir, "f.s2p"), []byte(s2p), 0o644); err != nil {
		t.Fatal(err)
	}
	solve := func(src string) *Point {
		t.Helper()
		c, err := circuit.Parse(filepath.Join(dir, "c.yaml"), []byte(src))
		if err != nil {
			t.Fatal(err)
		}
		p, err := Solve(c, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	p := solve(`
parts:
  - {type: voltage_source, name: V1, plus: v, minus: gnd, value: 1V}
  - {type: resistor, name: R0, between: [v, a], value: 100}
  - {type: transmission_line, name: T1, ends: [a, b], returns: [gnd, e], impedance: 50, delay: 1ns, dc_resistance: 10}
  - {type: resistor, name: Re, between: [e, gnd], value: 1k}
  - {type: s_parameter_block, name: F1, file: f.s2p, terminals: [b, c], dc: {resistance: [[120, 100], [100, 105]]}}
  - {type: resistor, name: RL, between: [c, gnd], value: 50}
`)
	// Hand analysis: the T's middle node m: from b through 20 Ω, to gnd
	// through 100 Ω, to c through 5 Ω and RL 50 Ω: 100 ∥ 55 = 35.4839 Ω.
	rm := 100 * 55.0 / 155
	rin := 100 + 10 + 20 + rm
	i := 1 / rin
	vb := 1 - i*110
	vm := i * rm
	vc := vm * 50 / 55
	want := map[string]float64{"a": 1 - 100*i, "b": vb, "c": vc, "e": 0}
	for node, w := range want {
		if v, _ := p.Voltage(node); math.Abs(v-w) > 1e-12 {
			t.Errorf("node %s: %.15g V, by hand %.15g V", node, v, w)
		}
	}
	if got := p.Distributed[0].Currents[0]; math.Abs(got-i) > 1e-15 {
		t.Errorf("line current %g, by hand %g", got, i)
	}
	// The return conductor carries the current back from e to gnd; the
	// port form sends it out of the first return and into the second.
	if got := p.Distributed[0].ReturnCurrent; math.Abs(got+i) > 1e-15 && math.Abs(got-i) > 1e-15 {
		t.Errorf("return conductor current %g, by hand ±%g", got, i)
	}
	p = solve(`
parts:
  - {type: voltage_source, name: V1, plus: v, minus: gnd, value: 1V}
  - {type: resistor, name: R0, between: [v, a], value: 100}
  - {type: s_parameter_block, name: F1, file: f.s2p, terminals: [a, c], dc: {through: [[a, c]]}}
  - {type: resistor, name: RL, between: [c, gnd], value: 300}
`)
	va, _ := p.Voltage("a")
	vcc, _ := p.Voltage("c")
	if math.Abs(va-0.75) > 1e-12 || math.Abs(vcc-0.75) > 1e-12 {
		t.Errorf("through: a %g V, c %g V, by hand 0.75 V each", va, vcc)
	}
}
