package mixer

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"qpoint/ac"
	"qpoint/bias/diode"
)

// withLine is the mixer demo with its IF return inductor Lret (47 nH
// between the centre tap and the return capacitor) replaced by a short
// lossy 50 Ω line: a transformer and a line in one circuit.
func withLine(t *testing.T) string {
	t.Helper()
	src := strings.Replace(demoFile(t, "mixer"),
		"{type: inductor,  name: Lret,    between: [ct, ret],     value: 47nH}",
		"{type: transmission_line, name: Tret, ends: [ct, ret], impedance: 50, length: 12mm, velocity_factor: 0.66, loss: 200dB/m@1GHz, dc_resistance: 0.2}", 1)
	if !strings.Contains(src, "Tret") {
		t.Fatal("the mixer demo changed: its Lret is not where this test expects it")
	}
	return src
}

// TestBruteForceLine: with a line in the circuit the conversion matrices
// take its rows at every sideband; the conversion loss equals the
// two-tone steady state's (harmonic balance, which takes lines), within
// the 0.02 dB of the demo's own check.
func TestBruteForceLine(t *testing.T) {
	if testing.Short() {
		t.Skip("a two-tone steady state of several hundred harmonics")
	}
	nw := network(t, withLine(t))
	c := nw.Point.Circuit.Analysis.Mixer
	s := Settings{LO: portIndex(t, nw, c.LO), RF: portIndex(t, nw, c.RF), IF: portIndex(t, nw, c.IF),
		LOFrequencyHz: c.LOFrequencyHz, RFFrequencyHz: c.RFFrequencyHz, LOEMF: ac.DBmToEMF(c.LOLevel.DBm, 50)}
	res, err := Analyze(nw, s)
	if err != nil {
		t.Fatal(err)
	}
	brute := bruteForce(t, nw, s, 60)
	t.Logf("with a line: conversion matrix %.6f dB, two-tone steady state %.6f dB", res.ConversionLossDB, brute)
	if d := math.Abs(res.ConversionLossDB - brute); d > 0.02 {
		t.Errorf("conversion loss %.4f dB from the conversion matrix, %.4f dB from the two-tone steady state (%.3g dB apart)", res.ConversionLossDB, brute, d)
	}
}

// TestLineNoiseInEquilibrium: TestPumpedJunctionThermal's circuit with
// its IF inductor replaced by a lossy line. At n = 2 the circuit
// temperature is T0, so the line's noise (Twiss's theorem at the circuit
// temperature, at every sideband) joins the junction's (thermal at nT/2
// = T0) and the ports' at one temperature: the IF noise must still be
// 4kT0 Re Z_out R²/|R + Z_out|² (Twiss 1955). Leaving the line's noise
// out, or taking it at the wrong sideband sign, breaks the equality.
func TestLineNoiseInEquilibrium(t *testing.T) {
	t0 := float64(ac.StandardNoiseTemperatureK)
	const n = 2.0
	temp := 2 * t0 / n
	src := strings.Replace(fmt.Sprintf(pumpedAtT0, temp, n, temp),
		"{type: inductor,  name: Lif, between: [a, ifout], value: 30nH}",
		"{type: transmission_line, name: Tif, ends: [a, ifout], impedance: 75, length: 8mm, velocity_factor: 0.66, loss: 300dB/m@1GHz, dc_resistance: 0.1}", 1)
	if !strings.Contains(src, "Tif") {
		t.Fatal("pumpedAtT0 changed: its Lif is not where this test expects it")
	}
	nw := network(t, src)
	s := Settings{LO: 0, RF: 1, IF: 2, LOFrequencyHz: 1e9, RFFrequencyHz: 1.2e9, LOEMF: ac.DBmToEMF(13, 50)}
	res, err := Analyze(nw, s)
	if err != nil {
		t.Fatal(err)
	}
	var line float64
	for _, c := range res.Noise.Contributions {
		if strings.Contains(c.Source, "Tif") {
			line = c.Share
		}
	}
	z := res.IFOutputImpedance
	const r = 50
	want := 4 * diode.Boltzmann * t0 * real(z) * r * r / sq(complex(r, 0)+z)
	got := res.Noise.OutputDensity
	t.Logf("IF noise %.9g V²/Hz, Twiss %.9g (Z_out %.4g Ω), relative difference %.2g; the line's share %.3g", got, want, z, got/want-1, line)
	if !(line > 0.01) {
		t.Errorf("the line's share of the noise is %.3g; the test needs a line that matters", line)
	}
	if rel := math.Abs(got/want - 1); rel > 1e-6 {
		t.Errorf("IF noise %.9g V²/Hz, the generalised Nyquist theorem gives %.9g (relative difference %.2g)", got, want, rel)
	}
}
