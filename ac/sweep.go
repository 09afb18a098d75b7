package ac

import (
	"fmt"
	"math"
	"math/cmplx"

	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// Point is the response of the network at one frequency.
type Point struct {
	FrequencyHz float64
	// S[i][j] is S_(i+1)(j+1), every port terminated in its reference
	// impedance.
	S [][]complex128
	// InputImpedance[i] looks into port i with the other ports terminated.
	InputImpedance []complex128
	// Probes[k] is the voltage of probe node k when port 1's generator has
	// an EMF of 1 V peak behind its reference impedance.
	Probes []complex128
	// GroupDelay is -d(arg S21)/dw in seconds (of S11 for a one-port).
	GroupDelay float64
}

// PortInfo names a port and its reference impedance.
type PortInfo struct {
	Name      string
	Impedance float64 // ohm
}

// Settings control a sweep. The zero value uses the circuit's own ports
// and probes.
type Settings struct {
	// Reference replaces the ports' reference impedances (one per port,
	// each > 0) for the S-parameters and terminations.
	Reference []float64
	// Probes lists the nodes whose transfer is reported; nil means the
	// circuit's own probes.
	Probes []string
}

// Response is a whole sweep held in memory.
type Response struct {
	Ports  []PortInfo
	Probes []string
	Points []Point
	Stats  Stats // which engine ran, and any fallback
	// Outside lists the measured blocks and microstrip lines that some
	// frequency of the sweep lies outside the data or models of: a
	// caution, not an error.
	Outside []smallsignal.OutsideRange
}

// Run sweeps nw over freqs and returns every point, and in Stats how the
// sweep ran.
func Run(nw *smallsignal.Network, freqs []float64, s Settings) (*Response, error) {
	r := &Response{}
	ws := new(Workspace)
	ports, probes, err := ws.Sweep(nw, freqs, s, func(p Point) error {
		r.Points = append(r.Points, p)
		return nil
	})
	r.Ports, r.Probes, r.Stats = ports, probes, ws.SweepStats()
	r.Outside = nw.Outside(freqs)
	return r, err
}

// SweepStats says how the workspace's last Sweep ran.
func (ws *Workspace) SweepStats() Stats {
	st := ws.stats
	st.Refused = append([]Engine(nil), st.Refused...)
	st.Elements = append([]string(nil), st.Elements...)
	return st
}

// elementSlope returns a zero work vector of n numbers for the elements'
// dY/dω x.
func (ws *Workspace) elementSlope(n int) []complex128 {
	ws.slopeElements = vector(ws.slopeElements, n)
	return ws.slopeElements
}

// Sweep computes the response at each frequency in turn and hands it to
// visit, so that a writer can stream a long sweep without holding it. It
// returns the ports and probe names the points refer to. visit's error
// stops the sweep and is returned.
//
// Each point costs O(n³) by a dense LU of Y(jw), or O(n²) after a one-time
// reduction of (G, C) to a pair of real Hessenberg (or Schur) matrices
// (Laub, IEEE Trans. Automatic Control 26(2), 1981; see reduction); the
// sweep takes the reduction when the point count repays it and its
// accuracy check passes, and the LU otherwise. Either way it holds O(n²)
// numbers whatever the point count.
func Sweep(nw *smallsignal.Network, freqs []float64, s Settings, visit func(Point) error) ([]PortInfo, []string, error) {
	return sweep(nw, freqs, s, visit, engineAuto)
}

func sweep(nw *smallsignal.Network, freqs []float64, s Settings, visit func(Point) error, choice engine) ([]PortInfo, []string, error) {
	return new(Workspace).sweep(nw, freqs, s, visit, choice)
}

// Sweep is the package's Sweep in the workspace's storage. The points
// handed to visit are the caller's to keep; the ports it returns are
// overwritten by the workspace's next call to Sweep.
func (ws *Workspace) Sweep(nw *smallsignal.Network, freqs []float64, s Settings, visit func(Point) error) ([]PortInfo, []string, error) {
	return ws.sweep(nw, freqs, s, visit, engineAuto)
}

func (ws *Workspace) sweep(nw *smallsignal.Network, freqs []float64, s Settings, visit func(Point) error, choice engine) ([]PortInfo, []string, error) {
	if len(nw.Ports) == 0 {
		return nil, nil, fmt.Errorf("the circuit has no ports; add a `ports:` entry to drive and load it")
	}
	ref := ws.reference[:0]
	for _, p := range nw.Ports {
		ref = append(ref, p.Impedance)
	}
	ws.reference = ref
	if s.Reference != nil {
		if len(s.Reference) != len(nw.Ports) {
			return nil, nil, fmt.Errorf("%d reference impedances given for %d ports", len(s.Reference), len(nw.Ports))
		}
		for i, z := range s.Reference {
			if !(z > 0) || math.IsInf(z, 0) {
				return nil, nil, fmt.Errorf("reference impedance %g ohm for port %s: must be a positive real number", z, nw.Ports[i].Name)
			}
		}
		nw = nw.WithReferences(s.Reference)
		copy(ref, s.Reference)
	}
	probes := s.Probes
	if probes == nil {
		probes = nw.Point.Circuit.Probes
	}
	for _, name := range probes {
		if _, ok := nw.Nodes[name]; !ok && name != circuit.Ground {
			return nil, nil, fmt.Errorf("probe %q is not a node of the circuit", name)
		}
	}
	ports := ws.ports[:0]
	for i, p := range nw.Ports {
		ports = append(ports, PortInfo{p.Name, ref[i]})
	}
	ws.ports = ports

	// A reservation serves this sweep alone.
	defer func() { ws.store = pointStore{} }()

	// The reduced engine takes the points it can; the LU the rest.
	done := 0
	r, refused := sweepEngine(nw, freqs, ref, probes, choice)
	ws.stats = Stats{Engine: EngineLU, Refused: refused}
	if nw.HasElements() {
		ws.stats.Elements = nw.ElementNames()
	}
	if r != nil {
		ws.stats.Engine = r.form.engine()
		var err error
		done, err = r.sweep(nw, freqs, ref, probes, visit, &ws.store)
		ws.stats.Reduced = done
		if err != nil || done == len(freqs) {
			return ports, probes, err
		}
	}
	ws.stats.LU = len(freqs) - done

	n, np := nw.N, len(nw.Ports)
	f := ws.factorization(n)
	g, c := nw.G.RawMatrix(), nw.C.RawMatrix()
	if len(ws.solutions) < np {
		ws.solutions = append(ws.solutions, make([][]complex128, np-len(ws.solutions))...)
	}
	x := ws.solutions[:np]
	for i := range x {
		x[i] = vector(x[i], n)
	}
	ws.slope = vector(ws.slope, n)
	dx := ws.slope
	gRows, cRows := make([][]float64, np), make([][]float64, np)
	for i := range gRows {
		gRows[i], cRows[i] = portRows(nw, i)
	}
	for _, hz := range freqs[done:] {
		if err := CheckFrequency(hz); err != nil {
			return ports, probes, err
		}
		w := 2 * math.Pi * hz
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				f.a[i*n+j] = complex(g.Data[i*g.Stride+j], w*c.Data[i*c.Stride+j])
			}
		}
		nw.Stamp(w, f.a, n)
		if err := f.factor(); err != nil {
			return ports, probes, fmt.Errorf("at %g Hz: %w", hz, err)
		}
		pt := ws.store.point(hz, np, len(probes))
		for j := 0; j < np; j++ {
			nw.Excitation(j, 1, x[j])
			f.solve(x[j])
			for i := 0; i < np; i++ {
				pt.S[i][j] = sEntry(nw.PortVoltage(i, x[j]), ref, i, j)
			}
			pt.InputImpedance[j] = inputImpedance(nw.PortVoltage(j, x[j]), portCurrent(gRows[j], cRows[j], w, x[j]))
		}
		for _, name := range probes {
			v, _ := nw.NodeVoltage(name, x[0])
			pt.Probes = append(pt.Probes, v)
		}
		// Group delay from the exact derivative dx/dw = -Y⁻¹ (jC x) for
		// the port-1 excitation.
		for i := 0; i < n; i++ {
			var s complex128
			row := c.Data[i*c.Stride : i*c.Stride+n]
			for j, cij := range row {
				if cij != 0 {
					s += complex(cij, 0) * x[0][j]
				}
			}
			dx[i] = -1i * s
		}
		if nw.HasElements() {
			// dY/dω of the lines and blocks, which are not jωC.
			slope := ws.elementSlope(n)
			nw.ElementsSlope(w, x[0], slope)
			for i := range dx {
				dx[i] -= slope[i]
			}
		}
		f.solve(dx)
		// S21 = k V and S11 = 2 V - 1: both derivatives follow from dV/dw.
		out := groupDelayPort(np)
		setGroupDelay(&pt, ref, out, nw.PortVoltage(out, dx))
		if err := visit(pt); err != nil {
			return ports, probes, err
		}
	}
	return ports, probes, nil
}

