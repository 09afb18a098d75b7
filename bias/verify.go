package bias

import (
	"errors"
	"fmt"
	"math"

	"qpoint/bias/circuit"
	"qpoint/bias/si"
)

// verify checks the operating point p as reported, independently of the
// Newton iteration that reached it: from the reported node voltages, the
// reported diode and source currents and the parts' values alone it
// recomputes the current balance at every named node, the voltage of
// every source and inductor branch, and each diode's current against its
// junction law and its series resistance. A node passes when its net
// current is within the tolerance Stats states, 1e-12 A + 1e-9 × the sum
// of the current magnitudes there, plus the rounding floor
// 16 ε g (|v_a| + |v_b|) of each resistance, port and series resistance
// at the node (a junction's current is the reported number, not g·v, so
// it adds none). It returns nil when every check passes, or an error
// naming the first node that fails, by how much, and, where a junction
// conducts so well that the rounding of its voltage alone exceeds the
// tolerance, that junction: float64 cannot resolve such a circuit.
//
// The check exists because the Newton iteration judges convergence on its
// own iterate, with the rounding floor of every junction: a junction whose
// conductance is enormous (a hot junction that has become a 1e-11 ohm
// short) lets a point pass that misses KCL by more than the current it
// reports.
func (s *system) verify(p *Point) error {
	c := s.c
	n := len(c.Nodes)
	sum, scale, floor := make([]float64, n), make([]float64, n), make([]float64, n)
	stiff := make([]float64, n) // the largest junction rounding at the node, and whose
	stiffPart := make([]string, n)
	volts := func(name string) (float64, int) {
		i := s.index[name]
		if i == ground {
			return 0, ground
		}
		return p.Nodes[i].Voltage, i
	}
	flow := func(a, b int, i float64) {
		if a != ground {
			sum[a] += i
			scale[a] += math.Abs(i)
		}
		if b != ground {
			sum[b] -= i
			scale[b] += math.Abs(i)
		}
	}
	addFloor := func(a, b int, e float64, part string) {
		for _, k := range []int{a, b} {
			if k != ground {
				floor[k] += e
			}
		}
	}
	rounding := func(a, b int, g, va, vb float64, part string) {
		addFloor(a, b, roundoff*math.Abs(g)*(math.Abs(va)+math.Abs(vb)), part)
	}
	current := map[string]float64{}
	for _, src := range p.Sources {
		current[src.Name] = src.Current
	}
	for _, src := range p.Inductors {
		current[src.Name] = src.Current
	}
	di := 0
	for _, part := range c.Parts {
		va, a := volts(part.Nodes[0])
		vb, b := volts(part.Nodes[1])
		switch part.Kind {
		case circuit.Resistor:
			flow(a, b, (va-vb)/part.Value)
			rounding(a, b, 1/part.Value, va, vb, part.Name)
		case circuit.VoltageSource, circuit.Inductor:
			want := 0.0
			if part.Kind == circuit.VoltageSource {
				want = part.Value
			}
			tol := branchTol*max(math.Abs(va), math.Abs(vb), math.Abs(want)) + voltAbsTol + 4*eps*(math.Abs(va)+math.Abs(vb))
			if d := va - vb - want; !(math.Abs(d) <= tol) {
				return fmt.Errorf("the point reached fails the independent check: %s's branch voltage is off by %s", part.Name, si.Format(d, "V", 3))
			}
			flow(a, b, current[part.Name])
		case circuit.CurrentSource:
			flow(a, b, part.Value)
		case circuit.Diode:
			d := p.Diodes[di]
			di++
			flow(a, b, d.Current)
			if math.IsNaN(d.Current) || math.IsInf(d.Current, 0) {
				return fmt.Errorf("the point reached fails the independent check: %s's current is %g", d.Name, d.Current)
			}
			// The junction's own law at the reported junction voltage
			// must give the reported current, to the rounding of that
			// voltage.
			internal := va - (d.Voltage - d.JunctionVoltage)
			law := d.Device.Current(d.JunctionVoltage).Value
			junctionFloor := roundoff * math.Abs(d.Conductance) * (math.Abs(internal) + math.Abs(vb))
			tol := kclAbsTol + kclRelTol*(math.Abs(law)+math.Abs(d.Current)) + junctionFloor
			if rs := d.Device.Params.SeriesResistance; rs > 0 {
				seriesFloor := roundoff * (math.Abs(va) + math.Abs(internal)) / rs
				tol += seriesFloor
				addFloor(a, b, seriesFloor, d.Name)
			}
			if !(math.Abs(law-d.Current) <= tol) {
				return fmt.Errorf("the point reached fails the independent check: %s reports %s, its junction law gives %s at the reported %s",
					d.Name, si.Format(d.Current, "A", 4), si.Format(law, "A", 4), si.Format(d.JunctionVoltage, "V", 4))
			}
			for _, k := range []int{a, b} {
				if k != ground && junctionFloor > stiff[k] {
					stiff[k], stiffPart[k] = junctionFloor, d.Name
				}
			}
		}
	}
	if err := s.verifyDistributed(p, volts, flow); err != nil {
		return err
	}
	for _, port := range c.Ports {
		if port.ACCoupled {
			continue
		}
		ret := port.Return
		if ret == "" {
			ret = circuit.Ground
		}
		va, a := volts(port.Node)
		vb, b := volts(ret)
		flow(a, b, (va-vb)/port.Impedance)
		rounding(a, b, 1/port.Impedance, va, vb, "port "+port.Name)
	}
	for i := range sum {
		tol := kclAbsTol + kclRelTol*scale[i] + floor[i]
		if math.Abs(sum[i]) <= tol {
			continue
		}
		msg := fmt.Sprintf("the point reached fails the independent check of KCL: the currents at node `%s` do not balance by %s (tolerance %s)",
			c.Nodes[i], si.Format(sum[i], "A", 3), si.Format(tol, "A", 2))
		if stiff[i] > tol {
			msg += fmt.Sprintf("; junction %s conducts so well at %s that its current is known only to ±%s from the rounding of its voltage, so float64 cannot resolve this circuit",
				stiffPart[i], si.Format(s.tempK, "K", 4), si.Format(stiff[i], "A", 2))
		}
		return errors.New(msg)
	}
	return nil
}

// eps is the float64 machine epsilon.
const eps = 0x1p-52
