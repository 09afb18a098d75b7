package ac

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"qpoint/ac/internal/fixture"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// randomMNA builds a random linearised network in modified nodal form with
// about nodes node unknowns: a resistor tree to ground (so every node has
// a DC path), then resistors, capacitors and linearised diodes (g1 in
// parallel with c1, some behind a series resistance with its own internal
// node), inductor branches and voltage-source branches (never in a loop
// of sources), and one to three ports terminated in their reference
// impedances. Values span the ranges of RF diode circuits: 1 Ω to 1 MΩ,
// 0.1 pF to 1 nF, 1 nH to 1 µH, junction conductances 10 nS to 100 mS.
func randomMNA(rng *rand.Rand, nodes int) *smallsignal.Network {
	logU := func(lo, hi float64) float64 { return math.Pow(10, lo+(hi-lo)*rng.Float64()) }
	type two struct {
		a, b int
		v    float64
	}
	var conds, caps []two
	type branch struct {
		a, b int
		l    float64
	}
	var branches []branch
	nn := nodes
	pick := func() int { // a node or ground (-1)
		if rng.IntN(6) == 0 {
			return smallsignal.Ground
		}
		return rng.IntN(nodes)
	}
	pair := func() (int, int) {
		for {
			a, b := pick(), pick()
			if a != b {
				return a, b
			}
		}
	}
	for i := 0; i < nodes; i++ {
		j := smallsignal.Ground
		if i > 0 && rng.IntN(4) != 0 {
			j = rng.IntN(i)
		}
		conds = append(conds, two{i, j, 1 / logU(0, 6)})
	}
	for e := 0; e < 2*nodes; e++ {
		a, b := pair()
		switch rng.IntN(5) {
		case 0:
			conds = append(conds, two{a, b, 1 / logU(0, 6)})
		case 1, 2:
			caps = append(caps, two{a, b, logU(-13, -9)})
		case 3: // linearised diode
			if rng.IntN(2) == 0 { // series resistance: an internal junction node
				j := nn
				nn++
				conds = append(conds, two{a, j, 1 / logU(0, 2)})
				a = j
			}
			conds = append(conds, two{a, b, logU(-8, -1)})
			caps = append(caps, two{a, b, logU(-13.5, -11)})
		case 4:
			branches = append(branches, branch{a, b, logU(-9, -6)})
		}
	}
	// Voltage sources: union-find over their terminals keeps them out of
	// loops (a loop of ideal sources has no solution).
	parent := map[int]int{}
	var find func(int) int
	find = func(x int) int {
		if p, ok := parent[x]; ok && p != x {
			r := find(p)
			parent[x] = r
			return r
		}
		return x
	}
	for s := 0; s < 1+nodes/8; s++ {
		a, b := pair()
		if find(a) == find(b) {
			continue
		}
		parent[find(a)] = find(b)
		branches = append(branches, branch{a, b, 0})
	}
	nw := &smallsignal.Network{Nodes: map[string]int{}}
	for i := 0; i < nn; i++ {
		name := fmt.Sprintf("n%d", i)
		nw.Names = append(nw.Names, name)
		nw.Nodes[name] = i
	}
	np := 1 + rng.IntN(3)
	for p := 0; p < np; p++ {
		node := rng.IntN(nodes)
		ret := smallsignal.Ground
		if rng.IntN(4) == 0 {
			for ret = rng.IntN(nodes); ret == node; ret = rng.IntN(nodes) {
			}
		}
		z0 := []float64{50, 75, 25, 100}[rng.IntN(4)]
		nw.Ports = append(nw.Ports, smallsignal.Port{Name: fmt.Sprintf("p%d", p+1), Node: node, Return: ret, Impedance: z0})
		conds = append(conds, two{node, ret, 1 / z0})
	}
	nw.NodeUnknowns = nn
	n := nn + len(branches)
	nw.N = n
	nw.G, nw.C = mat.NewDense(n, n, nil), mat.NewDense(n, n, nil)
	stamp := func(m *mat.Dense, t two) {
		if t.a >= 0 {
			m.Set(t.a, t.a, m.At(t.a, t.a)+t.v)
		}
		if t.b >= 0 {
			m.Set(t.b, t.b, m.At(t.b, t.b)+t.v)
		}
		if t.a >= 0 && t.b >= 0 {
			m.Set(t.a, t.b, m.At(t.a, t.b)-t.v)
			m.Set(t.b, t.a, m.At(t.b, t.a)-t.v)
		}
	}
	for _, t := range conds {
		stamp(nw.G, t)
	}
	for _, t := range caps {
		stamp(nw.C, t)
	}
	for k, br := range branches {
		row := nn + k
		nw.Names = append(nw.Names, fmt.Sprintf("b%d#current", k))
		if br.a >= 0 {
			nw.G.Set(br.a, row, 1)
			nw.G.Set(row, br.a, 1)
		}
		if br.b >= 0 {
			nw.G.Set(br.b, row, -1)
			nw.G.Set(row, br.b, -1)
		}
		nw.C.Set(row, row, -br.l)
	}
	return nw
}

func maxRel(a, b []complex128) float64 {
	var d, s float64
	for i := range a {
		d = math.Max(d, cmplx.Abs(a[i]-b[i]))
		s = math.Max(s, cmplx.Abs(b[i]))
	}
	return d / s
}

// sweepWith runs a sweep on the chosen engine and keeps its points.
func sweepWith(t *testing.T, nw *smallsignal.Network, freqs []float64, s Settings, choice engine) []Point {
	t.Helper()
	var pts []Point
	if _, _, err := sweep(nw, freqs, s, func(p Point) error {
		pts = append(pts, p)
		return nil
	}, choice); err != nil {
		t.Fatal(err)
	}
	return pts
}

// sweepsDiffer describes the first point and quantity in which two
// sweeps differ by more than rel relative (see pointsDiffer for the
// floors of vanishing quantities, here the accuracy check's checkFloor),
// or returns "".
func sweepsDiffer(a, b []Point, rel float64) string {
	return sweepsDifferAbove(a, b, rel, checkFloor)
}

func sweepsDifferAbove(a, b []Point, rel, floor float64) string {
	if len(a) != len(b) {
		return fmt.Sprintf("%d points against %d", len(a), len(b))
	}
	for k := range b {
		if d := pointsDiffer(a[k], b[k], rel, floor); d != "" {
			return d
		}
	}
	return ""
}

