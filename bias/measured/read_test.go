package measured

import (
	"math"
	"strings"
	"testing"
)

func TestReadUnits(t *testing.T) {
	// Unit conversions: SI prefixes as the circuit file reads them, and
	// 0 °C = 273.15 K (SI Brochure, 9th ed., 2019, 2.3.1).
	cases := []struct {
		name, file string
		kind       Kind
		want       []Point
		cautions   int
	}{
		{"SI base", "voltage [V],current [A]\n0.1,1e-6\n0.2,3e-5\n", CurrentVoltage,
			[]Point{{Voltage: 0.1, Value: 1e-6, Line: 2}, {Voltage: 0.2, Value: 3e-5, Line: 3}}, 0},
		{"prefixes and parentheses", "voltage (mV), current (mA)\n100, 0.001\n", CurrentVoltage,
			[]Point{{Voltage: 0.1, Value: 1e-6, Line: 2}}, 0},
		{"micro sign", "voltage [V],current [µA]\n0.1,2\n", CurrentVoltage,
			[]Point{{Voltage: 0.1, Value: 2e-6, Line: 2}}, 0},
		{"capacitance in pF, Celsius", "# bench 3\ncapacitance [pF];voltage [V];temperature [°C]\n0,18;-2;27\n0,2;-1;27\n", CapacitanceVoltage,
			[]Point{{Voltage: -2, Value: 0.18e-12, TemperatureK: 300.15, Line: 3}, {Voltage: -1, Value: 0.2e-12, TemperatureK: 300.15, Line: 4}}, 0},
		{"kelvin, tabs", "voltage\tcurrent [nA]\ttemperature [K]\n-1\t-2\t233.15\n", CurrentVoltage,
			[]Point{{Voltage: -1, Value: -2e-9, TemperatureK: 233.15, Line: 2}}, 1},
		{"no units", "voltage,current\r\n0.3,0.002\r\n", CurrentVoltage,
			[]Point{{Voltage: 0.3, Value: 0.002, Line: 2}}, 2},
		{"trailing separator, blank lines", "\nvoltage [V],current [A],\n\n0.3,0.002,\n", CurrentVoltage,
			[]Point{{Voltage: 0.3, Value: 0.002, Line: 4}}, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tab, err := Read(strings.NewReader(c.file))
			if err != nil {
				t.Fatal(err)
			}
			if tab.Kind != c.kind || len(tab.Cautions) != c.cautions || len(tab.Points) != len(c.want) {
				t.Fatalf("kind %v, %d cautions, %d points; want %v, %d, %d", tab.Kind, len(tab.Cautions), len(tab.Points), c.kind, c.cautions, len(c.want))
			}
			for i, w := range c.want {
				g := tab.Points[i]
				if !near(g.Voltage, w.Voltage) || !near(g.Value, w.Value) || !near(g.TemperatureK, w.TemperatureK) || g.Line != w.Line {
					t.Errorf("point %d = %+v, want %+v", i, g, w)
				}
			}
		})
	}
}

func near(a, b float64) bool { return math.Abs(a-b) <= 1e-15*math.Max(math.Abs(a), math.Abs(b)) }

func TestReadNoUnitCaution(t *testing.T) {
	tab, err := Read(strings.NewReader("voltage [V],current\n0.3,0.002\n"))
	if err != nil {
		t.Fatal(err)
	}
	c := tab.Cautions[0]
	if c.Kind != NoUnit || c.Line != 1 || c.Column != 13 || !strings.Contains(c.Message, "current") {
		t.Errorf("caution %+v; want no-unit for current at 1:13", c)
	}
}

