package line_test

import (
	"fmt"

	"qpoint/bias/line"
)

// A 1.1 mm strip on a 0.508 mm laminate of εr 3.55: its impedance and
// effective permittivity quasi-statically and at 5.8 GHz, where dispersion
// has raised ε_eff a little, and its losses there (a smooth copper strip:
// a rough foil adds to the conductor's).
func Example() {
	m := line.Microstrip{Width: 1.1e-3, Length: 10e-3, Height: 0.508e-3, Permittivity: 3.55,
		Thickness: 35e-6, LossTangent: 0.0027, Conductivity: line.Copper}
	z0, e0 := m.Static()
	z, e := m.ImpedanceAt(5.8e9)
	ac, ad := m.Attenuation(5.8e9)
	fmt.Printf("static: Z0 %.2f ohm, ε_eff %.4f\n", z0, e0)
	fmt.Printf("5.8 GHz: Z0 %.2f ohm, ε_eff %.4f\n", z, e)
	fmt.Printf("loss at 5.8 GHz: conductor %.3f dB/m, dielectric %.3f dB/m\n", ac/line.NepersPerDB, ad/line.NepersPerDB)
	// Output:
	// static: Z0 49.93 ohm, ε_eff 2.7384
	// 5.8 GHz: Z0 50.41 ohm, ε_eff 2.7628
	// loss at 5.8 GHz: conductor 1.738 dB/m, dielectric 2.105 dB/m
}
