package nonlinear

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"

	"qpoint/bias/diode"
	"qpoint/smallsignal"
)

// System is the nonlinear circuit f(x, t) + dq(x)/dt = 0 of a linearised
// network's unknowns (see the package comment), driven at one port.
type System struct {
	Network *smallsignal.Network
	N       int // unknowns
	// Input is the index of the port whose generator carries the EMF e
	// given to Eval; -1 for none.
	Input int
	// Blocked lists the AC-coupled ports: port Blocked[k]'s DC block holds
	// the constant voltage p[k] of Eval.
	Blocked []int
	// Dynamic marks the rows whose charge depends on some unknown: a
	// capacitor, an inductor's flux or a junction with charge. The other
	// rows are algebraic: f = 0 holds on them at every instant.
	Dynamic []bool
	// G and C are the linear parts, row-major N×N; G gains the constant
	// conductances of AddConductance.
	G, C []float64
}

// New returns the system of nw driven at port input (-1 for none).
func New(nw *smallsignal.Network, input int) *System {
	n := nw.N
	s := &System{Network: nw, N: n, Input: input}
	for i, p := range nw.Ports {
		if p.ACCoupled {
			s.Blocked = append(s.Blocked, i)
		}
	}
	s.G = append([]float64(nil), nw.GLinear.RawMatrix().Data...)
	s.C = append([]float64(nil), nw.CLinear.RawMatrix().Data...)
	s.Dynamic = make([]bool, n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if s.C[i*n+j] != 0 {
				s.Dynamic[i] = true
			}
		}
	}
	for _, d := range nw.Diodes {
		if d.Device.ZeroBiasCapacitance > 0 || d.Device.Params.TransitTime > 0 {
			if d.Junction >= 0 {
				s.Dynamic[d.Junction] = true
			}
			if d.Cathode >= 0 {
				s.Dynamic[d.Cathode] = true
			}
		}
	}
	return s
}

// AddConductance adds a constant conductance g between unknowns a and b
// (smallsignal.Ground for the reference node) to the linear part G, as a
// line's characteristic admittance in the method of characteristics is.
func (s *System) AddConductance(a, b int, g float64) {
	stampJ(s.G, s.N, a, b, g)
}

// BlockVoltages returns the DC-block voltages that hold state x at rest:
// each AC-coupled port's block carries minus the port's voltage, so that
// no current flows through its termination.
func (s *System) BlockVoltages(x []float64) []float64 {
	p := make([]float64, len(s.Blocked))
	for k, i := range s.Blocked {
		p[k] = -s.PortVoltage(i, x)
	}
	return p
}

// PortVoltage returns the voltage across port i in state x.
func (s *System) PortVoltage(i int, x []float64) float64 {
	pt := s.Network.Ports[i]
	v := 0.0
	if pt.Node >= 0 {
		v += x[pt.Node]
	}
	if pt.Return >= 0 {
		v -= x[pt.Return]
	}
	return v
}

// PortCurrent returns the current that port i's termination drives into
// the circuit at its node, (e - p - v)/Z0, for the generator's EMF e
// (zero at any port but the input) and the port's DC-block voltage p
// (zero for a DC-coupled port).
func (s *System) PortCurrent(i int, x []float64, emf float64, p []float64) float64 {
	e := 0.0
	if i == s.Input {
		e = emf
	}
	for k, b := range s.Blocked {
		if b == i {
			e -= p[k]
		}
	}
	return (e - s.PortVoltage(i, x)) / s.Network.Ports[i].Impedance
}

// JunctionVoltage returns diode d's intrinsic junction voltage in x.
func JunctionVoltage(x []float64, d smallsignal.Diode) float64 {
	v := 0.0
	if d.Junction >= 0 {
		v += x[d.Junction]
	}
	if d.Cathode >= 0 {
		v -= x[d.Cathode]
	}
	return v
}

// TerminalVoltage returns diode d's voltage at its terminals in x, anode
// minus cathode.
func TerminalVoltage(x []float64, d smallsignal.Diode) float64 {
	v := 0.0
	if d.Anode >= 0 {
		v += x[d.Anode]
	}
	if d.Cathode >= 0 {
		v -= x[d.Cathode]
	}
	return v
}

