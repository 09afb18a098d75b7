package smallsignal

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"qpoint/bias"
	"qpoint/bias/circuit"
)

func build(t *testing.T, src string) *Network {
	t.Helper()
	c, err := circuit.Parse("test.yaml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	nw, err := New(p)
	if err != nil {
		t.Fatal(err)
	}
	return nw
}

// TestStamps checks G and C of a small network entry by entry against the
// modified nodal stamps written out by hand (Ho, Ruehli, Brennan 1975).
func TestStamps(t *testing.T) {
	nw := build(t, `
parts:
  - {type: voltage_source, name: V, plus: a, minus: gnd, value: 1V}
  - {type: resistor, name: R, between: [a, b], value: 2}
  - {type: capacitor, name: C, between: [b, gnd], value: 3pF}
  - {type: inductor, name: L, between: [b, c], value: 5nH}
  - {type: resistor, name: Rc, between: [c, gnd], value: 4}
ports:
  - {name: p, node: b, impedance: 50, coupling: ac}
`)
	// Unknowns: a, b, c, then the branch currents of V and L (file order).
	if nw.N != 5 || nw.NodeUnknowns != 3 {
		t.Fatalf("N = %d, node unknowns %d; want 5 and 3", nw.N, nw.NodeUnknowns)
	}
	wantG := mat.NewDense(5, 5, []float64{
		0.5, -0.5, 0, 1, 0,
		-0.5, 0.5 + 1.0/50, 0, 0, 1,
		0, 0, 0.25, 0, -1,
		1, 0, 0, 0, 0,
		0, 1, -1, 0, 0,
	})
	wantC := mat.NewDense(5, 5, nil)
	wantC.Set(1, 1, 3e-12)
	wantC.Set(4, 4, -5e-9)
	if !mat.EqualApprox(nw.G, wantG, 1e-15) {
		t.Errorf("G =\n%v\nwant\n%v", mat.Formatted(nw.G), mat.Formatted(wantG))
	}
	if !mat.EqualApprox(nw.C, wantC, 1e-24) {
		t.Errorf("C =\n%v\nwant\n%v", mat.Formatted(nw.C), mat.Formatted(wantC))
	}
	// At DC the AC-coupled port's termination is gone.
	if g := nw.GDC().At(1, 1); math.Abs(g-0.5) > 1e-15 {
		t.Errorf("GDC[b][b] = %g, want 0.5", g)
	}
	// Another reference impedance replaces the termination.
	if g := nw.WithReferences([]float64{25}).G.At(1, 1); math.Abs(g-(0.5+1.0/25)) > 1e-15 {
		t.Errorf("G[b][b] with a 25 ohm reference = %g", g)
	}
}

// TestDiodeStamp: G minus GLinear is the diode's g_d stamp between its
// internal junction node and its cathode, and its Taylor coefficients obey
// g2 = g1/(2 n V_T) for the ideal law (../../shared/design/methods.md,
// common practice).
func TestDiodeStamp(t *testing.T) {
	nw := build(t, `
diode_models:
  m: {saturation_current: 1e-14, ideality: 1.1, series_resistance: 3}
parts:
  - {type: current_source, name: I, from: gnd, to: a, value: 1mA}
  - {type: diode, name: D, anode: a, cathode: gnd, model: m}
`)
	d := nw.Diodes[0]
	if d.Junction == d.Anode {
		t.Fatal("a diode with R_S needs its own junction node")
	}
	var diff mat.Dense
	diff.Sub(nw.G, nw.GLinear)
	if got := diff.At(d.Junction, d.Junction); math.Abs(got-d.G1) > 1e-15*d.G1 {
		t.Errorf("stamp %g, g1 %g", got, d.G1)
	}
	nvt := d.Device.NVT()
	if math.Abs(d.G2/(d.G1/(2*nvt))-1) > 1e-9 || math.Abs(d.G3/(d.G1/(6*nvt*nvt))-1) > 1e-9 {
		t.Errorf("g2 = %g, g3 = %g; the ideal law gives %g, %g", d.G2, d.G3, d.G1/(2*nvt), d.G1/(6*nvt*nvt))
	}
	if math.Abs(nw.Bias[d.Junction]-nw.Bias[d.Anode]+1e-3*3) > 1e-12 {
		t.Errorf("bias across R_S: %g V, want -3 mV", nw.Bias[d.Junction]-nw.Bias[d.Anode])
	}
}
