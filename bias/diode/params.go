package diode

import "math"

// Params are a junction diode's model values as written in the circuit file,
// in SI base units, valid at the temperature MeasuredAtK.
type Params struct {
	SaturationCurrent   float64 // I_S in A, > 0
	Ideality            float64 // n, emission coefficient
	SeriesResistance    float64 // R_S in ohm, >= 0
	ZeroBiasCapacitance float64 // C_j0 in F, >= 0
	BuiltInPotential    float64 // V_bi in V, > 0
	Grading             float64 // m, 0 < m < 1
	TransitTime         float64 // tau_T in s, >= 0

	// BreakdownVoltage is the reverse knee in V (a positive number); zero
	// means the model has no breakdown.
	BreakdownVoltage float64
	// BreakdownCurrent is the reverse current at the knee in A.
	BreakdownCurrent float64

	GapEnergy          float64 // E_g in eV
	SaturationExponent float64 // p, temperature exponent of I_S
	MeasuredAtK        float64 // T0 in K
	Ratings            Ratings

	// FlickerCoefficient K and FlickerExponent a set the junction's
	// flicker (1/f) noise, S_i = K |I_D|^a / f in A²/Hz; K = 0 (the
	// default) means none. The exponent is 1 when a coefficient is given
	// without one.
	FlickerCoefficient float64
	FlickerExponent    float64
}

// Ratings are the part's absolute limits. A zero field means "not given".
type Ratings struct {
	MaxCurrent        float64 // A, forward
	MaxReverseVoltage float64 // V, positive number
	MaxPower          float64 // W
}

// Defaults returns Params with every optional value at the circuit-file
// default; SaturationCurrent is left zero because the file must give it.
func Defaults() Params {
	return Params{
		Ideality:           1,
		BuiltInPotential:   0.7,
		Grading:            0.5,
		GapEnergy:          1.11,
		SaturationExponent: 3,
		MeasuredAtK:        300.15,
	}
}

// ShotNoise returns the one-sided power spectral density of the junction's
// shot noise at junction voltage v, in A²/Hz:
//
//	S_shot(v) = 2q (I_f(v) + 2 I_S) + 2q |i_b(v)|
//
// The ideal junction current I_f = I_S (e^(v/nV_T) - 1) is the difference
// of a forward flow I_S e^(v/nV_T) and a reverse flow I_S that cross the
// barrier independently, so each carries the full shot noise 2qI (Schottky
// 1918) and their densities add: 2q (I_f + 2 I_S). At zero bias this is
// 4q I_S = n · 4kT g_d(0): for an ideal junction (n = 1) exactly the
// thermal noise 4kT/R_0 of its zero-bias resistance, as equilibrium
// demands (Sze and Ng, "Physics of Semiconductor Devices", 3rd ed., 2007,
// ch. 2; Nyquist 1928); for n > 1 the law gives n times that. The
// breakdown knee's current is counted as shot noise too; a real avalanche
// is noisier than that.
func (d *Device) ShotNoise(v float64) float64 {
	saturation := d.SaturationCurrent
	return 2*Charge*(d.ForwardCurrent(v).Value+2*saturation) + 2*Charge*math.Abs(d.BreakdownCurrent(v).Value)
}

// FlickerNoise returns the one-sided power spectral density of the
// junction's flicker noise at junction voltage v and frequency freqHz, in
// A²/Hz: S_flicker = K |I(v)|^a / f, with K and a the model's flicker
// coefficient and exponent. It is zero for a model without flicker noise.
func (d *Device) FlickerNoise(v, freqHz float64) float64 {
	k := d.Params.FlickerCoefficient
	if k == 0 {
		return 0
	}
	a := d.Params.FlickerExponent
	if a == 0 {
		a = 1
	}
	return k * math.Pow(math.Abs(d.Current(v).Value), a) / freqHz
}
