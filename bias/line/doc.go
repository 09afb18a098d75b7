// Package line holds the laws of the circuit's distributed parts: the
// uniform transmission line given by its characteristic impedance and
// delay (with conductor and dielectric loss), the microstrip line given by
// its geometry (Hammerstad and Jensen 1980, Kirschning and Jansen 1982),
// and the measured block given by S-parameter data, interpolated between
// its frequencies in a way that keeps a passive block passive.
//
// Every part is described at one frequency by its scattering matrix S
// relative to real reference impedances, which stays finite for any
// passive part at every frequency (a line at f = 0 is a short, whose
// impedance matrix does not exist), and at DC by the behaviour of its
// conductors or by what the circuit file declares. The package is a leaf
// beside bias/diode: the circuit loader checks the parts with it, the DC
// solve takes their DC behaviour, and the small-signal network stamps their
// S-matrices at each frequency.
package line