// TestReducedSweepDemos: on every demo circuit the reduced engine is
// chosen (its accuracy check passes) and its sweep equals the dense LU's
// to 1e-9 relative in S, Z_in, probes and group delay.
func TestReducedSweepDemos(t *testing.T) {
	names, networks := demoNetworks(t)
	for k, nw := range networks {
		f := names[k]
		freqs, _ := LogGrid(1e3, 1e11, 25)
		ref := make([]float64, len(nw.Ports))
		for i, p := range nw.Ports {
			ref[i] = p.Impedance
		}
		probes := nw.Point.Circuit.Probes
		idx := make([]int, len(probes))
		for k, name := range probes {
			idx[k] = probeIndex(nw, name)
		}
		if nw.HasElements() {
			// Lines are not G + sC: nothing to reduce, and the sweep
			// keeps to the LU (TestTerminatedLineInputImpedance checks
			// it against Pozar).
			if first(sweepEngine(nw, freqs, ref, probes, engineReduced)) != nil {
				t.Errorf("%s: a network with lines was reduced", f)
			}
			continue
		}
		if first(sweepEngine(nw, freqs, ref, probes, engineReduced)) == nil {
			t.Errorf("%s: the reduction failed its accuracy check", f)
		}
		red := sweepWith(t, nw, freqs, Settings{}, engineReduced)
		lu := sweepWith(t, nw, freqs, Settings{}, engineLU)
		if d := sweepsDiffer(red, lu, 1e-9); d != "" {
			t.Errorf("%s (n = %d): %s", f, nw.N, d)
		}
		t.Logf("%s (n = %d): agree to %.0e relative (absolute floor %g)", filepath.Base(f), nw.N, agreement(red, lu), agreementFloor)
	}
}

// agreement returns the smallest power of ten rel at which pointsDiffer
// finds the sweeps equal above an absolute floor of agreementFloor, for
// the log.
const agreementFloor = 1e-13

func agreement(a, b []Point) float64 {
	rel := 1e-16
	for rel < 1 && sweepsDifferAbove(a, b, rel, agreementFloor) != "" {
		rel *= 10
	}
	return rel
}

// TestReducedSweepRandom: on random RLC networks with linearised diodes,
// inductor and voltage-source branches and one to three ports, the sweep
// on the reduced engine equals the dense LU's to 1e-9 relative; the
// engine's own accuracy check lets nearly all of them through.
func TestReducedSweepRandom(t *testing.T) {
	trials := 200
	if testing.Short() {
		trials = 40
	}
	reduced, worst := 0, 0.0
	for trial := 0; trial < trials; trial++ {
		rng := rand.New(rand.NewPCG(17, uint64(trial)))
		nw := randomMNA(rng, 2+rng.IntN(60))
		lo := math.Pow(10, 2+5*rng.Float64())
		freqs, _ := LogGrid(lo, lo*math.Pow(10, 1+3*rng.Float64()), 4)
		s := Settings{Probes: []string{nw.Names[rng.IntN(nw.NodeUnknowns)], nw.Names[0], "gnd"}}
		if rng.IntN(3) == 0 {
			for range nw.Ports {
				s.Reference = append(s.Reference, []float64{50, 75, 10}[rng.IntN(3)])
			}
		}
		lu := sweepWith(t, nw, freqs, s, engineLU)
		use := nw
		ref := make([]float64, len(nw.Ports))
		for i, p := range nw.Ports {
			ref[i] = p.Impedance
		}
		if s.Reference != nil {
			use, ref = nw.WithReferences(s.Reference), s.Reference
		}
		if first(sweepEngine(use, freqs, ref, s.Probes, engineReduced)) != nil {
			reduced++
		}
		red := sweepWith(t, nw, freqs, s, engineReduced)
		if d := sweepsDiffer(red, lu, 1e-9); d != "" {
			t.Errorf("trial %d (n = %d, %d ports): %s", trial, nw.N, len(nw.Ports), d)
		}
		worst = math.Max(worst, agreement(red, lu))
	}
	t.Logf("%d of %d random networks ran on the reduction; worst agreement %.0e relative (absolute floor %g)", reduced, trials, worst, agreementFloor)
	if reduced < trials*9/10 {
		t.Errorf("only %d of %d random networks passed the reduction's accuracy check", reduced, trials)
	}
}

// TestReducedSweepFallback: over the whole supported range, 1 mHz to
// 1 THz, the balancing cannot suit every frequency and the reduction
// fails its accuracy check on some random networks. The sweep then runs on
// the LU, so every sweep still equals the LU's to 1e-9; some must have
// fallen back, or the test does not test the fallback.
func TestReducedSweepFallback(t *testing.T) {
	fell := 0
	freqs, _ := LogGrid(MinFrequencyHz, MaxFrequencyHz, 2)
	for trial := 0; trial < 100; trial++ {
		rng := rand.New(rand.NewPCG(23, uint64(trial)))
		nw := randomMNA(rng, 2+rng.IntN(60))
		s := Settings{Probes: []string{nw.Names[rng.IntN(nw.NodeUnknowns)]}}
		ref := make([]float64, len(nw.Ports))
		for i, p := range nw.Ports {
			ref[i] = p.Impedance
		}
		if first(sweepEngine(nw, freqs, ref, s.Probes, engineReduced)) == nil {
			fell++
		}
		red := sweepWith(t, nw, freqs, s, engineReduced)
		lu := sweepWith(t, nw, freqs, s, engineLU)
		if d := sweepsDiffer(red, lu, 1e-9); d != "" {
			t.Errorf("trial %d (n = %d): %s", trial, nw.N, d)
		}
	}
	t.Logf("%d of 100 sweeps over 15 decades fell back to the LU", fell)
	if fell == 0 {
		t.Error("no sweep fell back to the LU: the fallback is untested")
	}
}

