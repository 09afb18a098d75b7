package ac

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/blas/blas64"

	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// engine names the linear solver behind an analysis over many
// frequencies.
type engine int

const (
	// engineAuto chooses by cost: the reduction when it pays and checks
	// out, the dense LU otherwise.
	engineAuto engine = iota
	// engineLU factors Y(jw) = G + jwC densely at every frequency: O(n³)
	// per point, nothing shared.
	engineLU
	// engineReduced reduces (G, C) once (see reduction for the forms) and
	// solves each frequency in O(n²); it still falls back to the LU when
	// no form passes its accuracy check.
	engineReduced
)

// The engine choice. The reduction costs O(n³) once and each point
// O(n²); the LU costs O(n³) at every point. Both the reduction and the
// LU point grow as n³, so the point count at which the reduction pays for
// itself depends little on n: from BenchmarkEngines (BENCHMARKS.md), the
// setup (reduction and accuracy check) over the LU's cost per point less
// the reduced point's is 6 to 46 points for n = 20 to 500, the most at
// n = 20 (the Hessenberg-triangular form alone had measured 21 to 43).
// Below minReducedN unknowns every method takes microseconds and the LU,
// which needs no setup, is kept.
const (
	minReducedPoints = 48
	minReducedN      = 12
)

// reducedPays reports whether a sweep of points frequencies of a network
// of n unknowns is cheaper with the one-time reduction.
func reducedPays(n, points int) bool {
	return n >= minReducedN && points >= minReducedPoints
}

// Accuracy of the reduced engine, checked before a sweep at its lowest,
// middle (geometric) and highest frequency: each reported quantity must
// agree with the same quantity computed from solutions improved by one
// step of iterative refinement to checkRel of its size (plus checkFloor of
// its natural scale, for quantities that vanish), or the sweep runs on the
// LU. The refinement's correction is the estimate of the reduced solve's
// error; checkRel is one tenth of the 1e-9 the tests hold the two engines
// to.
const (
	checkRel   = 1e-10
	checkFloor = 1e-12
)

// sweepRange returns the lowest and highest |f| of a sweep, zero
// frequencies left out, and false if there are none.
func sweepRange(freqsHz []float64) (lo, hi float64, ok bool) {
	lo, hi = math.Inf(1), 0
	for _, f := range freqsHz {
		f = math.Abs(f)
		if f == 0 || math.IsNaN(f) || math.IsInf(f, 0) {
			continue
		}
		lo, hi = math.Min(lo, f), math.Max(hi, f)
	}
	return lo, hi, hi > 0
}

// reductionForm names the two forms of a reduction (see reduction).
type reductionForm int

const (
	formShifted reductionForm = iota
	formSchur
	formTriangular
)

func (f reductionForm) String() string {
	switch f {
	case formShifted:
		return "shifted"
	case formSchur:
		return "shifted Schur"
	}
	return "Hessenberg-triangular"
}

// reduceFor reduces nw in the given form for a sweep over [lo, hi] Hz,
// balancing (and, in the shifted form, shifting) at the geometric middle
// of the range in rad/s.
func reduceFor(nw *smallsignal.Network, lo, hi float64, form reductionForm) (*reduction, error) {
	wRef := 2 * math.Pi * math.Sqrt(lo*hi)
	if form != formTriangular {
		return reduceShifted(nw.G, nw.C, wRef, form == formSchur)
	}
	return reduceTriangular(nw.G, nw.C, wRef)
}

// maxShiftedDecades is the widest sweep, in decades, that tries the
// shifted form first. On random networks (ac/reduce_test.go) the shifted
// form passed its accuracy check as often as the Hessenberg-triangular one
// over 3 to 6 decades (99 to 100 of 100 each), and far less often over
// the whole 15 decades from 1 mHz to 1 THz (25 of 100, against 96): one
// shift cannot suit frequencies that far from it.
const maxShiftedDecades = 6

