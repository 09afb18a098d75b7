package smallsignal

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/diode"
)

// Ground is the index used for the reference node.
const Ground = -1

// Network is a circuit linearised at a bias point, Y(s) = G + sC, in
// modified nodal form. Unknowns are the named nodes (in file order), then
// each diode's internal junction node where it has series resistance, then
// one branch current per inductor and per voltage source, then the port
// currents of the lines and measured blocks, whose rows are not part of
// G + sC but added at each frequency (Elements, Stamp).
type Network struct {
	Point *bias.Point
	N     int // number of unknowns
	// NodeUnknowns counts the voltage unknowns (named and internal nodes),
	// which come first; branch currents follow.
	NodeUnknowns int
	G, C         *mat.Dense // N×N
	Names        []string   // name of each unknown

	Nodes  map[string]int // named node -> unknown index
	Ports  []Port
	Diodes []Diode
	// Elements are the lines and measured blocks, whose rows depend on
	// frequency other than as G + jωC (distributed.go); their current
	// unknowns come last.
	Elements []Element

	// The large-signal view of the same unknowns, for time-domain
	// analysis: the linear parts alone (no diode stamps), the right-hand
	// side of the DC sources, and the DC solution.
	GLinear, CLinear *mat.Dense
	Sources          []float64 // DC source vector: f(x) = GLinear x + i_diodes(x) - Sources
	Bias             []float64 // the operating point in this layout
}

// Port is a port of the network, terminated in its reference impedance.
type Port struct {
	Name       string
	Node       int // unknown index of the port node
	Return     int // unknown index of the return node (Ground for gnd)
	Impedance  float64
	NodeName   string
	ReturnName string
	// ACCoupled ports sit behind an ideal DC block: they terminate the
	// network at every frequency but zero.
	ACCoupled bool
}

// Diode is a diode's small-signal model at its Q point.
type Diode struct {
	Name     string
	Anode    int // terminal anode
	Junction int // internal anode: equals Anode when R_S = 0
	Cathode  int

	SeriesResistance float64 // ohm
	Device           *diode.Device
	JunctionVoltage  float64 // V at the Q point
	// Taylor coefficients of the junction current and charge about the Q
	// point: g_k = (1/k!) d^k I/dV^k, c_k = (1/k!) d^k Q/dV^k. g1 is the
	// junction conductance g_d; c1 is the total capacitance C_j + C_d.
	G1, G2, G3 float64
	C1, C2, C3 float64
	// JunctionCapacitance and DiffusionCapacitance split c1.
	JunctionCapacitance  float64
	DiffusionCapacitance float64
}

// CurrentSensitivity returns the diode's short-circuit current sensitivity
// at frequency f in A/W of RF power absorbed by the chip (junction and
// series resistance):
//
//	β = (g2/g1) / (1 + R_S/R_j + ω² C² R_S R_j)
//
// where g1, g2 are the junction current's Taylor coefficients (g2/g1 =
// 1/(2 n V_T) for the ideal law), R_j = 1/g1 and C the junction's total
// capacitance. The rectified current is g2|v|²/2 for junction voltage v,
// the power absorbed in the junction |v|²g1/2, and the chip absorbs
// 1 + R_S/R_j + ω²C²R_S R_j times that; Cowley and Sorensen (1966) give the
// same frequency roll-off as 1/(1 + ω²C²R_S R_j) and the resistive loss as
// 1/(1 + R_S/R_j).
func (d Diode) CurrentSensitivity(f float64) float64 {
	if d.G1 <= 0 {
		return 0
	}
	rj := 1 / d.G1
	w := 2 * math.Pi * f
	return (d.G2 / d.G1) / (1 + d.SeriesResistance/rj + w*w*d.C1*d.C1*d.SeriesResistance*rj)
}

// New linearises the circuit at point p.
func New(p *bias.Point) (*Network, error) {
	return new(Workspace).New(p)
}

// Workspace keeps a Network's storage from one linearisation to the next:
// its matrices, vectors, names and node map, and the part lists New
// gathers on the way. Linearising a sequence of related bias points in one
// workspace, as a study does at each step, allocates nothing after the
// first when the circuit's unknowns stay the same. The networks are those
// New returns.
//
// The zero value is ready to use. A Workspace is not safe for concurrent
// use: give each goroutine its own.
type Workspace struct {
	network *Network
	// memos keeps each line's S-matrices from one network to the next
	// (scatteringMemo): a line's law does not change with the bias.
	memos map[*circuit.Distributed]*scatteringMemo

	conds, caps, diodeConds, diodeCaps, currentSources []twoTerminal
	branches                                           []branch
}

