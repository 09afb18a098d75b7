package smallsignal

import (
	"math/cmplx"
	"testing"

	"qpoint/bias"
	"qpoint/bias/circuit"
)

// TestElementConjugate: a real network's rows at -ω are the conjugates of
// those at ω, Y(-jω) = Y(jω)* (common practice: the transform of a real
// impulse response), as harmonic balance needs at negative products.
func TestElementConjugate(t *testing.T) {
	c, err := circuit.Parse("t.yaml", []byte(`
parts:
  - {type: resistor, name: R1, between: [a, gnd], value: 50}
  - {type: transmission_line, name: T1, ends: [a, b], returns: [gnd, e], impedance: 60, length: 0.2m, velocity_factor: 0.7, loss: {conductor: 0.5dB/m@1GHz, dielectric: 0.2dB/m@1GHz}}
  - {type: resistor, name: R2, between: [e, gnd], value: 10}
  - {type: microstrip, name: M1, ends: [b, c], width: 0.6mm, length: 9mm, substrate_height: 0.5mm, relative_permittivity: 9.8, thickness: 10um, loss_tangent: 0.001}
  - {type: resistor, name: R3, between: [c, gnd], value: 75}
`))
	if err != nil {
		t.Fatal(err)
	}
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	nw, err := New(p)
	if err != nil {
		t.Fatal(err)
	}
	s := make([]complex128, 4)
	for _, e := range nw.Elements {
		for _, w := range []float64{1e8, 6e9, 3e10} {
			pos := map[[2]int]complex128{}
			e.Entries(w, s, func(i, j int, v complex128) { pos[[2]int{i, j}] += v })
			neg := map[[2]int]complex128{}
			e.Entries(-w, s, func(i, j int, v complex128) { neg[[2]int{i, j}] += v })
			if len(pos) != len(neg) {
				t.Fatalf("%s: %d entries at ω, %d at -ω", e.Name, len(pos), len(neg))
			}
			for k, v := range pos {
				if cmplx.Abs(neg[k]-cmplx.Conj(v)) > 1e-15*cmplx.Abs(v) {
					t.Errorf("%s at %g rad/s: entry %v is %v at -ω, want %v", e.Name, w, k, neg[k], cmplx.Conj(v))
				}
			}
		}
	}
}
