package steady

import (
	"math"
	"math/cmplx"
	"testing"

	"qpoint/ac"
)

// TestTransformerVolterraAgainstWaveform: behind a step-up transformer a
// detector's fundamental and second harmonic from the Volterra series
// equal the steady-state waveform's within 0.05 dB at a small level (as
// the demos do, README): the series and the time-domain solver see the
// same coupled windings.
func TestTransformerVolterraAgainstWaveform(t *testing.T) {
	nw := network(t, `
diode_models:
  d: {saturation_current: 3uA, ideality: 1.05, series_resistance: 20, zero_bias_capacitance: 0.18pF, built_in_potential: 0.25V}
parts:
  - {type: transformer, name: T1, primary: [rf, gnd], secondary: [a, gnd], inductances: [100nH, 400nH], coupling: 0.9}
  - {type: diode, name: D1, anode: a, cathode: out, model: d}
  - {type: capacitor, name: C1, between: [out, gnd], value: 20pF}
ports:
  - {name: rf, node: rf, impedance: 50}
  - {name: video, node: out, impedance: 10k}
`)
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 300e6, EMF: ac.DBmToEMF(-50, 50)}
	est, err := ac.Volterra(nw, d)
	if err != nil {
		t.Fatal(err)
	}
	st, err := Solve(nw, d, Settings{Harmonics: 3})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name        string
		est, steady float64
	}{
		{"fundamental", cmplx.Abs(est.Fundamental), st.Output[1].Amplitude},
		{"second harmonic", cmplx.Abs(est.HD2), st.Output[2].Amplitude},
	} {
		if db := 20 * math.Log10(c.est/c.steady); math.Abs(db) > 0.05 {
			t.Errorf("%s: Volterra %.6g V, waveform %.6g V (%.3f dB apart)", c.name, c.est, c.steady, db)
		}
	}
}
