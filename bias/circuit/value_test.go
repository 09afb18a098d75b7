package circuit

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// The prefix multipliers are those of the SI Brochure, 9th edition (BIPM,
// 2019), table 7; 0 °C = 273.15 K is the definition of the degree Celsius in
// the same brochure, section 2.3.1.
func TestParseValue(t *testing.T) {
	tests := []struct {
		in   string
		q    Quantity
		want float64
	}{
		{"0.5", Dimensionless, 0.5},
		{"1e-9", Dimensionless, 1e-9},
		{"1E-3", Dimensionless, 1e-3},
		{"-3", Voltage, -3},
		{"+2", Voltage, 2},
		{".5", Dimensionless, 0.5},
		{"5.", Dimensionless, 5},
		{"500m", Dimensionless, 0.5},
		{"47k", Resistance, 47e3},
		{"4.7kΩ", Resistance, 4.7e3},
		{"4.7k\u2126", Resistance, 4.7e3}, // the ohm sign, a separate code point from capital omega
		{"4.7kohm", Resistance, 4.7e3},
		{"50ohm", Resistance, 50},
		{"1M", Resistance, 1e6},
		{"1m", Resistance, 1e-3},
		{"22pF", Capacitance, 22e-12},
		{"22p", Capacitance, 22e-12},
		{"1F", Capacitance, 1},      // farad
		{"1f", Capacitance, 1e-15},  // femto
		{"1fF", Capacitance, 1e-15}, // femtofarad
		{"1mF", Capacitance, 1e-3},
		{"39nH", Inductance, 39e-9},
		{"3.3V", Voltage, 3.3},
		{"250mV", Voltage, 0.25},
		{"2.45GHz", Frequency, 2.45e9},
		{"1MHz", Frequency, 1e6},
		{"1mHz", Frequency, 1e-3},
		{"2T", Frequency, 2e12},
		{"10uA", Current, 10e-6},
		{"10µA", Current, 10e-6}, // micro sign U+00B5
		{"10μA", Current, 10e-6}, // Greek small mu U+03BC
		{"10µ", Current, 10e-6},
		{"5ns", Time, 5e-9},
		{"75mW", Power, 75e-3},
		{"0.69eV", Energy, 0.69},
		{"1.11", Energy, 1.11},
		{"40meV", Energy, 0.04},
		{"1e3k", Resistance, 1e6},
		{"27C", Temperature, 300.15},
		{"27°C", Temperature, 300.15},
		{"300.15K", Temperature, 300.15},
		{"-40C", Temperature, 233.15},
		{"0", Voltage, 0},
		{"1e-320", Dimensionless, 1e-320}, // subnormal, but not zero
	}
	for _, tt := range tests {
		got, err := ParseValue(tt.in, tt.q)
		if err != nil {
			t.Errorf("ParseValue(%q, %v): unexpected error %v", tt.in, tt.q, err)
			continue
		}
		if got != tt.want && math.Abs(got-tt.want) > 1e-12*math.Abs(tt.want) {
			t.Errorf("ParseValue(%q, %v) = %g, want %g", tt.in, tt.q, got, tt.want)
		}
	}
}

// TestParseValueExact checks that a prefix is applied in decimal, so that a
// value written with a prefix is the float64 nearest to it, the same as the
// number written out.
func TestParseValueExact(t *testing.T) {
	for _, tt := range []struct {
		in   string
		q    Quantity
		want float64
	}{
		{"22pF", Capacitance, 2.2e-11},
		{"39nH", Inductance, 3.9e-8},
		{"100uA", Current, 1e-4},
		{"0.18pF", Capacitance, 1.8e-13},
		{"27C", Temperature, 300.15},
		{"-40C", Temperature, 233.15},
	} {
		if got, err := ParseValue(tt.in, tt.q); err != nil || got != tt.want {
			t.Errorf("ParseValue(%q) = %v, %v; want exactly %v", tt.in, got, err, tt.want)
		}
	}
}