// schurPointsPerUnknown sets when the Schur form pays: its setup costs
// about three times the shifted form's and each point about half, so it
// is taken for sweeps of at least this many points per unknown
// (BenchmarkForms, BENCHMARKS.md).
const schurPointsPerUnknown = 3

// reduceAccurate returns the first reduction of nw for a sweep of points
// frequencies over [lo, hi] Hz that can be made and passes accurate, nil
// if no form does: the shifted form first (the cheaper), the
// Hessenberg-triangular one first for sweeps wider than
// maxShiftedDecades, and the Schur form before both for sweeps long
// enough to repay it (schurPointsPerUnknown).
func reduceAccurate(nw *smallsignal.Network, lo, hi float64, points int, accurate func(*reduction) bool) *reduction {
	r, _ := reduceAccurateTried(nw, lo, hi, points, accurate)
	return r
}

// reduceAccurateTried is reduceAccurate that also returns the forms it
// tried and refused (their reduction failed, or their accuracy check).
func reduceAccurateTried(nw *smallsignal.Network, lo, hi float64, points int, accurate func(*reduction) bool) (*reduction, []Engine) {
	var refused []Engine
	forms := []reductionForm{formShifted, formTriangular}
	if hi > lo*math.Pow(10, maxShiftedDecades) {
		forms[0], forms[1] = forms[1], forms[0]
	} else if points >= schurPointsPerUnknown*nw.N {
		forms = append([]reductionForm{formSchur}, forms...)
	}
	for _, form := range forms {
		if r, err := reduceFor(nw, lo, hi, form); err == nil && accurate(r) {
			return r, refused
		}
		refused = append(refused, form.engine())
	}
	return nil, refused
}

// Engine names a method that solves Y(jw) x = b over a sweep.
type Engine string

// The engines.
const (
	EngineLU         Engine = "LU"                         // a complex LU of Y(jw) per point, O(n³)
	EngineSchur      Engine = "shifted Schur form"         // reduction of K⁻¹C to real Schur form, O(n²) a point
	EngineHessenberg Engine = "shifted Hessenberg form"    // reduction of K⁻¹C to Hessenberg form, O(n²) a point
	EngineTriangular Engine = "Hessenberg-triangular form" // QR and Dgghrd of (G, C), O(n²) a point
)

func (f reductionForm) engine() Engine {
	switch f {
	case formSchur:
		return EngineSchur
	case formTriangular:
		return EngineTriangular
	}
	return EngineHessenberg
}

// Stats says how a sweep ran: the engine that solved its first point,
// how many points each engine solved, and the reduction forms that were
// tried and refused by their accuracy check before it.
type Stats struct {
	Engine  Engine
	Reduced int // points solved on a reduction
	LU      int // points solved by the LU
	Refused []Engine
	// Elements names the lines and measured blocks that kept the sweep
	// on the LU: their rows depend on frequency other than as G + sC,
	// so (G, C) holds no reduction of the network.
	Elements []string
}

// checkFrequencies returns the frequencies the accuracy check probes:
// the ends of the range and points between them evenly spaced on a log
// scale, at least one (the geometric middle) and one per decade of range
// beyond two. A reduction's error varies with frequency (both forms are
// balanced, and the shifted one shifted, at the middle of the range), so
// wide sweeps are probed more densely.
func checkFrequencies(lo, hi float64) []float64 {
	decades := math.Log10(hi / lo)
	if !(decades > 0) || math.IsInf(decades, 0) {
		return []float64{lo}
	}
	inner := max(1, int(math.Ceil(decades))-1)
	f := []float64{lo}
	for k := 1; k <= inner; k++ {
		f = append(f, lo*math.Pow(hi/lo, float64(k)/float64(inner+1)))
	}
	return append(f, hi)
}

// refine returns x for Y(jw) x = b (or Y(jw)ᵀ x = b with transpose) by
// the reduced engine (factored at w) after one step of iterative
// refinement, x + Y⁻¹ (b - Y x), the residual taken with the network's own
// G and C.
func (r *reduction) refine(w float64, b []complex128, transpose bool) []complex128 {
	solve, residual := r.solve, r.pencil.residual
	if transpose {
		solve, residual = r.solveT, r.pencil.residualT
	}
	x := append([]complex128(nil), b...)
	solve(x)
	d := make([]complex128, r.n)
	residual(w, b, x, d)
	solve(d)
	for i := range x {
		x[i] += d[i]
	}
	return x
}

