// Package measured reads the measurement files of `qpoint fit`: a diode's
// current against voltage (I–V) or its capacitance against voltage (C–V),
// as CSV text, one point a line.
//
// The first line that is not a comment is the header. It names the
// columns, in any order:
//
//	voltage         required; volts
//	current         an I–V file: amperes, positive from anode to cathode
//	capacitance     a C–V file: farads
//	temperature     optional; needs its unit, [C] or [K]
//
// A unit may follow a name in brackets or parentheses, with an SI prefix:
// `voltage [mV]`, `current (mA)`, `capacitance [pF]`, `temperature [°C]`.
// A name without a unit is read in SI base units and the Table carries a
// NoUnit caution saying so (a temperature column must give its unit, as a
// circuit file's temperatures must).
//
// Columns are separated by commas, semicolons or tabs (the header decides);
// with semicolons or tabs a decimal comma is read as a point. A line that
// begins with # is a comment, blank lines are skipped and fields may be
// quoted. Values are plain decimal numbers (`0.125`, `-3.2e-6`): units
// belong in the header.
//
// The points of one temperature must be sorted by voltage, rising or
// falling, without repeats: a repeated or out-of-order voltage usually
// means two sweeps joined or a column mislabelled. In an I–V file the
// current has the sign of the voltage, as it does for any passive
// junction: a negative current at a forward voltage means the polarity or
// the sign convention of the file is reversed. A capacitance is above
// zero.
//
// Every problem is a *ParseError naming the line and column (1-based;
// columns count bytes) and saying what is accepted. Read never panics,
// whatever the bytes.
package measured
