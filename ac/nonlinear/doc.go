// Package nonlinear holds the full nonlinear circuit in the time domain,
// in the modified nodal layout of package smallsignal:
//
//	f(x, t) + d/dt q(x) = 0,
//	f(x, t) = G x + i_d(x) - b_dc - b_in(e(t), p),   q(x) = C x + q_d(x)
//
// where G and C are the linear parts (resistors, port terminations,
// capacitors, inductors' fluxes, the incidence of inductor and source
// branches), i_d and q_d the junction currents and charges of every diode
// from bias/diode's laws, b_dc the DC sources, and b_in the input port's
// generator of EMF e(t) behind its reference impedance together with each
// AC-coupled port's DC block, a constant voltage p_k in series with the
// port's termination. Its Jacobians are G(x) = df/dx and C(x) = dq/dx.
//
// Both time-domain engines stand on it: the periodic steady state of
// package ac (shooting over the trapezoidal rule) and the transient of
// package ac/transient (TR-BDF2 with step control). Each implicit step of
// either is one nonlinear system
//
//	F(x) = f(x, e) + a (q(x) - q_base) + r = 0,
//
// where a and q_base depend on the rule (a = 2/h and q_base = q_n for
// the trapezoidal rule) and r carries the rule's memory (and any source
// that depends only on the past). System.Step solves it by Newton's method
// with junction-voltage limiting (Vlach and Singhal, "Computer Methods for
// Circuit Analysis and Design", 2nd ed., 1994): each junction is taken on
// its tangent at a limited voltage rather than moving a node.
package nonlinear