func TestParseValueErrors(t *testing.T) {
	tests := []struct {
		in     string
		q      Quantity
		phrase string
	}{
		{"", Resistance, "no resistance given"},
		{"abc", Resistance, "does not start with a decimal number"},
		{"k", Resistance, "does not start with a decimal number"},
		{"--1", Voltage, "does not start with a decimal number"},
		{"NaN", Dimensionless, "not a finite number"},
		{"nan", Dimensionless, "not a finite number"},
		{".inf", Dimensionless, "not a finite number"},
		{"-Inf", Voltage, "not a finite number"},
		{"Infinity", Voltage, "not a finite number"},
		{"1e309", Resistance, "too large for a float64"},
		{"1e308T", Resistance, "too large for a float64"},
		{"1e99999999999999999999", Resistance, "too large for a float64"},
		{"1e-400", Capacitance, "too small for a float64"},
		{"1e-320f", Capacitance, "too small for a float64"},
		{"0x1F", Resistance, "hexadecimal"},
		{"0b101", Dimensionless, "hexadecimal, octal and binary"},
		{"1_000", Resistance, "`_000` after the number is not an SI prefix or a unit of resistance"},
		{"4.7K", Resistance, "K is not a prefix (kilo is written k)"},
		{"1KHz", Frequency, "K is not a prefix"},
		{"1 k", Resistance, "contains a space"},
		{" 1k", Resistance, "contains a space"},
		{"3.3V", Current, "V is a unit of voltage, not of current"},
		{"22pH", Capacitance, "H is a unit of inductance, not of capacitance"},
		{"1kHZ", Frequency, "the unit is written Hz"},
		{"10kOhm", Resistance, "the unit is written ohm"},
		{"10kohms", Resistance, "`kohms` after the number"},
		{"1kk", Resistance, "`kk` after the number"},
		{"1..2", Dimensionless, "`.2` after the number is not an SI prefix"},
		{"1e", Dimensionless, "`e` after the number"},
		{"3V", Dimensionless, "V is a unit of voltage, but this field is a plain number"},
		{"1P", Capacitance, "`P` after the number"}, // peta is not among the prefixes
		{"27", Temperature, "a temperature needs its unit, C or K"},
		{"-300C", Temperature, "at or below absolute zero"},
		{"0K", Temperature, "at or below absolute zero"},
		{"-273.15C", Temperature, "at or below absolute zero"},
		{"27mC", Temperature, "temperatures take no prefix"},
		{"80F", Temperature, "`F` is not a temperature unit"},
		{"nanK", Temperature, "not a finite number"},
	}
	for _, tt := range tests {
		v, err := ParseValue(tt.in, tt.q)
		if err == nil {
			t.Errorf("ParseValue(%q, %v) = %g, want an error containing %q", tt.in, tt.q, v, tt.phrase)
			continue
		}
		var ve *ValueError
		if !errors.As(err, &ve) {
			t.Errorf("ParseValue(%q, %v): error %T is not a *ValueError", tt.in, tt.q, err)
		}
		msg := err.Error()
		if !strings.Contains(msg, tt.phrase) {
			t.Errorf("ParseValue(%q, %v) error %q\n\tdoes not contain %q", tt.in, tt.q, msg, tt.phrase)
		}
		// Every message ends by saying which forms the field takes.
		if !strings.Contains(msg, "; accepted: "+tt.q.Accepted()) {
			t.Errorf("ParseValue(%q, %v) error %q\n\tdoes not list the accepted forms", tt.in, tt.q, msg)
		}
	}
}

func TestParseValueUnknownQuantity(t *testing.T) {
	if _, err := ParseValue("1", Quantity(99)); err == nil {
		t.Error("ParseValue with an unknown quantity: want an error")
	}
}

func TestAcceptedResistance(t *testing.T) {
	want := "a number with an optional SI prefix (f p n u µ m k M G T) and unit ohm or Ω, e.g. 4.7k or 4.7kohm"
	if got := Resistance.Accepted(); got != want {
		t.Errorf("Resistance.Accepted() = %q, want %q", got, want)
	}
}

func TestParseLevel(t *testing.T) {
	tests := []struct {
		in   string
		want Level
	}{
		{"-20dBm", Level{DBm: -20, IsPower: true}},
		{"0dBm", Level{DBm: 0, IsPower: true}},
		{"+7.5dBm", Level{DBm: 7.5, IsPower: true}},
		{"50mV", Level{PeakVolts: 0.05}},
		{"1V", Level{PeakVolts: 1}},
		{"200uV", Level{PeakVolts: 200e-6}},
	}
	for _, tt := range tests {
		got, err := ParseLevel(tt.in)
		if err != nil || got != tt.want {
			t.Errorf("ParseLevel(%q) = %+v, %v; want %+v", tt.in, got, err, tt.want)
		}
	}
}

func TestParseLevelErrors(t *testing.T) {
	tests := []struct{ in, phrase string }{
		{"0.05", "a level needs its unit, dBm or V"},
		{"-50mV", "a peak voltage must be above zero"},
		{"0V", "a peak voltage must be above zero"},
		{"-20dB", "dB is not accepted here"},
		{"-20dBW", "dBW is not accepted here"},
		{"-20mdBm", "dBm takes no prefix"},
		{"20dbm", "`dbm` after the number"},
		{"5A", "`A` after the number is not dBm or a voltage unit"},
		{"5KV", "K is not a prefix"},
		{"NaNdBm", "not a finite number"},
		{"1e999dBm", "too large"},
		{"", "no signal level given"},
	}
	for _, tt := range tests {
		_, err := ParseLevel(tt.in)
		if err == nil {
			t.Errorf("ParseLevel(%q): want an error containing %q", tt.in, tt.phrase)
			continue
		}
		if msg := err.Error(); !strings.Contains(msg, tt.phrase) || !strings.Contains(msg, "; accepted: "+levelAccepted) {
			t.Errorf("ParseLevel(%q) error %q\n\twant it to contain %q and the accepted forms", tt.in, msg, tt.phrase)
		}
	}
}
