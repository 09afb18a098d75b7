package balance

import (
	"errors"
	"math"
)

// timePreconditioner solves the Newton equations of a one-tone balance
// approximately in the time domain: the linearised circuit
//
//	(G + g(t)) dx + d/dt ((C + c(t)) dx) = r(t),   dx periodic,
//
// with d/dt replaced by the backward difference on the balance's own time
// grid: a cyclic block-bidiagonal system. The period is cut into segments
// over which the step-to-step propagator A_s⁻¹ B_(s-1) grows by at most
// segmentGrowth (a junction switching off multiplies its voltage by the
// fall of its capacitance), each segment's propagator is formed, and the
// cycle of segment states is solved densely with pivoting (multiple
// shooting: Aprille and Trick 1972 close the period with the same
// propagator). The junctions' conductance and capacitance enter sample by
// sample, so the switching that defeats a frequency-domain
// preconditioner is held exactly; what differs from the balance's
// Jacobian is the difference quotient, (1 - e^(-jωh))/h in place of jω
// (within 45° and 10 % at the top harmonic), and the DC block of
// AC-coupled ports, which stays a termination here. GMRES removes both.
// It costs O(S n³) to set up and O(S n²) to apply, for S samples, so it
// serves circuits of modest size.
type timePreconditioner struct {
	n, S int
	lu   []denseLU // A_s = G(t_s) + C(t_s)/h
	// B_s = C(t_s)/h, kept sparse: the lumped capacitances' entries
	// (compressed rows of the linear part, each over h) and each
	// junction's capacitance over h at every sample. Dense, it was an
	// n×n matrix a sample, as much memory again as the factors, and its
	// products scanned every entry.
	rowPtr, cols []int
	cOverH       []float64
	junctions    []timeJunction
	segments     [][2]int    // first and last sample of each segment
	cycle        denseLU     // the segment states' cyclic system
	rt           [][]float64 // work: r(t_s) per unknown
	xt           [][]float64 // work: dx(t_s) per unknown
	tmp          []float64
}

// timeJunction is one junction's share of B_s: its capacitance over h at
// every sample, between unknowns a and b (either may be ground, -1).
type timeJunction struct {
	a, b int
	c    []float64
}

// mulPrev sets y = B_s x.
func (tp *timePreconditioner) mulPrev(s int, x, y []float64) {
	for i := 0; i < tp.n; i++ {
		var sum float64
		for e := tp.rowPtr[i]; e < tp.rowPtr[i+1]; e++ {
			sum += tp.cOverH[e] * x[tp.cols[e]]
		}
		y[i] = sum
	}
	for _, j := range tp.junctions {
		c := j.c[s]
		var v float64
		if j.a >= 0 {
			v = x[j.a]
		}
		if j.b >= 0 {
			v -= x[j.b]
		}
		if j.a >= 0 {
			y[j.a] += c * v
		}
		if j.b >= 0 {
			y[j.b] -= c * v
		}
	}
}

// timeDomainLimit is the largest network the time-domain preconditioner
// takes; its set-up grows as n³ per sample.
const timeDomainLimit = 60

// segmentGrowth bounds the growth of a segment's propagator, so that its
// columns keep their digits.
const segmentGrowth = 1e4

var errSingularStep = errors.New("a time step's matrix is singular")

// maxCycle bounds the segment states' dense system; a circuit that needs
// more (its propagator growing by decades at many steps) is left to the
// frequency-domain preconditioner.
const maxCycle = 600

var errManySegments = errors.New("the period needs too many segments")

