package diode

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
