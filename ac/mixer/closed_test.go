package mixer

import (
	"fmt"
	"math"
	"testing"

	"qpoint/bias/diode"
)

// TestBesselSeries checks the series against Abramowitz and Stegun,
// "Handbook of Mathematical Functions", 1964, Table 9.8: I_1(1) =
// 0.565159104, and e^(-5) I_1(5) = 0.1639722669 (from memory).
func TestBesselSeries(t *testing.T) {
	if got := besselI(1, 1); math.Abs(got-0.565159104) > 1e-9 {
		t.Errorf("I_1(1) = %.10f, Table 9.8 gives 0.565159104", got)
	}
	if got := math.Exp(-5) * besselI(1, 5); math.Abs(got-0.1639722669) > 1e-9 {
		t.Errorf("e^-5 I_1(5) = %.10f, Table 9.8 gives 0.1639722669", got)
	}
}

// voltagePumped is a junction in a loop of three ports of 10 nΩ: the LO
// (with a DC bias of V0 behind it), the RF and the IF, each all but an
// ideal voltage source, so that the junction's voltage is the sum of
// their EMFs to 1e-8 of itself (the 1e15 Ω resistor only gives the
// ports' common node a part).
const voltagePumped = `
temperature: 300.15K
diode_models:
  m: {saturation_current: 1e-12, ideality: %g}
parts:
  - {type: voltage_source, name: Vb, plus: b, minus: gnd, value: %gV}
  - {type: diode, name: D, anode: a, cathode: s, model: m}
  - {type: resistor, name: Ropen, between: [t, gnd], value: 1e15}
ports:
  - {name: lo, node: a, return: b, impedance: 1e-8}
  - {name: rf, node: s, return: t, impedance: 1e-8}
  - {name: if, node: t, impedance: 1e-8}
`

// TestVoltagePumpedConversion: a junction pumped by an ideal voltage
// V0 + V_LO cos(ω_LO t) has the conductance g(t) = (I_S/nV_T)
// e^(V0/nV_T) e^(x cos ω_LO t), x = V_LO/(nV_T), whose Fourier
// coefficients are G_p = (I_S/nV_T) e^(V0/nV_T) I_p(x) (the generating
// function of the modified Bessel functions, Abramowitz and Stegun
// 9.6.34). Held at its voltage on every sideband, the junction passes an
// IF current G_1 per volt of RF, and the conversion loss between the two
// 10 nΩ ports is 1/(2 R G_1)². Both, the coefficients and the loss, hold
// to 1e-6 at x = 1, 5 and 20, for the RF above and below the LO.
func TestVoltagePumpedConversion(t *testing.T) {
	const v0, z0 = 0.1, 1e-8
	for _, n := range []float64{1, 1.3} {
		nw := network(t, fmt.Sprintf(voltagePumped, n, v0))
		nvt := n * diode.ThermalVoltage(300.15)
		scale := 1e-12 / nvt * math.Exp(v0/nvt)
		for _, x := range []float64{1, 5, 20} {
			for _, rfHz := range []float64{1.1e9, 0.93e9} {
				s := Settings{LO: 0, RF: 1, IF: 2, LOFrequencyHz: 1e9, RFFrequencyHz: rfHz, LOEMF: x * nvt}
				res, err := Analyze(nw, s)
				if err != nil {
					t.Fatal(err)
				}
				waves, _ := junctionWaves(nw, pumpHarmonics(res.Pump), 4)
				for p := 0; p <= 3; p++ {
					want := scale * besselI(p, x)
					for _, q := range []int{p, -p} {
						got := waves[0].G(q)
						if rel := math.Abs(real(got)/want - 1); rel > 1e-6 || math.Abs(imag(got)) > 1e-9*want {
							t.Errorf("n = %g, x = %g: G_%d = %.10g, closed form %.10g (relative error %.2g)", n, x, q, got, want, rel)
						}
					}
				}
				g1 := scale * besselI(1, x)
				got := 1 / (2 * z0 * math.Sqrt(math.Pow(10, res.ConversionLossDB/10)))
				if rel := math.Abs(got/g1 - 1); rel > 1e-6 {
					t.Errorf("n = %g, x = %g, RF %g Hz: IF current per volt of RF %.10g S, G_1 = %.10g S (relative error %.2g)", n, x, rfHz, got, g1, rel)
				} else {
					t.Logf("n = %g, x = %2g, RF %g Hz: G_1 = %.10g S, relative error %.2g; %d harmonics, %d sidebands", n, x, rfHz, g1, rel, res.Stats.Pump.Harmonics, res.Stats.Sidebands)
				}
			}
		}
	}
}
