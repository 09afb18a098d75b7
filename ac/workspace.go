package ac

import (
	"gonum.org/v1/gonum/mat"

	"qpoint/smallsignal"
)

// Workspace keeps the storage of sweeps and distortion estimates from one
// call to the next: the dense LU factorisations of Y(jw), the solution and
// source vectors, and the estimate itself. Analysing a sequence of networks
// in one workspace, as a study does at each of its steps, allocates little
// beyond the points a sweep hands out, as long as the networks keep their
// size. The results are those of Sweep and Volterra.
//
// The zero value is ready to use. A Workspace is not safe for concurrent
// use: give each goroutine its own.
type Workspace struct {
	factors *lu       // Y(jw) of a sweep or estimate
	solver  luSolver  // factors as an estimate's solver
	dc      luSolver  // Y(0) of an estimate's DC product, DC blocks open
	gdc     mat.Dense // G with the DC blocks open

	// Sweep.
	store     pointStore // points reserved for the next sweep (ReservePoints)
	reference []float64
	ports     []PortInfo
	solutions [][]complex128 // one per port's excitation
	slope     []complex128   // dx/dw for the group delay
	// slopeElements is dY/dω x of the lines and blocks, for the group
	// delay.
	slopeElements []complex128

	// Volterra.
	volterra    volterra
	estimate    *Estimate
	frequencies []float64
	solution    []complex128 // first-order solution
	sources     []complex128 // a product's sources, then its solution
	current     []complex128 // per diode: a product's current-law source
	charge      []complex128 // and its charge-law source before the jw factor
	firstA      []complex128 // per diode: first-order junction phasor at f1
	firstB      []complex128 // and at f2
	second      []complex128 // second harmonic junction phasor
	shift       []complex128 // DC shift of the junction voltage
	stats       Stats        // how the last Sweep ran
	// keepDC is set during a VolterraSweep, whose estimates share one
	// network: the DC factorisation made for the first is kept
	// (dcFactored) for the rest.
	keepDC, dcFactored bool
	parts              []Contribution
}

// ReservePoints makes one allocation for the next Sweep's points: room for
// points points of ports ports and probes probe voltages each. The points
// that Sweep hands out are then carved from it, still the caller's to
// keep, instead of each having its own: a study keeping every point of
// its steps' short sweeps allocates per step, not per point. The
// reservation serves the next Sweep alone; what it does not use is
// dropped.
func (ws *Workspace) ReservePoints(points, ports, probes int) {
	ws.store = pointStore{
		data: make([]complex128, points*(ports*ports+ports+probes)),
		rows: make([][]complex128, points*ports),
	}
}

// factorization returns the workspace's LU for n unknowns.
func (ws *Workspace) factorization(n int) *lu {
	if ws.factors == nil || ws.factors.n != n {
		ws.factors = newLU(n)
	}
	return ws.factors
}

// dcSolver returns the workspace's solver at zero frequency loaded, not
// yet factored, with nw's conductance matrix with its DC blocks open
// (GDC).
func (ws *Workspace) dcSolver(nw *smallsignal.Network) *luSolver {
	if ws.dc.f == nil || ws.dc.f.n != nw.N {
		ws.dc.f = newLU(nw.N)
	}
	nw.GDCTo(&ws.gdc)
	g := ws.gdc.RawMatrix()
	ws.dc.f.loadReal(g.Data, g.Stride)
	nw.Stamp(0, ws.dc.f.a, ws.dc.f.n)
	return &ws.dc
}

// estimateSolver returns the solver for an estimate at freqsHz: the
// workspace's dense LU where newSolver would take a new one without trying
// the reduction (always, for the few frequencies of an estimate, unless
// choice forces the reduction), newSolver's choice otherwise.
func (ws *Workspace) estimateSolver(nw *smallsignal.Network, freqsHz []float64, choice engine) solver {
	if choice == engineLU || choice == engineAuto && !reducedPays(nw.N, len(freqsHz)) || nw.HasElements() {
		ws.solver = luSolver{f: ws.factorization(nw.N), g: nw.G.RawMatrix(), c: nw.C.RawMatrix(), nw: elementsOf(nw)}
		return &ws.solver
	}
	return newSolver(nw, freqsHz, choice)
}

// vector returns a zero vector of n complex numbers, in v's storage when
// it has room.
func vector(v []complex128, n int) []complex128 {
	if cap(v) < n {
		return make([]complex128, n)
	}
	v = v[:n]
	clear(v)
	return v
}