// TestReducedSweepHandsOver: a point the reduction cannot take stops its
// sweep there without an error, and Sweep's LU carries on from it.
func TestReducedSweepHandsOver(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 3))
	nw := randomMNA(rng, 20)
	ref := make([]float64, len(nw.Ports))
	for i, p := range nw.Ports {
		ref[i] = p.Impedance
	}
	r, err := reduceFor(nw, 1e6, 1e9, formShifted)
	if err != nil {
		t.Fatal(err)
	}
	visited := 0
	done, err := r.sweep(nw, []float64{1e6, 1e7, 0, 1e9}, ref, nil, func(Point) error { visited++; return nil }, nil)
	if done != 2 || visited != 2 || err != nil {
		t.Errorf("reduced sweep over 1 MHz, 10 MHz, 0 Hz, 1 GHz: stopped after %d points (%d visited), error %v; want 2, 2, nil", done, visited, err)
	}
	if _, _, err := sweep(nw, []float64{1e6, 1e7, 0, 1e9}, Settings{Probes: []string{}}, func(Point) error { return nil }, engineReduced); err == nil {
		t.Error("a sweep through 0 Hz: no error")
	}
}

// TestSolverAdjoint: the reduced engine's solve and adjoint (transpose)
// solve, the ones Volterra products and noise use, equal the dense LU's
// to 1e-9 relative in every unknown (floor 1e-13 of the largest). Whole
// solution vectors are a stricter test than a sweep's outputs: unknowns
// far below the largest carry the reduction's normwise rounding, and its
// accuracy check sends some networks to the LU; most must pass it.
func TestSolverAdjoint(t *testing.T) {
	passed := 0
	defer func() {
		t.Logf("%d of 40 random networks passed the whole-vector check", passed)
		if passed < 30 {
			t.Errorf("only %d of 40 random networks passed the whole-vector check", passed)
		}
	}()
	for trial := 0; trial < 40; trial++ {
		rng := rand.New(rand.NewPCG(29, uint64(trial)))
		nw := randomMNA(rng, 2+rng.IntN(50))
		freqs := []float64{1e6, 3e7, 1e9}
		red := newSolver(nw, freqs, engineReduced)
		if _, ok := red.(*reduction); ok {
			passed++
		}
		lu := newSolver(nw, freqs, engineLU)
		for _, f := range freqs {
			w := 2 * math.Pi * f
			if err := red.at(w); err != nil {
				t.Fatal(err)
			}
			if err := lu.at(w); err != nil {
				t.Fatal(err)
			}
			b := make([]complex128, nw.N)
			for i := range b {
				b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
			}
			for _, tr := range []bool{false, true} {
				x, y := append([]complex128(nil), b...), append([]complex128(nil), b...)
				if tr {
					red.solveT(x)
					lu.solveT(y)
				} else {
					red.solve(x)
					lu.solve(y)
				}
				big := 0.0
				for _, v := range y {
					big = math.Max(big, cmplx.Abs(v))
				}
				for i := range x {
					if d := cmplx.Abs(x[i] - y[i]); d > 1e-9*cmplx.Abs(y[i])+1e-13*big {
						t.Errorf("trial %d at %g Hz (transpose %v): x[%d] = %v, LU gives %v", trial, f, tr, i, x[i], y[i])
						break
					}
				}
			}
		}
	}
}

// TestVolterraEngines: every demo's two-tone Volterra estimate, products
// and per-diode contributions, is the same to 1e-9 relative whether its
// solves at f1, 2f1, 3f1, f2, f1 ± f2 and 2f1 - f2 run on the reduction or
// the LU.
func TestVolterraEngines(t *testing.T) {
	names, networks := demoNetworks(t)
	for k, nw := range networks {
		f := names[k]
		if len(nw.Diodes) == 0 {
			continue
		}
		f1 := nw.Point.Circuit.Analysis.Distortion.FrequencyHz
		if f1 == 0 {
			f1 = 1e9
		}
		d := Drive{Input: 0, Output: Output{Port: len(nw.Ports) - 1}, FrequencyHz: f1, SecondToneHz: f1 + 10e6, EMF: 0.05}
		if len(nw.Ports) == 1 {
			d.Output = Output{Port: -1, Node: nw.Names[0]}
		}
		if nw.HasElements() {
			continue // no reduction of a network with lines (TestReducedSweepDemos)
		}
		if _, ok := newSolver(nw, []float64{f1, 2 * f1, 3 * f1, f1 + 10e6, 2*f1 + 10e6, -10e6, f1 - 10e6}, engineReduced).(*reduction); !ok {
			t.Errorf("%s: the reduction failed its accuracy check", f)
		}
		red, err := volterraOn(nw, d, engineReduced)
		if err != nil {
			t.Fatal(err)
		}
		lu, err := volterraOn(nw, d, engineLU)
		if err != nil {
			t.Fatal(err)
		}
		// A product's natural scale is the sum of its contributions'
		// magnitudes: a balanced product cancels to rounding of it.
		gross := map[Product]float64{}
		for _, c := range lu.Contributions {
			gross[c.Product] += cmplx.Abs(c.Phasor)
		}
		check := func(what string, a, b complex128, floor float64) {
			if d := cmplx.Abs(a - b); d > 1e-9*cmplx.Abs(b)+floor {
				t.Errorf("%s: %s = %v on the reduction, %v on the LU", filepath.Base(f), what, a, b)
			}
		}
		// A product the circuit balances out is rounding of its
		// contributions on either engine (Estimate.Balanced): its value is
		// not compared, only that both engines call it balanced.
		product := func(p Product, a, b complex128) {
			if !lu.Balanced(p) {
				check(string(p), a, b, 1e-13*gross[p])
			}
		}
		check("fundamental", red.Fundamental, lu.Fundamental, 0)
		check("linear fundamental", red.Linear, lu.Linear, 0)
		check("second fundamental", red.SecondFundamental, lu.SecondFundamental, 0)
		product(HD2, red.HD2, lu.HD2)
		product(HD3, red.HD3, lu.HD3)
		product(DC, complex(red.DCShift, 0), complex(lu.DCShift, 0))
		product(IM2Sum, red.IM2Sum, lu.IM2Sum)
		product(IM2Diff, red.IM2Diff, lu.IM2Diff)
		product(IM3, red.IM3, lu.IM3)
		for k := range lu.Contributions {
			c := lu.Contributions[k]
			check(fmt.Sprintf("%s %s %s", c.Product, c.Diode, c.Source), red.Contributions[k].Phasor, c.Phasor, 1e-13*gross[c.Product])
		}
		for _, p := range []Product{DC, HD2, HD3, IM2Sum, IM2Diff, IM3} {
			if red.Balanced(p) != lu.Balanced(p) {
				t.Errorf("%s: %s balanced %v on the reduction, %v on the LU", filepath.Base(f), p, red.Balanced(p), lu.Balanced(p))
			}
		}
	}
}

