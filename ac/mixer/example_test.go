package mixer_test

import (
	"fmt"
	"math"

	"qpoint/ac"
	"qpoint/ac/mixer"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// The single-balanced mixer demo with its LO at 7 dBm: conversion loss,
// noise figures, the impedance the RF port shows under pump, and the LO
// power the mixer takes.
func Example() {
	c, err := circuit.Load("../../testdata/demo/mixer.yaml")
	if err != nil {
		panic(err)
	}
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		panic(err)
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		panic(err)
	}
	// Ports in file order: rf, lo, if.
	s := mixer.Settings{LO: 1, RF: 0, IF: 2, LOFrequencyHz: 1.8e9, RFFrequencyHz: 1.9e9, LOEMF: ac.DBmToEMF(7, 50)}
	r, err := mixer.Analyze(nw, s)
	if err != nil {
		panic(err)
	}
	fmt.Printf("conversion loss %.2f dB, image %.2f dB; noise figure %.2f dB SSB, %.2f dB DSB\n",
		r.ConversionLossDB, r.ImageConversionLossDB, r.Noise.FigureSSBDB, r.Noise.FigureDSBDB)
	fmt.Printf("RF port %.1f %+.1fj Ω; LO absorbed %.2f dBm\n", real(r.RFInputImpedance), imag(r.RFInputImpedance), 10*math.Log10(r.LO.AbsorbedW*1e3))
	fmt.Printf("%s, %d harmonics; %d sidebands each side\n", r.Stats.Pump.Method, r.Stats.Pump.Harmonics, r.Stats.Sidebands)
	// Output:
	// conversion loss 6.62 dB, image 6.65 dB; noise figure 6.23 dB SSB, 3.24 dB DSB
	// RF port 53.1 -1.9j Ω; LO absorbed 6.86 dBm
	// harmonic balance, 64 harmonics; 32 sidebands each side
}