// refinedPoint computes Sweep's point at hz from refined solutions (see
// refine): the reference the reduced engine's own points are checked
// against. The reduction must be factored at hz.
func (r *reduction) refinedPoint(nw *smallsignal.Network, ref []float64, probes []int, hz float64) Point {
	w := 2 * math.Pi * hz
	np := len(nw.Ports)
	pt := newPoint(hz, np)
	b := make([]complex128, r.n)
	var x0 []complex128
	for j := 0; j < np; j++ {
		nw.Excitation(j, 1, b)
		x := r.refine(w, b, false)
		if j == 0 {
			x0 = x
		}
		for i := 0; i < np; i++ {
			pt.S[i][j] = sEntry(nw.PortVoltage(i, x), ref, i, j)
		}
		g, c := portRows(nw, j)
		pt.InputImpedance[j] = inputImpedance(nw.PortVoltage(j, x), portCurrent(g, c, w, x))
	}
	for _, p := range probes {
		pt.Probes = append(pt.Probes, at(x0, p))
	}
	// dx/dw = -Y⁻¹ jC x.
	r.pencil.mulC(x0, b)
	for i := range b {
		b[i] *= -1i
	}
	dx := r.refine(w, b, false)
	out := groupDelayPort(np)
	setGroupDelay(&pt, ref, out, nw.PortVoltage(out, dx))
	return pt
}

// sweepAccurate reports whether the reduced engine's points agree with
// refined ones (refinedPoint) to checkRel at the check frequencies of
// [lo, hi] Hz.
func (r *reduction) sweepAccurate(nw *smallsignal.Network, ref []float64, probes []string, lo, hi float64) bool {
	idx := make([]int, len(probes))
	for k, name := range probes {
		idx[k] = probeIndex(nw, name)
	}
	ev := r.points(nw, ref, probes)
	for _, hz := range checkFrequencies(lo, hi) {
		p, ok := ev.at(hz, nil)
		if !ok || pointsDiffer(p, r.refinedPoint(nw, ref, idx, hz), checkRel, checkFloor) != "" {
			return false
		}
	}
	return true
}

// pointsDiffer describes the first quantity in which point p differs from
// q by more than rel relative, or returns "". Quantities that vanish are
// held to an absolute floor instead (checkFloor in the accuracy check): for the S-parameters
// (at most 1 in size for a passive network, so this is rounding of the
// largest), for the probes in volts per volt of EMF, and for Z_in and the
// group delay the same floor carried through their formulas.
func pointsDiffer(p, q Point, rel, floor float64) string {
	for i := range q.S {
		for j := range q.S[i] {
			if d := cmplx.Abs(p.S[i][j] - q.S[i][j]); !(d <= rel*cmplx.Abs(q.S[i][j])+floor) {
				return fmt.Sprintf("at %g Hz: S%d%d = %v against %v", q.FrequencyHz, i+1, j+1, p.S[i][j], q.S[i][j])
			}
		}
		// Z = Z0 (1 + S)/(1 - S): dZ = 2 Z0 dS/(1 - S)². An open port
		// (S = 1, Z infinite) is held by its S alone.
		zq := q.InputImpedance[i]
		if cmplx.IsInf(zq) || cmplx.IsNaN(zq) {
			continue
		}
		z0 := real(zq * (1 - q.S[i][i]) / (1 + q.S[i][i]))
		zFloor := 2 * math.Abs(z0) * floor / sqAbs(1-q.S[i][i])
		if d := cmplx.Abs(p.InputImpedance[i] - zq); !(d <= rel*cmplx.Abs(zq)+zFloor) && !math.IsNaN(zFloor) {
			return fmt.Sprintf("at %g Hz: Z_in%d = %v against %v", q.FrequencyHz, i+1, p.InputImpedance[i], zq)
		}
	}
	for i := range q.Probes {
		if d := cmplx.Abs(p.Probes[i] - q.Probes[i]); !(d <= rel*cmplx.Abs(q.Probes[i])+floor) {
			return fmt.Sprintf("at %g Hz: probe %d = %v against %v", q.FrequencyHz, i, p.Probes[i], q.Probes[i])
		}
	}
	out := groupDelayPort(len(q.S))
	s := cmplx.Abs(q.S[out][0])
	if s == 0 {
		// An exact zero of the LU (a path its sparsity cuts) is rounding
		// for the reduction, and its phase has no delay.
		return ""
	}
	// τ = -Im(S'/S): errors floor in S and floor |S'| in S' give
	// floor |S'/S| / |S|, with |S'/S| taken as |τ| + 1/w.
	gFloor := floor * (math.Abs(q.GroupDelay) + 1/(2*math.Pi*q.FrequencyHz)) / s
	if math.IsNaN(q.GroupDelay) != math.IsNaN(p.GroupDelay) || math.Abs(p.GroupDelay-q.GroupDelay) > rel*math.Abs(q.GroupDelay)+gFloor {
		return fmt.Sprintf("at %g Hz: group delay %g s against %g s", q.FrequencyHz, p.GroupDelay, q.GroupDelay)
	}
	return ""
}

