package bias

import (
	"fmt"
	"math"

	"qpoint/bias/circuit"
	"qpoint/bias/line"
	"qpoint/bias/si"
)

// element is a distributed part (line or measured block) at DC: one
// branch current per port, flowing from the circuit into the port's
// terminal and out of its return, bound to the port voltages by the part's
// DC relation M V + N I = 0 (circuit.Distributed.DC); a line whose two
// returns differ also carries its return conductor's current, from the
// first return to the second, with V(return 1) = V(return 2).
type element struct {
	part      int // index into circuit.Distributed
	term, ret []int
	br        int // first port-current unknown
	shield    int // the return conductor's current, -1 for none
	rel       line.Relation
}

// DistributedCurrents is a line's or block's DC state: the current into
// each port's terminal (out of its return) and, for a line whose returns
// differ, the current its return conductor carries from the first return
// to the second.
type DistributedCurrents struct {
	Name          string
	Type          string
	Currents      []float64 // A, per port
	ReturnCurrent float64   // A
}

// buildDistributed adds the circuit's distributed parts to s: their
// unknowns after the others, and their structure to s.edges.
func (s *system) buildDistributed(c *circuit.Circuit, node func(string) (int, error)) error {
	s.elements = s.elements[:0]
	for pi := range c.Distributed {
		d := &c.Distributed[pi]
		e := element{part: pi, br: s.n, shield: -1, rel: d.DC}
		for k := range d.Terminals {
			a, err := node(d.Terminals[k])
			if err != nil {
				return err
			}
			b, err := node(d.Returns[k])
			if err != nil {
				return err
			}
			e.term, e.ret = append(e.term, a), append(e.ret, b)
		}
		s.n += len(e.term)
		if d.JoinReturnsAtDC {
			e.shield = s.n
			s.n++
		}
		s.elements = append(s.elements, e)
	}
	return nil
}

// distributedEdges adds the matrix structure of the distributed parts.
func (s *system) distributedEdges() {
	for _, e := range s.elements {
		p := len(e.term)
		for k := 0; k < p; k++ {
			s.edges = append(s.edges, [2]int{e.term[k], e.br + k}, [2]int{e.ret[k], e.br + k})
			for j := 0; j < p; j++ {
				s.edges = append(s.edges, [2]int{e.br + k, e.br + j}, [2]int{e.br + k, e.term[j]}, [2]int{e.br + k, e.ret[j]})
			}
		}
		if e.shield >= 0 {
			s.edges = append(s.edges, [2]int{e.ret[0], e.shield}, [2]int{e.ret[1], e.shield}, [2]int{e.ret[0], e.ret[1]})
		}
	}
}

// assembleDistributed stamps the distributed parts: their currents into
// the KCL rows and their relations as rows of their own. They are
// linear and source-free.
func (s *system) assembleDistributed() {
	for _, e := range s.elements {
		p := len(e.term)
		for k := 0; k < p; k++ {
			s.add(e.term[k], e.br+k, 1)
			s.add(e.ret[k], e.br+k, -1)
			row := e.br + k
			for j := 0; j < p; j++ {
				if m := e.rel.M[k*p+j]; m != 0 {
					s.add(row, e.term[j], m)
					s.add(row, e.ret[j], -m)
				}
				if n := e.rel.N[k*p+j]; n != 0 {
					s.add(row, e.br+j, n)
				}
			}
		}
		if e.shield >= 0 {
			s.add(e.ret[0], e.shield, 1)
			s.add(e.ret[1], e.shield, -1)
			s.add(e.shield, e.ret[0], 1)
			s.add(e.shield, e.ret[1], -1)
		}
	}
}

// residualDistributed adds the distributed parts' currents to the KCL
// residual and writes their relation rows: r = M V + N I, judged against
// the sizes of the terms.
func (s *system) residualDistributed(x, r, scale []float64, flow func(a, b int, i float64)) {
	for _, e := range s.elements {
		p := len(e.term)
		for k := 0; k < p; k++ {
			flow(e.term[k], e.ret[k], x[e.br+k])
			var sum, size float64
			for j := 0; j < p; j++ {
				v := volt(x, e.term[j]) - volt(x, e.ret[j])
				t1, t2 := e.rel.M[k*p+j]*v, e.rel.N[k*p+j]*x[e.br+j]
				sum += t1 + t2
				size = max(size, abs(t1), abs(t2), abs(e.rel.M[k*p+j])*max(abs(volt(x, e.term[j])), abs(volt(x, e.ret[j]))))
			}
			r[e.br+k], scale[e.br+k] = sum, size
		}
		if e.shield >= 0 {
			flow(e.ret[0], e.ret[1], x[e.shield])
			va, vb := volt(x, e.ret[0]), volt(x, e.ret[1])
			r[e.shield], scale[e.shield] = va-vb, max(abs(va), abs(vb))
		}
	}
}

// pointDistributed writes the distributed parts' DC currents into p.
func (s *system) pointDistributed(x []float64, p *Point) {
	p.Distributed = p.Distributed[:0]
	for _, e := range s.elements {
		d := &s.c.Distributed[e.part]
		dc := DistributedCurrents{Name: d.Name, Type: d.Type, Currents: append([]float64(nil), x[e.br:e.br+len(e.term)]...)}
		if e.shield >= 0 {
			dc.ReturnCurrent = x[e.shield]
		}
		p.Distributed = append(p.Distributed, dc)
	}
}

// verifyDistributed checks the distributed parts of the point p as
// reported: each relation row M V + N I from the reported node voltages
// and currents within branchTol of its terms' size plus voltAbsTol, and
// their currents into the KCL sums.
func (s *system) verifyDistributed(p *Point, volts func(string) (float64, int), flow func(a, b int, i float64)) error {
	for k, e := range s.elements {
		d := &s.c.Distributed[e.part]
		dc := p.Distributed[k]
		n := len(e.term)
		v := make([]float64, n)
		for j := 0; j < n; j++ {
			vt, a := volts(d.Terminals[j])
			vr, b := volts(d.Returns[j])
			v[j] = vt - vr
			flow(a, b, dc.Currents[j])
		}
		for i := 0; i < n; i++ {
			var sum, size float64
			for j := 0; j < n; j++ {
				t1, t2 := e.rel.M[i*n+j]*v[j], e.rel.N[i*n+j]*dc.Currents[j]
				sum += t1 + t2
				size = math.Max(size, math.Max(math.Abs(t1), math.Abs(t2)))
			}
			if !(math.Abs(sum) <= branchTol*size+voltAbsTol+4*eps*size) {
				return fmt.Errorf("the point reached fails the independent check: %s %s's DC relation is off by %s at port %d", d.Type, d.Name, si.Format(sum, "V", 3), i+1)
			}
		}
		if e.shield >= 0 {
			va, a := volts(d.Returns[0])
			vb, b := volts(d.Returns[1])
			if !(math.Abs(va-vb) <= branchTol*math.Max(math.Abs(va), math.Abs(vb))+voltAbsTol) {
				return fmt.Errorf("the point reached fails the independent check: %s %s's return conductor is off by %s", d.Type, d.Name, si.Format(va-vb, "V", 3))
			}
			flow(a, b, dc.ReturnCurrent)
		}
	}
	return nil
}
