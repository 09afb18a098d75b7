package ac

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"strings"
	"testing"
	"time"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/cblas128"

	"qpoint/ac/internal/fixture"
	"qpoint/smallsignal"
)

// Benchmarks of the sweep engines (BENCHMARKS.md quotes them):
//
//	go test -run '^$' -bench 'Engines' -benchtime 1x -count 5 ./ac/
//	go test -run '^$' -bench 'SteadyState' -count 5 ./ac/
//
// and, in package bias, the DC solve of diode ladders:
//
//	go test -run '^$' -bench 'Ladder' -count 5 ./bias/

// benchNetwork returns a network of exactly n unknowns: the ladder or a
// random one (randomMNA: couplings everywhere). A random network whose
// reduction fails the accuracy check over the benchmark's sweep would be
// swept by the LU; it is skipped, and the count of those skipped is
// reported as rejected-networks.
func benchNetwork(b *testing.B, kind string, n int) (nw *smallsignal.Network, rejected int) {
	b.Helper()
	switch kind {
	case "ladder":
		nw = network(b, fixture.Ladder(n))
		if nw.N != n {
			b.Fatalf("ladder has %d unknowns, want %d", nw.N, n)
		}
		return nw, 0
	case "random":
		freqs, _ := LinearGrid(1e6, 10e9, 3)
		for seed := uint64(0); seed < 1000; seed++ {
			for nodes := n / 3; nodes <= n; nodes++ {
				nw = randomMNA(rand.New(rand.NewPCG(41, seed<<20|uint64(nodes))), nodes)
				if nw.N == n {
					ref := make([]float64, len(nw.Ports))
					for i, p := range nw.Ports {
						ref[i] = p.Impedance
					}
					if first(sweepEngine(nw, freqs, ref, []string{nw.Names[0]}, engineReduced)) != nil {
						return nw, rejected
					}
					rejected++
					break
				}
				if nw.N > n {
					break
				}
			}
		}
		b.Fatalf("no random network of %d unknowns", n)
	}
	return nil, 0
}

// matVec sets y = A x for the row-major n×n complex A by gonum's Zgemv
// (cblas128.Gemv, assembly kernels on amd64): the O(n²) floor a per-point
// cost is measured against.
func matVec(a, x, y []complex128) {
	n := len(x)
	cblas128.Gemv(blas.NoTrans, 1, cblas128.General{Rows: n, Cols: n, Data: a, Stride: n},
		cblas128.Vector{N: n, Data: x, Inc: 1}, 0, cblas128.Vector{N: n, Data: y, Inc: 1})
}

// matVecGo is the same product as a plain Go loop, the way the package's
// own kernels were first written: for context beside Zgemv.
func matVecGo(a, x, y []complex128) {
	n := len(x)
	for i := range y {
		row := a[i*n : i*n+n]
		var s complex128
		for j, v := range row {
			s += v * x[j]
		}
		y[i] = s
	}
}

var sink complex128

