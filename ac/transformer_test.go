package ac

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"qpoint/bias"
	"qpoint/bias/circuit"
)

// TestIdealTransformerLoad: an ideal transformer of N secondary turns per
// primary turn shows a load R across its secondary as R/N² at its
// primary, in parallel with its magnetising inductance L_m (any circuit
// theory text: D. M. Pozar, "Microwave Engineering", 4th ed., 2012, or
// Desoer and Kuh, "Basic Circuit Theory", 1969; from memory). The
// coupled pair L1 = L_m, L2 = N² L_m at k = 1 is that transformer
// exactly, so the input impedance equals jωL_m ∥ R/N² to rounding.
func TestIdealTransformerLoad(t *testing.T) {
	for _, c := range []struct {
		n, r, lm, f float64
	}{{2, 200, 1e-6, 100e6}, {0.5, 10, 10e-9, 1e9}, {3, 50, 1e-3, 1e6}, {1.41421356, 75, 47e-9, 30e6}} {
		src := fmt.Sprintf(`
parts:
  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, gnd], turns_ratio: %g, magnetising_inductance: %g}
  - {type: resistor, name: Rload, between: [b, gnd], value: %g}
ports:
  - {name: in, node: a, impedance: 50}
`, c.n, c.lm, c.r)
		nw := network(t, src)
		got := run(t, nw, c.f).Points[0].InputImpedance[0]
		zl := complex(0, 2*math.Pi*c.f*c.lm)
		zr := complex(c.r/(c.n*c.n), 0)
		want := zl * zr / (zl + zr)
		if !near(got, want, 1e-9) {
			t.Errorf("N = %g, R = %g, L_m = %g at %g Hz: Z_in = %v, jωL_m ∥ R/N² = %v", c.n, c.r, c.lm, c.f, got, want)
		}
	}
}

// TestCoupledPairOpenCircuit: a coupled pair driven at its primary with
// its secondary open has the voltage ratio v2/v1 = M/L1 = k sqrt(L2/L1)
// (the coupled-inductor equations v1 = jωL1 i1, v2 = jωM i1 with i2 = 0;
// any circuit theory text, from memory). With a centre tap the two
// halves each carry half of it.
func TestCoupledPairOpenCircuit(t *testing.T) {
	for _, c := range []struct{ l1, l2, k float64 }{{100e-9, 400e-9, 0.9}, {1e-6, 1e-6, 0.98}, {50e-9, 5e-6, 0.35}, {2e-6, 0.5e-6, 1}} {
		want := c.k * math.Sqrt(c.l2/c.l1)
		// Whole secondary: probes a, b. Centre-tapped (a second circuit:
		// two primaries across one node would be a loop of windings, a
		// short at DC): probes a, c, m, d.
		for _, tapped := range []bool{false, true} {
			sec := "secondary: [b, gnd]"
			probes := "[a, b]"
			if tapped {
				sec, probes = "secondary: [c, d], centre_tap: m", "[a, c, m, d]"
			}
			src := fmt.Sprintf(`
parts:
  - {type: resistor, name: Rs, between: [in, a], value: 10}
  - {type: transformer, name: T1, primary: [a, gnd], %s, inductances: [%g, %g], coupling: %g}
  - {type: resistor, name: Rm, between: [m, gnd], value: 1}
ports:
  - {name: in, node: in, impedance: 50}
probes: %s
`, sec, c.l1, c.l2, c.k, probes)
			if !tapped {
				src = strings.Replace(src, "  - {type: resistor, name: Rm, between: [m, gnd], value: 1}\n", "", 1)
			}
			nw := network(t, src)
			pr := run(t, nw, 10e6).Points[0].Probes
			if !tapped {
				if got := pr[1] / pr[0]; !near(got, complex(want, 0), 1e-9) {
					t.Errorf("L1 = %g, L2 = %g, k = %g: v2/v1 = %v, k sqrt(L2/L1) = %g", c.l1, c.l2, c.k, got, want)
				}
				continue
			}
			for i, half := range []complex128{pr[1] - pr[2], pr[2] - pr[3]} {
				if got := half / pr[0]; !near(got, complex(want/2, 0), 1e-9) {
					t.Errorf("L1 = %g, L2 = %g, k = %g: half %d of the tapped secondary / v1 = %v, want %g", c.l1, c.l2, c.k, i+1, got, want/2)
				}
			}
		}
	}
}

