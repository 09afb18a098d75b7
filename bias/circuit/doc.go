// Package circuit reads and checks qpoint's circuit files.
//
// A circuit file is one YAML document naming the circuit's parts (resistors,
// capacitors, inductors, DC sources and diodes), the diode models they use,
// the ports where signals enter and leave, extra probe nodes and, optionally,
// default settings for the analyses. Values are written with SI prefixes and
// units (47k, 22pF, 2.45GHz, 27C); the loader turns them into SI base units,
// so everything downstream works in ohms, farads, volts, amperes, hertz,
// seconds and kelvin.
//
// Load and Parse check the whole file before anything is solved: unknown or
// repeated keys, values out of their physical range, references to parts,
// models, ports or nodes that do not exist, and connections the DC operating
// point cannot be found for (a node with no DC path to gnd, a loop of voltage
// sources and inductors). Every problem is reported as an *Error at its line
// and column, all of them together in an ErrorList.
package circuit
