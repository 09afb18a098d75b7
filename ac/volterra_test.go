package ac

import (
	"math"
	"math/cmplx"
	"testing"

	"qpoint/bias/diode"
)

// junctionFixture is a junction driven by a nearly ideal voltage source:
// V0 from a DC source plus the port's EMF behind 1 µΩ, its current read
// across a 1 µΩ sense resistor at node s.
const junctionFixture = `
temperature: 300.15K
diode_models:
  m: {saturation_current: 1e-14, ideality: 1}
parts:
  - {type: voltage_source, name: Vb, plus: b, minus: gnd, value: 0.6V}
  - {type: diode, name: D, anode: a, cathode: s, model: m}
  - {type: resistor, name: Rsense, between: [s, gnd], value: 1e-6}
ports:
  - {name: drive, node: a, return: b, impedance: 1e-6}
`

// TestVolterraExponentialLimits: for a voltage-driven exponential junction
// HD2 -> x/4 and HD3 -> x²/24 as x = V/(n V_T) -> 0 (Gray, Hurst, Lewis,
// Meyer, 5th ed., ch. 5), and for two equal tones IM3 = x²/8 = 3 HD3
// (common practice; Wambacq and Sansen 1998).
func TestVolterraExponentialLimits(t *testing.T) {
	nw := network(t, junctionFixture)
	vt := diode.ThermalVoltage(300.15)
	for _, x := range []float64{1e-3, 1e-2} {
		est, err := Volterra(nw, Drive{Input: 0, Output: Output{Port: -1, Node: "s"}, FrequencyHz: 1e6, EMF: x * vt, SecondToneHz: 1.1e6})
		if err != nil {
			t.Fatal(err)
		}
		hd2 := cmplx.Abs(est.HD2) / cmplx.Abs(est.Linear)
		hd3 := cmplx.Abs(est.HD3) / cmplx.Abs(est.Linear)
		im3 := cmplx.Abs(est.IM3) / cmplx.Abs(est.Linear)
		// The 1 µΩ parts perturb the junction voltage by about g·1µΩ ≈ 2e-5.
		if math.Abs(hd2/(x/4)-1) > 1e-4 || math.Abs(hd3/(x*x/24)-1) > 1e-4 || math.Abs(im3/(x*x/8)-1) > 1e-4 {
			t.Errorf("x = %g: HD2 = %g (x/4 = %g), HD3 = %g (x²/24 = %g), IM3 = %g (x²/8 = %g)", x, hd2, x/4, hd3, x*x/24, im3, x*x/8)
		}
		// DC shift: the rectified current I_Q x²/4 through the sense resistor.
		iq := 1e-14 * math.Exp(0.6/vt)
		if got, want := est.DCShift, iq*x*x/4*1e-6; math.Abs(got/want-1) > 1e-4 {
			t.Errorf("x = %g: DC shift %g V, want I_Q x²/4 R = %g V", x, got, want)
		}
	}
}

// TestContributionsSum: each product's contributions add up to its total
// and their percentages to 100.
func TestContributionsSum(t *testing.T) {
	for _, f := range []string{"detector", "mixer", "limiter", "attenuator"} {
		nw := network(t, demo(t, f))
		out := Output{Port: len(nw.Ports) - 1}
		est, err := Volterra(nw, Drive{Input: 0, Output: out, FrequencyHz: 900e6, EMF: 0.01, SecondToneHz: 910e6})
		if err != nil {
			t.Fatal(err)
		}
		totals := map[Product]complex128{DC: complex(est.DCShift, 0), HD2: est.HD2, HD3: est.HD3, IM2Sum: est.IM2Sum, IM2Diff: est.IM2Diff, IM3: est.IM3}
		sums := map[Product]complex128{}
		gross := map[Product]float64{}
		pct := map[Product]float64{}
		for _, c := range est.Contributions {
			sums[c.Product] += c.Phasor
			gross[c.Product] += cmplx.Abs(c.Phasor)
			pct[c.Product] += c.Percent
		}
		for p, tot := range totals {
			// Products that cancel by symmetry (a balanced mixer's even
			// orders) are left with rounding noise of the gross sum.
			if cmplx.Abs(sums[p]-tot) > 1e-9*gross[p] {
				t.Errorf("%s %s: contributions sum to %v, total %v", f, p, sums[p], tot)
			}
			if cmplx.Abs(tot) > 1e-6*gross[p] && math.Abs(pct[p]-100) > 1e-6 {
				t.Errorf("%s %s: percentages sum to %g", f, p, pct[p])
			}
		}
	}
}

// TestOneTone: the one-tone view of a two-tone estimate equals a one-tone
// estimate solved on its own.
func TestOneTone(t *testing.T) {
	nw := network(t, demo(t, "detector"))
	d := Drive{Input: 0, Output: Output{Port: 1}, FrequencyHz: 2.45e9, EMF: DBmToEMF(-30, 50)}
	alone, err := Volterra(nw, d)
	if err != nil {
		t.Fatal(err)
	}
	d.SecondToneHz = 2.46e9
	two, err := Volterra(nw, d)
	if err != nil {
		t.Fatal(err)
	}
	one := two.OneTone()
	if one.Fundamental != alone.Fundamental || one.HD2 != alone.HD2 || one.HD3 != alone.HD3 || one.DCShift != alone.DCShift ||
		one.Drive != alone.Drive || len(one.Contributions) != len(alone.Contributions) {
		t.Errorf("one-tone view %+v differs from the one-tone estimate %+v", one, alone)
	}
}
