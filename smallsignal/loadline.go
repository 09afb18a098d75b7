package smallsignal

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// LoadLine is the DC load the rest of the circuit presents to one diode's
// terminals, as a Norton source: the terminal current I and voltage V of
// the diode satisfy
//
//	I = Current - Conductance·V
//
// (Norton's theorem; the load line of a two-terminal device in a linear
// network, common practice). The rest of the circuit is taken at DC —
// capacitors open, inductors and voltage sources shorts, AC-coupled ports
// absent — with every other diode linearised at its Q point (g_d behind
// R_S), so the line is exact where the diode is the only one and the
// tangent of the true load curve at the Q point otherwise. It passes
// through the diode's own Q point.
type LoadLine struct {
	Diode int // index into Network.Diodes
	// Conductance is G = 1/R_th, the conductance the rest of the circuit
	// presents at the diode's terminals: zero where it feeds the diode a
	// fixed current (a current source, or no DC path at all), +Inf where
	// it holds the terminal voltage (a voltage source or an inductor
	// straight across the diode).
	Conductance float64
	// Current is the Norton current G·V_th, the current a short across
	// the terminals would carry; for G = 0 the fixed current itself, and
	// NaN for G = +Inf.
	Current float64
	// OpenVoltage is V_th, the terminal voltage with the diode removed;
	// for G = +Inf the voltage held, and NaN for G = 0.
	OpenVoltage float64
	// QVoltage and QCurrent are the diode's terminal voltage and current
	// at the operating point, on the line.
	QVoltage, QCurrent float64
}

// At returns the current the load line allows at terminal voltage v (NaN
// for a vertical line).
func (l LoadLine) At(v float64) float64 {
	if math.IsInf(l.Conductance, 1) {
		return math.NaN()
	}
	return l.Current - l.Conductance*v
}

// singularCond is the condition number beyond which the rest of the
// circuit counts as open at the diode's terminals.
const singularCond = 1e14

// LoadLine returns the DC load line of diode k: the impedance the rest of
// the circuit presents between its terminals, by one solve of the DC
// nodal matrix with the diode (junction and series resistance) taken out,
// driven by a unit current into the anode and out of the cathode.
func (nw *Network) LoadLine(k int) (LoadLine, error) {
	if k < 0 || k >= len(nw.Diodes) {
		return LoadLine{}, fmt.Errorf("smallsignal: diode %d: the circuit has %d diodes", k, len(nw.Diodes))
	}
	d := nw.Diodes[k]
	q, ok := quiescent(nw.Point, k, d.Name)
	if !ok {
		return LoadLine{}, fmt.Errorf("smallsignal: diode %s has no Q point", d.Name)
	}
	l := LoadLine{Diode: k, QVoltage: q.Voltage, QCurrent: q.Current}
	m := mat.DenseCopyOf(nw.GLinear)
	for _, p := range nw.Ports {
		if p.ACCoupled {
			stampConductance(m, p.Node, p.Return, -1/p.Impedance)
		}
	}
	for j, o := range nw.Diodes {
		if j != k {
			stampConductance(m, o.Junction, o.Cathode, o.G1)
		}
	}
	if nw.HasElements() {
		// Lines and blocks at DC: their DC relations' rows (real).
		e := make([]complex128, nw.N*nw.N)
		nw.Stamp(0, e, nw.N)
		for i := 0; i < nw.N; i++ {
			for j := 0; j < nw.N; j++ {
				if v := real(e[i*nw.N+j]); v != 0 {
					m.Set(i, j, m.At(i, j)+v)
				}
			}
		}
	}
	if d.Junction != d.Anode {
		// Take R_S out; the internal node then touches nothing and is
		// pinned to zero so that the matrix stays square and regular.
		stampConductance(m, d.Anode, d.Junction, -1/d.SeriesResistance)
		for i := 0; i < nw.N; i++ {
			m.Set(d.Junction, i, 0)
			m.Set(i, d.Junction, 0)
		}
		m.Set(d.Junction, d.Junction, 1)
	}
	b := mat.NewVecDense(nw.N, nil)
	if d.Anode != Ground {
		b.SetVec(d.Anode, 1)
	}
	if d.Cathode != Ground {
		b.SetVec(d.Cathode, b.AtVec(d.Cathode)-1)
	}
	var lu mat.LU
	lu.Factorize(m)
	var z mat.VecDense
	if lu.Cond() > singularCond || lu.SolveVecTo(&z, false, b) != nil {
		// Open at the terminals: the diode's current is what the rest
		// forces through it, whatever its voltage.
		l.Current, l.OpenVoltage = q.Current, math.NaN()
		return l, nil
	}
	zt := 0.0
	if d.Anode != Ground {
		zt += z.AtVec(d.Anode)
	}
	if d.Cathode != Ground {
		zt -= z.AtVec(d.Cathode)
	}
	if zt <= 0 {
		l.Conductance, l.Current, l.OpenVoltage = math.Inf(1), math.NaN(), q.Voltage
		return l, nil
	}
	l.Conductance = 1 / zt
	l.Current = q.Current + l.Conductance*q.Voltage
	l.OpenVoltage = q.Voltage + q.Current*zt
	return l, nil
}
