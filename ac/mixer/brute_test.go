package mixer

import (
	"math"
	"testing"
	"time"

	"qpoint/ac"
	"qpoint/ac/balance"
	"qpoint/smallsignal"
)

// bruteForce returns the conversion loss read off the full nonlinear
// circuit driven by the LO and by an RF tone rdB below the LO's
// available power, solved as one periodic steady state: with f_LO and
// f_RF whole multiples of f0 = f_IF, the steady state has period 1/f0,
// and harmonic balance at f0 with a generator at each harmonic solves
// it. The IF is the IF port's voltage at harmonic 1.
func bruteForce(t *testing.T, nw *smallsignal.Network, s Settings, rdB float64) float64 {
	t.Helper()
	f0 := s.IFHz()
	hLO := int(math.Round(s.LOFrequencyHz / f0))
	hRF := int(math.Round(s.RFFrequencyHz / f0))
	if math.Abs(float64(hLO)*f0-s.LOFrequencyHz) > 1e-6*f0 || math.Abs(float64(hRF)*f0-s.RFFrequencyHz) > 1e-6*f0 {
		t.Fatalf("f_LO %g and f_RF %g are not whole multiples of the IF %g", s.LOFrequencyHz, s.RFFrequencyHz, f0)
	}
	zLO, zRF, zIF := nw.Ports[s.LO].Impedance, nw.Ports[s.RF].Impedance, nw.Ports[s.IF].Impedance
	loDBm := ac.EMFToDBm(s.LOEMF, zLO)
	rfEMF := ac.DBmToEMF(loDBm-rdB, zRF)
	begin := time.Now()
	r, err := balance.Solve(nw, ac.Drive{Input: s.LO, Output: ac.Output{Port: s.IF}, FrequencyHz: f0},
		balance.Settings{Harmonics: 16 * hRF, MaxHarmonics: 1024, Generators: []balance.Generator{
			{Port: s.LO, Harmonic: hLO, EMF: complex(s.LOEMF, 0)},
			{Port: s.RF, Harmonic: hRF, EMF: complex(rfEMF, 0)},
		}})
	if err != nil {
		t.Fatal(err)
	}
	x := r.Harmonic(1)
	port := nw.Ports[s.IF]
	v := at(x, port.Node) - at(x, port.Return)
	delivered := sq(v) / (2 * zIF)
	available := ac.AvailablePower(rfEMF, zRF)
	t.Logf("brute force: LO at harmonic %d, RF at %d of %g Hz, %d harmonics, %d samples, %d Newton iterations, %v",
		hLO, hRF, f0, r.Stats.Harmonics, r.Stats.Samples, r.Stats.Iterations, time.Since(begin).Round(time.Millisecond))
	return 10 * math.Log10(available/delivered)
}

// TestBruteForceDemo: the conversion loss of the conversion matrix equals
// the loss read off a two-tone steady state with the RF 60 dB below the
// LO, at commensurate frequencies, within 0.02 dB (the bound;
// the two agree far closer, as a tone 60 dB down leaves the conversion
// linear to 1e-6), on the demo mixer at its own LO drive and on a
// circuit whose series resistance and junction capacitance matter.
func TestBruteForceDemo(t *testing.T) {
	if testing.Short() {
		t.Skip("a two-tone steady state of several hundred harmonics")
	}
	nw := network(t, demoFile(t, "mixer"))
	c := nw.Point.Circuit.Analysis.Mixer
	s := Settings{LO: portIndex(t, nw, c.LO), RF: portIndex(t, nw, c.RF), IF: portIndex(t, nw, c.IF),
		LOFrequencyHz: c.LOFrequencyHz, RFFrequencyHz: c.RFFrequencyHz, LOEMF: ac.DBmToEMF(c.LOLevel.DBm, 50)}
	res, err := Analyze(nw, s)
	if err != nil {
		t.Fatal(err)
	}
	brute := bruteForce(t, nw, s, 60)
	t.Logf("demo (pump %d harmonics, %d sidebands): conversion matrix %.6f dB, two-tone steady state %.6f dB, difference %.2g dB", res.Stats.Pump.Harmonics, res.Stats.Sidebands, res.ConversionLossDB, brute, res.ConversionLossDB-brute)
	if d := math.Abs(res.ConversionLossDB - brute); d > 0.02 {
		t.Errorf("demo: conversion loss %.4f dB from the conversion matrix, %.4f dB from the two-tone steady state (%.3g dB apart; within 0.02 dB expected)", res.ConversionLossDB, brute, d)
	}
}

// lossyMixer is a single-diode mixer at 5 GHz (LO) and 6 GHz (RF) whose
// junction capacitance (0.5 pF, 53 Ω at the RF) and series resistance
// (12 Ω) take a good part of the signal, with a DC bias.
const lossyMixer = `
diode_models:
  d: {saturation_current: 5nA, ideality: 1.15, series_resistance: 12, zero_bias_capacitance: 0.5pF, built_in_potential: 0.5V, transit_time: 5ps}
parts:
  - {type: capacitor, name: Clo, between: [lo, a], value: 1pF}
  - {type: capacitor, name: Crf, between: [rf, a], value: 1pF}
  - {type: inductor,  name: Lif, between: [a, ifout], value: 20nH}
  - {type: capacitor, name: Cif, between: [ifout, gnd], value: 2pF}
  - {type: diode, name: D, anode: a, cathode: gnd, model: d}
  - {type: voltage_source, name: Vb, plus: vb, minus: gnd, value: 1V}
  - {type: resistor, name: Rb, between: [vb, ifout], value: 4.7k}
ports:
  - {name: lo, node: lo, impedance: 50}
  - {name: rf, node: rf, impedance: 50}
  - {name: if, node: ifout, impedance: 50, coupling: ac}
`

// TestBruteForceLossy: as TestBruteForceDemo, on a circuit where series
// resistance and junction capacitance (with some diffusion charge)
// matter, with the RF above and below the LO.
func TestBruteForceLossy(t *testing.T) {
	if testing.Short() {
		t.Skip("two-tone steady states")
	}
	nw := network(t, lossyMixer)
	for _, rfHz := range []float64{6e9, 4e9} {
		s := Settings{LO: 0, RF: 1, IF: 2, LOFrequencyHz: 5e9, RFFrequencyHz: rfHz, LOEMF: ac.DBmToEMF(5, 50)}
		res, err := Analyze(nw, s)
		if err != nil {
			t.Fatal(err)
		}
		brute := bruteForce(t, nw, s, 60)
		t.Logf("RF %g Hz (pump %d harmonics, %d sidebands): conversion matrix %.6f dB, two-tone steady state %.6f dB, difference %.2g dB",
			rfHz, res.Stats.Pump.Harmonics, res.Stats.Sidebands, res.ConversionLossDB, brute, res.ConversionLossDB-brute)
		if d := math.Abs(res.ConversionLossDB - brute); d > 0.02 {
			t.Errorf("RF %g Hz: conversion loss %.4f dB from the conversion matrix, %.4f dB from the two-tone steady state (%.3g dB apart; within 0.02 dB expected)", rfHz, res.ConversionLossDB, brute, d)
		}
	}
}