// TestEngineChoice: the cost rule keeps the LU for small networks and
// short sweeps and takes the reduction for long sweeps of large ones.
func TestEngineChoice(t *testing.T) {
	for _, c := range []struct {
		n, points int
		want      bool
	}{
		{6, 10000, false}, // a demo: microseconds either way
		{200, 3, false},   // a Volterra estimate
		{200, 7, false},   // a two-tone one
		{200, 20, false},  // below the measured break-even, 21 to 43 points
		{200, 1000, true},
		{50, 200, true},
		{500, 100, true},
	} {
		if got := reducedPays(c.n, c.points); got != c.want {
			t.Errorf("n = %d, %d points: reduction pays = %v, want %v", c.n, c.points, got, c.want)
		}
	}
}

// TestReductionReconstructs: in both forms the reduction's maps satisfy
// L (G + sC) R = H + sT to rounding (checked column by column through
// the basis, at s = 0 and at s = j wRef), with H and T upper Hessenberg
// and, in the Hessenberg-triangular form, T upper triangular: the forms
// of Laub (IEEE Trans. Automatic Control 26(2), 1981; here with
// gonum's Dgetrf and Dgehrd) and of Moler and Stewart (SIAM J. Numer.
// Anal. 10(2), 1973; gonum's Dgeqp3, Dorgqr and Dgghrd).
func TestReductionReconstructs(t *testing.T) {
	for trial := 0; trial < 30; trial++ {
		rng := rand.New(rand.NewPCG(31, uint64(trial)))
		nw := randomMNA(rng, 2+rng.IntN(80))
		n := nw.N
		for _, form := range []reductionForm{formShifted, formSchur, formTriangular} {
			r, err := reduceFor(nw, 1e6, 1e10, form)
			if err != nil {
				t.Fatalf("trial %d, %v: %v", trial, form, err)
			}
			g, c := nw.G.RawMatrix(), nw.C.RawMatrix()
			wRef := 2 * math.Pi * math.Sqrt(1e6*1e10)
			for _, w := range []float64{0, wRef} {
				e, x, y, z := make([]complex128, n), make([]complex128, n), make([]complex128, n), make([]complex128, n)
				worst, size := 0.0, 0.0
				for j := 0; j < n; j++ {
					clear(e)
					e[j] = 1
					r.basis.right(e, x)
					for i := 0; i < n; i++ {
						var s complex128
						for k := 0; k < n; k++ {
							s += complex(g.Data[i*g.Stride+k], w*c.Data[i*c.Stride+k]) * x[k]
						}
						y[i] = s
					}
					r.basis.left(y, z)
					for i := 0; i < n; i++ {
						want := complex(r.h[i*n+j], w*r.t[i*n+j])
						worst = math.Max(worst, cmplx.Abs(z[i]-want))
						size = math.Max(size, cmplx.Abs(want))
					}
				}
				// The shifted form's L holds K⁻¹: its rounding grows with
				// K's condition number.
				tol := 1e-12
				if sb, ok := r.basis.(*shiftedBasis); ok {
					tol = math.Max(tol, 1e-15/sb.rcond)
				}
				if worst > tol*size {
					t.Errorf("trial %d (n = %d), %v, w = %g: |L (G + jwC) R - (H + jwT)| = %g, |H + jwT| = %g, tolerance %g", trial, n, form, w, worst, size, tol)
				}
			}
			// leftT and rightT are the transposes of left and right:
			// vᵀ (L u) = (Lᵀ v)ᵀ u, and likewise for R.
			u, v := make([]complex128, n), make([]complex128, n)
			for i := range u {
				u[i] = complex(rng.NormFloat64(), rng.NormFloat64())
				v[i] = complex(rng.NormFloat64(), rng.NormFloat64())
			}
			lu, ltv, ru, rtv := make([]complex128, n), make([]complex128, n), make([]complex128, n), make([]complex128, n)
			r.basis.left(u, lu)
			r.basis.leftT(v, ltv)
			r.basis.right(u, ru)
			r.basis.rightT(v, rtv)
			dot := func(a, b []complex128) (s, size complex128) {
				var m float64
				for i := range a {
					s += a[i] * b[i]
					m += cmplx.Abs(a[i] * b[i])
				}
				return s, complex(m, 0)
			}
			a1, m1 := dot(v, lu)
			a2, _ := dot(ltv, u)
			b1, m2 := dot(v, ru)
			b2, _ := dot(rtv, u)
			if cmplx.Abs(a1-a2) > 1e-12*real(m1) || cmplx.Abs(b1-b2) > 1e-12*real(m2) {
				t.Errorf("trial %d, %v: vᵀ(L u) = %v, (Lᵀ v)ᵀ u = %v; vᵀ(R u) = %v, (Rᵀ v)ᵀ u = %v", trial, form, a1, a2, b1, b2)
			}
			below := 2 // zero below the first subdiagonal
			for _, m := range []struct {
				name  string
				v     []float64
				below int
			}{{"H", r.h, 2}, {"T", r.t, below}} {
				if form == formTriangular && m.name == "T" {
					m.below = 1
				}
				for i := 0; i < n; i++ {
					for j := 0; j <= i-m.below; j++ {
						if m.v[i*n+j] != 0 {
							t.Fatalf("trial %d, %v: %s[%d][%d] = %g, want 0", trial, form, m.name, i, j, m.v[i*n+j])
						}
					}
				}
			}
		}
	}
}

