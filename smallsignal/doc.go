// Package smallsignal linearises a circuit at its DC operating point.
//
// Each part becomes its linear model: a diode becomes its junction
// conductance g_d = dI/dV at the Q point in parallel with its junction
// capacitance C_j(V_Q) and diffusion capacitance tau_T g_d, behind its series
// resistance as a branch of its own; resistors, capacitors, inductors and
// port terminations stay as they are; DC voltage sources become shorts and
// DC current sources opens. The network is assembled once, in modified
// nodal form, as real matrices G and C with Y(s) = G + sC (Ho, Ruehli,
// Brennan, IEEE Trans. Circuits and Systems 22(6), 1975).
//
// Every port's reference impedance terminates the network, so that a port
// driven by a Norton current E/Z0 is the port's generator with EMF E.
//
// The package also exposes, per diode, the Taylor coefficients of the
// junction current and charge at the Q point to third order, the inputs of
// the distortion analysis:
//
//	i(v) = I_Q + g1 v + g2 v² + g3 v³,   q(v) = Q_Q + c1 v + c2 v² + c3 v³
package smallsignal