// BenchmarkEngines measures, for each network and size, the per-point
// cost of both engines and of one complex matrix-vector product. Others'
// work shares the machine, so the three are timed in interleaved batches
// (10 LU points, 2 at n = 500; 100 reduced points, long enough that the
// LU's eviction of the reduction from cache costs little; 400 products)
// and each is the sum over its batches: a burst of load falls on all
// three alike.
//
//   - lu-ns/pt: the dense LU sweep, per point (200 points; 20 at n = 500);
//   - point-ns: one point on the reduced engine, the reduction made;
//   - matvec-ns: one n×n complex matrix-vector product (gonum's Zgemv);
//   - matvec-go-ns: the same as a plain Go loop (100 per batch);
//   - setup-ms: the reduction and its accuracy check (median of three);
//   - reduced-ns/pt: a 1000-point reduced sweep per point,
//     point-ns + setup/1000;
//   - sweep-ns/pt: the same timed end to end, one sweep through Sweep's
//     own path (more exposed to load: one long interval);
//   - speedup: lu-ns/pt over reduced-ns/pt;
//   - form: the reduction's form (0 shifted Hessenberg, 1 shifted Schur,
//     2 Hessenberg-triangular);
//   - point/matvec and pt/matvec: point-ns and reduced-ns/pt over
//     matvec-ns.
//
// Run with -benchtime 1x: one iteration is one full measurement.
func BenchmarkEngines(b *testing.B) {
	const points = 1000
	freqs, err := LinearGrid(1e6, 10e9, points)
	if err != nil {
		b.Fatal(err)
	}
	for _, kind := range []string{"ladder", "random"} {
		for _, n := range []int{20, 50, 200, 500} {
			b.Run(fmt.Sprintf("%s/n=%d", kind, n), func(b *testing.B) {
				nw, rejected := benchNetwork(b, kind, n)
				s := Settings{Probes: []string{nw.Names[0]}}
				ref := make([]float64, len(nw.Ports))
				for i, p := range nw.Ports {
					ref[i] = p.Impedance
				}
				if first(sweepEngine(nw, freqs, ref, s.Probes, engineReduced)) == nil {
					b.Fatalf("%s n=%d: the reduction fails its accuracy check", kind, n)
				}
				luPoints, luBatch := 200, 10
				if n >= 500 {
					luPoints, luBatch = 20, 2
				}
				discard := func(Point) error { return nil }
				a := make([]complex128, n*n)
				for i := range a {
					a[i] = complex(float64(i%7), float64(i%5))
				}
				x, y := make([]complex128, n), make([]complex128, n)
				for i := range x {
					x[i] = complex(1, float64(i))
				}
				lo, hi, _ := sweepRange(freqs)
				setup := func() *reduction {
					r := reduceAccurate(nw, lo, hi, points, func(r *reduction) bool {
						return r.sweepAccurate(nw, ref, s.Probes, lo, hi)
					})
					if r == nil {
						b.Fatal("reduction failed")
					}
					return r
				}
				var lu, pt, mv, mvGo, sw, setups []float64
				var form reductionForm
				for b.Loop() {
					var tSetup []float64
					var r *reduction
					for range 3 {
						t0 := time.Now()
						r = setup()
						tSetup = append(tSetup, float64(time.Since(t0).Nanoseconds()))
					}
					form = r.form
					ev := r.points(nw, ref, s.Probes)
					var tLU, tPt, tMV, tGo time.Duration
					nLU, nPt, nMV := 0, 0, 0
					for k := 0; nLU < luPoints; k++ {
						batch := freqs[(k*luBatch)%points : (k*luBatch)%points+luBatch]
						t0 := time.Now()
						if _, _, err := sweep(nw, batch, s, discard, engineLU); err != nil {
							b.Fatal(err)
						}
						t1 := time.Now()
						for j := range 100 {
							if _, ok := ev.at(freqs[(k*100+j)%points], nil); !ok {
								b.Fatal("zero pivot")
							}
						}
						t2 := time.Now()
						for range 400 {
							matVec(a, x, y)
							x, y = y, x
						}
						t3 := time.Now()
						for range 100 {
							matVecGo(a, x, y)
							x, y = y, x
						}
						t4 := time.Now()
						sink = x[0]
						tLU += t1.Sub(t0)
						tPt += t2.Sub(t1)
						tMV += t3.Sub(t2)
						tGo += t4.Sub(t3)
						nLU, nPt, nMV = nLU+luBatch, nPt+100, nMV+400
					}
					t0 := time.Now()
					if _, _, err := sweep(nw, freqs, s, discard, engineReduced); err != nil {
						b.Fatal(err)
					}
					sw = append(sw, float64(time.Since(t0).Nanoseconds())/points)
					lu = append(lu, float64(tLU.Nanoseconds())/float64(nLU))
					pt = append(pt, float64(tPt.Nanoseconds())/float64(nPt))
					mv = append(mv, float64(tMV.Nanoseconds())/float64(nMV))
					mvGo = append(mvGo, float64(tGo.Nanoseconds())/float64(nMV/4))
					setups = append(setups, median(tSetup))
				}
				luM, ptM, mvM, setupM := median(lu), median(pt), median(mv), median(setups)
				b.ReportMetric(float64(form), "form")
				red := ptM + setupM/points
				b.ReportMetric(luM, "lu-ns/pt")
				b.ReportMetric(ptM, "point-ns")
				b.ReportMetric(mvM, "matvec-ns")
				b.ReportMetric(median(mvGo), "matvec-go-ns")
				b.ReportMetric(setupM/1e6, "setup-ms")
				b.ReportMetric(red, "reduced-ns/pt")
				b.ReportMetric(median(sw), "sweep-ns/pt")
				b.ReportMetric(luM/red, "speedup")
				b.ReportMetric(ptM/mvM, "point/matvec")
				b.ReportMetric(float64(rejected), "rejected-networks")
				b.ReportMetric(red/mvM, "pt/matvec")
			})
		}
	}
}