// sEntry returns S_ij = 2 V_i sqrt(R_j/R_i) - δ_ij from the voltage V_i
// across port i for a unit EMF at port j (power waves, real references).
func sEntry(v complex128, ref []float64, i, j int) complex128 {
	s := 2 * v * complex(math.Sqrt(ref[j]/ref[i]), 0)
	if i == j {
		s--
	}
	return s
}

// setGroupDelay sets the point's group delay -d(arg S)/dw of S_out,1 from
// dv, the derivative of port out's voltage for a unit EMF at port 1:
// -Im(S'/S) with S' = 2 dv sqrt(R_1/R_out); NaN where S vanishes.
func setGroupDelay(pt *Point, ref []float64, out int, dv complex128) {
	sv := pt.S[out][0]
	dS := 2 * dv * complex(math.Sqrt(ref[0]/ref[out]), 0)
	if sv != 0 && !cmplx.IsNaN(sv) {
		pt.GroupDelay = -imag(dS / sv)
	} else {
		pt.GroupDelay = math.NaN()
	}
}

// newPoint returns a Point for np ports whose S-matrix rows and input
// impedances share one allocation: a long sweep or study keeps millions of
// points, and one block each keeps the collector's work small.
func newPoint(hz float64, np int) Point { return newPointWithProbes(hz, np, 0) }

