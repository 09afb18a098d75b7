package bias

import (
	"math"

	"qpoint/bias/circuit"
	"qpoint/bias/diode"
)

// Point is a DC operating point.
type Point struct {
	Circuit      *circuit.Circuit
	TemperatureK float64
	Nodes        []Node   // every named node but ground, in file order
	Sources      []Source // voltage and current sources, in file order
	Inductors    []Source // DC current of each inductor, in file order
	Diodes       []QPoint // in file order
	// Distributed holds each line's and block's DC currents, in file
	// order (distributed.go).
	Distributed []DistributedCurrents
	Warnings    []Warning
	Stats       Stats

	x     []float64 // the solution vector, for continuation
	vl    []float64
	shape int // number of unknowns, to check a continuation start fits
}

// Node is a node voltage with respect to ground.
type Node struct {
	Name    string
	Voltage float64 // V
}

// Source is the DC current of a source or inductor.
type Source struct {
	Name string
	Kind circuit.Kind
	// Current flows into the part's plus (voltage source), to (current
	// source) or first (inductor) terminal from the circuit. A source that
	// delivers power has a negative current.
	Current float64 // A
}

// QPoint is a diode's Q point.
type QPoint struct {
	Name   string
	Model  string
	Device *diode.Device // the model at the point's temperature

	Voltage         float64 // V, anode minus cathode at the terminals
	JunctionVoltage float64 // V, excluding the drop on R_S
	Current         float64 // A, anode to cathode, the junction's own current

	// Conductance is g_d = dI/dV of the intrinsic junction, and
	// DynamicResistance its inverse (+Inf when the conductance underflows).
	Conductance          float64 // S
	DynamicResistance    float64 // ohm
	JunctionCapacitance  float64 // F, depletion, dq_j/dv
	DiffusionCapacitance float64 // F, tau_T g_d of the forward current
	Power                float64 // W, dissipated: Voltage × Current

	// Fractions of the model's ratings: forward current over max_current,
	// reverse voltage over max_reverse_voltage, power over max_power. NaN
	// where the model gives no such rating.
	CurrentFraction        float64
	ReverseVoltageFraction float64
	PowerFraction          float64

	// InBreakdown is true where the breakdown knee's current exceeds the
	// ideal junction's saturation current: the junction is in reverse
	// breakdown.
	InBreakdown bool

	// share is g_d Z for a junction carrying more than forcedCurrent (NaN
	// otherwise): see currentShare.
	share float64
}

// Voltage returns the voltage of the named node, 0 for ground, and whether
// the node exists.
func (p *Point) Voltage(name string) (float64, bool) {
	if name == circuit.Ground {
		return 0, true
	}
	for _, n := range p.Nodes {
		if n.Name == name {
			return n.Voltage, true
		}
	}
	return 0, false
}

// point writes the operating point at st into p, reusing p's storage.
// Everything but the warnings, which the caller may keep, is overwritten.
func (s *system) point(st *state, p *Point) {
	c := s.c
	*p = Point{
		Circuit: c, TemperatureK: s.tempK, shape: s.n,
		x:         append(p.x[:0], st.x...),
		vl:        append(p.vl[:0], st.vl...),
		Nodes:     p.Nodes[:0],
		Sources:   p.Sources[:0],
		Inductors: p.Inductors[:0],
		Diodes:    p.Diodes[:0],
		// Distributed: pointDistributed below.
		Distributed: p.Distributed,
	}
	for i, name := range c.Nodes {
		p.Nodes = append(p.Nodes, Node{name, st.x[i]})
	}
	// Sources in file order whatever their kind: the voltage and current
	// sources are each listed in file order, so merge them by part index.
	vi, ii := 0, 0
	for vi < len(s.vsources) || ii < len(s.isources) {
		if ii == len(s.isources) || vi < len(s.vsources) && s.vsources[vi].part < s.isources[ii].part {
			v := s.vsources[vi]
			vi++
			part := c.Parts[v.part]
			src := Source{Name: part.Name, Kind: part.Kind, Current: st.x[v.br]}
			if part.Kind == circuit.Inductor {
				p.Inductors = append(p.Inductors, src)
			} else {
				p.Sources = append(p.Sources, src)
			}
			continue
		}
		i := s.isources[ii]
		ii++
		part := c.Parts[i.part]
		p.Sources = append(p.Sources, Source{Name: part.Name, Kind: part.Kind, Current: -i.value})
	}

	s.pointDistributed(st.x, p)
	var shareBuf []float64
	for _, j := range s.junctions {
		part := c.Parts[j.part]
		junction := volt(st.x, j.internal) - volt(st.x, j.cathode)
		vt := volt(st.x, j.anode) - volt(st.x, j.cathode)
		i := j.dev.Current(junction)
		current := i.Value
		if j.internal != j.anode {
			// Both the junction law at the junction voltage and the
			// series resistance's g·(v_a - v_i) give the diode's current;
			// each is known to the rounding of its voltage difference
			// times its conductance. Report the better known.
			va, vi, vk := volt(st.x, j.anode), volt(st.x, j.internal), volt(st.x, j.cathode)
			gs := 1 / j.dev.Params.SeriesResistance
			if gs*(abs(va)+abs(vi)) < i.D1*(abs(vi)+abs(vk)) {
				current = (va - vi) * gs
			}
		}
		d := QPoint{
			Name:                 part.Name,
			Model:                part.Model,
			Device:               j.dev,
			Voltage:              vt,
			JunctionVoltage:      junction,
			Current:              current,
			Conductance:          i.D1,
			DynamicResistance:    1 / i.D1,
			JunctionCapacitance:  j.dev.DepletionCharge(junction).D1,
			DiffusionCapacitance: j.dev.DiffusionCharge(junction).D1,
			Power:                vt * current,
		}
		if i.D1 == 0 {
			d.DynamicResistance = math.Inf(1)
		}
		d.InBreakdown = -j.dev.BreakdownCurrent(junction).Value > j.dev.SaturationCurrent
		d.share = math.NaN()
		if d.Current > forcedCurrent && s.mat != nil {
			if shareBuf == nil {
				shareBuf = make([]float64, s.n)
			}
			d.share = s.currentShare(j, i.D1, shareBuf)
		}
		r := j.dev.Params.Ratings
		d.CurrentFraction = fraction(math.Max(current, 0), r.MaxCurrent)
		d.ReverseVoltageFraction = fraction(math.Max(-vt, 0), r.MaxReverseVoltage)
		d.PowerFraction = fraction(d.Power, r.MaxPower)
		p.Diodes = append(p.Diodes, d)
	}
	p.Warnings = cautions(p)
}

func fraction(v, rating float64) float64 {
	if rating <= 0 {
		return math.NaN()
	}
	return v / rating
}

// currentShare returns the fraction g_d / (g_d + G_c) of a small current
// injected across the junction that the junction itself takes, where G_c
// is the conductance the rest of the circuit (series resistance included)
// presents to it: g_d Z with Z the impedance across the junction from the
// Newton matrix's factors. Near 1 the circuit feeds the junction a current
// (a resistance sets it); near 0 the circuit holds the junction's voltage
// and its current follows the exponential alone.
func (s *system) currentShare(j junction, g float64, b []float64) float64 {
	clear(b)
	addRHS(b, j.internal, 1)
	addRHS(b, j.cathode, -1)
	s.mat.Solve(b)
	return g * (volt(b, j.internal) - volt(b, j.cathode))
}