// twoTerminal is a linear part between unknowns a and b (Ground for the
// reference node) of value v: a conductance, a capacitance or a source
// current.
type twoTerminal struct {
	a, b int
	v    float64
}

// branch is an inductor or DC voltage source from a to b, whose current is
// an unknown of its own.
type branch struct {
	a, b int
	l    float64 // inductance; zero for a voltage source
}

// New linearises the circuit at point p in the workspace's storage. The
// Network it returns is overwritten by the workspace's next call to New.
func (w *Workspace) New(p *bias.Point) (*Network, error) {
	if w.network == nil {
		w.network = &Network{Nodes: map[string]int{}}
	}
	nw := w.network
	*nw = Network{
		Point: p, Nodes: nw.Nodes,
		G: nw.G, C: nw.C, GLinear: nw.GLinear, CLinear: nw.CLinear,
		Names: nw.Names[:0], Ports: nw.Ports[:0], Diodes: nw.Diodes[:0], Elements: nw.Elements[:0],
		Sources: nw.Sources, Bias: nw.Bias,
	}
	c := p.Circuit
	clear(nw.Nodes)
	for _, name := range c.Nodes {
		nw.Nodes[name] = len(nw.Names)
		nw.Names = append(nw.Names, name)
	}
	node := func(name string) (int, error) {
		if name == circuit.Ground {
			return Ground, nil
		}
		i, ok := nw.Nodes[name]
		if !ok {
			return 0, fmt.Errorf("smallsignal: node %q is not in the circuit", name)
		}
		return i, nil
	}

	conds, caps, diodeConds, diodeCaps := w.conds[:0], w.caps[:0], w.diodeConds[:0], w.diodeCaps[:0]
	branches, isrc := w.branches[:0], w.currentSources[:0]
	defer func() {
		// Keep the lists' storage for the next call.
		w.conds, w.caps, w.diodeConds, w.diodeCaps = conds, caps, diodeConds, diodeCaps
		w.branches, w.currentSources = branches, isrc
	}()

	for _, part := range c.Parts {
		a, err := node(part.Nodes[0])
		if err != nil {
			return nil, err
		}
		b, err := node(part.Nodes[1])
		if err != nil {
			return nil, err
		}
		switch part.Kind {
		case circuit.Resistor:
			conds = append(conds, twoTerminal{a, b, 1 / part.Value})
		case circuit.Capacitor:
			caps = append(caps, twoTerminal{a, b, part.Value})
		case circuit.Inductor:
			branches = append(branches, branch{a, b, part.Value})
		case circuit.VoltageSource:
			branches = append(branches, branch{a, b, 0}) // a DC source is a short to signals
		case circuit.CurrentSource:
			// A DC current source is an open circuit to signals.
			isrc = append(isrc, twoTerminal{a, b, part.Value})
		case circuit.Diode:
			q, ok := quiescent(p, len(nw.Diodes), part.Name)
			if !ok {
				return nil, fmt.Errorf("smallsignal: diode %s has no Q point", part.Name)
			}
			dev := q.Device
			d := Diode{Name: part.Name, Anode: a, Junction: a, Cathode: b, SeriesResistance: dev.Params.SeriesResistance,
				Device: dev, JunctionVoltage: q.JunctionVoltage}
			if d.SeriesResistance > 0 {
				d.Junction = len(nw.Names)
				nw.Names = appendName(nw.Names, part.Name, "#junction")
				conds = append(conds, twoTerminal{a, d.Junction, 1 / d.SeriesResistance})
			}
			d.G1, d.G2, d.G3 = dev.Current(q.JunctionVoltage).Taylor()
			d.C1, d.C2, d.C3 = dev.Charge(q.JunctionVoltage).Taylor()
			d.JunctionCapacitance = dev.DepletionCharge(q.JunctionVoltage).D1
			d.DiffusionCapacitance = dev.DiffusionCharge(q.JunctionVoltage).D1
			diodeConds = append(diodeConds, twoTerminal{d.Junction, b, d.G1})
			diodeCaps = append(diodeCaps, twoTerminal{d.Junction, b, d.C1})
			nw.Diodes = append(nw.Diodes, d)
		}
	}
	for _, port := range c.Ports {
		a, err := node(port.Node)
		if err != nil {
			return nil, err
		}
		ret := port.Return
		if ret == "" {
			ret = circuit.Ground
		}
		b, err := node(ret)
		if err != nil {
			return nil, err
		}
		nw.Ports = append(nw.Ports, Port{Name: port.Name, Node: a, Return: b, Impedance: port.Impedance, NodeName: port.Node, ReturnName: ret, ACCoupled: port.ACCoupled})
		conds = append(conds, twoTerminal{a, b, 1 / port.Impedance})
	}

	nNodes := len(nw.Names)
	nw.NodeUnknowns = nNodes
	if w.memos == nil {
		w.memos = map[*circuit.Distributed]*scatteringMemo{}
	}
	n, err := nw.addElements(c, nNodes+len(branches), node, w.memos)
	if err != nil {
		return nil, err
	}
	nw.N = n
	if n == 0 {
		return nil, fmt.Errorf("smallsignal: the circuit has no unknowns")
	}
	if n > MaxUnknowns {
		return nil, &TooLargeError{Unknowns: n}
	}
	nw.G = zeroMatrix(nw.G, n)
	nw.C = zeroMatrix(nw.C, n)
	for _, t := range conds {
		stampConductance(nw.G, t.a, t.b, t.v)
	}
	for _, t := range caps {
		stampConductance(nw.C, t.a, t.b, t.v)
	}
	nw.Sources = zeroVector(nw.Sources, n)
	for _, t := range isrc {
		// Value amperes leave `from` (a) and enter `to` (b).
		if t.a != Ground {
			nw.Sources[t.a] -= t.v
		}
		if t.b != Ground {
			nw.Sources[t.b] += t.v
		}
	}
	nw.Bias = zeroVector(nw.Bias, n)
	for _, nd := range p.Nodes {
		nw.Bias[nw.Nodes[nd.Name]] = nd.Voltage
	}
	for _, d := range nw.Diodes {
		if d.Junction != d.Anode {
			vc := 0.0
			if d.Cathode != Ground {
				vc = nw.Bias[d.Cathode]
			}
			nw.Bias[d.Junction] = vc + d.JunctionVoltage
		}
	}
	// Branch k carries current i from a to b through the part:
	// KCL rows get +i at a and -i at b; the branch row states
	// v_a - v_b - s L i = 0.
	k := nNodes
	bi := 0
	for _, part := range c.Parts {
		if part.Kind != circuit.Inductor && part.Kind != circuit.VoltageSource {
			continue
		}
		br := branches[bi]
		bi++
		nw.Names = appendName(nw.Names, part.Name, "#current")
		nw.Bias[k] = branchCurrent(p, part)
		if part.Kind == circuit.VoltageSource {
			nw.Sources[k] = part.Value
		}
		if br.a != Ground {
			nw.G.Set(br.a, k, 1)
			nw.G.Set(k, br.a, 1)
		}
		if br.b != Ground {
			nw.G.Set(br.b, k, -1)
			nw.G.Set(k, br.b, -1)
		}
		nw.C.Set(k, k, -br.l)
		k++
	}
	if err := stampCouplings(nw, c); err != nil { // coupling.go
		return nil, err
	}
	nw.finishElements(p)
	// Everything so far is linear: keep it for the time-domain solver,
	// then add the diodes' small-signal stamps.
	nw.GLinear = copyMatrix(nw.GLinear, nw.G)
	nw.CLinear = copyMatrix(nw.CLinear, nw.C)
	for _, t := range diodeConds {
		stampConductance(nw.G, t.a, t.b, t.v)
	}
	for _, t := range diodeCaps {
		stampConductance(nw.C, t.a, t.b, t.v)
	}
	return nw, nil
}

