package diode

// Exact SI constants since the 2019 revision (BIPM, The International
// System of Units, 9th edition, 2019).
const (
	Boltzmann = 1.380649e-23    // k in J/K
	Charge    = 1.602176634e-19 // q in C
)

// ZeroCelsius is 0 °C in kelvin.
const ZeroCelsius = 273.15

// ThermalVoltage returns V_T = kT/q in volts at temperature tempK.
func ThermalVoltage(tempK float64) float64 {
	return Boltzmann * tempK / Charge
}