// TestReadErrors: each bad file gets an error at its line and column that
// says what is accepted.
func TestReadErrors(t *testing.T) {
	cases := []struct {
		name, file string
		line, col  int
		says       string
	}{
		{"empty", "", 1, 1, "no header"},
		{"comments only", "# nothing\n", 1, 1, "no header"},
		{"header only", "voltage [V],current [A]\n", 2, 1, "no points"},
		{"unknown column", "voltage [V],curent [A]\n", 1, 13, "accepted: a header"},
		{"numbers as header", "0.1,1e-6\n0.2,2e-6\n", 1, 1, "not one qpoint reads"},
		{"no voltage", "current [A],temperature [C]\n1,2\n", 1, 1, "no voltage column"},
		{"neither", "voltage [V]\n1\n", 1, 1, "neither a current"},
		{"both", "voltage [V],current [A],capacitance [F]\n", 1, 25, "both current and capacitance"},
		{"duplicate column", "voltage [V],current [A],voltage [mV]\n", 1, 25, "second voltage column"},
		{"wrong unit", "voltage [V],current [V]\n", 1, 13, "not a unit of current"},
		{"prefix without unit", "voltage [V],current [m]\n", 1, 13, "not a unit of current"},
		{"capital K prefix", "voltage [KV],current [A]\n", 1, 1, "not a unit of voltage"},
		{"temperature without unit", "voltage [V],current [A],temperature\n", 1, 25, "temperature [C]"},
		{"temperature prefix", "voltage [V],current [A],temperature [mK]\n", 1, 25, "without prefix"},
		{"unclosed bracket", "voltage [V,current [A]\n", 1, 1, "not one qpoint reads"},
		{"ragged", "voltage [V],current [A]\n0.1,1e-6\n0.2\n", 3, 1, "1 fields where the header (line 1) names 2"},
		{"too many fields", "voltage [V],current [A]\n0.1,1e-6,3\n", 2, 10, "3 fields"},
		{"text", "voltage [V],current [A]\n0.1,one\n", 2, 5, "\"one\" is not a plain number"},
		{"unit in cell", "voltage [V],current [A]\n0.1V,1e-6\n", 2, 1, "not a plain number"},
		{"hex", "voltage [V],current [A]\n0x1p-3,1e-6\n", 2, 1, "not a plain number"},
		{"nan", "voltage [V],current [A]\n0.1,NaN\n", 2, 5, "not a plain number"},
		{"overflow", "voltage [V],current [A]\n0.1,1e999\n", 2, 5, "out of range"},
		{"empty field", "voltage [V],current [A]\n,1e-6\n", 2, 1, "empty field"},
		{"decimal comma with commas", "voltage [V],current [A]\n0,1,1e-6\n", 2, 5, "3 fields"},
		{"negative forward current", "voltage [V],current [mA]\n0.1,0.5\n0.2,-0.7\n", 3, 5, "has the sign of its voltage"},
		{"positive reverse current", "voltage [V],current [mA]\n-1,0.5\n", 2, 4, "has the sign of its voltage"},
		{"duplicate voltage", "voltage [V],current [A]\n0.1,1e-6\n0.2,2e-6\n0.2,2.1e-6\n", 4, 1, "repeats line 3"},
		{"unsorted", "voltage [V],current [A]\n0.1,1e-6\n0.3,2e-6\n0.2,2.1e-6\n", 4, 1, "breaks the rising order"},
		{"unsorted falling", "voltage [V],current [A]\n0.3,1e-4\n0.2,2e-6\n0.25,2.1e-6\n", 4, 1, "breaks the falling order"},
		{"unsorted within a temperature", "voltage [V],current [A],temperature [C]\n0.1,1e-6,27\n0.2,1e-5,85\n0.2,2e-6,27\n0.3,2e-5,85\n0.25,2.1e-5,85\n", 6, 1, "at 358.15 K"},
		{"zero capacitance", "voltage [V],capacitance [pF]\n-1,0\n", 2, 4, "above zero"},
		{"capacitance without unit", "voltage [V],capacitance\n-1,0.18\n", 2, 4, "header gives no unit"},
		{"below absolute zero", "voltage [V],current [A],temperature [C]\n0.1,1e-6,-300\n", 2, 10, "above absolute zero"},
		{"huge voltage", "voltage [V],current [A]\n2e6,1\n", 2, 1, "up to 1e+06 V"},
		{"invalid utf-8", "voltage [V],current [A]\n0.1,\xff\n", 2, 5, "not UTF-8"},
		{"nul", "voltage [V],current [A]\n0.1,\x00\n", 2, 5, "NUL"},
		{"bare quote", "voltage [V],current [A]\n0.1,1\"e\n", 2, 6, "quotes only around whole fields"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Read(strings.NewReader(c.file))
			pe, ok := err.(*ParseError)
			if !ok {
				t.Fatalf("error %v (%T), want a *ParseError", err, err)
			}
			if pe.Line != c.line || pe.Column != c.col || !strings.Contains(pe.Msg, c.says) {
				t.Errorf("got %d:%d %s\nwant %d:%d ...%s...", pe.Line, pe.Column, pe.Msg, c.line, c.col, c.says)
			}
			if !strings.Contains(pe.Msg, "accepted") {
				t.Errorf("%q does not say what is accepted", pe.Msg)
			}
		})
	}
}

func TestReadTooLarge(t *testing.T) {
	_, err := Read(strings.NewReader("voltage [V],current [A]\n" + strings.Repeat("0", MaxBytes)))
	if pe, ok := err.(*ParseError); !ok || !strings.Contains(pe.Msg, "larger than") {
		t.Errorf("error %v, want a refusal of the size", err)
	}
}

// FuzzRead: no input makes Read panic, and every error is placed.
func FuzzRead(f *testing.F) {
	for _, s := range []string{
		"voltage [V],current [A]\n0.1,1e-6\n0.2,2e-6\n",
		"capacitance [pF];voltage [V];temperature [°C]\n0,18;-2;27\n",
		"voltage,current\n\"0.1\",\"1e-6\"\n",
		"\xef\xbb\xbfvoltage [V]\tcurrent [A]\n-1\t-1e-9\n",
		"voltage [V],current [A]\n0.1,\"1e-6\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		tab, err := Read(strings.NewReader(s))
		if err != nil {
			pe, ok := err.(*ParseError)
			if !ok || pe.Line < 1 || pe.Column < 1 {
				t.Fatalf("error %v is not placed", err)
			}
			return
		}
		for _, p := range tab.Points {
			if math.IsNaN(p.Voltage) || math.IsNaN(p.Value) || math.IsInf(p.Value, 0) {
				t.Fatalf("point %+v not finite", p)
			}
		}
	})
}