// quiescent returns the Q point of the diode named name, the k-th diode of
// the circuit in file order, as p lists them.
func quiescent(p *bias.Point, k int, name string) (bias.QPoint, bool) {
	if k < len(p.Diodes) && p.Diodes[k].Name == name {
		return p.Diodes[k], true
	}
	for _, d := range p.Diodes {
		if d.Name == name {
			return d, true
		}
	}
	return bias.QPoint{}, false
}

// branchCurrent returns the DC current of a voltage source or inductor at
// p, zero if p does not list it.
func branchCurrent(p *bias.Point, part circuit.Part) float64 {
	list := p.Sources
	if part.Kind == circuit.Inductor {
		list = p.Inductors
	}
	for _, s := range list {
		if s.Name == part.Name {
			return s.Current
		}
	}
	return 0
}

// appendName appends the name part+suffix of a new unknown to names. When
// names's storage already holds that name there, from an earlier network
// of the same circuit, it is kept, so that relinearising allocates no
// string.
func appendName(names []string, part, suffix string) []string {
	if k := len(names); k < cap(names) {
		if old := names[:k+1][k]; len(old) == len(part)+len(suffix) && old[:len(part)] == part && old[len(part):] == suffix {
			return names[:k+1]
		}
	}
	return append(names, part+suffix)
}

