package ac

import (
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"

	"qpoint/ac/touchstone"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// TestTerminatedLineInputImpedance: the input impedance of a lossless line
// of impedance Z0 and electrical length βl ending in a load Z_L is
//
//	Z_in = Z0 (Z_L + j Z0 tan βl) / (Z0 + j Z_L tan βl)
//
// (Pozar, "Microwave Engineering", 4th ed., eq. 2.44); at a quarter wave
// it is Z0²/Z_L (Pozar eq. 2.48, the quarter-wave transformer). The load
// here is 30 Ω in series with 2 pF, a complex Z_L, and the analysis is the
// whole chain: circuit file, bias, the network's element rows, the LU.
func TestTerminatedLineInputImpedance(t *testing.T) {
	const z0, delay = 75.0, 250e-12 // a quarter wave at 1 GHz
	nw := network(t, fmt.Sprintf(`
parts:
  - {type: transmission_line, name: T1, ends: [a, b], impedance: %g, delay: %gs}
  - {type: resistor, name: RL, between: [b, m], value: 30}
  - {type: capacitor, name: CL, between: [m, gnd], value: 2pF}
ports:
  - {name: in, node: a, impedance: 50}
`, z0, delay))
	freqs := []float64{1e6, 3.3e8, 1e9, 1.7e9, 2e9, 5.1e9}
	r := run(t, nw, freqs...)
	if r.Stats.Engine != EngineLU || len(r.Stats.Elements) != 1 {
		t.Errorf("stats %+v: want the LU, named for T1", r.Stats)
	}
	worst := 0.0
	defer func() { t.Logf("largest relative error of Z_in against Pozar eq. 2.44: %.2g", worst) }()
	for _, p := range r.Points {
		w := 2 * math.Pi * p.FrequencyHz
		zl := complex(30, -1/(w*2e-12))
		bl := w * delay
		var want complex128
		if math.Abs(math.Cos(bl)) < 1e-12 {
			want = complex(z0*z0, 0) / zl // eq. 2.48
		} else {
			tn := complex(0, math.Tan(bl))
			want = complex(z0, 0) * (zl + complex(z0, 0)*tn) / (complex(z0, 0) + zl*tn)
		}
		got := p.InputImpedance[0]
		worst = math.Max(worst, cmplx.Abs(got-want)/cmplx.Abs(want))
		if cmplx.Abs(got-want) > 1e-9*cmplx.Abs(want) {
			t.Errorf("at %g Hz: Z_in = %v, Pozar eq. 2.44 gives %v (rel %.2g)", p.FrequencyHz, got, want, cmplx.Abs(got-want)/cmplx.Abs(want))
		}
	}
	// At the quarter wave exactly: Z0²/Z_L.
	w := 2 * math.Pi * 1e9
	zl := complex(30, -1/(w*2e-12))
	got := r.Points[2].InputImpedance[0]
	if want := complex(z0*z0, 0) / zl; cmplx.Abs(got-want) > 1e-9*cmplx.Abs(want) {
		t.Errorf("quarter wave: Z_in = %v, Z0²/Z_L = %v", got, want)
	}
}

// TestQuarterWaveStubs: an open stub a quarter wave long is a short at
// its frequency, and a shorted one an open (common practice; Pozar sec.
// 2.3): across a matched through line the open stub leaves |S21| = 0 and
// |S11| = 1, the shorted stub S21 = e^(-jβl) of the through line alone and
// S11 = 0, each to 1e-9. At DC the shorted stub holds its node at 0 V.
func TestQuarterWaveStubs(t *testing.T) {
	const f0 = 5.8e9
	through := 100e-12
	for _, c := range []struct {
		name, stub string
		open       bool
	}{
		{"open", "{type: transmission_line, name: S1, ends: [a, far], impedance: 35, electrical_length: 90deg@5.8GHz}", true},
		{"shorted", "{type: transmission_line, name: S1, ends: [a, gnd], impedance: 35, electrical_length: 90deg@5.8GHz}", false},
	} {
		nw := network(t, fmt.Sprintf(`
parts:
  - {type: voltage_source, name: V1, plus: v, minus: gnd, value: 1V}
  - {type: resistor, name: R1, between: [v, a], value: 1k}
  - {type: transmission_line, name: T0, ends: [a, c], impedance: 50, delay: %gs}
  - %s
ports:
  - {name: p1, node: a, impedance: 50, coupling: ac}
  - {name: p2, node: c, impedance: 50, coupling: ac}
`, through, c.stub))
		// The 1 kΩ feed loads the through line by 50/1000: de-embed it
		// by making it part of the check: the stub at f0 dominates.
		r := run(t, nw, f0)
		s := r.Points[0].S
		if c.open {
			t.Logf("open stub at f0: |S21| = %.2g, |S11| - 1 = %.2g", cmplx.Abs(s[1][0]), cmplx.Abs(s[0][0])-1)
			if cmplx.Abs(s[1][0]) > 1e-9 || math.Abs(cmplx.Abs(s[0][0])-1) > 1e-9 {
				t.Errorf("%s stub at f0: S21 = %v, S11 = %v; want a short: 0 and |1|", c.name, s[1][0], s[0][0])
			}
		} else {
			// The 1 kΩ feed is still across node a: S21 is that of the
			// through line with 1 kΩ shunt, exactly 2/(2 + 50/1000) e^(-jβl)
			// (Pozar Table 4.2 for the shunt admittance 1/1000).
			want := complex(2/(2+50.0/1000), 0) * cmplx.Exp(complex(0, -2*math.Pi*f0*through))
			t.Logf("%s stub at f0: |S21 - through line's| = %.2g", c.name, cmplx.Abs(s[1][0]-want))
			if d := cmplx.Abs(s[1][0] - want); d > 1e-9 {
				t.Errorf("%s stub at f0: S21 = %v, want %v (|Δ| %.2g)", c.name, s[1][0], want, d)
			}
		}
		v, _ := nw.Point.Voltage("a")
		if !c.open && v != 0 {
			t.Errorf("%s stub: DC voltage at a = %g, want 0 (the stub shorts it)", c.name, v)
		}
		if c.open && math.Abs(v-1) > 1e-12 {
			t.Errorf("%s stub: DC voltage at a = %g, want 1 V (the stub is open)", c.name, v)
		}
	}
}

// TestLineGroupDelay: a matched lossless line delays by exactly its
// delay, the group delay -d(arg S21)/dω = T (Pozar sec. 2.3, common
// practice); the derivative of the line's rows is taken by central
// differences.
func TestLineGroupDelay(t *testing.T) {
	nw := network(t, `
parts:
  - {type: transmission_line, name: T1, ends: [a, b], impedance: 50, length: 0.3m, velocity_factor: 0.7}
ports:
  - {name: p1, node: a, impedance: 50}
  - {name: p2, node: b, impedance: 50}
`)
	want := 0.3 / (0.7 * 299792458)
	for _, p := range run(t, nw, 1e6, 1e8, 3e9).Points {
		t.Logf("at %g Hz: group delay relative error %.2g", p.FrequencyHz, p.GroupDelay/want-1)
		if math.Abs(p.GroupDelay-want) > 1e-9*want {
			t.Errorf("at %g Hz: group delay %.12g s, want %.12g", p.FrequencyHz, p.GroupDelay, want)
		}
	}
}

// lumpedTwoPort is a lossy passive two-port of resistors, inductors and
// capacitors; blockTwoPort is the same network as a Touchstone block.
const lumpedTwoPort = `
temperature: 45C
parts:
  - {type: resistor,  name: R1, between: [in, m], value: 20}
  - {type: resistor,  name: R2, between: [m, gnd], value: 100}
  - {type: inductor,  name: L1, between: [m, n], value: 3nH}
  - {type: capacitor, name: C1, between: [n, gnd], value: 1.5pF}
  - {type: resistor,  name: R3, between: [n, out], value: 5}
  - {type: capacitor, name: C2, between: [in, out], value: 0.2pF}
ports:
  - {name: p1, node: in, impedance: 50}
  - {name: p2, node: out, impedance: 75}
`

// TestBlockRoundTrip writes the response of a lumped two-port as a
// Touchstone file (ac/touchstone, power waves, references 50 and 75 Ω),
// reads it back as an s_parameter_block in a circuit of its own, and
// analyses that circuit: at the file's frequencies the response (S and
// input impedances) and the noise (the block's by Twiss's theorem at the
// circuit temperature, the lumped network's by Johnson and Nyquist) agree
// to 1e-9. Both networks are passive and at one temperature, so Twiss's
// theorem makes the block's noise exactly the resistors' (Twiss 1955).
func TestBlockRoundTrip(t *testing.T) {
	lumped := network(t, lumpedTwoPort)
	freqs := []float64{1e7, 2e8, 7.5e8, 1.3e9, 2.2e9, 4e9}
	ref := run(t, lumped, freqs...)
	dir := t.TempDir()
	file := filepath.Join(dir, "twoport.s2p")
	var points []touchstone.Point
	for _, p := range ref.Points {
		points = append(points, touchstone.Point{FrequencyHz: p.FrequencyHz, S: p.S})
	}
	f, err := os.Create(file)
	if err != nil {
		t.Fatal(err)
	}
	if err := touchstone.Write(f, []touchstone.Port{{Name: "p1", Impedance: 50}, {Name: "p2", Impedance: 75}}, points, touchstone.FormatRI, nil); err != nil {
		t.Fatal(err)
	}
	f.Close()
	// At DC the inductor is a short and the capacitors open: the
	// resistance matrix of the T of R1, R2 (and R3 to port 2).
	src := `
temperature: 45C
parts:
  - {type: s_parameter_block, name: F1, file: twoport.s2p, terminals: [in, out], dc: {resistance: [[120, 100], [100, 105]]}}
ports:
  - {name: p1, node: in, impedance: 50}
  - {name: p2, node: out, impedance: 75}
`
	c, err := circuit.Parse(filepath.Join(dir, "block.yaml"), []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	block, err := smallsignal.New(p)
	if err != nil {
		t.Fatal(err)
	}
	got := run(t, block, freqs...)
	worstS := 0.0
	for k, pt := range got.Points {
		for i := range pt.S {
			for j := range pt.S[i] {
				worstS = math.Max(worstS, cmplx.Abs(pt.S[i][j]-ref.Points[k].S[i][j]))
			}
		}
	}
	t.Logf("largest |ΔS| of the block against the lumped network: %.2g", worstS)
	for k, pt := range got.Points {
		for i := range pt.S {
			for j := range pt.S[i] {
				if d := cmplx.Abs(pt.S[i][j] - ref.Points[k].S[i][j]); d > 1e-9 {
					t.Errorf("at %g Hz: S%d%d = %v, lumped %v", pt.FrequencyHz, i+1, j+1, pt.S[i][j], ref.Points[k].S[i][j])
				}
			}
			zr := ref.Points[k].InputImpedance[i]
			if d := cmplx.Abs(pt.InputImpedance[i] - zr); d > 1e-9*cmplx.Abs(zr) {
				t.Errorf("at %g Hz: Z_in%d = %v, lumped %v", pt.FrequencyHz, i+1, pt.InputImpedance[i], zr)
			}
		}
	}
	if o := block.Outside(freqs); len(o) != 0 {
		t.Errorf("the file's own frequencies reported outside its data: %+v", o)
	}
	if o := block.Outside([]float64{1e6, 1e9, 5e9}); len(o) != 1 || o[0].Count != 2 {
		t.Errorf("outside: %+v, want two frequencies of F1", o)
	}
	// Noise at port 2 with port 1 the input: every part at 45 °C.
	s := NoiseSettings{Input: 0, Output: Output{Port: 1}}
	nl, err := Noise(lumped, freqs, s)
	if err != nil {
		t.Fatal(err)
	}
	nb, err := Noise(block, freqs, s)
	if err != nil {
		t.Fatal(err)
	}
	worstN := 0.0
	defer func() { t.Logf("largest relative difference of the output noise: %.2g", worstN) }()
	for k := range freqs {
		a, b := nl.Points[k], nb.Points[k]
		worstN = math.Max(worstN, math.Abs(a.Total-b.Total)/a.Total)
		if math.Abs(a.Total-b.Total) > 1e-9*a.Total || math.Abs(a.Circuit-b.Circuit) > 1e-9*a.Circuit {
			t.Errorf("at %g Hz: output noise %g (circuit's own %g) V²/Hz, lumped %g (%g)", freqs[k], b.Total, b.Circuit, a.Total, a.Circuit)
		}
		if math.Abs(a.FigureDB()-b.FigureDB()) > 1e-8 {
			t.Errorf("at %g Hz: noise figure %.12f dB, lumped %.12f dB", freqs[k], b.FigureDB(), a.FigureDB())
		}
	}
}

// TestLossyLineNoise: a lossy line between two terminations, all at one
// temperature T, is in thermal equilibrium, so the noise voltage at its
// output is 4kT Re Z with Z the impedance at that node (Nyquist 1928;
// Twiss 1955 for the line's share): here the output termination in
// parallel with the line's input impedance from that end, Z = 50 ∥ Z_in2.
// The line has conductor and dielectric loss and is not matched (its
// impedance is complex), so every source counts.
func TestLossyLineNoise(t *testing.T) {
	nw := network(t, `
temperature: 16.85C
parts:
  - {type: transmission_line, name: T1, ends: [a, b], impedance: 50, length: 3m, velocity_factor: 0.66, loss: {conductor: 1dB/m@1GHz, dielectric: 0.5dB/m@1GHz}}
  - {type: capacitor, name: C1, between: [b, gnd], value: 1pF}
ports:
  - {name: p1, node: a, impedance: 30, noise_temperature: 290K}
  - {name: p2, node: b, impedance: 50, noise_temperature: 290K}
`)
	freqs := []float64{2e7, 2e8, 1e9, 3e9}
	r, err := Noise(nw, freqs, NoiseSettings{Input: 0, Output: Output{Port: 1}})
	if err != nil {
		t.Fatal(err)
	}
	resp := run(t, nw, freqs...)
	for k, p := range r.Points {
		zin := resp.Points[k].InputImpedance[1]
		z := 50 * zin / (50 + zin)
		want := 4 * 1.380649e-23 * 290 * real(z)
		t.Logf("at %g Hz: output noise against 4kT Re Z: %.2g", p.FrequencyHz, p.Total/want-1)
		if math.Abs(p.Total/want-1) > 1e-9 {
			t.Errorf("at %g Hz: output noise %.12g V²/Hz, 4kT Re Z = %.12g", p.FrequencyHz, p.Total, want)
		}
	}
}