func median(v []float64) float64 {
	s := append([]float64(nil), v...)
	slices.Sort(s)
	if len(s)%2 == 1 {
		return s[len(s)/2]
	}
	return (s[len(s)/2-1] + s[len(s)/2]) / 2
}

// TestReducedSweepStreams: a reduced sweep allocates per point only the
// point it hands to visit (the S-matrix, impedances and probes: a few
// hundred bytes), nothing of order n or n², so a sweep's memory is the
// reduction's O(n²) whatever its point count.
func TestReducedSweepStreams(t *testing.T) {
	rng := rand.New(rand.NewPCG(43, 1))
	nw := randomMNA(rng, 60)
	ref := make([]float64, len(nw.Ports))
	for i, p := range nw.Ports {
		ref[i] = p.Impedance
	}
	r, err := reduceFor(nw, 1e6, 1e9, formShifted)
	if err != nil {
		t.Fatal(err)
	}
	bytesFor := func(points int) float64 {
		freqs, _ := LinearGrid(1e6, 1e9, points)
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		if _, err := r.sweep(nw, freqs, ref, []string{nw.Names[0]}, func(Point) error { return nil }, nil); err != nil {
			t.Fatal(err)
		}
		runtime.ReadMemStats(&after)
		return float64(after.TotalAlloc - before.TotalAlloc)
	}
	small, large := bytesFor(100), bytesFor(1100)
	perPoint := (large - small) / 1000
	np := float64(len(nw.Ports))
	limit := 64 + 48*np + 16*np*np + 32*np + 64 // slice headers, S rows, Z_in, a probe
	t.Logf("n = %d, %d ports: %.0f bytes per point, %.0f per sweep besides", nw.N, len(nw.Ports), perPoint, small-100*perPoint)
	if perPoint > limit || math.IsNaN(perPoint) {
		t.Errorf("%.0f bytes allocated per point, want at most %.0f (the point itself); n² complex would be %d", perPoint, limit, 16*nw.N*nw.N)
	}
}