// factorTime sets up the time-domain preconditioner at the last evaluated
// point.
func (sys *system) factorTime() error {
	n, S := sys.n, sys.spec.samples
	tp := sys.tpre
	if tp == nil || tp.S != S {
		tp = &timePreconditioner{n: n, S: S, lu: make([]denseLU, S),
			rt: make([][]float64, n), xt: make([][]float64, n), tmp: make([]float64, n)}
		for s := range tp.lu {
			tp.lu[s] = newDenseLU(n)
		}
		for i := range tp.rt {
			tp.rt[i] = make([]float64, S)
			tp.xt[i] = make([]float64, S)
		}
		tp.junctions = make([]timeJunction, len(sys.js))
		for k, jn := range sys.js {
			tp.junctions[k] = timeJunction{a: jn.a, b: jn.b, c: make([]float64, S)}
		}
		sys.tpre = tp
	}
	h := 2 * math.Pi / (sys.spec.wGrid * float64(S))
	lin := sys.lin
	tp.rowPtr, tp.cols = lin.rowPtr, lin.cols
	if len(tp.cOverH) != len(lin.c) {
		tp.cOverH = make([]float64, len(lin.c))
	}
	for e, c := range lin.c {
		tp.cOverH[e] = c / h
	}
	for k, jn := range sys.js {
		for s := range S {
			tp.junctions[k].c[s] = jn.c[s] / h
		}
	}
	for s := 0; s < S; s++ {
		a := tp.lu[s].a
		clear(a)
		for i := 0; i < n; i++ {
			for e := lin.rowPtr[i]; e < lin.rowPtr[i+1]; e++ {
				a[i*n+lin.cols[e]] += lin.g[e] + lin.c[e]/h
			}
		}
		for _, jn := range sys.js {
			v := jn.g[s] + jn.c[s]/h
			if jn.a >= 0 {
				a[jn.a*n+jn.a] += v
			}
			if jn.b >= 0 {
				a[jn.b*n+jn.b] += v
			}
			if jn.a >= 0 && jn.b >= 0 {
				a[jn.a*n+jn.b] -= v
				a[jn.b*n+jn.a] -= v
			}
		}
		if err := tp.lu[s].factor(); err != nil {
			return err
		}
	}
	// Segments and their propagators Φ_m, column by column.
	tp.segments = tp.segments[:0]
	var phis [][]float64
	phi := make([]float64, n*n)
	col, next := make([]float64, n), make([]float64, n)
	first := 0
	for first < S {
		for i := range phi {
			phi[i] = 0
		}
		for i := 0; i < n; i++ {
			phi[i*n+i] = 1
		}
		last := first
		for s := first; s < S; s++ {
			grown := 0.0
			for j := 0; j < n; j++ {
				for i := 0; i < n; i++ {
					col[i] = phi[i*n+j]
				}
				tp.mulPrev((s+S-1)%S, col, next)
				tp.lu[s].solve(next)
				for i := 0; i < n; i++ {
					phi[i*n+j] = next[i]
					grown = math.Max(grown, math.Abs(next[i]))
				}
			}
			if math.IsNaN(grown) || math.IsInf(grown, 0) {
				return errSingularStep
			}
			last = s
			if grown > segmentGrowth {
				break
			}
		}
		tp.segments = append(tp.segments, [2]int{first, last})
		phis = append(phis, append([]float64(nil), phi...))
		first = last + 1
	}
	// Cycle: y_(m+1) - Φ_m y_m = ψ_m, with y_M = y_0.
	M := len(tp.segments)
	N := M * n
	if N > maxCycle {
		return errManySegments
	}
	if len(tp.cycle.a) != N*N {
		tp.cycle = newDenseLU(N)
	}
	c := tp.cycle.a
	clear(c)
	for m := 0; m < M; m++ {
		row := ((m + 1) % M) * n
		for i := 0; i < n; i++ {
			c[(row+i)*N+row+i] += 1
			for j := 0; j < n; j++ {
				c[(row+i)*N+m*n+j] -= phis[m][i*n+j]
			}
		}
	}
	return tp.cycle.factor()
}

// propagate runs dx_s = A_s⁻¹ (r_s + B_(s-1) dx_(s-1)) over samples
// first..last from dx_(first-1) = x (overwritten with dx_last), writing
// the samples into tp.xt.
func (tp *timePreconditioner) propagate(first, last int, x []float64) {
	n, S := tp.n, tp.S
	v := tp.tmp
	for s := first; s <= last; s++ {
		tp.mulPrev((s+S-1)%S, x, v)
		for i := 0; i < n; i++ {
			v[i] += tp.rt[i][s]
		}
		tp.lu[s].solve(v)
		for i := 0; i < n; i++ {
			tp.xt[i][s] = v[i]
		}
		copy(x, v)
	}
}

