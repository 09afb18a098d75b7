package bias

import (
	"fmt"
	"slices"

	"qpoint/bias/band"
	"qpoint/bias/circuit"
	"qpoint/bias/diode"
)

const ground = -1

// conductance is a linear resistance between unknowns a and b.
type conductance struct {
	a, b int
	g    float64
}

// vsource fixes v(plus) - v(minus) = value and carries the branch current
// (into plus from the circuit) as unknown br. Inductors are vsources of zero
// value at DC.
type vsource struct {
	plus, minus, br int
	value           float64
	part            int // index into circuit.Parts
}

// isource drives value amperes from `from` through itself into `to`.
type isource struct {
	from, to int
	value    float64
	part     int
}

// junction is a diode's intrinsic junction between its internal anode and
// its cathode; the series resistance, if any, is a conductance from the
// terminal anode to the internal one.
type junction struct {
	anode, internal, cathode int // anode is the terminal; internal == anode when R_S = 0
	dev                      *diode.Device
	part                     int
}

// system is the circuit in modified nodal form at one temperature.
//
// A system can be rebuilt for another circuit (build): it keeps its
// storage, its diode devices while their model and temperature are the
// same, and its band ordering and matrix while the matrix's structure is
// the same, so that a study stepping a value along a chain allocates
// almost nothing per step.
type system struct {
	c      *circuit.Circuit
	tempK  float64
	nNodes int // node unknowns, including internal diode nodes
	n      int // all unknowns

	conds     []conductance
	vsources  []vsource
	isources  []isource
	junctions []junction
	elements  []element // lines and measured blocks (distributed.go)

	mat *band.Matrix

	// Kept from one build to the next.
	index      map[string]int           // named node (and ground) -> unknown
	devices    map[string]*diode.Device // by model name
	edges      [][2]int                 // the structure of the matrix build makes
	orderN     int                      // the order of the matrix mat was made for
	orderEdges [][2]int                 // and its structure, for the band ordering
}

