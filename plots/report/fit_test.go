package report

import (
	"math"
	"strings"
	"testing"

	"qpoint/bias/circuit"
)

// TestYAMLValue: the block's numbers read back through the circuit file's
// value grammar to the digits written.
func TestYAMLValue(t *testing.T) {
	cases := []struct {
		v      float64
		digits int
		unit   string
		want   string
		q      circuit.Quantity
	}{
		{3.01834e-6, 5, "A", "3.0183uA", circuit.Current},
		{1.8e-13, 3, "F", "180fF", circuit.Capacitance},
		{0.34336, 4, "V", "343.4mV", circuit.Voltage},
		{14.0017, 6, "ohm", "14.0017", circuit.Resistance},
		{1.0702336, 6, "", "1.07023", circuit.Dimensionless},
		{0.69243, 5, "eV", "0.69243eV", circuit.Energy},
		{1e-3, 6, "A", "1mA", circuit.Current},
		{2.5e-17, 3, "A", "0.025fA", circuit.Current},
		{1500, 4, "ohm", "1500", circuit.Resistance},
	}
	for _, c := range cases {
		got := yamlValue(c.v, c.digits, c.unit)
		if got != c.want {
			t.Errorf("yamlValue(%g, %d, %q) = %q, want %q", c.v, c.digits, c.unit, got, c.want)
		}
		back, err := circuit.ParseValue(got, c.q)
		if err != nil || math.Abs(back-c.v) > 0.5*math.Pow10(-c.digits+1)*math.Abs(c.v) {
			t.Errorf("%q reads back as %g (%v), written from %g", got, back, err, c.v)
		}
	}
}

func TestModelName(t *testing.T) {
	for in, want := range map[string]string{
		"testdata/fit/detector_iv.csv": "detector_iv",
		"Bench 3 (hot).CSV":            "bench_3__hot",
		"2024-05-01.csv":               "fitted_2024_05_01",
		"gnd.csv":                      "fitted_gnd",
		"+++.csv":                      "fitted",
	} {
		if got := ModelName(in); got != want {
			t.Errorf("ModelName(%q) = %q, want %q", in, got, want)
		}
	}
}

func TestCheckModelName(t *testing.T) {
	for name, ok := range map[string]bool{"detector_iv": true, "hsms-2850": true, "": false, "gnd": false, "a b": false, "ü": false, strings.Repeat("x", 101): false} {
		if err := CheckModelName(name); (err == nil) != ok {
			t.Errorf("CheckModelName(%q) = %v, want ok %v", name, err, ok)
		}
	}
}
