package plots

import (
	"strings"
	"testing"

	"gonum.org/v1/plot"
)

// labels returns the labelled ticks of ts, in order.
func labels(ts []plot.Tick) []string {
	var out []string
	for _, t := range ts {
		if !t.IsMinor() {
			out = append(out, t.Label)
		}
	}
	return out
}

func TestTickLabels(t *testing.T) {
	// The expected labels are SI notation as the SI Brochure (BIPM, 9th
	// ed., 2019, sec. 5.4) writes it: a space between number and unit,
	// the prefix joined to the unit.
	tests := []struct {
		name     string
		ticker   plot.Ticker
		min, max float64
		want     []string
	}{
		{"four decades of frequency", LogTicks{Unit: "Hz"}, 1e6, 1e10,
			[]string{"1 MHz", "10 MHz", "100 MHz", "1 GHz", "10 GHz"}},
		{"decades inside an uneven span", LogTicks{Unit: "Hz"}, 3e5, 2.45e9,
			[]string{"1 MHz", "10 MHz", "100 MHz", "1 GHz"}},
		{"under two decades labels 1, 2, 5", LogTicks{Unit: "Hz"}, 1e6, 5e7,
			[]string{"1 MHz", "2 MHz", "5 MHz", "10 MHz", "20 MHz", "50 MHz"}},
		{"eleven decades label every second", LogTicks{Unit: "Hz"}, 1, 1e11,
			[]string{"1 Hz", "100 Hz", "10 kHz", "1 MHz", "100 MHz", "10 GHz"}},
		{"a narrow span falls back to linear", LogTicks{Unit: "Hz"}, 2.4e9, 2.5e9,
			[]string{"2.4 GHz", "2.42 GHz", "2.44 GHz", "2.46 GHz", "2.48 GHz", "2.5 GHz"}},
		{"ohms on a log axis", LogTicks{Unit: "Ω"}, 5, 5e3,
			[]string{"10 Ω", "100 Ω", "1 kΩ"}},
		{"group delay in ns", LinearTicks{Unit: "s"}, 0, 2e-9,
			[]string{"0 s", "500 ps", "1 ns", "1.5 ns", "2 ns"}},
		{"delay crossing zero", LinearTicks{Unit: "s"}, -1.2e-9, 1.2e-9,
			[]string{"-1 ns", "-500 ps", "0 s", "500 ps", "1 ns"}},
		{"decibels stay plain numbers", LinearTicks{}, -40, 0,
			[]string{"-40", "-30", "-20", "-10", "0"}},
		{"fractions of a decibel", LinearTicks{}, -3, 0,
			[]string{"-3.0", "-2.5", "-2.0", "-1.5", "-1.0", "-0.5", "0"}},
		{"reactance in kΩ", LinearTicks{Unit: "Ω"}, -1000, 3000,
			[]string{"-1 kΩ", "0 Ω", "1 kΩ", "2 kΩ", "3 kΩ"}},
		{"phase by 30°", PhaseTicks{}, -180, 0,
			[]string{"-180°", "-150°", "-120°", "-90°", "-60°", "-30°", "0°"}},
		{"phase past a turn by 90°", PhaseTicks{}, -360, 90,
			[]string{"-360°", "-270°", "-180°", "-90°", "0°", "90°"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := labels(tt.ticker.Ticks(tt.min, tt.max))
			if strings.Join(got, "|") != strings.Join(tt.want, "|") {
				t.Errorf("labels over [%g, %g] = %q, want %q", tt.min, tt.max, got, tt.want)
			}
		})
	}
}

func TestTicksStayInRange(t *testing.T) {
	for _, tk := range []plot.Ticker{LogTicks{Unit: "Hz"}, LinearTicks{Unit: "s"}, PhaseTicks{}} {
		for _, r := range [][2]float64{{1e6, 1e10}, {3e5, 2.45e9}, {7, 9}, {0.1, 0.3}} {
			for _, x := range tk.Ticks(r[0], r[1]) {
				if x.Value < r[0]*(1-1e-9) || x.Value > r[1]*(1+1e-9) {
					t.Errorf("%T over [%g, %g] gave a tick at %g, outside the range", tk, r[0], r[1], x.Value)
				}
			}
		}
	}
}

func TestTicksOfBadRanges(t *testing.T) {
	// An axis that has nothing to show must get no ticks, not a panic.
	nan := func() float64 { var z float64; return z / z }()
	for _, tk := range []plot.Ticker{LogTicks{Unit: "Hz"}, LinearTicks{Unit: "s"}, PhaseTicks{}} {
		for _, r := range [][2]float64{{0, 0}, {1, 1}, {-1, 1e9}, {5, 2}, {nan, 1}} {
			if _, log := tk.(LogTicks); !log && r[0] < r[1] {
				continue // a valid linear range
			}
			if got := tk.Ticks(r[0], r[1]); len(got) != 0 {
				t.Errorf("%T over [%g, %g] gave %d ticks, want none", tk, r[0], r[1], len(got))
			}
		}
	}
}
