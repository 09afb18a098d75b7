package balance

import (
	"math"
	"testing"

	"qpoint/ac"
	"qpoint/bias/diode"
)

// TestBesselTable checks the series against Abramowitz and Stegun,
// "Handbook of Mathematical Functions", 1964, Table 9.8.
func TestBesselTable(t *testing.T) {
	for _, c := range []struct {
		k    int
		want float64
	}{{0, 1.266065878}, {1, 0.565159104}, {2, 0.135747670}, {3, 0.022168425}} {
		if got := besselI(c.k, 1); math.Abs(got-c.want) > 1e-9 {
			t.Errorf("I_%d(1) = %.10f, Table 9.8 gives %.9f", c.k, got, c.want)
		}
	}
}

// junctionFixture drives a junction through 10 nΩ so that the drive is an
// ideal voltage to better than 1e-7.
const junctionFixture = `
temperature: 300.15K
diode_models:
  m: {saturation_current: 1e-14, ideality: 1}
parts:
  - {type: voltage_source, name: Vb, plus: b, minus: gnd, value: 0.6V}
  - {type: diode, name: D, anode: a, cathode: s, model: m}
  - {type: resistor, name: Rsense, between: [s, gnd], value: 1e-8}
ports:
  - {name: drive, node: a, return: b, impedance: 1e-8}
`

// TestBesselOneTone: a junction driven by v = V0 + V cos(wt) carries the
// harmonics 2 I_S e^(V0/nV_T) I_k(x), x = V/(n V_T) (Abramowitz and
// Stegun eq. 9.6.34), to 1e-6 relative at x = 0.1, 1 and 3.
func TestBesselOneTone(t *testing.T) {
	nw := network(t, junctionFixture)
	vt := diode.ThermalVoltage(300.15)
	for _, c := range []struct {
		x      float64
		linear LinearSolver
	}{{0.1, Automatic}, {1, Automatic}, {3, Automatic}, {0.1, Krylov}, {1, Krylov}, {3, Krylov}} {
		x := c.x
		r, err := Solve(nw, ac.Drive{Input: 0, Output: ac.Output{Port: -1, Node: "s"}, FrequencyHz: 1e6, EMF: x * vt}, Settings{Report: 6, Linear: c.linear})
		if err != nil {
			t.Fatal(err)
		}
		worst := 0.0
		i0 := 1e-14 * math.Exp(0.6/vt)
		for _, h := range r.DiodeCurrents[0] {
			k := h.Orders[0]
			if x < 1 && k > 4 {
				// At x = 0.1 the fifth harmonic lies 170 dB below the DC
				// current, where the balance's floor (1e-13 of the
				// largest junction current) allows more than 1e-6.
				continue
			}
			want := 2 * i0 * besselI(k, x)
			if k == 0 {
				want = i0*besselI(0, x) - 1e-14 // the mean includes -I_S
			}
			rel := math.Abs(h.Amplitude/want - 1)
			worst = math.Max(worst, rel)
			if rel > 1e-6 {
				t.Errorf("x = %g, harmonic %d: %.10g A, Bessel law %.10g A (relative error %.2g)", x, k, h.Amplitude, want, rel)
			}
		}
		t.Logf("x = %g, %s: worst relative error %.2g; %d Newton, %d GMRES iterations, %d harmonics", x, r.Stats.Linear, worst,
			r.Stats.Iterations, r.Stats.LinearIterations, r.Stats.Harmonics)
	}
}

// TestBesselTwoTones: with v = V0 + V cos(w1 t) + V cos(w2 t), the
// exponential factors into two generating functions (Abramowitz and
// Stegun eq. 9.6.34 applied to each tone), so the current at the mixing
// product m·f1 + n·f2 is 2 I_S e^(V0/nV_T) I_|m|(x) I_|n|(x), and the mean
// I_S e^(V0/nV_T) I_0(x)² - I_S. Checked to 1e-6 relative at x = 0.1, 1
// and 3 for every product up to the fourth order, under both truncations.
func TestBesselTwoTones(t *testing.T) {
	nw := network(t, junctionFixture)
	vt := diode.ThermalVoltage(300.15)
	i0 := 1e-14 * math.Exp(0.6/vt)
	for _, c := range []struct {
		x     float64
		trunc Truncation
	}{{0.1, Diamond}, {1, Diamond}, {3, Diamond}, {1, Box}} {
		x := c.x
		// f2/f1 = 1.0137: no two products up to order 60 coincide.
		d := ac.Drive{Input: 0, Output: ac.Output{Port: -1, Node: "s"}, FrequencyHz: 1e6, SecondToneHz: 1.0137e6, EMF: x * vt}
		r, err := Solve(nw, d, Settings{Report: 4, Truncation: c.trunc})
		if err != nil {
			t.Fatal(err)
		}
		worst, count := 0.0, 0
		for _, h := range r.DiodeCurrents[0] {
			m, n := abs(h.Orders[0]), abs(h.Orders[1])
			if m+n > 4 || (x < 1 && m+n > 3) {
				continue // below the floor at x = 0.1, as for one tone
			}
			want := 2 * i0 * besselI(m, x) * besselI(n, x)
			if m == 0 && n == 0 {
				want = i0*besselI(0, x)*besselI(0, x) - 1e-14
			}
			rel := math.Abs(h.Amplitude/want - 1)
			worst = math.Max(worst, rel)
			count++
			if rel > 1e-6 {
				t.Errorf("x = %g, %s: %s: %.10g A, Bessel law %.10g A (relative error %.2g)", x, c.trunc,
					productName(h.Orders[0], h.Orders[1]), h.Amplitude, want, rel)
			}
		}
		t.Logf("x = %g, %s: %d products, worst relative error %.2g; order %d (%d products, %d samples), %d Newton, %d GMRES iterations, %v",
			x, c.trunc, count, worst, r.Stats.Harmonics, r.Stats.Products, r.Stats.Samples, r.Stats.Iterations, r.Stats.LinearIterations, r.Stats.Runtime)
	}
}
