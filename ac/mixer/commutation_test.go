package mixer

import (
	"math"
	"testing"
)

// switched is a single-balanced mixer whose LO balun is driven by an all
// but ideal source (1 mΩ on its primary, 2 secondary turns per primary
// turn), so that the LO across the series pair of diodes is a pure
// sinusoid: both diodes conduct in one half of the LO period and neither
// in the other, joining the RF port (at the secondary's centre tap) to
// the IF port (at the diodes' midpoint) and parting them by turns. The
// LO cancels at both ports by symmetry. The diodes have neither charge
// nor more than 0.1 Ω of series resistance.
const switched = `
diode_models:
  sw: {saturation_current: 1nA, ideality: 1, series_resistance: 0.1}
parts:
  - {type: transformer, name: T, primary: [p, gnd], secondary: [a, b], centre_tap: c, turns_ratio: 2, magnetising_inductance: 10uH}
  - {type: diode, name: D1, anode: a, cathode: x, model: sw}
  - {type: diode, name: D2, anode: x, cathode: b, model: sw}
ports:
  - {name: lo, node: p, impedance: 1m}
  - {name: rf, node: c, impedance: 50}
  - {name: if, node: x, impedance: 50}
`

// TestIdealSwitching: the classical limit of the switching mixer, derived
// for this circuit. A switch of on-resistance r between an RF generator
// (EMF E behind R) and an IF load R, closed for half of each LO period,
// puts m(t) E cos ω_RF t across the load, with m = R/(2R + r) while
// closed and 0 while open. The 50 % square wave's fundamental is
// (2/π) cos ω_LO t (its Fourier series), so the IF load sees
// E m_on/π peak and the loss is (E²/8R) / ((E m_on/π)²/2R) =
// π² (1 + r/2R)²: 9.94 dB for an ideal switch, the classical figure of a
// single switch between resistive terminations (the derivation is the
// textbook one, from memory). Here r = R_S/2, the two diodes' series
// resistances in parallel, and the junctions' own resistance vanishes as
// the drive rises: the loss must fall at every step of the drive and end
// within 0.02 dB of the limit.
func TestIdealSwitching(t *testing.T) {
	nw := network(t, switched)
	const R, r = 50, 0.05
	limit := 10 * math.Log10(math.Pi*math.Pi*(1+r/(2*R))*(1+r/(2*R)))
	prev := math.Inf(1)
	var last float64
	for _, emf := range []float64{0.3, 0.6, 1, 2, 4, 8} {
		s := Settings{LO: 0, RF: 1, IF: 2, LOFrequencyHz: 10e6, RFFrequencyHz: 11e6, LOEMF: emf}
		res, err := Analyze(nw, s)
		if err != nil {
			t.Fatal(err)
		}
		last = res.ConversionLossDB
		t.Logf("LO EMF %4g V: conversion loss %.4f dB (%+.4f dB from the limit), image %.4f dB; %d harmonics, %d sidebands",
			emf, last, last-limit, res.ImageConversionLossDB, res.Stats.Pump.Harmonics, res.Stats.Sidebands)
		if !(last < prev) {
			t.Errorf("LO EMF %g V: the loss %.4f dB did not fall from %.4f dB", emf, last, prev)
		}
		prev = last
	}
	if d := math.Abs(last - limit); d > 0.02 {
		t.Errorf("at the strongest drive the loss is %.4f dB, %.3f dB from the switch's limit %.4f dB", last, d, limit)
	}
}
