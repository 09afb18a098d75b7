package smallsignal

import (
	"math"
	"path/filepath"
	"testing"

	"qpoint/bias"
	"qpoint/bias/circuit"
)

func demoNetwork(t *testing.T, name string) *Network {
	t.Helper()
	c, err := circuit.Load(filepath.Join("..", "testdata", "demo", name+".yaml"))
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
	return nw
}

// TestLoadLineDemos: the Thevenin equivalent each demo's diode sees at
// DC, written out by hand from the schematic (Thevenin's theorem, common
// practice). The line must also pass through the Q point the bias solve
// found, which is Kirchhoff's current law around the loop: the open
// voltage the line implies equals the source's to the solve's residual.
func TestLoadLineDemos(t *testing.T) {
	cases := []struct {
		demo  string
		diode int
		rth   float64 // Ω; 0 for a short
		vth   float64 // V; NaN where only R is checked
		why   string
		rtol  float64 // relative; zero: 1e-9
	}{
		// Vcc 3.3 V, Rbias 220 kΩ to the anode; the cathode returns
		// through the video port's 100 kΩ (Cvideo open, the RF port
		// behind its DC block).
		{"detector", 0, 320e3, 3.3, "Rbias + video port", 0},
		// Vctl 1.8 V, Rctl 1 kΩ, Lfeed a short; Cbyp, Cin, Cout open.
		{"attenuator", 0, 1e3, 1.8, "Rctl", 0},
		// Lreturn straight across the diode.
		{"limiter", 0, 0, 0, "Lreturn shorts the terminals", 0},
		// The series line and the shorted stub return the anode to
		// ground at DC (a line's conductors are a short, with their few
		// milliohms); the cathode returns through the video port's
		// 100 kΩ; the open stub and Cvideo carry no DC.
		{"matched_detector", 0, 100e3, 0, "video port, through the lines' conductors", 1e-6},
	}
	for _, k := range cases {
		nw := demoNetwork(t, k.demo)
		l, err := nw.LoadLine(k.diode)
		if err != nil {
			t.Fatal(err)
		}
		if k.rth == 0 {
			if !math.IsInf(l.Conductance, 1) || l.OpenVoltage != l.QVoltage {
				t.Errorf("%s: conductance %g, open voltage %g; want +Inf at the Q voltage (%s)", k.demo, l.Conductance, l.OpenVoltage, k.why)
			}
			continue
		}
		if k.rtol == 0 {
			k.rtol = 1e-9
		}
		if r := 1 / l.Conductance; math.Abs(r-k.rth) > k.rtol*k.rth {
			t.Errorf("%s: R_th %.12g Ω, want %g Ω (%s)", k.demo, r, k.rth, k.why)
		} else {
			t.Logf("%s: R_th %.12g Ω", k.demo, r)
		}
		// The residual of the solve (1e-12 A + 1e-9 of the currents)
		// times R_th bounds the open voltage's error.
		if math.Abs(l.OpenVoltage-k.vth) > 1e-6 {
			t.Errorf("%s: V_th %.9g V, want %g V (%s)", k.demo, l.OpenVoltage, k.vth, k.why)
		}
		if got := l.At(l.QVoltage); math.Abs(got-l.QCurrent) > 1e-12+1e-9*math.Abs(l.QCurrent) {
			t.Errorf("%s: line at the Q voltage gives %g A, Q current %g A", k.demo, got, l.QCurrent)
		}
	}
}

// TestLoadLineOtherDiode: in the mixer's bias chain Vbias - Rtop - Dtop -
// Dbottom - Rbottom the upper diode sees the lower one linearised: R_th =
// Rtop + Rbottom + R_S + 1/g_d of Dbottom (the midpoint's other paths are
// open at DC: the traps' capacitors, the IF port behind its DC block; the
// balun's windings reach the diodes only through Ca and Cb).
func TestLoadLineOtherDiode(t *testing.T) {
	nw := demoNetwork(t, "mixer")
	l, err := nw.LoadLine(0)
	if err != nil {
		t.Fatal(err)
	}
	lower := nw.Diodes[1]
	want := 330 + 330 + lower.SeriesResistance + 1/lower.G1
	if r := 1 / l.Conductance; math.Abs(r-want) > 1e-9*want {
		t.Errorf("R_th %.12g Ω, want %.12g Ω", r, want)
	}
}

// TestLoadLineCurrentSource: a diode fed by a current source alone sees
// an open circuit: a horizontal line at the source's current.
func TestLoadLineCurrentSource(t *testing.T) {
	nw := build(t, `
diode_models:
  d: {saturation_current: 1nA, series_resistance: 5}
parts:
  - {type: current_source, name: I1, from: gnd, to: a, value: 1mA}
  - {type: diode, name: D1, anode: a, cathode: gnd, model: d}
`)
	l, err := nw.LoadLine(0)
	if err != nil {
		t.Fatal(err)
	}
	if l.Conductance != 0 || math.Abs(l.Current-1e-3) > 1e-12 || !math.IsNaN(l.OpenVoltage) {
		t.Errorf("got G %g, I %g, V_th %g; want 0 S, 1 mA, NaN", l.Conductance, l.Current, l.OpenVoltage)
	}
	if _, err := nw.LoadLine(1); err == nil {
		t.Error("diode 1 of a one-diode circuit: no error")
	}
}
