package diode_test

import (
	"fmt"

	"qpoint/bias/diode"
)

// A Device is a model at one temperature; its laws give the value and the
// first three derivatives at an intrinsic junction voltage. At a junction
// current I the dynamic resistance is 1/i'(v) = n V_T / (I + I_S), n V_T / I
// well above I_S (common practice), and TerminalCurrent includes the series
// resistance's drop. The figures below check by hand: V_T = kT/q =
// 25.865 mV at 300.15 K, and 0.2012 V + 20 Ω × 4.941 mA = 0.3 V.
func Example() {
	p := diode.Defaults()
	p.SaturationCurrent, p.Ideality, p.SeriesResistance = 3e-6, 1.05, 20
	d := diode.New(p, 300.15)

	l := d.Current(0.1)
	fmt.Printf("i(100 mV) = %.4g A, r_d = %.4g Ω (n V_T / I = %.4g Ω)\n",
		l.Value, 1/l.D1, p.Ideality*diode.ThermalVoltage(300.15)/(l.Value+p.SaturationCurrent))

	i, vj := d.TerminalCurrent(0.3)
	fmt.Printf("at 300 mV across the terminals: %.4g A, %.4g V across the junction\n", i, vj)
	// Output:
	// i(100 mV) = 0.0001162 A, r_d = 227.9 Ω (n V_T / I = 227.9 Ω)
	// at 300 mV across the terminals: 0.004941 A, 0.2012 V across the junction
}
