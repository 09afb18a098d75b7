// Package mixer analyses a diode mixer about the periodic operating point
// its local oscillator sets: the conversion loss, the impedances each port
// sees under pump, the LO power the mixer takes and the noise figure.
//
// The analysis has two steps, as the theory of resistive mixers has them
// (A. A. M. Saleh, "Theory of Resistive Mixers", MIT Press, 1971; S. A.
// Maas, "Microwave Mixers", 2nd ed., Artech, 1993, ch. 4-5; D. N. Held and
// A. R. Kerr, "Conversion loss and noise of microwave and millimeter-wave
// mixers", IEEE Trans. MTT 26(2), 1978):
//
//  1. The large-signal pump: the LO port's generator, at its frequency and
//     available power, drives the circuit (with its DC bias) to a periodic
//     steady state, solved by harmonic balance (package ac/balance), and by
//     shooting as a check where asked. Each junction's voltage over one
//     period gives its conductance g(t) = di/dv, capacitance c(t) = dq/dv
//     and shot-noise density s(t) = 2q(i_f(t) + 2 I_S) through the device
//     laws of bias/diode.
//  2. The small signal about it: at the sidebands ω_k = ω_IF + k ω_LO,
//     k = -K..K, each junction is the conversion matrix of the Fourier
//     coefficients of g(t) and c(t), and the linear network enters as its
//     admittance at each sideband with every port terminated in its
//     reference impedance. Reduced to the junctions (the embedding
//     impedances of Held and Kerr), the system has (2K + 1) unknowns per
//     junction; K doubles until the figures stop moving.
//
// A sideband with a negative frequency carries the conjugate of the
// physical phasor at |ω_k| (Maas, ch. 4): with the RF above the LO the RF
// is k = +1 and the image k = -1, with the RF below the LO the other way
// round.
//
// Noise: every resistor, diode series resistance and port termination is
// a thermal source, uncorrelated from sideband to sideband; each pumped
// junction's shot noise is cyclostationary, its sideband correlation
// matrix ⟨N_k N_l*⟩ = S_(k-l) the Fourier coefficients of s(t) (C.
// Dragone, "Analysis of thermal and shot noise in pumped resistive
// diodes", Bell Syst. Tech. J. 47, 1968; Held and Kerr 1978). One
// transposed solve gives every source's transfer to the IF port at once.
//
// Analyze returns a Result with its Stats; SweepLO repeats it over LO
// levels, each pump continuing from the last.
package mixer
