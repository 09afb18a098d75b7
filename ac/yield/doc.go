// Package yield asks what fraction of built circuits meets its targets
// when every toleranced value (circuit.Tolerance: a part's value, a
// diode's copy of a model key) spreads as the circuit file says, and
// which value's spread matters most.
//
// Run draws N circuits by Monte Carlo simulation (JCGM 101:2008, the GUM
// supplement on propagating distributions): each run takes its own
// random stream, a ChaCha8 generator keyed by the seed and the run's
// index, so a run's values and results are the same whatever the worker
// count and whichever worker takes it. Each run is analysed as a study
// step (study.Workspace.Evaluate) at every temperature of the operating
// range, starting its bias solve from the nominal circuit's point at
// that temperature; a run passes when every target holds at every
// temperature. The yield K/N comes with the Wilson score interval
// (Wilson, "Probable inference, the law of succession, and statistical
// inference", JASA 22, 1927).
//
// Sensitivities are first order, from central differences of each target
// measure about the nominal circuit (there is no adjoint of the bias
// point's dependence on the values here, so every measure is treated
// alike); each value's share of the measure's variance follows the law
// of propagation of uncertainty (JCGM 100:2008, 5.1.2 and 5.2.2). The
// worst-case corners put every value at the end of its spread (a band's
// end, or three standard deviations) in the direction that first-order
// sensitivity says worsens the target.
package yield
