package si

import "testing"

func TestFormat(t *testing.T) {
	cases := []struct {
		v      float64
		unit   string
		digits int
		want   string
	}{
		{4.7e3, "Ω", 3, "4.7 kΩ"},
		{2.45e9, "Hz", 3, "2.45 GHz"},
		{-65e-6, "A", 3, "-65 µA"},
		{999.96, "V", 4, "1 kV"},
		{0.21, "V", 4, "210 mV"},
		{0, "A", 3, "0 A"},
		{1.234567, "", 4, "1.235"},
		{25.852e-3, "V", 5, "25.852 mV"},
		{1e-21, "A", 3, "1.00e-21 A"},
	}
	for _, c := range cases {
		if got := Format(c.v, c.unit, c.digits); got != c.want {
			t.Errorf("Format(%g, %q, %d) = %q, want %q", c.v, c.unit, c.digits, got, c.want)
		}
	}
}