// sweepEngine returns the reduction to run a sweep of freqsHz on, or nil
// for the dense LU: by cost (reducedPays) unless choice forces a method,
// and only if the reduction passes its accuracy check.
func sweepEngine(nw *smallsignal.Network, freqsHz []float64, ref []float64, probes []string, choice engine) (*reduction, []Engine) {
	if choice == engineLU || len(freqsHz) == 0 || nw.HasElements() {
		// Lines and measured blocks are not G + sC: nothing to reduce.
		return nil, nil
	}
	if choice == engineAuto && !reducedPays(nw.N, len(freqsHz)) {
		return nil, nil
	}
	for _, f := range freqsHz {
		if CheckFrequency(f) != nil {
			return nil, nil // the LU path reports it where it occurs
		}
	}
	lo, hi, _ := sweepRange(freqsHz)
	return reduceAccurateTried(nw, lo, hi, len(freqsHz), func(r *reduction) bool {
		return r.sweepAccurate(nw, ref, probes, lo, hi)
	})
}

// probeIndex returns the unknown of a probe node, smallsignal.Ground for
// the reference node.
func probeIndex(nw *smallsignal.Network, name string) int {
	if name == circuit.Ground {
		return smallsignal.Ground
	}
	return nw.Nodes[name]
}

// pointEval computes Sweep's points on a reduction. It holds O(n²)
// numbers, nothing per point.
type pointEval struct {
	r    *reduction
	ref  []float64
	c, y [][]complex128 // per port: excitation in reduced coordinates; solution
	vrow [][]float64    // port voltage i = vrow[i]·y
	// The current the network draws at port i for the excitation there
	// is (grow[i] + jω crow[i])·y (portRows, in reduced coordinates).
	grow, crow [][]float64
	prow       [][]float64 // probe k's voltage = prow[k]·y
	dy         []complex128
	// reciprocal: G and C are symmetric, so S is (power waves, real
	// references): the column of the group delay's output port comes
	// from its row, which the adjoint solve gives, and that port needs no
	// solve of its own.
	reciprocal bool
	solves     [][]complex128 // the y[j] each point solves for
}

// symmetric reports whether the square m equals its transpose exactly.
func symmetric(m blas64.General, n int) bool {
	for i := 0; i < n; i++ {
		for j := 0; j < i; j++ {
			if m.Data[i*m.Stride+j] != m.Data[j*m.Stride+i] {
				return false
			}
		}
	}
	return true
}

