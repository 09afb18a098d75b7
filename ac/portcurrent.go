package ac

import (
	"math"
	"math/cmplx"

	"qpoint/smallsignal"
)

// portRows returns the rows of G' and C that give the current flowing
// from port i's node into the network, I = (g + jωc)·x, where G' is G
// without the port's own reference termination: the current the network
// itself draws, summed over its parts at the node.
//
// The input impedance follows as Z_in = V/I from the nodal solution. The
// textbook Z_0 (1 + S)/(1 - S) is the same quantity, but where S lies
// within rounding of ±1 (a port behind a DC block at millihertz, a port
// shorted by a large capacitor at terahertz) the difference 1 ∓ S has lost
// all its digits: the attenuator demo at 1 mHz printed -50 Ω - j1.6 TΩ,
// a negative resistance, for what is 20 Ω behind a capacitor. The
// element currents at the node keep the small real part (Pozar,
// "Microwave Engineering", 4th ed., 2012, sec. 4.1, for Z_in = V/I).
func portRows(nw *smallsignal.Network, i int) (g, c []float64) {
	n := nw.N
	p := nw.Ports[i]
	g, c = make([]float64, n), make([]float64, n)
	if p.Node == smallsignal.Ground {
		return g, c
	}
	gm, cm := nw.G.RawMatrix(), nw.C.RawMatrix()
	copy(g, gm.Data[p.Node*gm.Stride:p.Node*gm.Stride+n])
	copy(c, cm.Data[p.Node*cm.Stride:p.Node*cm.Stride+n])
	t := 1 / p.Impedance
	g[p.Node] -= t
	if p.Return != smallsignal.Ground {
		g[p.Return] += t
	}
	return g, c
}

// portCurrent returns (g + jωc)·x.
func portCurrent(g, c []float64, w float64, x []complex128) complex128 {
	return dotReal(g, x) + complex(0, w)*dotReal(c, x)
}

// inputImpedance returns V/I, infinite where no current flows.
func inputImpedance(v, i complex128) complex128 {
	if i == 0 {
		return cmplx.Inf()
	}
	z := v / i
	if cmplx.IsNaN(z) {
		return complex(math.NaN(), math.NaN())
	}
	return z
}
