// Package transient follows the full nonlinear circuit in time from its DC
// operating point, driven at one port by a generator whose EMF is any
// continuous function of time (Source): a pulsed carrier with an optional
// small probe tone (Pulse), or a piecewise-linear wave (PiecewiseLinear).
//
// The equations are those of package ac/nonlinear, f(x, t) + dq(x)/dt = 0,
// with the diodes' currents and charges from bias/diode, written once for
// the periodic steady state and this package alike. They are integrated in
// charge form by TR-BDF2 (Bank, Coughran, Fichtner, Grosse, Rose and
// Smith, "Transient simulation of silicon devices and circuits", IEEE
// Trans. CAD 4(4), 1985; analysed by Hosea and Shampine, "Analysis and
// implementation of TR-BDF2", Appl. Numer. Math. 20, 1996): each step of
// length h is a trapezoidal stage to t + γh followed by a second-order
// backward-difference stage to t + h, γ = 2 - √2, so that both stages
// share one step matrix G(x) + (2/(γh)) C(x) up to its charge coefficient.
// The rule is second order and L-stable: its amplification factor for a
// mode λ tends to zero as hλ → -∞ (R(∞) = 0), so the ringing a stiff mode
// carries under the trapezoidal rule alone (factor -1 per step: a junction
// capacitance behind a conducting junction, a switching edge) is gone in
// one step. A free oscillation resolved by N steps per period loses
// about 0.0037 (2π/N)⁴ of its amplitude per step, 5.7/N³ per period
// (1e-4 at N = 40), and its phase lags by about 0.040 (2π/N)³ per step: a
// damping and a dispersion below the step control's tolerance at the step
// counts it chooses.
//
// Step control is by the local truncation error of the charges,
//
//	LTE = 2 k h (q'_n / γ - q'_γ / (γ (1 - γ)) + q'_{n+1} / (1 - γ)),
//	k = (-3γ² + 4γ - 2) / (12 (2 - γ)),
//
// the estimate of Bank et al., taken per dynamic row in units of the
// row's own variable (divided by its diagonal capacitance or inductance)
// against a tolerance relative to that variable's recent excursion from
// the DC point plus an absolute floor. Steps land on every breakpoint of
// the source (the corners of a pulse's edges), never exceed a fraction of
// its carrier's period while it is on, and a step whose Newton solve fails
// is retried shorter, then by backward Euler (a fallback counted in the
// Stats).
//
// Alongside it keeps the energy account: the work of the generator and of
// the DC sources, what the resistors, the port terminations and the
// junctions' conduction dissipate, and what the capacitors, inductors,
// junction charges and DC blocks hold at the end (Energy). Their balance
// is a check on the integration.
//
// An AC-coupled port's DC block is ideal, an infinite capacitance: it
// holds its DC-point voltage through a run (the periodic steady state of
// package ac instead charges it until it carries no mean current, the
// limit of an endless run). Result.BlockCurrents records what passes it,
// and RunPulse cautions where a real blocking capacitor would charge.
//
// Lines by the method of characteristics (Branin, "Transient analysis of
// lossless transmission lines", Proc. IEEE 55(11), 1967) plug in through
// Delayed: a constant conductance at each end and a current source that
// depends only on the past. The circuit file has no lines yet, and
// measured S-parameter blocks have no time-domain model here: Check
// refuses any part kind the transient cannot follow.
//
// RunPulse drives a pulsed carrier through a limiter or a detector and
// reads the figures a designer is judged by: spike and flat leakage and
// the recovery time of the small-signal loss for a limiter, the rise and
// fall of the video output and its settled value against the periodic
// steady state for a detector. SweepLevel repeats it over pulse powers.
package transient
