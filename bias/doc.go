// Package bias finds the DC operating point of a circuit: every node
// voltage, every source current and the Q point of every diode.
//
// The circuit is written in modified nodal form (Ho, Ruehli, Brennan, "The
// modified nodal approach to network analysis", IEEE Trans. Circuits and
// Systems 22(6), 1975): one unknown per node, one per diode's internal node
// when the diode has series resistance, and one branch current per voltage
// source and inductor. Capacitors are open at DC; inductors are shorts; a
// port that is not AC-coupled is its reference resistance to its return.
//
// Solve runs Newton's method with junction-voltage limiting. When plain
// Newton fails it steps a conductance from every node to ground down to
// zero, and then, if that fails too, ramps the sources up from zero
// (Vlach and Singhal, "Computer Methods for Circuit Analysis and Design",
// 2nd ed., 1994; Najm, "Circuit Simulation", 2010). Every aid is removed
// before the last iterations: the reported point is that of the circuit as
// described, and it satisfies Kirchhoff's current law to 1e-12 A plus 1e-9
// of the largest current at each node.
package bias
