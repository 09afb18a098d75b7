package steady

import (
	"math"
	"strings"
	"testing"

	"qpoint/ac"
)

// TestStressCautions: the limiter demo at +20 dBm is driven past its
// clamp diodes' current rating; at -20 dBm nothing is exceeded.
func TestStressCautions(t *testing.T) {
	nw := network(t, demo(t, "limiter"))
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 1e9}
	d.EMF = ac.DBmToEMF(-20, 50)
	st, err := Solve(nw, d, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if c := st.Cautions(); len(c) != 0 {
		t.Errorf("at -20 dBm: cautions %q, want none", c)
	}
	d.EMF = ac.DBmToEMF(27, 50)
	st, err = Solve(nw, d, Settings{Start: st})
	if err != nil {
		t.Fatal(err)
	}
	c := strings.Join(st.Cautions(), "\n")
	if !strings.Contains(c, "peak forward current") {
		t.Errorf("at +27 dBm (10 V peak EMF into 100 mA clamps): cautions %q, want the current rating", c)
	}
	for _, s := range st.Stress {
		if s.PeakCurrent <= 0 || s.MeanPower <= 0 {
			t.Errorf("%s: stress %+v", s.Name, s)
		}
	}
}

// overdrivenNoRating is a detector whose model gives no ratings, driven
// hard into a 1 Ω video load: its 50 fF junction takes far more current
// than a junction that small survives.
const overdrivenNoRating = `
diode_models:
  det: {saturation_current: 3uA, ideality: 1.05, series_resistance: 5, zero_bias_capacitance: 0.05pF, built_in_potential: 0.25V}
parts:
  - {type: capacitor, name: Cblock, between: [rf, a], value: 22pF}
  - {type: resistor, name: Rin, between: [rf, gnd], value: 1k}
  - {type: resistor, name: Rmatch, between: [a, gnd], value: 1k}
  - {type: diode, name: D1, anode: a, cathode: vout, model: det}
  - {type: capacitor, name: Cvideo, between: [vout, gnd], value: 100pF}
  - {type: resistor, name: Rload, between: [vout, gnd], value: 1}
ports:
  - {name: rf, node: rf, impedance: 50, coupling: ac}
  - {name: video, node: vout, impedance: 100k}
`

// TestStressWithoutRatings: with no ratings in the model, a junction whose
// peak current passes C_j0 × 3.3e11 A/F (the small-junction rule,
// smallJunctionCurrent: 16.7 mA for 50 fF) draws a caution; at a small
// level it does not, and the peak current is reported either way.
func TestStressWithoutRatings(t *testing.T) {
	nw := network(t, overdrivenNoRating)
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 100e6, EMF: ac.DBmToEMF(-20, 50)}
	st, err := Solve(nw, d, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if c := st.StressCautions(); len(c) != 0 || !(st.Stress[0].PeakCurrent > 0) {
		t.Errorf("at -20 dBm: cautions %+v, peak current %g A; want none and a current", c, st.Stress[0].PeakCurrent)
	}
	if got, want := st.Stress[0].SmallJunctionCurrent, 0.05e-12*1e-4/0.3e-15; math.Abs(got/want-1) > 1e-12 {
		t.Errorf("small-junction current %g A, want %g A", got, want)
	}
	d.EMF = ac.DBmToEMF(30, 50)
	st, err = Solve(nw, d, Settings{Start: st})
	if err != nil {
		t.Fatal(err)
	}
	c := st.StressCautions()
	if len(c) != 1 || c[0].Kind != SmallJunction || c[0].Value <= c[0].Limit {
		t.Errorf("at +30 dBm (peak %g A): cautions %+v; want one small-junction caution", st.Stress[0].PeakCurrent, c)
	}
}