// BenchmarkForms measures, on the diode-loaded ladder for a sweep from
// 1 MHz to 10 GHz, what each form of the reduction costs to set up (the
// reduction and its accuracy check, median of three) and per point (the
// median of five batches), and from these the point count at which the
// Schur form's dearer setup is repaid by its cheaper points, in all and
// per unknown (break-even, break-even/n): the basis of
// schurPointsPerUnknown.
//
//	go test -run '^$' -bench Forms -benchtime 1x -count 3 ./ac/
func BenchmarkForms(b *testing.B) {
	for _, n := range []int{20, 50, 100, 200, 500} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			nw := network(b, fixture.Ladder(n))
			ref := []float64{50, 50}
			probes := []string{nw.Names[0]}
			setup := map[reductionForm]float64{}
			point := map[reductionForm]float64{}
			for b.Loop() {
				for _, form := range []reductionForm{formShifted, formSchur, formTriangular} {
					var r *reduction
					var times []float64
					for range 3 {
						t0 := time.Now()
						var err error
						r, err = reduceFor(nw, 1e6, 10e9, form)
						if err != nil || !r.sweepAccurate(nw, ref, probes, 1e6, 10e9) {
							b.Fatalf("%v: the reduction fails (%v)", form, err)
						}
						times = append(times, float64(time.Since(t0).Nanoseconds()))
					}
					setup[form] = median(times)
					ev := r.points(nw, ref, probes)
					per := max(1, 2_000_000/(n*n))
					var batches []float64
					for k := range 5 {
						t0 := time.Now()
						for j := range per {
							if _, ok := ev.at(1e9+float64(k*per+j)*1e5, nil); !ok {
								b.Fatal("zero pivot")
							}
						}
						batches = append(batches, float64(time.Since(t0).Nanoseconds())/float64(per))
					}
					point[form] = median(batches)
				}
			}
			for _, form := range []reductionForm{formShifted, formSchur, formTriangular} {
				name := strings.ReplaceAll(form.String(), " ", "-")
				b.ReportMetric(setup[form]/1e6, name+"-setup-ms")
				b.ReportMetric(point[form], name+"-point-ns")
			}
			even := (setup[formSchur] - setup[formShifted]) / (point[formShifted] - point[formSchur])
			b.ReportMetric(even, "break-even")
			b.ReportMetric(even/float64(n), "break-even/n")
		})
	}
}

// factorPlain is lu.factor without its skip of zero multipliers: the
// textbook dense elimination (Golub and Van Loan, algorithm 3.4.1) that
// touches every entry below and right of each pivot, whatever the
// sparsity. It is the baseline a dense solver with no regard for zeros
// would give.
func (f *lu) factorPlain() error {
	n, a := f.n, f.a
	for k := 0; k < n; k++ {
		p, big := k, cabs1(a[k*n+k])
		for i := k + 1; i < n; i++ {
			if v := cabs1(a[i*n+k]); v > big {
				p, big = i, v
			}
		}
		f.piv[k] = p
		if big == 0 {
			return errSingular
		}
		if p != k {
			rk, rp := a[k*n:(k+1)*n], a[p*n:(p+1)*n]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
		}
		inv := 1 / a[k*n+k]
		f.inv[k] = inv
		rowK := a[k*n : (k+1)*n]
		for i := k + 1; i < n; i++ {
			rowI := a[i*n : (i+1)*n]
			l := rowI[k] * inv
			rowI[k] = l
			for j := k + 1; j < n; j++ {
				rowI[j] -= l * rowK[j]
			}
		}
	}
	return nil
}

// BenchmarkLUBaselines: one factorisation of Y(jω) at 1 GHz for the
// ladder and a random network of 200 unknowns, by the LU the sweeps use
// (which skips a row whose multiplier is zero: on a sparse ladder most
// are) and by the plain dense elimination. BenchmarkEngines's "LU per
// point" column is the first; this gives the second beside it.
//
//	go test -run '^$' -bench LUBaselines -count 5 ./ac/
func BenchmarkLUBaselines(b *testing.B) {
	for _, kind := range []string{"ladder", "random"} {
		nw, _ := benchNetwork(b, kind, 200)
		g, c := nw.G.RawMatrix(), nw.C.RawMatrix()
		f := newLU(nw.N)
		w := 2 * math.Pi * 1e9
		for _, plain := range []bool{false, true} {
			name := kind + "/skipping-zeros"
			if plain {
				name = kind + "/plain"
			}
			b.Run(name, func(b *testing.B) {
				for b.Loop() {
					f.load(g.Data, c.Data, g.Stride, c.Stride, w)
					var err error
					if plain {
						err = f.factorPlain()
					} else {
						err = f.factor()
					}
					if err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}