// drivePort adds to f a voltage v in series with port i's reference
// impedance: the Norton current v/Z0 enters the port node.
func (s *System) drivePort(f []float64, i int, v float64) {
	pt := s.Network.Ports[i]
	j := v / pt.Impedance
	if pt.Node >= 0 {
		f[pt.Node] -= j
	}
	if pt.Return >= 0 {
		f[pt.Return] += j
	}
}

// Eval computes f(x) = G x + i_d(x) - b_dc - b_in(emf, p) and q(x) =
// C x + q_d(x), and, if jg and jc are not nil, their Jacobians G(x) and
// C(x) (row-major N×N). emf is the input generator's EMF at this
// instant, p the DC-block voltages. With vl not nil, each junction's
// current and charge are taken on their tangents at the junction voltage
// vl[k] instead of at x: i(vl) + g(vl) (v - vl), so that a Newton step can
// stand on a limited junction voltage whatever nodes the junction joins.
func (s *System) Eval(x []float64, emf float64, p []float64, f, q, jg, jc, vl []float64) {
	s.eval(x, emf, p, f, q, jg, jc, vl, nil)
}

// eval is Eval, also leaving each junction's current in currents when
// it is not nil (and vl is nil).
func (s *System) eval(x []float64, emf float64, p []float64, f, q, jg, jc, vl, currents []float64) {
	n := s.N
	for i := 0; i < n; i++ {
		var fs, qs float64
		row := i * n
		for j := 0; j < n; j++ {
			fs += s.G[row+j] * x[j]
			qs += s.C[row+j] * x[j]
		}
		f[i] = fs - s.Network.Sources[i]
		q[i] = qs
	}
	if jg != nil {
		copy(jg, s.G)
		copy(jc, s.C)
	}
	// The input generator, and every DC block's constant voltage in
	// series with its port's reference impedance.
	inputBlocked := false
	for k, i := range s.Blocked {
		v := -p[k]
		if i == s.Input {
			v, inputBlocked = emf-p[k], true
		}
		s.drivePort(f, i, v)
	}
	if !inputBlocked && s.Input >= 0 {
		s.drivePort(f, s.Input, emf)
	}
	for k, d := range s.Network.Diodes {
		v := JunctionVoltage(x, d)
		var i, qd diode.Law
		if vl != nil {
			u := vl[k]
			i, qd = d.Device.Laws(u)
			i.Value += i.D1 * (v - u)
			qd.Value += qd.D1 * (v - u)
		} else {
			i, qd = d.Device.Laws(v)
			if currents != nil {
				currents[k] = i.Value
			}
		}
		stamp2(f, q, d.Junction, d.Cathode, i.Value, qd.Value)
		if jg != nil {
			stampJ(jg, n, d.Junction, d.Cathode, i.D1)
			stampJ(jc, n, d.Junction, d.Cathode, qd.D1)
		}
	}
}

func stamp2(f, q []float64, a, b int, i, c float64) {
	if a >= 0 {
		f[a] += i
		q[a] += c
	}
	if b >= 0 {
		f[b] -= i
		q[b] -= c
	}
}

func stampJ(m []float64, n, a, b int, g float64) {
	if a >= 0 {
		m[a*n+a] += g
	}
	if b >= 0 {
		m[b*n+b] += g
	}
	if a >= 0 && b >= 0 {
		m[a*n+b] -= g
		m[b*n+a] -= g
	}
}

// Work is the storage of implicit steps: after Step it holds f, q and
// the Jacobians at the solution, and Factor's LU.
type Work struct {
	F, Q   []float64
	JG, JC []float64 // G(x), C(x), row-major N×N
	// Currents holds each junction's current at the solution.
	Currents []float64
	// Bound, when not nil, is a second test of Step's: converged also
	// when |dx_i| <= Bound[i] on every node voltage.
	Bound []float64
	Jac   blas64.General
	Ipiv  []int
	dx    blas64.General
	vl    []float64
}