// TestHessenbergSolve: the elimination on H + jwT, and its transpose
// solve, agree with the dense LU of the same matrix; random H, T with
// zero diagonal entries of T (a singular C) and rows scaled so that
// partial pivoting swaps.
func TestHessenbergSolve(t *testing.T) {
	rng := rand.New(rand.NewPCG(37, 1))
	for trial := 0; trial < 50; trial++ {
		n := 1 + rng.IntN(40)
		r := &reduction{n: n, h: make([]float64, n*n), t: make([]float64, n*n)}
		for i := 0; i < n; i++ {
			scale := math.Pow(10, 4*rng.Float64()-2)
			for j := max(i-1, 0); j < n; j++ {
				r.h[i*n+j] = scale * rng.NormFloat64()
				if j >= i && rng.IntN(3) != 0 {
					r.t[i*n+j] = scale * rng.NormFloat64()
				}
			}
		}
		r.alloc()
		w := math.Pow(10, 2*rng.Float64()-1)
		if err := r.factor(w); err != nil {
			t.Fatal(err)
		}
		f := newLU(n)
		f.load(r.h, r.t, n, n, w)
		if err := f.factor(); err != nil {
			t.Fatal(err)
		}
		swaps := 0
		for _, s := range r.swap[:max(n-1, 0)] {
			if s {
				swaps++
			}
		}
		for _, tr := range []bool{false, true} {
			b := make([]complex128, n)
			for i := range b {
				b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
			}
			x, y := append([]complex128(nil), b...), append([]complex128(nil), b...)
			if tr {
				r.solveYT(x)
				f.solveT(y)
			} else {
				r.solveY(x)
				f.solve(y)
			}
			if d := maxRel(x, y); d > 1e-10 {
				t.Errorf("trial %d (n = %d, %d swaps, transpose %v): differs from the dense LU by %g", trial, n, swaps, tr, d)
			}
		}
	}
}

// TestShiftedHessenbergSolve: in the shifted form factor eliminates
// Hm - νI and scales by 1/μ; its solves, transpose solves and fused
// adjoint equal the dense LU of I + μHm = H + jwT, and the short cut
// for vᵀ T y (adjointT) equals the product with T.
func TestShiftedHessenbergSolve(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 2))
	for trial := 0; trial < 50; trial++ {
		n := 1 + rng.IntN(40)
		sigma := math.Pow(10, 4*rng.Float64()-2)
		r := &reduction{n: n, h: make([]float64, n*n), t: make([]float64, n*n), shift: sigma, form: formShifted}
		for i := 0; i < n; i++ {
			scale := math.Pow(10, 2*rng.Float64()-1) / sigma
			for j := max(i-1, 0); j < n; j++ {
				r.t[i*n+j] = scale * rng.NormFloat64()
				r.h[i*n+j] = -sigma * r.t[i*n+j]
			}
			r.h[i*n+i]++
		}
		r.alloc()
		b := checkSolves(t, rng, r, sigma, fmt.Sprintf("trial %d (n = %d)", trial, n))
		y := append([]complex128(nil), b...)
		r.solveY(y)
		ev := &pointEval{r: r, dy: make([]complex128, n)}
		got := ev.adjointT(b, y)
		r.mulT(y, ev.dy)
		want := dotu(r.adj, ev.dy)
		if d := cmplx.Abs(got - want); d > 1e-9*cmplx.Abs(want) {
			t.Errorf("trial %d (n = %d): vᵀ T y = %v by the short cut, %v by the product", trial, n, got, want)
		}
	}
}

// TestSchurSolve: in the Schur form the substitutions with S - νI (1×1 and
// 2×2 diagonal blocks), their transpose, the adjoint factor solves and the
// product with T = S equal the dense LU of I + μS = H + jwT.
func TestSchurSolve(t *testing.T) {
	rng := rand.New(rand.NewPCG(43, 3))
	for trial := 0; trial < 50; trial++ {
		n := 1 + rng.IntN(40)
		sigma := math.Pow(10, 4*rng.Float64()-2)
		q := &quasi{n: n, s: make([]float64, n*n), size: make([]int, n), inv: make([]complex128, n), inv2: make([]complex128, 4*n),
			re: make([]float64, n), im: make([]float64, n), yr: make([]float64, n), yi: make([]float64, n)}
		blocks := 0
		for i := 0; i < n; {
			scale := math.Pow(10, 2*rng.Float64()-1) / sigma
			if i+1 < n && rng.IntN(2) == 0 {
				// A standardized 2×2 block: equal diagonal, b·c < 0.
				a, b, c := scale*rng.NormFloat64(), scale*(0.1+rng.Float64()), -scale*(0.1+rng.Float64())
				q.s[i*n+i], q.s[i*n+i+1], q.s[(i+1)*n+i], q.s[(i+1)*n+i+1] = a, b, c, a
				q.size[i], q.size[i+1] = 2, 0
				for j := i + 2; j < n; j++ {
					q.s[i*n+j], q.s[(i+1)*n+j] = scale*rng.NormFloat64(), scale*rng.NormFloat64()
				}
				i += 2
				blocks++
				continue
			}
			q.size[i] = 1
			for j := i; j < n; j++ {
				q.s[i*n+j] = scale * rng.NormFloat64()
			}
			i++
		}
		r := &reduction{n: n, h: make([]float64, n*n), t: append([]float64(nil), q.s...), shift: sigma, form: formSchur, quasi: q}
		for i := range r.h {
			r.h[i] = -sigma * r.t[i]
		}
		for i := 0; i < n; i++ {
			r.h[i*n+i]++
		}
		r.alloc()
		b := checkSolves(t, rng, r, sigma, fmt.Sprintf("trial %d (n = %d, %d blocks)", trial, n, blocks))
		got, want := make([]complex128, n), make([]complex128, n)
		r.mulT(b, got)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				want[i] += complex(r.t[i*n+j], 0) * b[j]
			}
		}
		if d := maxRel(got, want); d > 1e-13 {
			t.Errorf("trial %d: S y differs from the plain product by %g", trial, d)
		}
	}
}

