package transient

import (
	"fmt"
	"math"
	"testing"
)

// TestStorageTime switches a diode from a forward current I_F to a
// reverse current I_R and times the storage phase, from the switch until
// the stored charge is gone (q_d = 0, where the junction voltage crosses
// zero), against the charge-control result
//
//	t_s = τ_T ln(1 + I_F/I_R)
//
// (Kuno, "Analysis and characterization of P-N junction diode switching",
// IEEE Trans. Electron Devices 11(1), 1964; Sze and Ng, "Physics of
// Semiconductor Devices", 3rd ed., 2007, ch. 2), within 2 %. The model's
// stored charge q_d = τ_T i_f(v) is the charge-control model: the diode
// current is i_f + dq_d/dt = q_d/τ_T + dq_d/dt. The currents come from a
// 1000 V generator behind 1 MΩ, so that the junction's own volt moves
// them by 0.1 % at most; the switch is a ramp of 1e-4 τ_T, timed from
// its middle.
func TestStorageTime(t *testing.T) {
	const tau, r = 100e-9, 1e6
	nw := network(t, fmt.Sprintf(`
name: storage
diode_models:
  stored: {saturation_current: 1e-14, transit_time: %g}
parts:
  - {type: diode, name: D1, anode: a, cathode: gnd, model: stored}
ports:
  - {name: in, node: a, impedance: %g}
`, tau, r))
	for _, ratio := range []float64{0.25, 1, 4} { // I_F / I_R
		const vf = 1000.0
		vr := vf / ratio
		settle, sw := 15*tau, 1e-4*tau
		src := PiecewiseLinear{Times: []float64{0, 1e-3 * tau, settle, settle + sw}, Values: []float64{0, vf, vf, -vr}}
		res, err := Run(nw, Settings{Input: 0, Source: src, RelativeTolerance: 1e-5, Watch: []int{nw.Nodes["a"]}}, settle+5*tau)
		if err != nil {
			t.Fatal(err)
		}
		v := res.Watched[0]
		crossing := math.NaN()
		for i := 1; i < len(v); i++ {
			if res.Times[i-1] >= settle && v[i-1] > 0 && v[i] <= 0 {
				crossing = res.Times[i-1] + (res.Times[i]-res.Times[i-1])*v[i-1]/(v[i-1]-v[i])
				break
			}
		}
		got := crossing - (settle + sw/2)
		want := tau * math.Log(1+ratio)
		t.Logf("I_F/I_R = %g: storage time %.5g ns, charge control %.5g ns (%+.3f %%), %d steps", ratio, got*1e9, want*1e9, 100*(got-want)/want, res.Stats.Accepted)
		if math.IsNaN(got) || math.Abs(got-want) > 0.02*want {
			t.Errorf("I_F/I_R = %g: storage time %.4g s; charge control (Kuno 1964) gives %.4g s; want within 2 %%", ratio, got, want)
		}
	}
}
