package steady

import (
	"math"
	"math/cmplx"
	"os"
	"testing"

	"qpoint/ac"
	"qpoint/ac/internal/fixture"
	"qpoint/bias/diode"
)

// TestSteadyStateBessel: a junction driven by v = V0 + V cos(wt) carries
// harmonics 2 I_S e^(V0/nV_T) I_k(x), x = V/(n V_T) (Abramowitz and Stegun
// eq. 9.6.34), here to 1e-6 relative at x = 0.1, 1 and 3.
func TestSteadyStateBessel(t *testing.T) {
	nw := network(t, junctionFixtureTight)
	vt := diode.ThermalVoltage(300.15)
	for _, x := range []float64{0.1, 1, 3} {
		st, err := Solve(nw, ac.Drive{Input: 0, Output: ac.Output{Port: -1, Node: "s"}, FrequencyHz: 1e6, EMF: x * vt}, Settings{Samples: 64, Harmonics: 3})
		if err != nil {
			t.Fatal(err)
		}
		i0 := 1e-14 * math.Exp(0.6/vt)
		h := st.DiodeCurrents[0]
		for k := 0; k <= 3; k++ {
			want := 2 * i0 * fixture.BesselI(k, x)
			if k == 0 {
				want = i0*fixture.BesselI(0, x) - 1e-14 // the mean includes -I_S
			}
			if rel := math.Abs(h[k].Amplitude/want - 1); rel > 1e-6 {
				t.Errorf("x = %g, harmonic %d: %.10g A, Bessel law %.10g A (relative error %.2g)", x, k, h[k].Amplitude, want, rel)
			}
		}
	}
}

// junctionFixtureTight drives the junction through 10 nΩ so that the
// drive is an ideal voltage to better than 1e-7.
const junctionFixtureTight = `
temperature: 300.15K
diode_models:
  m: {saturation_current: 1e-14, ideality: 1}
parts:
  - {type: voltage_source, name: Vb, plus: b, minus: gnd, value: 0.6V}
  - {type: diode, name: D, anode: a, cathode: s, model: m}
  - {type: resistor, name: Rsense, between: [s, gnd], value: 1e-8}
ports:
  - {name: drive, node: a, return: b, impedance: 1e-8}
`

// TestVolterraMatchesWaveform: at a small level (-50 dBm, x = 0.04, HD3
// near -110 dBc) the Volterra estimate and the waveform agree on every
// harmonic of the detector demo, a junction with series resistance and a
// capacitance that supplies 39 % of HD2, to 0.05 dB. Two independent methods, one in the
// frequency domain and one in the time domain, check each other.
func TestVolterraMatchesWaveform(t *testing.T) {
	nw := network(t, demo(t, "detector"))
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9, EMF: ac.DBmToEMF(-50, 50)}
	est, err := ac.Volterra(nw, d)
	if err != nil {
		t.Fatal(err)
	}
	st, err := Solve(nw, d, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("shooting: %d iterations, residual %.2g", st.Iterations, st.Residual)
	// The junction runs at x = |v|/(n V_T) below 0.05, and its charge
	// supplies a large share of HD2 at 2.45 GHz: the capacitance matters.
	x := cmplx.Abs(est.Junctions[0]) / nw.Diodes[0].Device.NVT()
	charge := 0.0
	for _, c := range est.Contributions {
		if c.Product == ac.HD2 && c.Source == ac.ChargeLaw {
			charge = c.Percent
		}
	}
	t.Logf("x = %.4f; charge share of HD2 %.1f %%", x, charge)
	if x >= 0.05 || charge < 10 {
		t.Fatalf("the check needs x < 0.05 (got %.4f) and a capacitance that matters (charge share %.1f %%)", x, charge)
	}
	pairs := []struct {
		name      string
		est, wave complex128
	}{
		{"fundamental", est.Fundamental, st.Output[1].Phasor},
		{"HD2", est.HD2, st.Output[2].Phasor},
		{"HD3", est.HD3, st.Output[3].Phasor},
		{"DC shift", complex(est.DCShift, 0), st.Output[0].Phasor},
	}
	for _, p := range pairs {
		db := 20 * math.Log10(cmplx.Abs(p.wave)/cmplx.Abs(p.est))
		t.Logf("%s: estimate %.4g, waveform %.4g (%.4f dB)", p.name, cmplx.Abs(p.est), cmplx.Abs(p.wave), db)
		// HD2 within 0.05 dB and HD3 within 0.2 dB is the issue's
		// requirement; here every product meets 0.05 dB.
		if math.Abs(db) > 0.05 {
			t.Errorf("%s: estimate %v, waveform %v differ by %.3f dB", p.name, p.est, p.wave, db)
		}
	}
}

