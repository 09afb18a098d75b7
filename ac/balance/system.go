package balance

import (
	"math"
	"math/cmplx"

	"qpoint/bias/band"
	"qpoint/smallsignal"
)

// system is the balance equations of one spectrum: for every product k,
//
//	F_k(X) = Y(jw_k) X_k + I_k(X) + jw_k Q_k(X) - B_k = 0,
//
// with X_k the unknowns' phasors at product k, I_k and Q_k the junctions'
// current and charge phasors (stamped into their nodes) and B_k the
// sources: the DC sources at k = 0 and the input generator's Norton
// current at each tone, scaled by the continuation parameter λ. At DC the
// phasors are real; the imaginary parts of the DC unknowns are carried
// with the equation Im X_0 = 0 so that every vector has the same complex
// layout, x[k·n + i].
type system struct {
	nw   *smallsignal.Network
	n    int
	lin  *linear
	spec *spectrum
	grid *grid
	js   []*junction

	dc, signal []complex128 // B = dc + λ signal
	lambda     float64

	// From the last residual evaluation: the weights that turn each
	// equation's error into multiples of its tolerance, and the scales
	// they came from.
	weight   []float64
	scale    []float64
	rounding []float64 // per unknown: the junctions' rounding scale (see residual)

	pre  *preconditioner
	tpre *timePreconditioner
	// tpreAge counts the Newton steps tpre has served since it was set
	// up, and tpreIters is the GMRES iterations of the last of them.
	tpreAge, tpreIters int
}

// Tolerances of the balance: an equation holds when its error is within
// relTol of the magnitudes of the currents meeting in it at that product,
// plus absRel of the rounding scale of the junctions at the node (the
// floor for a product that vanishes: the transforms mix the products, so
// their rounding at one product follows the largest current, and the
// largest charge times the highest frequency).
const (
	relTol = 1e-9
	absRel = 1e-13
)

func newSystem(nw *smallsignal.Network, lin *linear, spec *spectrum, js []*junction, input int, emf float64, gens []Generator) *system {
	n, P := nw.N, len(spec.products)
	sys := &system{nw: nw, n: n, lin: lin, spec: spec, grid: newGrid(spec), js: js}
	lin.setFrequencies(spec)
	sys.dc = make([]complex128, n*P)
	sys.signal = make([]complex128, n*P)
	for i, v := range nw.Sources {
		sys.dc[i] = complex(v, 0)
	}
	port := nw.Ports[input]
	norton := complex(emf/port.Impedance, 0)
	tones := [][2]int{{1, 0}}
	if spec.twoTone {
		tones = append(tones, [2]int{0, 1})
	}
	for _, t := range tones {
		k, _ := spec.index(t[0], t[1])
		if port.Node >= 0 {
			sys.signal[k*n+port.Node] += norton
		}
		if port.Return >= 0 {
			sys.signal[k*n+port.Return] -= norton
		}
	}
	stampGenerators(sys.signal, nw, spec, gens)
	sys.weight = make([]float64, n*P)
	sys.scale = make([]float64, n*P)
	sys.rounding = make([]float64, n)
	return sys
}

// residual evaluates F(x) into f, refreshes the weights and returns the
// largest weighted error (at most 1 where every equation holds) and false
// when the junction laws met a non-finite value.
func (sys *system) residual(x, f []complex128) (float64, bool) {
	n, P := sys.n, len(sys.spec.products)
	clear(f)
	clear(sys.scale)
	clear(sys.rounding)
	for k := 0; k < P; k++ {
		sys.lin.apply(k, x[k*n:(k+1)*n], f[k*n:(k+1)*n], sys.scale[k*n:(k+1)*n])
	}
	ok := evaluate(sys.grid, sys.js, x, n)
	wTop := 0.0
	for _, p := range sys.spec.products {
		wTop = math.Max(wTop, math.Abs(p.omega))
	}
	for _, j := range sys.js {
		// The transforms' rounding at any product follows the junction's
		// largest current, and its largest charge times the highest
		// frequency: the floor of the nodes it joins.
		var iMax, qMax float64
		for k, p := range sys.spec.products {
			c := j.i[k] + complex(0, p.omega)*j.q[k]
			j.stamp(f, k, n, c)
			m := cmplx.Abs(j.i[k]) + math.Abs(p.omega)*cmplx.Abs(j.q[k])
			if j.a >= 0 {
				sys.scale[k*n+j.a] += m
			}
			if j.b >= 0 {
				sys.scale[k*n+j.b] += m
			}
			iMax = math.Max(iMax, cmplx.Abs(j.i[k]))
			qMax = math.Max(qMax, cmplx.Abs(j.q[k]))
		}
		r := iMax + wTop*qMax
		if j.a >= 0 {
			sys.rounding[j.a] += r
		}
		if j.b >= 0 {
			sys.rounding[j.b] += r
		}
	}
	for e := range f {
		b := sys.dc[e] + complex(sys.lambda, 0)*sys.signal[e]
		f[e] -= b
		sys.scale[e] += cmplx.Abs(b)
	}
	for i := 0; i < n; i++ {
		f[i] = complex(real(f[i]), imag(x[i]))
	}
	// Weights.
	global := 0.0
	for _, s := range sys.scale {
		global = math.Max(global, s)
	}
	worst := 0.0
	for i := 0; i < n; i++ {
		floor := math.Max(absRel*sys.rounding[i], 1e-20*global+1e-300)
		for k := 0; k < P; k++ {
			e := k*n + i
			w := 1 / (relTol*sys.scale[e] + floor)
			if k == 0 {
				// Im X_0 = 0 is exact: weigh it like the real part.
				r := math.Abs(real(f[e])) * w
				if r > worst || math.IsNaN(r) {
					worst = r
				}
				sys.weight[e] = w
				continue
			}
			sys.weight[e] = w
			r := cmplx.Abs(f[e]) * w
			if r > worst || math.IsNaN(r) {
				worst = r
			}
		}
	}
	if math.IsNaN(worst) || math.IsInf(worst, 0) {
		ok = false
	}
	return worst, ok
}

