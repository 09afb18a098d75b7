package extract_test

import (
	"fmt"
	"math"

	"qpoint/bias/diode"
	"qpoint/bias/extract"
	"qpoint/bias/measured"
)

// A forward sweep, one point per decade of current from 10 nA to 100 mA,
// of a junction with I_S = 2 nA, n = 1.1 and R_S = 5 Ω at 27 °C: the
// fit returns those values, and says what the points leave undetermined.
func ExampleFit() {
	vt := diode.ThermalVoltage(300.15)
	var points []measured.Point
	for e := -8; e <= -1; e++ {
		i := math.Pow10(e)
		v := 1.1*vt*math.Log1p(i/2e-9) + 5*i
		points = append(points, measured.Point{Voltage: v, Value: i})
	}
	r, err := extract.Fit(extract.Data{Current: points}, extract.Settings{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, key := range []string{"saturation_current", "ideality", "series_resistance", "gap_energy"} {
		v := r.Value(key)
		fmt.Printf("%-20s %.6g %s (%s)\n", key, v.Value, v.Unit, v.Status)
	}
	for _, c := range r.Cautions {
		fmt.Printf("%s: %s\n", c.Kind, c.Key)
	}
	// Output:
	// saturation_current   2e-09 A (fitted)
	// ideality             1.1  (fitted)
	// series_resistance    5 ohm (fitted)
	// gap_energy           1.11 eV (default)
	// not-determined: gap_energy
	// not-determined: saturation_temperature_exponent
	// not-determined: breakdown_voltage
	// not-determined: zero_bias_capacitance
	// not-determined: built_in_potential
	// not-determined: grading_coefficient
}