func (r *reduction) points(nw *smallsignal.Network, ref []float64, probes []string) *pointEval {
	n, np := r.n, len(nw.Ports)
	ev := &pointEval{r: r, ref: ref, c: make([][]complex128, np), y: make([][]complex128, np), dy: make([]complex128, n)}
	// The port excitations in reduced coordinates, c_j = L b_j, do not
	// depend on frequency.
	b := make([]complex128, n)
	for j := range ev.c {
		ev.c[j], ev.y[j] = make([]complex128, n), make([]complex128, n)
		nw.Excitation(j, 1, b)
		r.basis.left(b, ev.c[j])
	}
	// The rows of R the outputs need, so no point forms the whole
	// solution x = R y.
	row := func(i int) []float64 {
		v := make([]float64, n)
		if i >= 0 {
			r.basis.rightRow(i, v)
		}
		return v
	}
	for _, p := range nw.Ports {
		v := row(p.Node)
		if p.Return >= 0 {
			for j, z := range row(p.Return) {
				v[j] -= z
			}
		}
		ev.vrow = append(ev.vrow, v)
	}
	for i := range nw.Ports {
		g, c := portRows(nw, i)
		ev.grow = append(ev.grow, combineRows(g, row))
		ev.crow = append(ev.crow, combineRows(c, row))
	}
	for _, name := range probes {
		ev.prow = append(ev.prow, row(probeIndex(nw, name)))
	}
	// Modified nodal analysis of resistors, capacitors, inductors,
	// linearised diodes and independent sources stamps symmetric G and C;
	// checked, not assumed.
	ev.reciprocal = np > 1 && symmetric(nw.G.RawMatrix(), n) && symmetric(nw.C.RawMatrix(), n)
	for j := range ev.y {
		if !ev.reciprocal || j != groupDelayPort(np) {
			ev.solves = append(ev.solves, ev.y[j])
		}
	}
	return ev
}

// groupDelayPort is the port whose response to port 1 the group delay
// follows: S21's output, or port 1 alone.
func groupDelayPort(ports int) int {
	if ports > 1 {
		return 1
	}
	return 0
}

// at returns the point at hz, and false where the Hessenberg elimination
// meets a zero pivot.
func (ev *pointEval) at(hz float64, store *pointStore) (Point, bool) {
	r, ref := ev.r, ev.ref
	np := len(ev.c)
	out := groupDelayPort(np)
	// The factorisation also solves the adjoint (H + jwT)ᵀ v = vrow[out]
	// for the group delay.
	r.adjRHS = ev.vrow[out]
	err := r.factor(2 * math.Pi * hz)
	r.adjRHS = nil
	if err != nil {
		return Point{}, false
	}
	pt := store.point(hz, np, len(ev.prow))
	for j := range ev.y {
		copy(ev.y[j], ev.c[j])
	}
	for k := 0; k < len(ev.solves); k += 2 {
		if k+1 < len(ev.solves) {
			r.solveY2(ev.solves[k], ev.solves[k+1])
		} else {
			r.solveY(ev.solves[k])
		}
	}
	// S_ij from V_i (sEntry) for unit EMF at port j, with
	// V_i = vrow[i]·y_j, or vᵀ c_j for i = out (v the adjoint solution).
	for j := 0; j < np; j++ {
		for i := 0; i < np; i++ {
			var v complex128
			switch {
			case ev.reciprocal && i == out:
				v = dotu(r.adj, ev.c[j])
			case ev.reciprocal && j == out:
				continue // from row out, below
			default:
				v = dotReal(ev.vrow[i], ev.y[j])
			}
			pt.S[i][j] = sEntry(v, ref, i, j)
		}
	}
	if ev.reciprocal {
		for i := 0; i < np; i++ {
			pt.S[i][out] = pt.S[out][i]
		}
	}
	w := 2 * math.Pi * hz
	for i := 0; i < np; i++ {
		if ev.reciprocal && i == out {
			// No solve of its own: Z from S, whose diagonal entry came
			// from the adjoint, unless S is near ±1, where that form
			// has lost its digits and the port gets its solve after all.
			sii := pt.S[i][i]
			if cmplx.Abs(1-sii) > nearUnit && cmplx.Abs(1+sii) > nearUnit {
				pt.InputImpedance[i] = complex(ref[i], 0) * (1 + sii) / (1 - sii)
				continue
			}
			copy(ev.y[i], ev.c[i])
			r.solveY(ev.y[i])
		}
		v := dotReal(ev.vrow[i], ev.y[i])
		pt.InputImpedance[i] = inputImpedance(v, dotReal(ev.grow[i], ev.y[i])+complex(0, w)*dotReal(ev.crow[i], ev.y[i]))
	}
	for _, p := range ev.prow {
		pt.Probes = append(pt.Probes, dotReal(p, ev.y[0]))
	}
	// Group delay: dx/dw = -Y⁻¹ jC x, and with L (G + sC) R = H + sT and
	// x = R y this is dy/dw = -j (H + jwT)⁻¹ T y; the output's share,
	// vrow[out]·dy, is -j vᵀ T y with the adjoint v factor solved.
	setGroupDelay(&pt, ref, out, -1i*ev.adjointT(ev.c[0], ev.y[0]))
	return pt, true
}

