package ac

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"

	"qpoint/ac/internal/fixture"
	"qpoint/smallsignal"
)

// demoNetworks loads and linearises every demo circuit, by file name.
func demoNetworks(tb testing.TB) (names []string, networks []*smallsignal.Network) {
	tb.Helper()
	files, _ := filepath.Glob("../testdata/demo/*.yaml")
	if len(files) == 0 {
		tb.Fatal("no demo circuits found")
	}
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			tb.Fatal(err)
		}
		names = append(names, filepath.Base(f))
		networks = append(networks, network(tb, string(data)))
	}
	return names, networks
}

func run(t *testing.T, nw *smallsignal.Network, freqs ...float64) *Response {
	t.Helper()
	r, err := Run(nw, freqs, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func near(a, b complex128, rel float64) bool {
	return cmplx.Abs(a-b) <= rel*math.Max(cmplx.Abs(b), 1e-300)
}

// TestRCLowPass: a first-order RC low-pass is 3.0103 dB down with -45°
// phase at 1/(2π R C) (textbook closed form, 20 log10(1/√2)). The
// generator's 50 Ω adds to R.
func TestRCLowPass(t *testing.T) {
	nw := network(t, `
parts:
  - {type: resistor,  name: R, between: [in, out], value: 950}
  - {type: capacitor, name: C, between: [out, gnd], value: 10nF}
  - {type: resistor,  name: Rdc, between: [out, gnd], value: 1T}
ports:
  - {name: in, node: in, impedance: 50, coupling: ac}
probes: [out]
`)
	corner := 1 / (2 * math.Pi * 1000 * 10e-9)
	r := run(t, nw, corner)
	h := r.Points[0].Probes[0]
	db := 20 * math.Log10(cmplx.Abs(h))
	deg := cmplx.Phase(h) * 180 / math.Pi
	// 1 TΩ across C shifts the result by about 1e-9.
	if math.Abs(db+3.0103) > 1e-4 || math.Abs(deg+45) > 1e-6 {
		t.Errorf("at the corner: %.5f dB, %.6f°; want -3.0103 dB, -45°", db, deg)
	}
}

// TestSeriesAndShunt compares S-parameters of a series impedance Z and a
// shunt admittance Y between two 50 Ω ports with the closed forms of Pozar,
// "Microwave Engineering", 4th ed., 2012, ch. 4:
//
//	series: S11 = Z/(2Z0 + Z), S21 = 2Z0/(2Z0 + Z)
//	shunt:  S11 = -Y Z0/(2 + Y Z0), S21 = 2/(2 + Y Z0)
func TestSeriesAndShunt(t *testing.T) {
	series := network(t, `
parts:
  - {type: resistor,  name: R, between: [a, m], value: 33}
  - {type: inductor,  name: L, between: [m, b], value: 12nH}
ports:
  - {name: p1, node: a, impedance: 50}
  - {name: p2, node: b, impedance: 50}
`)
	shunt := network(t, `
parts:
  - {type: resistor,  name: R, between: [a, m], value: 20}
  - {type: capacitor, name: C, between: [m, gnd], value: 3.3pF}
ports:
  - {name: p1, node: a, impedance: 50}
  - {name: p2, node: a, impedance: 50}
`)
	z0 := complex(50, 0)
	for _, f := range []float64{1e6, 100e6, 1e9, 2.45e9, 10e9} {
		w := complex(0, 2*math.Pi*f)
		zs := 33 + w*12e-9
		ys := 1 / (20 + 1/(w*3.3e-12))
		for _, c := range []struct {
			name     string
			nw       *smallsignal.Network
			s11, s21 complex128
		}{
			{"series", series, zs / (2*z0 + zs), 2 * z0 / (2*z0 + zs)},
			{"shunt", shunt, -ys * z0 / (2 + ys*z0), 2 / (2 + ys*z0)},
		} {
			p := run(t, c.nw, f).Points[0]
			if !near(p.S[0][0], c.s11, 1e-12) || !near(p.S[1][0], c.s21, 1e-12) {
				t.Errorf("%s at %g Hz: S11 = %v, S21 = %v; Pozar's closed forms give %v, %v", c.name, f, p.S[0][0], p.S[1][0], c.s11, c.s21)
			}
			if !near(p.S[0][1], p.S[1][0], 1e-12) || !near(p.S[1][1], p.S[0][0], 1e-12) {
				t.Errorf("%s at %g Hz: symmetric network gives S12 = %v, S22 = %v", c.name, f, p.S[0][1], p.S[1][1])
			}
		}
	}
}

// TestLosslessUnitary: an LC network between resistive ports is lossless,
// so its S-matrix is unitary, S^H S = I (Pozar ch. 4), here to 1e-12.
func TestLosslessUnitary(t *testing.T) {
	nw := network(t, `
parts:
  - {type: inductor,  name: L1, between: [a, b], value: 8.2nH}
  - {type: capacitor, name: C1, between: [b, gnd], value: 2.2pF}
  - {type: inductor,  name: L2, between: [b, c], value: 15nH}
  - {type: capacitor, name: C2, between: [c, gnd], value: 1pF}
  - {type: capacitor, name: C3, between: [a, c], value: 0.5pF}
  - {type: inductor,  name: L3, between: [c, d], value: 4.7nH}
ports:
  - {name: p1, node: a, impedance: 50}
  - {name: p2, node: c, impedance: 75}
  - {name: p3, node: d, impedance: 25}
`)
	r := run(t, nw, 1e7, 3e8, 1e9, 1.7e9, 5e9)
	for _, p := range r.Points {
		s := mat.NewCDense(3, 3, nil)
		for i := range 3 {
			for j := range 3 {
				s.Set(i, j, p.S[i][j])
			}
		}
		for i := range 3 {
			for j := range 3 {
				var sum complex128
				for k := range 3 {
					sum += cmplx.Conj(s.At(k, i)) * s.At(k, j)
				}
				want := complex(0, 0)
				if i == j {
					want = 1
				}
				if cmplx.Abs(sum-want) > 1e-12 {
					t.Errorf("at %g Hz: (S^H S)[%d][%d] = %v, want %v", p.FrequencyHz, i, j, sum, want)
				}
			}
		}
	}
}

// TestDiodeDynamicResistance: a diode at 1 mA, n = 1, 300 K has
// r_d = n V_T / I = 25.85 Ω (common practice, "26 mV over the current");
// with C_j its impedance turns at 1/(2π r_d C) with -45° phase.
func TestDiodeDynamicResistance(t *testing.T) {
	nw := network(t, `
temperature: 300K
diode_models:
  m: {saturation_current: 1e-14, ideality: 1, zero_bias_capacitance: 2pF, built_in_potential: 0.8V, grading_coefficient: 0.5}
parts:
  - {type: current_source, name: I, from: gnd, to: a, value: 1mA}
  - {type: diode, name: D, anode: a, cathode: gnd, model: m}
ports:
  - {name: p, node: a, impedance: 50, coupling: ac}
`)
	d := nw.Diodes[0]
	rd := 1 / d.G1
	if math.Abs(rd-25.852) > 0.001 {
		t.Errorf("r_d at 1 mA = %.4f Ω, want 25.852 Ω", rd)
	}
	corner := 1 / (2 * math.Pi * rd * d.C1)
	z := run(t, nw, corner).Points[0].InputImpedance[0]
	if deg := cmplx.Phase(z) * 180 / math.Pi; math.Abs(deg+45) > 1e-9 || math.Abs(cmplx.Abs(z)-rd/math.Sqrt2) > 1e-9*rd {
		t.Errorf("at 1/(2π r C) = %g Hz: Z = %v (%.6f°), want |Z| = r/√2 = %g Ω at -45°", corner, z, deg, rd/math.Sqrt2)
	}
}

// TestDemosReciprocal: every demo circuit linearised at its bias is a
// passive reciprocal network, so S_ij = S_ji (Pozar ch. 4).
func TestDemosReciprocal(t *testing.T) {
	names, networks := demoNetworks(t)
	for k, nw := range networks {
		f := names[k]
		freqs, _ := LogGrid(1e6, 1e10, 5)
		for _, p := range run(t, nw, freqs...).Points {
			for i := range p.S {
				for j := range p.S {
					if !near(p.S[i][j], p.S[j][i], 1e-9) && cmplx.Abs(p.S[i][j]-p.S[j][i]) > 1e-13 {
						t.Errorf("%s at %g Hz: S%d%d = %v, S%d%d = %v", f, p.FrequencyHz, i+1, j+1, p.S[i][j], j+1, i+1, p.S[j][i])
					}
				}
			}
		}
	}
}

// TestLUAgainstRealEmbedding checks the complex LU against gonum's real LU
// of the equivalent real system [A_r -A_i; A_i A_r] (gonum.org/v1/gonum/mat).
func TestLUAgainstRealEmbedding(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := 0; trial < 50; trial++ {
		n := 1 + rng.IntN(30)
		f := newLU(n)
		big := mat.NewDense(2*n, 2*n, nil)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				v := complex(rng.NormFloat64(), rng.NormFloat64())
				if rng.IntN(3) == 0 {
					v = 0
				}
				f.a[i*n+j] = v
				big.Set(i, j, real(v))
				big.Set(i+n, j+n, real(v))
				big.Set(i, j+n, -imag(v))
				big.Set(i+n, j, imag(v))
			}
		}
		b := make([]complex128, n)
		rhs := mat.NewVecDense(2*n, nil)
		for i := range b {
			b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
			rhs.SetVec(i, real(b[i]))
			rhs.SetVec(i+n, imag(b[i]))
		}
		var want mat.VecDense
		if err := want.SolveVec(big, rhs); err != nil || f.factor() != nil {
			continue
		}
		cond := mat.Cond(big, 1)
		f.solve(b)
		for i := range b {
			w := complex(want.AtVec(i), want.AtVec(i+n))
			if cmplx.Abs(b[i]-w) > 1e-13*cond*(1+cmplx.Abs(w)) {
				t.Fatalf("trial %d: x[%d] = %v, real embedding gives %v", trial, i, b[i], w)
			}
		}
	}
}