// jacobian returns J dx, the derivative of F at the last evaluated point
// along dx: Y_k dx_k plus the conversion products (g(θ) dv(θ)) and
// jw_k (c(θ) dv(θ)) of every junction, taken on the grid (so exactly the
// derivative of the sampled residual).
func (sys *system) jacobian(dx, out []complex128) {
	n, P := sys.n, len(sys.spec.products)
	S := sys.spec.samples
	clear(out)
	for k := 0; k < P; k++ {
		sys.lin.apply(k, dx[k*n:(k+1)*n], out[k*n:(k+1)*n], nil)
	}
	vp, vp2 := make([]complex128, P), make([]complex128, P)
	dv1, dv2 := make([]float64, S), make([]float64, S)
	gi, cq := make([]float64, S), make([]float64, S)
	di, dq := make([]complex128, P), make([]complex128, P)
	js := sys.js
	apply := func(j *junction, dv []float64) {
		for s := range dv {
			gi[s] = j.g[s] * dv[s]
			cq[s] = j.c[s] * dv[s]
		}
		sys.grid.toPhasors(gi, cq, di, dq)
		for k, p := range sys.spec.products {
			j.stamp(out, k, n, di[k]+complex(0, p.omega)*dq[k])
		}
	}
	for a := 0; a < len(js); a += 2 {
		j1 := js[a]
		for k := range vp {
			vp[k] = j1.voltage(dx, k, n)
		}
		if a+1 < len(js) {
			j2 := js[a+1]
			for k := range vp2 {
				vp2[k] = j2.voltage(dx, k, n)
			}
			sys.grid.toTime(vp, vp2, dv1, dv2)
			apply(j1, dv1)
			apply(j2, dv2)
		} else {
			sys.grid.toTime(vp, nil, dv1, nil)
			apply(j1, dv1)
		}
	}
	for i := 0; i < n; i++ {
		out[i] = complex(real(out[i]), imag(dx[i]))
	}
}

// preconditioner holds the LU factors of the Jacobian restricted to a
// band of the products: the couplings between products whose artificial
// frequencies differ by at most width. At width 0 it is the network with
// each junction replaced by its time-averaged conductance and
// capacitance,
//
//	M_k = Y(jw_k) + Σ_junctions (ḡ + jw_k c̄),
//
// block-diagonal in the products and exact for a linear circuit; wider
// bands add the slow modulation of the junctions' conductance that a
// hard drive brings, and a band as wide as the spectrum is the Jacobian
// itself. The unknowns are ordered product by product, each product's
// nodes in reverse Cuthill-McKee order (bias/band), so the band of the
// real matrix is 2n·width + 2b + 1 wide for a node bandwidth b.
type preconditioner struct {
	width int
	m     *band.Matrix
	vec   []float64
}

// nodeBandwidth returns the reverse Cuthill-McKee order of the network's
// unknowns (junctions included) and the bandwidth it gives.
func (sys *system) nodeOrder() ([]int, int) {
	var extra [][2]int
	for _, j := range sys.js {
		if j.a >= 0 && j.b >= 0 {
			extra = append(extra, [2]int{j.a, j.b}, [2]int{j.b, j.a})
		}
	}
	edges := sys.lin.pattern(extra)
	perm := band.Order(sys.n, edges)
	kl, _ := band.Widths(perm, edges)
	return perm, kl
}

// preconditionerWidth returns the real band half-width for a product
// width.
func (sys *system) preconditionerWidth(width, nodeWidth int) int {
	return 2*sys.n*width + 2*nodeWidth + 1
}

// factorPreconditioner assembles and factors the band of the given
// product width at the last evaluated point.
func (sys *system) factorPreconditioner(width int) error {
	n, P := sys.n, len(sys.spec.products)
	if sys.pre == nil || sys.pre.width != width {
		nodePerm, nodeWidth := sys.nodeOrder()
		L := 2 * n * P
		perm := make([]int, L)
		for k := 0; k < P; k++ {
			for pos, i := range nodePerm {
				for part := 0; part < 2; part++ {
					perm[2*(k*n+pos)+part] = 2*(k*n+i) + part
				}
			}
		}
		w := min(sys.preconditionerWidth(width, nodeWidth), L-1)
		sys.pre = &preconditioner{width: width, m: band.New(perm, w, w), vec: make([]float64, L)}
	}
	m := sys.pre.m
	m.Zero()
	sys.assemble(width, m.Add)
	return m.Factor()
}

// precondition overwrites r with M⁻¹ r.
func (sys *system) precondition(r []complex128) {
	v := sys.pre.vec
	for e, z := range r {
		v[2*e], v[2*e+1] = real(z), imag(z)
	}
	sys.pre.m.Solve(v)
	for e := range r {
		r[e] = complex(v[2*e], v[2*e+1])
	}
}
