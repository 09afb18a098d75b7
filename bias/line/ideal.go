package line

import "math"

// Ideal is a uniform TEM line given by its characteristic impedance Z0 and
// its one-way delay T, with optional loss per metre when its physical
// length is known. Its inductance and capacitance are L = Z0 T and
// C = T/Z0 (whole line); the loss enters as a series resistance that
// grows as √f (conductors, Conductor) and a shunt conductance that grows as
// f (dielectric of constant loss tangent), scaled so that at LossHz
//
//	α_c = R/(2 Z0),   α_d = G Z0/2   (Pozar, "Microwave Engineering",
//	                                  4th ed., 2012, eqs. 2.80-2.81)
//
// hold per metre, the low-loss attenuations the user states.
type Ideal struct {
	Impedance float64 // Z0, ohm
	Delay     float64 // T, s
	// Length is the physical length in metres, zero when the line was
	// given by its delay or electrical length alone.
	Length float64
	// ConductorLoss and DielectricLoss are α_c and α_d in nepers per
	// metre at LossHz.
	ConductorLoss, DielectricLoss float64
	LossHz                        float64
	// DCResistance is the whole line's conductor resistance at DC, ohm.
	DCResistance float64
}

// At returns the line's telegrapher section at freqHz (0 for DC).
func (l Ideal) At(freqHz float64) Section {
	w := 2 * math.Pi * freqHz
	z0, t := l.Impedance, l.Delay
	cond := Conductor{DCResistance: l.DCResistance, SkinHz: l.LossHz}
	var g float64
	if l.LossHz > 0 {
		cond.SkinAt = 2 * z0 * l.ConductorLoss * l.Length
		g = 2 * l.DielectricLoss * l.Length * (freqHz / l.LossHz) / z0
	}
	return Section{
		Z: cond.At(freqHz) + complex(0, w*z0*t),
		Y: complex(g, w*t/z0),
	}
}

// Reference returns Z0, the reference impedance of the line's S-matrix.
func (l Ideal) Reference() float64 { return l.Impedance }

// NepersPerDB converts an attenuation in dB to nepers: 1 Np = 20/ln 10 dB.
const NepersPerDB = math.Ln10 / 20