// TestSlowVideoSteadyState: a detector whose video RC is 1000 RF periods
// reaches steady state in at most 15 shooting iterations.
func TestSlowVideoSteadyState(t *testing.T) {
	nw := network(t, `
diode_models:
  det: {saturation_current: 3uA, ideality: 1.05, series_resistance: 20, zero_bias_capacitance: 0.18pF, built_in_potential: 0.25V}
parts:
  - {type: capacitor, name: Cin, between: [rf, a], value: 10pF}
  - {type: resistor, name: Rret, between: [a, gnd], value: 1k}
  - {type: diode, name: D, anode: a, cathode: v, model: det}
  - {type: capacitor, name: Cv, between: [v, gnd], value: 40.8pF}
  - {type: resistor, name: Rv, between: [v, gnd], value: 10k}
ports:
  - {name: rf, node: rf, impedance: 50}
probes: [v]
`)
	// Rv Cv = 408 ns = 1000 periods at 2.45 GHz.
	d := ac.Drive{Input: 0, Output: ac.Output{Port: -1, Node: "v"}, FrequencyHz: 2.45e9, EMF: ac.DBmToEMF(-10, 50)}
	st, err := Solve(nw, d, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if st.Iterations > 15 {
		t.Errorf("%d shooting iterations over both step sizes, want at most 15", st.Iterations)
	}
	t.Logf("%d iterations, DC shift %.4g V, residual %.2g", st.Iterations, st.Output[0].Amplitude, st.Residual)
	if st.Output[0].Amplitude <= 0 {
		t.Errorf("a detector's video output must rise with signal: DC shift %g V", st.Output[0].Amplitude)
	}
}

// TestReadingsBelowFloor: at -200 dBm into the detector demo the waveform's
// harmonics and DC shift are rounding (the Volterra series puts the 2nd
// harmonic 210 dB and the DC shift 3.5e-21 V below anything the solver
// resolves); they are marked below the floor and give no THD, where they
// once read THD 6 % and HD3 -28 dBc (issue 13, item 5). At -60 dBm the
// second harmonic is real and agrees with the estimate to 0.5 dB.
func TestReadingsBelowFloor(t *testing.T) {
	src, err := os.ReadFile("../../testdata/demo/detector.yaml")
	if err != nil {
		t.Fatal(err)
	}
	nw := network(t, string(src))
	for _, dbm := range []float64{-200, -160, -120} {
		d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9, EMF: ac.DBmToEMF(dbm, 50)}
		st, err := Solve(nw, d, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		for _, h := range st.Output {
			if h.Order != 1 && !h.BelowFloor {
				t.Errorf("%g dBm: order %d at %g V not marked below the floor %g V", dbm, h.Order, h.Amplitude, st.NoiseFloor)
			}
		}
		if !math.IsNaN(st.THDPercent) {
			t.Errorf("%g dBm: THD %g %%, want none (rounding)", dbm, st.THDPercent)
		}
	}
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9, EMF: ac.DBmToEMF(-60, 50)}
	st, err := Solve(nw, d, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	e, err := ac.Volterra(nw, d)
	if err != nil {
		t.Fatal(err)
	}
	if st.Output[2].BelowFloor || math.Abs(20*math.Log10(st.Output[2].Amplitude/cmplx.Abs(e.HD2))) > 0.5 {
		t.Errorf("-60 dBm: HD2 %g V (below floor %v), estimate %g V", st.Output[2].Amplitude, st.Output[2].BelowFloor, cmplx.Abs(e.HD2))
	}
}
