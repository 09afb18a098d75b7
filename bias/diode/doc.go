// Package diode holds the junction diode's device laws, written once and
// used by every analysis: the DC solver, the small-signal linearisation, the
// distortion coefficients and the time-domain solver.
//
// A Device is a diode model evaluated at one temperature. Its laws take the
// intrinsic junction voltage v (anode minus cathode, excluding the drop on
// the series resistance) and return a Law: the value and its first three
// derivatives with respect to v.
//
//	current          i(v) = I_S (exp(v/(n V_T)) - 1) + breakdown knee
//	depletion charge q_j(v), whose derivative is C_j0 / (1 - v/V_bi)^m
//	diffusion charge q_d(v) = tau_T i_f(v)
//
// Sources: Sze and Ng, "Physics of Semiconductor Devices", 3rd ed., 2007,
// ch. 2 (junction laws, depletion capacitance, built-in potential); Gray,
// Hurst, Lewis, Meyer, "Analysis and Design of Analog Integrated Circuits",
// 5th ed., 2009, ch. 1 (temperature law of I_S).
package diode