// preconditionTime overwrites the phasors r with the time-domain
// solution's phasors.
func (sys *system) preconditionTime(r []complex128) {
	tp := sys.tpre
	n, P := sys.n, len(sys.spec.products)
	dcIm := make([]float64, n)
	p1, p2 := make([]complex128, P), make([]complex128, P)
	for i := 0; i < n; i += 2 {
		for k := 0; k < P; k++ {
			p1[k] = r[k*n+i]
		}
		dcIm[i] = imag(r[i])
		if i+1 < n {
			for k := 0; k < P; k++ {
				p2[k] = r[k*n+i+1]
			}
			dcIm[i+1] = imag(r[i+1])
			sys.grid.toTime(p1, p2, tp.rt[i], tp.rt[i+1])
		} else {
			sys.grid.toTime(p1, nil, tp.rt[i], nil)
		}
	}
	M := len(tp.segments)
	y := make([]float64, M*n)
	x := make([]float64, n)
	for m, seg := range tp.segments {
		clear(x)
		tp.propagate(seg[0], seg[1], x)
		copy(y[((m+1)%M)*n:], x)
	}
	tp.cycle.solve(y)
	for m, seg := range tp.segments {
		copy(x, y[m*n:(m+1)*n])
		tp.propagate(seg[0], seg[1], x)
	}
	for i := 0; i < n; i += 2 {
		if i+1 < n {
			sys.grid.toPhasors(tp.xt[i], tp.xt[i+1], p1, p2)
			for k := 0; k < P; k++ {
				r[k*n+i], r[k*n+i+1] = p1[k], p2[k]
			}
		} else {
			sys.grid.toPhasors(tp.xt[i], make([]float64, tp.S), p1, p2)
			for k := 0; k < P; k++ {
				r[k*n+i] = p1[k]
			}
		}
	}
	for i := 0; i < n; i++ {
		r[i] = complex(real(r[i]), dcIm[i])
	}
}

// denseLU is a small dense real LU with partial pivoting, in place.
type denseLU struct {
	n   int
	a   []float64
	piv []int
}

func newDenseLU(n int) denseLU {
	return denseLU{n: n, a: make([]float64, n*n), piv: make([]int, n)}
}

func (f *denseLU) factor() error {
	n, a := f.n, f.a
	for k := 0; k < n; k++ {
		p, big := k, math.Abs(a[k*n+k])
		for i := k + 1; i < n; i++ {
			if v := math.Abs(a[i*n+k]); v > big {
				p, big = i, v
			}
		}
		f.piv[k] = p
		if big == 0 || math.IsNaN(big) || math.IsInf(big, 0) {
			return errSingularStep
		}
		if p != k {
			// Only the active columns: the multipliers stay where their
			// step left them, as solve applies the interchanges step by
			// step.
			for j := k; j < n; j++ {
				a[k*n+j], a[p*n+j] = a[p*n+j], a[k*n+j]
			}
		}
		inv := 1 / a[k*n+k]
		for i := k + 1; i < n; i++ {
			l := a[i*n+k] * inv
			a[i*n+k] = l
			if l == 0 {
				continue
			}
			for j := k + 1; j < n; j++ {
				a[i*n+j] -= l * a[k*n+j]
			}
		}
	}
	return nil
}

func (f *denseLU) solve(b []float64) {
	n, a := f.n, f.a
	for k := 0; k < n; k++ {
		if p := f.piv[k]; p != k {
			b[k], b[p] = b[p], b[k]
		}
		for i := k + 1; i < n; i++ {
			b[i] -= a[i*n+k] * b[k]
		}
	}
	for k := n - 1; k >= 0; k-- {
		s := b[k]
		for j := k + 1; j < n; j++ {
			s -= a[k*n+j] * b[j]
		}
		b[k] = s / a[k*n+k]
	}
}