// build writes c at tempK into s, reusing what the last build left: its
// storage, a model's device while its parameters and the temperature are
// the same, and the band ordering and matrix while the matrix's structure
// is the same (the ordering is a function of the structure alone, so the
// reuse changes no result).
func (s *system) build(c *circuit.Circuit, tempK float64) error {
	s.c, s.tempK = c, tempK
	s.conds, s.vsources, s.isources, s.junctions = s.conds[:0], s.vsources[:0], s.isources[:0], s.junctions[:0]
	s.edges = s.edges[:0]
	if s.index == nil {
		s.index = make(map[string]int, len(c.Nodes)+1)
	}
	clear(s.index)
	s.index[circuit.Ground] = ground
	for i, name := range c.Nodes {
		s.index[name] = i
	}
	if s.devices == nil {
		s.devices = map[string]*diode.Device{}
	}
	node := func(name string) (int, error) {
		i, ok := s.index[name]
		if !ok {
			return 0, fmt.Errorf("node %q is not in the circuit's node list", name)
		}
		return i, nil
	}
	// Internal diode nodes come after the named ones. Diodes of one model
	// share its device; a device built for an earlier circuit is kept
	// while it is the same model at the same temperature.
	s.nNodes = len(c.Nodes)
	for pi, p := range c.Parts {
		if p.Kind != circuit.Diode {
			continue
		}
		m, ok := c.Models[p.Model]
		if !ok {
			return fmt.Errorf("diode %s: unknown model %q", p.Name, p.Model)
		}
		dev, ok := s.devices[p.Model]
		if !ok || dev.Params != m.Params || dev.TempK != tempK {
			dev = diode.New(m.Params, tempK)
			s.devices[p.Model] = dev
		}
		a, err := node(p.Nodes[0])
		if err != nil {
			return err
		}
		k, err := node(p.Nodes[1])
		if err != nil {
			return err
		}
		j := junction{anode: a, internal: a, cathode: k, dev: dev, part: pi}
		if series := m.Params.SeriesResistance; series > 0 {
			j.internal = s.nNodes
			s.nNodes++
			s.conds = append(s.conds, conductance{a, j.internal, 1 / series})
		}
		s.junctions = append(s.junctions, j)
	}
	s.n = s.nNodes

	for pi, p := range c.Parts {
		if p.Kind == circuit.Diode {
			continue
		}
		a, err := node(p.Nodes[0])
		if err != nil {
			return err
		}
		b, err := node(p.Nodes[1])
		if err != nil {
			return err
		}
		switch p.Kind {
		case circuit.Resistor:
			s.conds = append(s.conds, conductance{a, b, 1 / p.Value})
		case circuit.Capacitor:
			// Open at DC.
		case circuit.Inductor:
			s.vsources = append(s.vsources, vsource{a, b, s.n, 0, pi})
			s.n++
		case circuit.VoltageSource:
			s.vsources = append(s.vsources, vsource{a, b, s.n, p.Value, pi})
			s.n++
		case circuit.CurrentSource:
			s.isources = append(s.isources, isource{a, b, p.Value, pi})
		}
	}
	if err := s.buildDistributed(c, node); err != nil {
		return err
	}
	for _, p := range c.Ports {
		if p.ACCoupled {
			continue
		}
		a, err := node(p.Node)
		if err != nil {
			return err
		}
		ret := p.Return
		if ret == "" {
			ret = circuit.Ground
		}
		b, err := node(ret)
		if err != nil {
			return err
		}
		s.conds = append(s.conds, conductance{a, b, 1 / p.Impedance})
	}

	for i := 0; i < s.nNodes; i++ {
		s.edges = append(s.edges, [2]int{i, i})
	}
	for _, c := range s.conds {
		s.edges = append(s.edges, [2]int{c.a, c.b})
	}
	for _, v := range s.vsources {
		s.edges = append(s.edges, [2]int{v.plus, v.br}, [2]int{v.minus, v.br}, [2]int{v.plus, v.minus})
	}
	for _, j := range s.junctions {
		s.edges = append(s.edges, [2]int{j.internal, j.cathode})
	}
	s.distributedEdges()
	if s.mat != nil && s.orderN == s.n && slices.Equal(s.orderEdges, s.edges) {
		return nil // the same structure: the same ordering and band
	}
	s.mat = nil
	perm := band.Order(s.n, s.edges)
	kl, ku := band.Widths(perm, s.edges)
	if work := float64(s.n) * float64(kl) * float64(kl+ku); work > maxFactorWork {
		return fmt.Errorf("the circuit's %d unknowns are wired so that no ordering keeps the matrix banded (bandwidth %d): each Newton step would take about %.2g multiply-adds, more than the %.0g this solver allows; accepted: circuits whose nodes can be ordered so that each connects to near neighbours, as chains, ladders and hand-drawn circuits of a few hundred nodes can",
			s.n, max(kl, ku), work, float64(maxFactorWork))
	}
	s.mat = band.New(perm, kl, ku)
	// Keep the structure for the next build to compare with, and take the
	// older list's storage for that build's edges.
	s.orderN = s.n
	s.orderEdges, s.edges = s.edges, s.orderEdges[:0]
	return nil
}

// maxFactorWork bounds the multiply-adds of one factorisation of the banded
// Jacobian, n·kl·(kl+ku), to about a tenth of a second. A ladder of 1000
// diodes needs 4000; a network of a few thousand randomly joined nodes, which
// fits in a circuit file, would need 1e10 per Newton step and take hours
// over the iterations of every strategy.
const maxFactorWork = 1e8

// volt returns the voltage of unknown i in x (zero for ground).
func volt(x []float64, i int) float64 {
	if i == ground {
		return 0
	}
	return x[i]
}

// add adds v to entry (i, j) of the matrix unless either index is ground.
func (s *system) add(i, j int, v float64) {
	if i == ground || j == ground {
		return
	}
	s.mat.Add(i, j, v)
}

