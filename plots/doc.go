// Package plots draws the figures of a small-signal sweep: magnitude and
// phase against frequency, each port's input impedance, a Smith chart of
// each port's reflection coefficient and the group delay. It reads an
// ac.Response and nothing else, so every figure shows exactly what the
// sweep computed.
//
// It also draws the figures of the other analyses, each from that
// analysis' own results: the harmonics of the steady-state waveform beside
// the Volterra estimate, the output against input level with the weakly
// nonlinear asymptotes and the compression point, and distortion against
// frequency (distortion.go); a study's measures against the varied value,
// and a colour map of one measure over a study of two quantities on the
// house sequential Ramp (study.go); and the output noise density and each
// noise source's share of it (noise.go), which take plain slices so as to
// depend on no noise analysis type.
//
// A figure is a Figure value: one or more panels (gonum/plot plots) stacked
// top to bottom on a shared frequency axis, a title, a short note and a key
// of its traces, all in the house style of style.go. Figures draw
// themselves onto any vg canvas; Write renders one as SVG or PNG into an
// io.Writer and leaves files to the caller. Frequencies are in hertz,
// impedances in ohms and delays in seconds throughout; SI prefixes appear
// only in the tick and marker labels.
//
// Values that cannot be drawn — NaN or infinite results, a zero magnitude
// on a decibel or logarithmic axis, a non-positive frequency — are left
// out, and a trace is broken where they occur rather than joined across
// the gap.
package plots