// maxCancellation bounds the digits the shifted form's short cut for vᵀ T y
// may lose to cancellation (adjointT): a factor of 1e4, four digits of the
// sixteen, where the accuracy check asks for ten.
const maxCancellation = 1e4

// adjointT returns vᵀ T y for the adjoint solution v factor left in the
// reduction and y = (H + jwT)⁻¹ c. In the shifted form T = Hm and
// H + jwT = I + μ Hm, so T y = (c - y)/μ and vᵀ T y = (vᵀc - vᵀy)/μ: two
// dot products instead of a product with T, unless the difference cancels
// more than maxCancellation allows.
func (ev *pointEval) adjointT(c, y []complex128) complex128 {
	r := ev.r
	if r.shift > 0 {
		a, b := dotu(r.adj, c), dotu(r.adj, y)
		if cmplx.Abs(a)+cmplx.Abs(b) <= maxCancellation*cmplx.Abs(a-b) {
			return (a - b) * r.scale
		}
	}
	r.mulT(y, ev.dy)
	return dotu(r.adj, ev.dy)
}

// sweep runs Sweep's points on the reduction from freqsHz[0] on and
// returns how many it visited. It stops early, without an error, at a
// point it cannot take (a frequency out of range, a zero pivot), for the
// LU to carry on from there; visit's error is returned.
func (r *reduction) sweep(nw *smallsignal.Network, freqsHz []float64, ref []float64, probes []string, visit func(Point) error, store *pointStore) (int, error) {
	ev := r.points(nw, ref, probes)
	for k, hz := range freqsHz {
		if CheckFrequency(hz) != nil {
			return k, nil
		}
		pt, ok := ev.at(hz, store)
		if !ok {
			return k, nil
		}
		if err := visit(pt); err != nil {
			return k, err
		}
	}
	return len(freqsHz), nil
}

// solveAccurate reports whether the reduced engine's solutions of
// Y(jw) x = b for each port's excitation, and of Y(jw) x = 1 and
// Y(jw)ᵀ z = 1 for a vector of ones, agree with refined ones to checkRel
// in every unknown, with a floor of checkFloor times the largest, at the
// check frequencies of [lo, hi] Hz: the check for analyses that use whole
// solution vectors (Volterra products, noise's adjoint).
func (r *reduction) solveAccurate(nw *smallsignal.Network, lo, hi float64) bool {
	// Right-hand sides: each port's excitation, solved plainly, and a
	// vector of ones (touching every unknown, as an adjoint's output
	// selector and a product's sources may), solved both ways.
	type rhs struct {
		b         []complex128
		transpose bool
	}
	var cases []rhs
	for j := range nw.Ports {
		b := make([]complex128, r.n)
		nw.Excitation(j, 1, b)
		cases = append(cases, rhs{b, false})
	}
	ones := make([]complex128, r.n)
	for i := range ones {
		ones[i] = 1
	}
	cases = append(cases, rhs{ones, false}, rhs{ones, true})
	for _, hz := range checkFrequencies(lo, hi) {
		w := 2 * math.Pi * hz
		if r.factor(w) != nil {
			return false
		}
		for _, c := range cases {
			x := append([]complex128(nil), c.b...)
			if c.transpose {
				r.solveT(x)
			} else {
				r.solve(x)
			}
			xr := r.refine(w, c.b, c.transpose)
			big := 0.0
			for _, v := range xr {
				big = math.Max(big, cmplx.Abs(v))
			}
			for i := range x {
				if !(cmplx.Abs(x[i]-xr[i]) <= checkRel*cmplx.Abs(xr[i])+checkFloor*big) {
					return false
				}
			}
		}
	}
	return true
}

