package transient

import (
	"math"
	"strings"
	"testing"

	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// network loads a circuit from its text and linearises it at its DC point.
func network(t testing.TB, src string) *smallsignal.Network {
	t.Helper()
	c, err := circuit.Parse("test.yaml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		t.Fatal(err)
	}
	return nw
}

// rampResponse is the response of a first-order lag of time constant tau
// to an input that ramps from 0 to 1 over [0, d] and then holds 1:
//
//	y(t) = (t - tau (1 - e^(-t/tau))) / d                 for t <= d,
//	y(t) = 1 - (tau/d) (e^(d/tau) - 1) e^(-t/tau)          for t >= d,
//
// the convolution of the ramp with the step response 1 - e^(-t/tau)
// (any circuits text, e.g. Desoer and Kuh, "Basic Circuit Theory", 1969,
// ch. 4).
func rampResponse(t, tau, d float64) float64 {
	if t <= d {
		return (t - tau*(-math.Expm1(-t/tau))) / d
	}
	return 1 - (tau/d)*math.Expm1(d/tau)*math.Exp(-t/tau)
}

// TestFirstOrderClosedForms checks the transient of an RC and an RL
// against their closed forms (rampResponse): the capacitor voltage
// v = E y(t) with tau = RC, and the inductor current i = (E/R) y(t) with
// tau = L/R, R being the generator's reference impedance. The integrator
// bounds the local error of each step by the relative tolerance r of the
// response's size; the global error is about r times the number of steps
// per time constant over which the local errors add before they decay:
// the check allows 10 r (measured: 0.95 r at r = 1e-3, 5.5 r at 1e-5).
func TestFirstOrderClosedForms(t *testing.T) {
	for _, tc := range []struct {
		name, file string
		tau        float64
		watch      func(nw *smallsignal.Network) int
		scale      float64 // final value of the watched unknown per volt of EMF
	}{
		{"RC", `
name: RC
parts:
  - {type: capacitor, name: C1, between: [a, gnd], value: 1nF}
ports:
  - {name: in, node: a, impedance: 1k}
`, 1e3 * 1e-9, func(nw *smallsignal.Network) int { return nw.Nodes["a"] }, 1},
		{"RL", `
name: RL
parts:
  - {type: inductor, name: L1, between: [a, gnd], value: 10uH}
ports:
  - {name: in, node: a, impedance: 50}
`, 10e-6 / 50, func(nw *smallsignal.Network) int { return nw.NodeUnknowns }, 1.0 / 50},
	} {
		for _, rel := range []float64{1e-3, 1e-5} {
			nw := network(t, tc.file)
			const emf, ramp = 2.0, 1e-3 // ramp as a fraction of tau
			d := ramp * tc.tau
			s := Settings{Input: 0, Source: PiecewiseLinear{Times: []float64{0, d}, Values: []float64{0, emf}},
				RelativeTolerance: rel, Watch: []int{tc.watch(nw)}}
			r, err := Run(nw, s, 8*tc.tau)
			if err != nil {
				t.Fatal(err)
			}
			worst, at := 0.0, 0.0
			for i, tt := range r.Times {
				want := emf * tc.scale * rampResponse(tt, tc.tau, d)
				if e := math.Abs(r.Watched[0][i]-want) / (emf * tc.scale); e > worst {
					worst, at = e, tt
				}
			}
			t.Logf("%s at relative tolerance %g: %d steps (%d rejected), largest error %.3g of the final value at t = %.3g τ; energy imbalance %.2g",
				tc.name, rel, r.Stats.Accepted, r.Stats.Rejected, worst, at/tc.tau, r.Energy.Imbalance)
			if worst > 10*rel {
				t.Errorf("%s at relative tolerance %g: largest error %.3g of the final value (at t = %.3g τ); want within 10 × the tolerance",
					tc.name, rel, worst, at/tc.tau)
			}
		}
	}
}

// TestCheckRefusesUnknownParts: a part the transient has no time-domain
// model for (a measured S-parameter block, when the file grows one) is
// refused with its name and what is accepted.
func TestCheckRefusesUnknownParts(t *testing.T) {
	c, err := circuit.Parse("test.yaml", []byte(`
parts:
  - {type: resistor, name: R1, between: [a, gnd], value: 1k}
`))
	if err != nil {
		t.Fatal(err)
	}
	if err := Check(c); err != nil {
		t.Fatalf("a resistor refused: %v", err)
	}
	c.Parts = append(c.Parts, circuit.Part{Kind: circuit.Kind(99), Name: "F1", Nodes: [2]string{"a", "gnd"}})
	err = Check(c)
	if err == nil || !strings.Contains(err.Error(), "part F1") || !strings.Contains(err.Error(), "accepted:") || !strings.Contains(err.Error(), "S-parameter block") {
		t.Errorf("Check of an unknown part: %v; want a refusal naming F1 and what is accepted", err)
	}
}