// newPointWithProbes is newPoint with room for the voltages of probes
// probes in the same block: Probes is empty with that capacity (nil when
// there are none), ready to be appended to.
func newPointWithProbes(hz float64, np, probes int) Point {
	return layoutPoint(hz, np, probes, make([]complex128, np*np+np+probes), make([][]complex128, np))
}

// layoutPoint returns a Point whose S rows, input impedances and probe
// voltages (empty, with room for probes) live in block, which holds
// np² + np + probes numbers, with rows (np of them) for S.
func layoutPoint(hz float64, np, probes int, block []complex128, rows [][]complex128) Point {
	pt := Point{FrequencyHz: hz, S: rows, InputImpedance: block[np*np : np*np+np : np*np+np]}
	for i := range pt.S {
		pt.S[i] = block[i*np : (i+1)*np : (i+1)*np]
	}
	if probes > 0 {
		pt.Probes = block[np*np+np : np*np+np : np*np+np+probes]
	}
	return pt
}

// pointStore hands out points carved in turn from blocks reserved for
// many of them, so that a caller keeping every point of many short sweeps
// (a study) makes two allocations per sweep instead of two per point.
// With nothing reserved, or the reservation used up, each point gets
// blocks of its own (newPointWithProbes). A nil store reserves nothing.
type pointStore struct {
	data []complex128
	rows [][]complex128
}

func (ps *pointStore) point(hz float64, np, probes int) Point {
	size := np*np + np + probes
	if ps == nil || len(ps.data) < size || len(ps.rows) < np {
		return newPointWithProbes(hz, np, probes)
	}
	block, rows := ps.data[:size:size], ps.rows[:np:np]
	ps.data, ps.rows = ps.data[size:], ps.rows[np:]
	return layoutPoint(hz, np, probes, block, rows)
}
