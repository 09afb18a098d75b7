package circuit

import (
	"math"
	"os"
	"path/filepath"
	"testing"

	"qpoint/bias/line"
)

// TestDistributedForms reads every form the circuit file gives lines and
// blocks, and checks what the loader makes of them.
func TestDistributedForms(t *testing.T) {
	dir := t.TempDir()
	// An active two-port (|S21| = 1.2) whose phase turns 60° between
	// points: both cautions.
	s2p := "# GHz S MA R 50\n1 0.1 0 1.2 0 0.1 0 0.1 0\n2 0.1 0 1.2 -60 0.1 0 0.1 0\n"
	if err := os.WriteFile(filepath.Join(dir, "amp.s2p"), []byte(s2p), 0o644); err != nil {
		t.Fatal(err)
	}
	src := `
parts:
  - {type: resistor, name: R1, between: [a, gnd], value: 50}
  - {type: transmission_line, name: T1, ends: [a, b], impedance: 50, delay: 120ps}
  - {type: transmission_line, name: T2, ends: [b, stub], impedance: 70, electrical_length: 90deg@5.8GHz}
  - {type: transmission_line, name: T3, ends: [b, d], returns: [gnd, e], impedance: 75, length: 1m, velocity_factor: 66%, loss: 0.2dB/m@1GHz}
  - {type: transmission_line, name: T4, ends: [d, f], impedance: 50, length: 2m, velocity_factor: 0.8, loss: {conductor: 0.1dB/m@1GHz, dielectric: 0.05dB/m@2GHz}, dc_resistance: 0.3}
  - {type: microstrip, name: M1, ends: [f, open], width: 1.1mm, length: 8mm, substrate_height: 0.508mm, relative_permittivity: 3.55, thickness: 35um, loss_tangent: 0.0027, conductivity: 58MS/m, open_end_extension: auto}
  - {type: s_parameter_block, name: F1, file: amp.s2p, terminals: [f, g], dc: {through: [[f, g]]}}
  - {type: resistor, name: R2, between: [e, gnd], value: 1k}
  - {type: resistor, name: R3, between: [g, gnd], value: 1k}
ports:
  - {name: p1, node: a, impedance: 50}
`
	c, err := Parse(filepath.Join(dir, "c.yaml"), []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Distributed) != 6 {
		t.Fatalf("%d distributed parts, want 6", len(c.Distributed))
	}
	d := c.Distributed
	if d[0].Ideal.Delay != 120e-12 || d[0].DCText != "short" || d[0].Returns[1] != Ground {
		t.Errorf("T1: %+v", d[0])
	}
	// 90° at 5.8 GHz is a quarter period.
	if got := d[1].Ideal.Delay; math.Abs(got-0.25/5.8e9) > 1e-24 {
		t.Errorf("T2 delay %g", got)
	}
	// 66 % of c over 1 m; 0.2 dB/m is 0.2 ln10/20 Np/m.
	if got := d[2].Ideal.Delay; math.Abs(got-1/(0.66*line.SpeedOfLight)) > 1e-21 {
		t.Errorf("T3 delay %g", got)
	}
	if got := d[2].Ideal.ConductorLoss; math.Abs(got-0.2*math.Ln10/20) > 1e-15 || d[2].Ideal.LossHz != 1e9 || !d[2].JoinReturnsAtDC {
		t.Errorf("T3 loss %g Np/m at %g Hz, join %v", got, d[2].Ideal.LossHz, d[2].JoinReturnsAtDC)
	}
	// The dielectric's 0.05 dB/m at 2 GHz is 0.025 dB/m at the
	// conductor's 1 GHz.
	if got := d[3].Ideal.DielectricLoss; math.Abs(got-0.025*math.Ln10/20) > 1e-15 || d[3].Ideal.DCResistance != 0.3 || d[3].DCText != "resistance" {
		t.Errorf("T4: %+v", d[3].Ideal)
	}
	m := d[4].Microstrip
	if m.Conductivity != 58e6 || m.Extension != m.OpenEndExtension() || m.Extension <= 0 {
		t.Errorf("M1: %+v (one open end: extension %g)", m, m.OpenEndExtension())
	}
	if d[5].DCText != "through" || d[5].Block.DC == nil || d[5].Block.DC[1] != 1 {
		t.Errorf("F1 DC S-matrix %v, want a through", d[5].Block.DC)
	}
	kinds := map[WarningKind]bool{}
	for _, w := range c.Warnings {
		kinds[w.Kind] = true
		if w.Kind == Dangling {
			t.Errorf("an open stub's end is not a dangling node: %s", w)
		}
	}
	if !kinds[NotPassive] || !kinds[SparseData] {
		t.Errorf("warnings %v: want not-passive and sparse-data", c.Warnings)
	}
	if _, err := c.ResolveVary("T1.impedance"); err == nil {
		t.Errorf("a study varied a line's impedance")
	}
}