// TestSchurSweep: sweeps on the Schur form, where it can be made and
// passes its accuracy check, equal the dense LU's to 1e-9 relative; on
// random networks swept over up to four decades nearly all pass.
func TestSchurSweep(t *testing.T) {
	trials := 100
	if testing.Short() {
		trials = 20
	}
	passed := 0
	for trial := 0; trial < trials; trial++ {
		rng := rand.New(rand.NewPCG(47, uint64(trial)))
		nw := randomMNA(rng, 2+rng.IntN(60))
		lo := math.Pow(10, 2+5*rng.Float64())
		freqs, _ := LogGrid(lo, lo*math.Pow(10, 1+3*rng.Float64()), 10)
		s := Settings{Probes: []string{nw.Names[rng.IntN(nw.NodeUnknowns)], "gnd"}}
		ref := make([]float64, len(nw.Ports))
		for i, p := range nw.Ports {
			ref[i] = p.Impedance
		}
		l, h, _ := sweepRange(freqs)
		r, err := reduceFor(nw, l, h, formSchur)
		if err != nil || !r.sweepAccurate(nw, ref, s.Probes, l, h) {
			continue
		}
		passed++
		var red []Point
		if _, err := r.sweep(nw, freqs, ref, s.Probes, func(p Point) error { red = append(red, p); return nil }, nil); err != nil {
			t.Fatal(err)
		}
		lu := sweepWith(t, nw, freqs, s, engineLU)
		if d := sweepsDiffer(red, lu, 1e-9); d != "" {
			t.Errorf("trial %d (n = %d, %d ports): %s", trial, nw.N, len(nw.Ports), d)
		}
	}
	t.Logf("%d of %d random networks passed the Schur form's check", passed, trials)
	if passed < trials*9/10 {
		t.Errorf("only %d of %d random networks passed the Schur form's check", passed, trials)
	}
}

// TestNoiseEngines: noise computed with its adjoint solves on the reduced
// engine equals noise on the dense LU to 1e-9 relative (each source's
// contribution above 1e-13 of the largest, the total and the gain), on
// biased circuits (the demos, diode-loaded RC and LC ladders) with a node
// output, an input port or none, and long log sweeps; most take the
// reduction.
func TestNoiseEngines(t *testing.T) {
	_, networks := demoNetworks(t)
	for _, sections := range []int{3, 7, 12, 20} {
		networks = append(networks, network(t, diodeLadder(sections)))
	}
	for _, n := range []int{21, 45, 90} {
		networks = append(networks, network(t, fixture.Ladder(n)))
	}
	reduced, trials := 0, 0
	rng := rand.New(rand.NewPCG(53, 1))
	for k, nw := range networks {
		for _, input := range []int{-1, 0} {
			trials++
			var named []string // the circuit's own nodes, not a junction's internal one
			for name := range nw.Nodes {
				named = append(named, name)
			}
			slices.Sort(named)
			s := NoiseSettings{Input: input, Output: Output{Port: -1, Node: named[rng.IntN(len(named))]}}
			lo := math.Pow(10, 5+3*rng.Float64())
			freqs, _ := LogGrid(lo, lo*math.Pow(10, 1+2*rng.Float64()), 40)
			a, err := noiseSweep(nw, freqs, s, engineReduced)
			if err != nil {
				t.Fatal(err)
			}
			b, err := noiseSweep(nw, freqs, s, engineLU)
			if err != nil {
				t.Fatal(err)
			}
			v, _ := newNoise(nw, s, freqs, engineReduced)
			if _, ok := v.sys.(*reduction); ok {
				reduced++
			}
			for j := range b.Points {
				p, q := a.Points[j], b.Points[j]
				big := 0.0
				for _, c := range q.Contributions {
					big = math.Max(big, c)
				}
				for i, c := range q.Contributions {
					if d := math.Abs(p.Contributions[i] - c); d > 1e-9*c+1e-13*big {
						t.Fatalf("network %d (n = %d) at %g Hz: source %s contributes %g against %g", k, nw.N, q.FrequencyHz, b.Sources[i].Name, p.Contributions[i], c)
					}
				}
				if d := math.Abs(p.Total - q.Total); d > 1e-9*q.Total {
					t.Fatalf("network %d at %g Hz: total %g against %g", k, q.FrequencyHz, p.Total, q.Total)
				}
				if d := cmplx.Abs(p.Gain - q.Gain); d > 1e-9*cmplx.Abs(q.Gain)+1e-13 {
					t.Fatalf("network %d at %g Hz: gain %v against %v", k, q.FrequencyHz, p.Gain, q.Gain)
				}
			}
		}
	}
	t.Logf("%d of %d noise sweeps ran on the reduction", reduced, trials)
	if reduced < trials*3/4 {
		t.Errorf("only %d of %d noise sweeps ran on the reduction", reduced, trials)
	}
}