// zeroMatrix returns a zero n×n matrix, in m's storage when m has room.
func zeroMatrix(m *mat.Dense, n int) *mat.Dense {
	if m == nil {
		return mat.NewDense(n, n, nil)
	}
	m.Reset()
	m.ReuseAs(n, n)
	return m
}

// copyMatrix returns a copy of a, in m's storage when m has room.
func copyMatrix(m *mat.Dense, a *mat.Dense) *mat.Dense {
	if m == nil {
		return mat.DenseCopyOf(a)
	}
	r, c := a.Dims()
	m.Reset()
	m.ReuseAs(r, c)
	m.Copy(a)
	return m
}

// zeroVector returns a zero vector of length n, in v's storage when it has
// room.
func zeroVector(v []float64, n int) []float64 {
	if cap(v) < n {
		return make([]float64, n)
	}
	v = v[:n]
	clear(v)
	return v
}

// Excitation returns the right-hand side that drives port i with a
// generator of EMF emf (peak volts) behind its reference impedance: a Norton
// current emf/Z0 into the port node and out of its return.
func (nw *Network) Excitation(i int, emf complex128, b []complex128) {
	clear(b)
	p := nw.Ports[i]
	j := emf / complex(p.Impedance, 0)
	if p.Node != Ground {
		b[p.Node] += j
	}
	if p.Return != Ground {
		b[p.Return] -= j
	}
}

// PortVoltage returns the voltage across port i in the solution x.
func (nw *Network) PortVoltage(i int, x []complex128) complex128 {
	p := nw.Ports[i]
	return at(x, p.Node) - at(x, p.Return)
}

// NodeVoltage returns the named node's voltage in x.
func (nw *Network) NodeVoltage(name string, x []complex128) (complex128, bool) {
	if name == circuit.Ground {
		return 0, true
	}
	i, ok := nw.Nodes[name]
	if !ok {
		return 0, false
	}
	return x[i], true
}

func at(x []complex128, i int) complex128 {
	if i == Ground {
		return 0
	}
	return x[i]
}

// GDC returns the conductance matrix at zero frequency: G without the
// terminations of AC-coupled ports, whose DC blocks are open at DC.
func (nw *Network) GDC() *mat.Dense {
	var g mat.Dense
	nw.GDCTo(&g)
	return &g
}

// GDCTo writes GDC's matrix into g, reusing g's storage when it has room
// for N×N entries.
func (nw *Network) GDCTo(g *mat.Dense) {
	g.Reset()
	g.ReuseAs(nw.N, nw.N)
	g.Copy(nw.G)
	for _, p := range nw.Ports {
		if p.ACCoupled {
			stampConductance(g, p.Node, p.Return, -1/p.Impedance)
		}
	}
}

func stampConductance(m *mat.Dense, a, b int, v float64) {
	if a != Ground {
		m.Set(a, a, m.At(a, a)+v)
	}
	if b != Ground {
		m.Set(b, b, m.At(b, b)+v)
	}
	if a != Ground && b != Ground {
		m.Set(a, b, m.At(a, b)-v)
		m.Set(b, a, m.At(b, a)-v)
	}
}

// WithReferences returns a copy of the network whose ports are terminated
// in the impedances z (one per port) instead of their own.
func (nw *Network) WithReferences(z []float64) *Network {
	out := *nw
	out.G = mat.DenseCopyOf(nw.G)
	out.Ports = append([]Port(nil), nw.Ports...)
	for i, p := range out.Ports {
		stampConductance(out.G, p.Node, p.Return, 1/z[i]-1/p.Impedance)
		out.Ports[i].Impedance = z[i]
	}
	return &out
}

// MaxUnknowns bounds the unknowns of a network New builds. The network
// and the analyses on it hold dense n×n matrices: G, C and their linear
// parts here (4 × 8n² bytes), a complex LU per frequency (16n²) and the
// reduced sweep engines' bases and forms (about 6 × 8n² more), so that at
// this bound every analysis stays within about 1 GB (12 × 8 × 3000² is
// 864 MB). The DC solve, banded, takes circuits far larger.
const MaxUnknowns = 3000

// TooLargeError is New's refusal of a network beyond MaxUnknowns, before
// anything is allocated for it.
type TooLargeError struct {
	Unknowns int
}

func (e *TooLargeError) Error() string {
	gb := 12 * 8 * float64(e.Unknowns) * float64(e.Unknowns) / 1e9
	return fmt.Sprintf("smallsignal: the network has %d unknowns (nodes, internal diode nodes and branch currents); the small-signal analyses would hold dense matrices of that order, about %.3g GB; accepted: up to %d unknowns, which keeps them within about 1 GB (the DC bias solve takes larger circuits)",
		e.Unknowns, gb, MaxUnknowns)
}