func addRHS(b []float64, i int, v float64) {
	if i != ground {
		b[i] += v
	}
}

// junctionVoltages writes each junction's intrinsic voltage at x into voltages.
func (s *system) junctionVoltages(x, voltages []float64) {
	for k, j := range s.junctions {
		voltages[k] = volt(x, j.internal) - volt(x, j.cathode)
	}
}

// assemble builds the Newton system at the junction voltages vl: the
// matrix in s.mat and the right-hand side in b, whose solution is the next
// iterate. lambda scales every independent source; gmin is a conductance
// from every node unknown to ground.
func (s *system) assemble(vl []float64, lambda, gmin float64, b []float64) {
	s.mat.Zero()
	clear(b)
	for _, c := range s.conds {
		s.add(c.a, c.a, c.g)
		s.add(c.b, c.b, c.g)
		s.add(c.a, c.b, -c.g)
		s.add(c.b, c.a, -c.g)
	}
	for _, v := range s.vsources {
		s.add(v.plus, v.br, 1)
		s.add(v.minus, v.br, -1)
		s.add(v.br, v.plus, 1)
		s.add(v.br, v.minus, -1)
		b[v.br] = lambda * v.value
	}
	for _, src := range s.isources {
		addRHS(b, src.from, -lambda*src.value)
		addRHS(b, src.to, lambda*src.value)
	}
	s.assembleDistributed()
	for k, j := range s.junctions {
		i := j.dev.Current(vl[k])
		g := i.D1
		ieq := i.Value - g*vl[k]
		s.add(j.internal, j.internal, g)
		s.add(j.cathode, j.cathode, g)
		s.add(j.internal, j.cathode, -g)
		s.add(j.cathode, j.internal, -g)
		addRHS(b, j.internal, -ieq)
		addRHS(b, j.cathode, ieq)
	}
	if gmin > 0 {
		for i := 0; i < s.nNodes; i++ {
			s.mat.Add(i, i, gmin)
		}
	}
}

// roundoff is the multiple of the machine epsilon allowed for rounding in
// a current computed as g·(v_a - v_b).
const roundoff = 16 * 0x1p-52

// residual returns the KCL residual of the circuit as described (no aids,
// sources at full value) at x: r[i] is the net current leaving node i
// through the parts, and scale[i] the sum of the magnitudes of those
// currents, the size the residual is judged against. floor[i] is the
// rounding floor of the residual: a current g·(v_a - v_b) cannot be known
// better than g·(|v_a| + |v_b|)·ε, which matters for milliohm parts at
// volts. Branch rows hold the voltage error of each source.
func (s *system) residual(x, r, scale, floor []float64) {
	clear(r)
	clear(scale)
	clear(floor)
	flow := func(a, b int, i float64) {
		if a != ground {
			r[a] += i
			scale[a] += abs(i)
		}
		if b != ground {
			r[b] -= i
			scale[b] += abs(i)
		}
	}
	rounding := func(a, b int, g float64) {
		e := roundoff * g * (abs(volt(x, a)) + abs(volt(x, b)))
		if a != ground {
			floor[a] += e
		}
		if b != ground {
			floor[b] += e
		}
	}
	for _, c := range s.conds {
		flow(c.a, c.b, c.g*(volt(x, c.a)-volt(x, c.b)))
		rounding(c.a, c.b, c.g)
	}
	for _, v := range s.vsources {
		flow(v.plus, v.minus, x[v.br])
		vp, vm := volt(x, v.plus), volt(x, v.minus)
		r[v.br] = vp - vm - v.value
		scale[v.br] = max(abs(vp), abs(vm), abs(v.value))
	}
	for _, src := range s.isources {
		flow(src.from, src.to, src.value)
	}
	s.residualDistributed(x, r, scale, flow)
	for _, j := range s.junctions {
		v := volt(x, j.internal) - volt(x, j.cathode)
		i := j.dev.Current(v)
		flow(j.internal, j.cathode, i.Value)
		rounding(j.internal, j.cathode, abs(i.D1))
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