// solver solves the network's equations at one frequency at a time: the
// reduced engine or the dense LU behind one interface, for analyses that
// use whole solution vectors (Volterra products, adjoint noise solves).
type solver interface {
	// at factors Y(jw) = G + jwC.
	at(w float64) error
	// solve overwrites b with the solution of Y(jw) x = b.
	solve(b []complex128)
	// solveT overwrites b with the solution of Y(jw)ᵀ z = b.
	solveT(b []complex128)
}

// luSolver is the dense LU as a solver. With nw set, the network's
// lines and measured blocks add their rows at each frequency.
type luSolver struct {
	f    *lu
	g, c blas64.General
	nw   *smallsignal.Network
}

func newLUSolver(nw *smallsignal.Network) *luSolver {
	return &luSolver{f: newLU(nw.N), g: nw.G.RawMatrix(), c: nw.C.RawMatrix(), nw: elementsOf(nw)}
}

// elementsOf returns nw when it holds lines or measured blocks, nil
// otherwise: what a luSolver needs to stamp them.
func elementsOf(nw *smallsignal.Network) *smallsignal.Network {
	if nw.HasElements() {
		return nw
	}
	return nil
}

func (s *luSolver) at(w float64) error {
	s.f.load(s.g.Data, s.c.Data, s.g.Stride, s.c.Stride, w)
	if s.nw != nil {
		s.nw.Stamp(w, s.f.a, s.f.n)
	}
	return s.f.factor()
}

func (s *luSolver) solve(b []complex128)  { s.f.solve(b) }
func (s *luSolver) solveT(b []complex128) { s.f.solveT(b) }

func (r *reduction) at(w float64) error { return r.factor(w) }

// newSolver returns the solver for an analysis that factors Y(jw) at each
// of freqsHz (in hertz) once: the reduction when choice forces it or when
// it pays for that many points, and it passes its accuracy check
// (solveAccurate); the dense LU otherwise.
func newSolver(nw *smallsignal.Network, freqsHz []float64, choice engine) solver {
	if choice == engineLU || nw.HasElements() {
		return newLUSolver(nw)
	}
	lo, hi, ok := sweepRange(freqsHz)
	if !ok || (choice == engineAuto && !reducedPays(nw.N, len(freqsHz))) {
		return newLUSolver(nw)
	}
	r := reduceAccurate(nw, lo, hi, len(freqsHz), func(r *reduction) bool { return r.solveAccurate(nw, lo, hi) })
	if r == nil {
		return newLUSolver(nw)
	}
	return r
}

// nearUnit is how close to ±1 an S-parameter may come before Z_0 (1 +
// S)/(1 - S) is no longer trusted for the input impedance: it keeps about
// half of float64's digits there.
const nearUnit = 1e-8

// combineRows returns Σ_k a_k row(k): the row vector a over the unknowns
// carried into reduced coordinates.
func combineRows(a []float64, row func(int) []float64) []float64 {
	var out []float64
	for k, v := range a {
		if v == 0 {
			continue
		}
		r := row(k)
		if out == nil {
			out = make([]float64, len(r))
		}
		for j, z := range r {
			out[j] += v * z
		}
	}
	if out == nil {
		out = row(-1)
	}
	return out
}