// checkSolves factors r at a random w near sigma with a random adjoint
// right-hand side and checks its fused adjoint, plain and transpose
// solves against the dense LU of H + jwT; it returns the right-hand side
// it used.
func checkSolves(t *testing.T, rng *rand.Rand, r *reduction, sigma float64, what string) []complex128 {
	t.Helper()
	n := r.n
	w := sigma * math.Pow(10, 4*rng.Float64()-2)
	adjRHS := make([]float64, n)
	for i := range adjRHS {
		adjRHS[i] = rng.NormFloat64()
	}
	r.adjRHS = adjRHS
	err := r.factor(w)
	r.adjRHS = nil
	if err != nil {
		t.Fatal(err)
	}
	f := newLU(n)
	f.load(r.h, r.t, n, n, w)
	if err := f.factor(); err != nil {
		t.Fatal(err)
	}
	v := make([]complex128, n)
	for i, a := range adjRHS {
		v[i] = complex(a, 0)
	}
	f.solveT(v)
	if d := maxRel(r.adj, v); d > 1e-10 {
		t.Errorf("%s: the adjoint differs from the dense LU by %g", what, d)
	}
	b := make([]complex128, n)
	for i := range b {
		b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	for _, tr := range []bool{false, true} {
		x, y := append([]complex128(nil), b...), append([]complex128(nil), b...)
		if tr {
			r.solveYT(x)
			f.solveT(y)
		} else {
			r.solveY(x)
			f.solve(y)
		}
		if d := maxRel(x, y); d > 1e-10 {
			t.Errorf("%s (transpose %v): differs from the dense LU by %g", what, tr, d)
		}
	}
	return b
}

// TestLadderAgainstABCD: a lossy LC ladder between 50 Ω ports, long
// enough for the reduced engine, against the cascade of its sections'
// ABCD matrices (Pozar, "Microwave Engineering", 4th ed., 2012, sec. 4.4,
// Tables 4.1 and 4.2): series Z = R + jwL is [[1, Z], [0, 1]], shunt
// Y = jwC is [[1, 0], [Y, 1]], and with equal reference impedances
// S21 = 2 / (A + B/Z0 + C Z0 + D), S11 = (A + B/Z0 - C Z0 - D) / (same).
// Each form of the reduction, forced, and the automatic choice must agree
// with the cascade to 1e-9 (floor 1e-12), and their group delay with the
// cascade's phase slope to 1e-6 (with the floor carried through S'/S).
func TestLadderAgainstABCD(t *testing.T) {
	const sections, z0 = 24, 50.0
	const r, l, c = 0.5, 10e-9, 4e-12 // per section; cutoff 1/(π sqrt(LC)) ≈ 1.6 GHz
	nw := network(t, lossyLadder("name: lossy LC ladder\n", sections, r, l, c, z0))
	freqs, err := LinearGrid(10e6, 2e9, 400)
	if err != nil {
		t.Fatal(err)
	}
	cascade := func(hz float64) (s11, s21 complex128) {
		w := 2 * math.Pi * hz
		m := [2][2]complex128{{1, 0}, {0, 1}}
		mul := func(a, b [2][2]complex128) [2][2]complex128 {
			return [2][2]complex128{
				{a[0][0]*b[0][0] + a[0][1]*b[1][0], a[0][0]*b[0][1] + a[0][1]*b[1][1]},
				{a[1][0]*b[0][0] + a[1][1]*b[1][0], a[1][0]*b[0][1] + a[1][1]*b[1][1]},
			}
		}
		series := [2][2]complex128{{1, complex(r, w*l)}, {0, 1}}
		shunt := [2][2]complex128{{1, 0}, {complex(0, w*c), 1}}
		for k := 0; k < sections; k++ {
			m = mul(mul(m, series), shunt)
		}
		a, bb, cc, d := m[0][0], m[0][1], m[1][0], m[1][1]
		den := a + bb/z0 + cc*z0 + d
		return (a + bb/z0 - cc*z0 - d) / den, 2 / den
	}
	ref := []float64{z0, z0}
	check := func(what string, pts []Point) {
		t.Helper()
		if len(pts) != len(freqs) {
			t.Fatalf("%s: %d points, want %d", what, len(pts), len(freqs))
		}
		for k, p := range pts {
			s11, s21 := cascade(freqs[k])
			for _, q := range []struct {
				name      string
				got, want complex128
			}{{"S11", p.S[0][0], s11}, {"S21", p.S[1][0], s21}, {"S12", p.S[0][1], s21}} {
				if d := cmplx.Abs(q.got - q.want); d > 1e-9*cmplx.Abs(q.want)+1e-12 {
					t.Fatalf("%s at %g Hz: %s = %v, the ABCD cascade gives %v", what, freqs[k], q.name, q.got, q.want)
				}
			}
			// Group delay -d arg S21/dw by a central difference of the
			// cascade, h = 1e-6 of the frequency: truncation error of order
			// h² times the phase's third derivative, and rounding of order
			// 1e-16 over the phase step, both far below the 1e-6 asked.
			h := 1e-6 * freqs[k]
			_, up := cascade(freqs[k] + h)
			_, down := cascade(freqs[k] - h)
			tau := -cmplx.Phase(up/down) / (2 * 2 * math.Pi * h)
			// Where S21 vanishes (the stop band, down to -150 dB here) its
			// absolute floor 1e-12 carries into S'/S: the delay is held to
			// that floor too, as the engine's own check holds it
			// (pointsDiffer).
			floor := 1e-12 * (math.Abs(tau) + 1/(2*math.Pi*freqs[k])) / cmplx.Abs(s21)
			if d := math.Abs(p.GroupDelay - tau); d > 1e-6*math.Abs(tau)+floor {
				t.Fatalf("%s at %g Hz: group delay %g s, the cascade's phase slope gives %g s", what, freqs[k], p.GroupDelay, tau)
			}
		}
	}
	lo, hi, _ := sweepRange(freqs)
	for _, form := range []reductionForm{formShifted, formSchur, formTriangular} {
		rd, err := reduceFor(nw, lo, hi, form)
		if err != nil {
			t.Fatalf("%v: %v", form, err)
		}
		if !rd.sweepAccurate(nw, ref, nil, lo, hi) {
			t.Errorf("%v: fails its accuracy check", form)
			continue
		}
		var pts []Point
		if _, err := rd.sweep(nw, freqs, ref, nil, func(p Point) error { pts = append(pts, p); return nil }, nil); err != nil {
			t.Fatal(err)
		}
		check(form.String(), pts)
	}
	r0, _ := sweepEngine(nw, freqs, ref, nil, engineAuto)
	if r0 == nil {
		t.Fatalf("n = %d, %d points: the automatic choice took the LU", nw.N, len(freqs))
	}
	t.Logf("n = %d, %d points: the automatic choice took the %v form", nw.N, len(freqs), r0.form)
	check("automatic", sweepWith(t, nw, freqs, Settings{}, engineAuto))
	check("dense LU", sweepWith(t, nw, freqs, Settings{}, engineLU))
}

// TestLadderNoiseNyquist: the lossy ladder of TestLadderAgainstABCD with
// everything at 290 K, the circuit and both ports' terminations: a
// passive network in thermal equilibrium, whose noise voltage at a node is
// 4kT Re Z, Z the impedance from that node to ground (Nyquist, Phys. Rev.
// 32, 1928; for networks, Twiss, J. Appl. Phys. 26, 1955). Z at the output
// node is the ladder seen from its output, its input terminated by Z0,
// (D Z0 + B)/(C Z0 + A) from the ABCD cascade (Pozar sec. 4.4), in
// parallel with the output port's Z0. Noise runs its adjoint solves on
// the reduced engine over 400 points; every point must agree to 1e-9.
func TestLadderNoiseNyquist(t *testing.T) {
	const sections, z0 = 24, 50.0
	const r, l, c = 0.5, 10e-9, 4e-12
	nw := network(t, lossyLadder("name: lossy LC ladder at 290 K\ntemperature: 290K\n", sections, r, l, c, z0))
	freqs, err := LinearGrid(10e6, 2e9, 400)
	if err != nil {
		t.Fatal(err)
	}
	s := NoiseSettings{Input: -1, Output: Output{Port: -1, Node: fmt.Sprintf("n%d", sections)}}
	v, err := newNoise(nw, s, freqs, engineAuto)
	if err != nil {
		t.Fatal(err)
	}
	rd, ok := v.sys.(*reduction)
	if !ok {
		t.Fatalf("n = %d, %d points: the noise took the LU", nw.N, len(freqs))
	}
	res, err := Noise(nw, freqs, s)
	if err != nil {
		t.Fatal(err)
	}
	const kT4 = 4 * 1.380649e-23 * 290 // CODATA 2018 (exact in SI 2019)
	for k, p := range res.Points {
		w := 2 * math.Pi * freqs[k]
		m := [2][2]complex128{{1, 0}, {0, 1}}
		series := complex(r, w*l)
		shunt := complex(0, w*c)
		for j := 0; j < sections; j++ {
			// m · [[1, Z], [0, 1]] · [[1, 0], [Y, 1]]
			a, bb := m[0][0], m[0][0]*series+m[0][1]
			cc, d := m[1][0], m[1][0]*series+m[1][1]
			m = [2][2]complex128{{a + bb*shunt, bb}, {cc + d*shunt, d}}
		}
		zout := (m[1][1]*z0 + m[0][1]) / (m[1][0]*z0 + m[0][0])
		z := zout * z0 / (zout + z0)
		want := kT4 * real(z)
		if d := math.Abs(p.Total - want); d > 1e-9*want {
			t.Fatalf("at %g Hz: output noise %g V²/Hz, 4kT Re Z gives %g (Re Z = %g Ω)", freqs[k], p.Total, want, real(z))
		}
	}
	t.Logf("n = %d, %d points on the %v form: output noise equals 4kT Re Z", nw.N, len(freqs), rd.form)
}

// lossyLadder returns a circuit file, opening with head, of sections
// sections of series r and l and shunt c between two ports of z0.
func lossyLadder(head string, sections int, r, l, c, z0 float64) string {
	var b strings.Builder
	b.WriteString(head + "parts:\n")
	for k := 1; k <= sections; k++ {
		fmt.Fprintf(&b, "  - {type: resistor, name: R%d, between: [n%d, m%d], value: %g}\n", k, k-1, k, r)
		fmt.Fprintf(&b, "  - {type: inductor, name: L%d, between: [m%d, n%d], value: %gH}\n", k, k, k, l)
		fmt.Fprintf(&b, "  - {type: capacitor, name: C%d, between: [n%d, gnd], value: %gF}\n", k, k, c)
	}
	fmt.Fprintf(&b, "ports:\n  - {name: in, node: n0, impedance: %g}\n  - {name: out, node: n%d, impedance: %g}\n", z0, sections, z0)
	return b.String()
}

// TestReducedSweepHard: the hard circuits of testdata/hard that have
// ports (stacked and antiparallel junctions, rectifiers, breakdown, tiny
// and huge values), swept over 1 MHz to 10 GHz (a shifted form) and over
// 1 kHz to 100 GHz (the Hessenberg-triangular form first): the reduced
// engine, forced, equals the dense LU to 1e-9 relative.
func TestReducedSweepHard(t *testing.T) {
	files, _ := filepath.Glob("../testdata/hard/*.yaml")
	swept := 0
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		c, err := circuit.Parse(f, data)
		if err != nil {
			t.Fatal(err)
		}
		p, err := bias.Solve(c, bias.Settings{})
		if err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		nw, err := smallsignal.New(p)
		if err != nil {
			t.Fatal(err)
		}
		if len(nw.Ports) == 0 {
			continue
		}
		for _, span := range [][2]float64{{1e6, 1e10}, {1e3, 1e11}} {
			freqs, _ := LogGrid(span[0], span[1], 40)
			red := sweepWith(t, nw, freqs, Settings{}, engineReduced)
			lu := sweepWith(t, nw, freqs, Settings{}, engineLU)
			if d := sweepsDiffer(red, lu, 1e-9); d != "" {
				t.Errorf("%s (n = %d), %g to %g Hz: %s", filepath.Base(f), nw.N, span[0], span[1], d)
			}
			swept++
		}
	}
	t.Logf("%d sweeps of hard circuits", swept)
	if swept < 20 {
		t.Errorf("only %d sweeps of hard circuits", swept)
	}
}

