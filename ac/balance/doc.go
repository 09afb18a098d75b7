// Package balance finds the steady state of a circuit under one or two
// sinusoidal tones by harmonic balance: in the frequency domain, with the
// unknowns the phasors of every node voltage and branch current at DC and
// at the harmonics of one tone, or at the mixing products m·f1 + n·f2 of
// two tones kept by a box or diamond truncation.
//
// The linear network enters as its admittance matrix Y(jw) at each
// product's frequency; each junction's current and charge, from package
// bias/diode, are evaluated on an oversampled time grid and transformed
// with go-dsp's FFT (two tones share one grid through an artificial
// frequency mapping). Newton's method with the exact Jacobian (the
// conversion matrices of the junctions' conductance and capacitance
// waveforms) solves the balance, each step by a dense LU for small
// problems and otherwise by GMRES with a block preconditioner built from
// the network and the time-averaged junctions. Source stepping carries a
// hard drive, the harmonic count grows until the top products fall below
// the tolerance, and convergence is judged by the KCL error at every
// product.
//
// Solve returns a Result with its Stats; Result.Steady gives the form
// package ac's shooting gives, and Method plugs harmonic balance (or the
// automatic choice between it and shooting) into steady.Solve, so that
// steady.LevelSweep and steady.ValidityLimit use it with continuation between
// levels.
//
// Sources: K. S. Kundert and A. Sangiovanni-Vincentelli, "Simulation of
// nonlinear circuits in the frequency domain", IEEE Trans. CAD 5(4), 1986;
// V. Rizzoli et al., "Harmonic-balance simulation of strongly nonlinear
// very large-size microwave circuits by inexact Newton methods", IEEE
// MTT-S 1996; S. A. Maas, "Nonlinear Microwave and RF Circuits", 2nd ed.,
// 2003, ch. 3; Y. Saad and M. H. Schultz, SIAM J. Sci. Stat. Comput.
// 7(3), 1986 (GMRES).
package balance