// NewWork returns storage for s's steps.
func (s *System) NewWork() *Work {
	n := s.N
	return &Work{
		F: make([]float64, n), Q: make([]float64, n),
		JG: make([]float64, n*n), JC: make([]float64, n*n),
		Jac:  blas64.General{Rows: n, Cols: n, Stride: n, Data: make([]float64, n*n)},
		Ipiv: make([]int, n),
		dx:   blas64.General{Rows: n, Cols: 1, Stride: 1, Data: make([]float64, n)},
		vl:   make([]float64, len(s.Network.Diodes)),

		Currents: make([]float64, len(s.Network.Diodes)),
	}
}

// smallN is the largest system Factor factors by its own loops rather than
// LAPACK's dgetrf: below LAPACK's block size dgetrf runs the same
// unblocked elimination (dgetf2), and for a handful of unknowns the cost
// is the BLAS calls per column, not the arithmetic.
const smallN = 24

// Factor loads J = G(x) + a C(x) on dynamic rows, G(x) on algebraic ones,
// from w's last evaluation, and factors it in place by Gaussian
// elimination with partial pivoting: LAPACK's dgetrf (without the
// condition estimate a mat.LU makes, which nothing here reads), or for at
// most smallN unknowns the same elimination in plain loops that skip zero
// multipliers. It reports false for an exactly zero pivot.
func (s *System) Factor(a float64, w *Work) bool {
	n := s.N
	for i := 0; i < n; i++ {
		row := w.Jac.Data[i*n : (i+1)*n]
		copy(row, w.JG[i*n:(i+1)*n])
		if s.Dynamic[i] {
			for j, c := range w.JC[i*n : (i+1)*n] {
				row[j] += a * c
			}
		}
	}
	if n <= smallN {
		return factorSmall(w.Jac.Data, n, w.Ipiv)
	}
	return lapack64.Getrf(w.Jac, w.Ipiv)
}

// Solve overwrites b (N × cols, row-major) with J⁻¹ b for the matrix
// Factor last factored.
func (s *System) Solve(b blas64.General, w *Work) {
	if s.N <= smallN {
		solveSmall(w.Jac.Data, s.N, w.Ipiv, b.Data, b.Cols, b.Stride)
		return
	}
	lapack64.Getrs(blas.NoTrans, w.Jac, b, w.Ipiv)
}

// factorSmall factors the n×n row-major a in place into P A = L U, L unit
// lower triangular below the diagonal and U on and above it, choosing as
// pivot the first entry of largest magnitude in each column (as dgetf2
// does); ipiv[j] is the row swapped with row j. It reports false for a
// zero pivot.
func factorSmall(a []float64, n int, ipiv []int) bool {
	for j := 0; j < n; j++ {
		p, big := j, math.Abs(a[j*n+j])
		for i := j + 1; i < n; i++ {
			if v := math.Abs(a[i*n+j]); v > big {
				p, big = i, v
			}
		}
		ipiv[j] = p
		if big == 0 {
			return false
		}
		if p != j {
			rj, rp := a[j*n:(j+1)*n], a[p*n:(p+1)*n]
			for k := range rj {
				rj[k], rp[k] = rp[k], rj[k]
			}
		}
		rj := a[j*n : (j+1)*n]
		r := 1 / rj[j]
		for i := j + 1; i < n; i++ {
			ri := a[i*n : (i+1)*n]
			l := ri[j] * r
			ri[j] = l
			if l == 0 {
				continue
			}
			for k := j + 1; k < n; k++ {
				ri[k] -= l * rj[k]
			}
		}
	}
	return true
}

// solveSmall overwrites b (n × cols, row stride stride) with A⁻¹ b for
// the factors of factorSmall.
func solveSmall(a []float64, n int, ipiv []int, b []float64, cols, stride int) {
	row := func(i int) []float64 { return b[i*stride : i*stride+cols] }
	for j := 0; j < n; j++ {
		if p := ipiv[j]; p != j {
			bj, bp := row(j), row(p)
			for k := range bj {
				bj[k], bp[k] = bp[k], bj[k]
			}
		}
	}
	for i := 1; i < n; i++ {
		bi := row(i)
		for k, l := range a[i*n : i*n+i] {
			if l == 0 {
				continue
			}
			for c, v := range row(k) {
				bi[c] -= l * v
			}
		}
	}
	for i := n - 1; i >= 0; i-- {
		bi := row(i)
		for k := i + 1; k < n; k++ {
			u := a[i*n+k]
			if u == 0 {
				continue
			}
			for c, v := range row(k) {
				bi[c] -= u * v
			}
		}
		d := a[i*n+i]
		for c := range bi {
			bi[c] /= d
		}
	}
}