// TestWindingIsShortAtDC: at DC each winding is a short (an inductor's
// flux does not change), so a 1 V source behind 100 Ω drives 10 mA
// through the primary, and the secondary, returned through 1 kΩ to a
// 2 V source, carries 2 mA (Ohm's law).
func TestWindingIsShortAtDC(t *testing.T) {
	c, err := circuit.Parse("t.yaml", []byte(`
parts:
  - {type: voltage_source, name: V1, plus: s, minus: gnd, value: 1V}
  - {type: resistor, name: R1, between: [s, a], value: 100}
  - {type: voltage_source, name: V2, plus: t, minus: gnd, value: 2V}
  - {type: resistor, name: R2, between: [t, b], value: 1k}
  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, gnd], inductances: [1uH, 4uH], coupling: 0.99}
`))
	if err != nil {
		t.Fatal(err)
	}
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]float64{"T1.primary": 10e-3, "T1.secondary": 2e-3}
	for _, l := range p.Inductors {
		if w, ok := want[l.Name]; ok {
			if math.Abs(l.Current-w) > 1e-12 {
				t.Errorf("%s carries %g A at DC, want %g A", l.Name, l.Current, w)
			}
			delete(want, l.Name)
		}
	}
	if len(want) > 0 {
		t.Errorf("windings missing from the bias point: %v", want)
	}
}

// TestTransformerReciprocal: a network of coupled windings is reciprocal,
// S21 = S12 (the inductance matrix is symmetric; Pozar sec. 4.3), and
// lossless windings pass all the power a lossless network can: |S11|² +
// |S21|² = 1 between two ports.
func TestTransformerReciprocal(t *testing.T) {
	nw := network(t, `
parts:
  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, c], centre_tap: gnd, inductances: [200nH, 800nH], coupling: 0.95}
  - {type: capacitor, name: C1, between: [c, gnd], value: 10pF}
ports:
  - {name: one, node: a, impedance: 50}
  - {name: two, node: b, impedance: 75}
`)
	for _, f := range []float64{1e6, 30e6, 300e6, 3e9} {
		pt := run(t, nw, f).Points[0]
		if !near(pt.S[0][1], pt.S[1][0], 1e-9) {
			t.Errorf("%g Hz: S12 = %v, S21 = %v", f, pt.S[0][1], pt.S[1][0])
		}
		if p := math.Pow(cmplx.Abs(pt.S[0][0]), 2) + math.Pow(cmplx.Abs(pt.S[1][0]), 2); math.Abs(p-1) > 1e-9 {
			t.Errorf("%g Hz: |S11|² + |S21|² = %.12f, want 1 for lossless windings", f, p)
		}
	}
}

// TestTransformerNoise: the thermal noise of a resistor seen through an
// ideal 1:N transformer is that of the impedance it shows, 4kT Re Z with
// Z = jωL_m ∥ R/N² (Nyquist 1928, through a lossless network: Twiss
// 1955), here across a noiseless 50 Ω port: 4kT Re Z · |50/(50 + Z)|².
func TestTransformerNoise(t *testing.T) {
	nw := network(t, `
temperature: 290K
parts:
  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, gnd], turns_ratio: 2, magnetising_inductance: 2uH}
  - {type: resistor, name: R, between: [b, gnd], value: 200}
ports:
  - {name: out, node: a, impedance: 50, noise_temperature: 0K}
`)
	for _, f := range []float64{1e6, 10e6, 100e6} {
		r, err := Noise(nw, []float64{f}, NoiseSettings{Input: -1, Output: Output{Port: 0}})
		if err != nil {
			t.Fatal(err)
		}
		zl := complex(0, 2*math.Pi*f*2e-6)
		z := zl * 50 / (zl + 50) // R/N² = 50 Ω
		h := 50 / (50 + z)
		want := 4 * 1.380649e-23 * 290 * real(z) * real(h*cmplx.Conj(h))
		if got := r.Points[0].Total; math.Abs(got/want-1) > 1e-9 {
			t.Errorf("%g Hz: output noise %.10g V²/Hz, 4kT Re Z |50/(50+Z)|² = %.10g", f, got, want)
		}
	}
}
