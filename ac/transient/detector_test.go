package transient

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"qpoint/ac"
)

// TestDetectorVideo drives a small-signal (square-law) detector with a
// pulse whose edges are short against its video time constant. The
// rectified current (at -40 dBm, with the video at 40 µV far below nV_T,
// so that the junction's bias barely moves) is then a step into the
// video network, a first-order
// lag of tau = C_video R, R the video node's DC resistance at the bias
// point (the load beside the junction's zero-bias resistance and the
// generator's), so the 10-90 % rise and fall are tau ln 9 (first-order
// step response, common practice; e.g. Millman and Halkias, "Integrated
// Electronics", 1972, sec. 16-4): within 3 %, the junction's capacitance
// and its slight departure from square law at -40 dBm being left out of
// the closed form. The video change at the end of the flat top, 16 tau
// in, must match the steady state's DC shift (steady.Solve) within
// 0.05 dB.
func TestDetectorVideo(t *testing.T) {
	nw := network(t, `
name: fast video detector
diode_models:
  det: {saturation_current: 3uA, ideality: 1.05, series_resistance: 20, zero_bias_capacitance: 0.18pF, built_in_potential: 0.25V}
parts:
  - {type: diode, name: D1, anode: in, cathode: vout, model: det}
  - {type: capacitor, name: Cv, between: [vout, gnd], value: 20pF}
  - {type: resistor, name: Rv, between: [vout, gnd], value: 1k}
ports:
  - {name: rf, node: in, impedance: 50}
`)
	out := ac.Output{Port: -1, Node: "vout"}
	v := nw.Nodes["vout"]
	// R = e_vᵀ G⁻¹ e_v at DC.
	var lu mat.LU
	lu.Factorize(nw.G)
	e := mat.NewVecDense(nw.N, nil)
	e.SetVec(v, 1)
	var z mat.VecDense
	if err := lu.SolveVecTo(&z, false, e); err != nil {
		t.Fatal(err)
	}
	tau := 20e-12 * z.AtVec(v)
	const carrier = 2.45e9
	p := Pulse{CarrierHz: carrier, CarrierEMF: ac.DBmToEMF(-40, 50), Width: 16 * tau, Rise: 1e-9, Fall: 1e-9}
	res, err := RunPulse(nw, PulseSettings{Input: 0, Output: out, Pulse: p, Transient: Settings{RelativeTolerance: 1e-5, VoltageTolerance: 1e-10}})
	if err != nil {
		t.Fatal(err)
	}
	if res.Kind != Detector {
		t.Fatalf("read as a %v; want a detector", res.Kind)
	}
	f := res.Figures
	want := tau * math.Log(9)
	t.Logf("tau %.4g ns; rise %.4g ns, fall %.4g ns, closed form %.4g ns; settled %.5g V, steady state %.5g V; %d steps", tau*1e9, f.RiseTime*1e9, f.FallTime*1e9, want*1e9, f.Settled, res.SteadyShift, res.Run.Stats.Accepted)
	for _, c := range []struct {
		name string
		got  float64
	}{{"rise", f.RiseTime}, {"fall", f.FallTime}} {
		if math.IsNaN(c.got) || math.Abs(c.got-want) > 0.03*want {
			t.Errorf("%s time %.4g s; a first-order lag of tau = %.4g s gives tau ln 9 = %.4g s; want within 3 %%", c.name, c.got, tau, want)
		}
	}
	if d := 20 * math.Log10(f.Settled/res.SteadyShift); math.IsNaN(d) || math.Abs(d) > 0.05 {
		t.Errorf("settled video change %.5g V against the steady state's DC shift %.5g V (%+.3f dB); want within 0.05 dB", f.Settled, res.SteadyShift, d)
	}
	for _, c := range res.Cautions {
		t.Errorf("unexpected caution %v: %s", c.Kind, c.Message)
	}
}