// TestTinyReductions: every form reduces networks of one and two unknowns
// (gonum's Dgehrd wants exactly n-1 reflector scalars: none for n = 1),
// passes its check and sweeps them as the LU does.
func TestTinyReductions(t *testing.T) {
	for _, src := range []string{`name: one node
parts:
  - {type: resistor, name: R, between: [a, gnd], value: 100}
  - {type: capacitor, name: C, between: [a, gnd], value: 1pF}
ports:
  - {name: p, node: a, impedance: 50}
`, `name: two nodes
parts:
  - {type: resistor, name: R, between: [a, b], value: 100}
  - {type: capacitor, name: C, between: [b, gnd], value: 1pF}
ports:
  - {name: p, node: a, impedance: 50}
  - {name: q, node: b, impedance: 50}
`} {
		nw := network(t, src)
		ref := make([]float64, len(nw.Ports))
		for i, p := range nw.Ports {
			ref[i] = p.Impedance
		}
		freqs, _ := LinearGrid(1e6, 1e9, 100)
		lu := sweepWith(t, nw, freqs, Settings{}, engineLU)
		for _, form := range []reductionForm{formShifted, formSchur, formTriangular} {
			r, err := reduceFor(nw, 1e6, 1e9, form)
			if err != nil {
				t.Fatalf("n = %d, %v: %v", nw.N, form, err)
			}
			if !r.sweepAccurate(nw, ref, nil, 1e6, 1e9) {
				t.Errorf("n = %d, %v: fails its accuracy check", nw.N, form)
			}
			var pts []Point
			if _, err := r.sweep(nw, freqs, ref, nil, func(p Point) error { pts = append(pts, p); return nil }, nil); err != nil {
				t.Fatal(err)
			}
			if d := sweepsDiffer(pts, lu, 1e-9); d != "" {
				t.Errorf("n = %d, %v: %s", nw.N, form, d)
			}
		}
	}
}

// first returns the reduction of a sweepEngine result.
func first(r *reduction, _ []Engine) *reduction { return r }
