package circuit

import "math"

// span is the range of magnitudes a circuit-file value of one quantity may
// take: zero, or a magnitude from min to max. The spans are generous for
// any circuit that can be built, and keep every number the analyses derive
// from a value (1/R, C·v, I_S e^(v/nV_T), 1/f) finite: a value such as
// 1e308 V would otherwise reach the solver and fail there, far from the
// line that caused it.
type span struct {
	min, max float64
	words    string // the span as the message gives it
}

var spans = [...]span{
	Dimensionless: {0, 1e6, "a number of magnitude up to 1e6"},
	Resistance:    {1e-12, 1e15, "a resistance from 1e-12 ohm to 1e15 ohm"},
	Capacitance:   {0, 1e6, "a capacitance up to 1e6 F"},
	Inductance:    {0, 1e6, "an inductance up to 1e6 H"},
	Voltage:       {0, 1e6, "a voltage of magnitude up to 1 MV"},
	Current:       {0, 1e6, "a current of magnitude up to 1e6 A"},
	Frequency:     {1e-3, 1e12, "a frequency from 1 mHz to 1 THz"},
	Time:          {0, 1e6, "a time up to 1e6 s"},
	Power:         {0, 1e12, "a power up to 1e12 W"},
	Energy:        {0, 1e3, "an energy up to 1000 eV"},
	Temperature:   {1e-3, 1e9, "a temperature from 1 mK to 1e9 K"},
	Length:        {1e-12, 1e6, "a length from 1 pm to 1000 km"},
}

// outOfSpan returns what is wrong with v as a value of q, or "" when its
// magnitude lies in q's span (or v is zero, which the field's own rule
// judges).
func outOfSpan(v float64, q Quantity) string {
	if q < 0 || int(q) >= len(spans) || v == 0 {
		return ""
	}
	s, a := spans[q], math.Abs(v)
	switch {
	case a > s.max:
		return "beyond the largest " + q.String() + " accepted"
	case a < s.min:
		return "below the smallest " + q.String() + " accepted"
	}
	return ""
}
