package circuit

import (
	"fmt"
	"path/filepath"
	"strings"
	"testing"
)

// TestPlausibility: each rule fires on the slip it is for, names the line
// and suggests the value likely meant, and stays silent on sensible
// values (and on every demo and hard circuit).
func TestPlausibility(t *testing.T) {
	const head = `
diode_models:
  det: {saturation_current: %s, zero_bias_capacitance: %s, transit_time: %s}
parts:
  - {type: voltage_source, name: Vcc, plus: vcc, minus: gnd, value: 3.3V}
  - {type: resistor, name: Rbias, between: [vcc, a], value: %s}
  - {type: capacitor, name: Cblock, between: [rf, a], value: %s}
  - {type: inductor, name: Lchoke, between: [a, x], value: %s}
  - {type: resistor, name: Rx, between: [x, gnd], value: 1k}
  - {type: resistor, name: Rin, between: [rf, gnd], value: 50}
  - {type: diode, name: D1, anode: a, cathode: gnd, model: det}
ports:
  - {name: rf, node: rf, impedance: 50, coupling: ac}
analysis:
  response: {from: 1GHz, to: 6GHz, per_decade: 10}
`
	sensible := []string{"3uA", "0.18pF", "0", "47k", "22pF", "39nH"}
	cases := []struct {
		at   int // which value is the slip
		slip string
		line int
		want string
	}{
		{0, "20mA", 3, "did you mean 20 µA or 20 nA?"},
		{1, "0.15", 3, "did you mean 150 fF?"},
		{2, "5", 3, "did you mean 5 µs or 5 ns?"},
		{3, "1m", 6, "did you mean 1M (1 MΩ, mega)?"},
		// 10 pF is 6.5 Ω and 10 nF 6.5 mΩ at the 2.45 GHz centre, 1/(2πfC):
		// the nearer to 50 Ω on a log scale is 10 pF.
		{4, "10", 7, "did you mean 10 pF?"},
		{5, "39", 8, "did you mean 39 nH?"},
	}
	fill := func(vals []string) string {
		args := make([]any, len(vals))
		for i, v := range vals {
			args[i] = v
		}
		return sprintf(head, args...)
	}
	c, err := Parse("sensible.yaml", []byte(fill(sensible)))
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Warnings) != 0 {
		t.Errorf("sensible values drew cautions: %+v", c.Warnings)
	}
	for _, k := range cases {
		vals := append([]string(nil), sensible...)
		vals[k.at] = k.slip
		c, err := Parse("slip.yaml", []byte(fill(vals)))
		if err != nil {
			t.Fatal(err)
		}
		if len(c.Warnings) != 1 || c.Warnings[0].Line != k.line || !strings.Contains(c.Warnings[0].Message, k.want) {
			t.Errorf("%s: cautions %+v; want one at line %d saying %q", k.slip, c.Warnings, k.line, k.want)
		}
	}
	files, _ := filepath.Glob("../../testdata/demo/*.yaml")
	hard, _ := filepath.Glob("../../testdata/hard/*.yaml")
	for _, f := range append(files, hard...) {
		c, err := Load(f)
		if err != nil {
			t.Fatal(err)
		}
		if len(c.Warnings) != 0 {
			t.Errorf("%s: cautions %+v on a circuit written on purpose", f, c.Warnings)
		}
	}
}

func sprintf(format string, args ...any) string { return fmt.Sprintf(format, args...) }