func TestGrid(t *testing.T) {
	f, err := LogGrid(1e6, 1e9, 10)
	if err != nil {
		t.Fatal(err)
	}
	if len(f) != 31 || f[0] != 1e6 || f[30] != 1e9 || math.Abs(f[10]-1e7) > 1e-3 {
		t.Errorf("LogGrid(1 MHz, 1 GHz, 10) = %d points %g..%g, f[10] = %g", len(f), f[0], f[len(f)-1], f[10])
	}
	if _, err := LogGrid(1e-4, 1e3, 10); err == nil {
		t.Error("LogGrid below 1 mHz: no error")
	}
	if _, err := LogGrid(1e9, 1e6, 10); err == nil {
		t.Error("falling LogGrid: no error")
	}
}

// TestGroupDelay: the exact derivative agrees with a finite difference of
// the unwrapped phase.
func TestGroupDelay(t *testing.T) {
	nw := network(t, `
parts:
  - {type: inductor,  name: L1, between: [a, b], value: 10nH}
  - {type: capacitor, name: C1, between: [b, gnd], value: 4pF}
  - {type: inductor,  name: L2, between: [b, c], value: 10nH}
ports:
  - {name: p1, node: a, impedance: 50}
  - {name: p2, node: c, impedance: 50}
`)
	f0, h := 600e6, 1e3
	r := run(t, nw, f0-h, f0, f0+h)
	ph := func(k int) float64 { return cmplx.Phase(r.Points[k].S[1][0]) }
	fd := -(ph(2) - ph(0)) / (2 * math.Pi * 2 * h)
	if got := r.Points[1].GroupDelay; math.Abs(got-fd) > 1e-6*math.Abs(fd) {
		t.Errorf("group delay %g s, finite difference %g s", got, fd)
	}
}

// TestRunStats: Run says which engine solved the points: the LU for a
// short sweep of the small detector demo, the reduction for a long sweep
// of the 24-section ladder (a form that passed its accuracy check, so
// none refused before it), every point counted once.
func TestRunStats(t *testing.T) {
	small := network(t, demo(t, "detector"))
	freqs, _ := LogGrid(10e6, 6e9, 10)
	r, err := Run(small, freqs, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if r.Stats.Engine != EngineLU || r.Stats.LU != len(freqs) || r.Stats.Reduced != 0 {
		t.Errorf("detector: %+v; want the LU for all %d points", r.Stats, len(freqs))
	}
	big := network(t, fixture.Ladder(75))
	long, _ := LinearGrid(1e6, 1e9, 400)
	r, err = Run(big, long, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if r.Stats.Engine == EngineLU || r.Stats.Reduced+r.Stats.LU != len(long) || len(r.Stats.Refused) != 0 {
		t.Errorf("ladder: %+v; want a reduction over all %d points", r.Stats, len(long))
	}
}

var (
	network = fixture.Network
	demo    = fixture.Demo
)