// The ways a step's Newton solve fails.
var (
	ErrSingular      = errors.New("singular step matrix")
	ErrDiverged      = errors.New("the waveform diverged")
	ErrNoConvergence = errors.New("no convergence within a time step")
)

// Step solves one implicit step,
//
//	F(x) = f(x, emf) + a (q(x) - qBase) + extra = 0,
//
// the middle term on dynamic rows only, by Newton's method from the guess
// in x, which it overwrites with the solution; extra may be nil. Each
// junction's law is taken on its tangent at a limited junction voltage
// (diode.Device.Limit), so an iteration cannot overshoot the exponential.
// Converged means an update of the node voltages below tol relative to
// their size (plus 1e-3 V) or, when w.Bound is set, within it, or, since Newton converges quadratically
// until rounding stops it, an update below 1e-10 relative (or 1e-10 of
// the largest voltage) that no longer shrinks. On return w holds f, q and
// the Jacobians evaluated exactly at the solution. It returns the
// iterations taken.
func (s *System) Step(x []float64, a float64, qBase, extra []float64, emf float64, p []float64, tol float64, maxIter int, w *Work) (int, error) {
	n := s.N
	for k, d := range s.Network.Diodes {
		w.vl[k] = JunctionVoltage(x, d)
	}
	prevWorst := math.Inf(1)
	for it := 1; it <= maxIter; it++ {
		s.Eval(x, emf, p, w.F, w.Q, w.JG, w.JC, w.vl)
		for i := 0; i < n; i++ {
			r := w.F[i]
			if s.Dynamic[i] {
				r += a * (w.Q[i] - qBase[i])
			}
			if extra != nil {
				r += extra[i]
			}
			w.dx.Data[i] = -r
		}
		if !s.Factor(a, w) {
			return it, ErrSingular
		}
		s.Solve(w.dx, w)
		// Judge the step on the node voltages: branch currents follow
		// from them and can carry the rounding of a milliohm part.
		worst, moved, vmax := 0.0, 0.0, 0.0
		nodes := s.Network.NodeUnknowns
		within := true
		for i := 0; i < n; i++ {
			nx := x[i] + w.dx.Data[i]
			if math.IsNaN(nx) || math.IsInf(nx, 0) {
				return it, ErrDiverged
			}
			if i < nodes {
				d := math.Abs(w.dx.Data[i])
				worst = math.Max(worst, d/(math.Abs(nx)+1e-3))
				moved = math.Max(moved, d)
				vmax = math.Max(vmax, math.Abs(nx))
				if w.Bound != nil && d > w.Bound[i] {
					within = false
				}
			}
			x[i] = nx
		}
		// A node near 0 V beside nodes at volts moves by their
		// rounding, which can cycle at 1e-10 of its own size: an
		// update that no longer shrinks and is below 1e-10 of the
		// largest voltage is at the rounding level too.
		small := worst <= tol || ((worst <= 1e-10 || moved <= 1e-10*(vmax+1e-3)) && worst > prevWorst/4)
		if w.Bound != nil {
			small = within || small
		}
		prevWorst = worst
		// Junction-voltage limiting keeps a step from overshooting the
		// exponential: the next iteration takes each junction on its
		// tangent at the limited voltage, as the DC solver does, rather
		// than moving a node (which the junction may share with sources
		// and other junctions, or which may be gnd).
		limited := false
		for k, d := range s.Network.Diodes {
			lv, lim := d.Device.Limit(JunctionVoltage(x, d), w.vl[k])
			w.vl[k] = lv
			limited = limited || lim
		}
		if small && !limited {
			s.eval(x, emf, p, w.F, w.Q, w.JG, w.JC, nil, w.Currents)
			return it, nil
		}
	}
	return maxIter, ErrNoConvergence
}
