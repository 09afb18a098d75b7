package transient

import (
	"math"
	"os"
	"testing"

	"qpoint/ac"
)

// TestEnergyBalance: over a pulse through nonlinear circuits, the work of
// the generator and the DC sources equals what the resistors, port
// terminations and junctions dissipate plus the change of what the
// capacitors, inductors, junction charges and DC blocks hold (conservation
// of energy; Tellegen's theorem, Penfield, Spence and Duinker, "Tellegen's
// Theorem and Electrical Networks", MIT Press, 1970), to 1e-6 of the
// largest term. The stored energy is a state function (½CV², ½LI²,
// ∫ v dq of each junction charge in closed form), independent of the
// integration; the imbalance is the integration's error, so the runs use
// a tight tolerance. At the default tolerance the account is looser, and
// the imbalance it reports says by how much.
func TestEnergyBalance(t *testing.T) {
	limiter, err := os.ReadFile("../../testdata/demo/limiter.yaml")
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name, file string
		carrier    float64
		levelDBm   float64
		output     ac.Output
		tight      float64 // a tolerance at which the account closes to 1e-6
	}{
		{"limiter demo", string(limiter), 3e9, 35, ac.Output{Port: 1}, 1e-8},
		{"biased detector", `
name: biased detector
diode_models:
  det: {saturation_current: 3uA, ideality: 1.05, series_resistance: 20, zero_bias_capacitance: 0.18pF, built_in_potential: 0.25V, transit_time: 50ps, breakdown_voltage: 3.8V, breakdown_current: 100uA}
parts:
  - {type: voltage_source, name: Vcc, plus: vcc, minus: gnd, value: 3.3V}
  - {type: resistor, name: Rbias, between: [vcc, anode], value: 4.7k}
  - {type: current_source, name: Itrim, from: gnd, to: anode, value: 20uA}
  - {type: capacitor, name: Cblock, between: [rf, anode], value: 22pF}
  - {type: inductor, name: Lfeed, between: [rf, gnd], value: 47nH}
  - {type: diode, name: D1, anode: anode, cathode: vout, model: det}
  - {type: capacitor, name: Cvideo, between: [vout, gnd], value: 10pF}
  - {type: resistor, name: Rload, between: [vout, gnd], value: 2k}
ports:
  - {name: rf, node: rf, impedance: 50, coupling: ac}
  - {name: video, node: vout, impedance: 100k}
`, 2.45e9, 10, ac.Output{Port: 1}, 1e-10},
	} {
		nw := network(t, tc.file)
		period := 1 / tc.carrier
		p := Pulse{CarrierHz: tc.carrier, CarrierEMF: ac.DBmToEMF(tc.levelDBm, 50), Width: 30 * period, Rise: 3 * period, Fall: 3 * period}
		for _, rel := range []float64{1e-3, tc.tight} {
			if testing.Short() && rel < 1e-9 {
				continue // 200 000 steps
			}
			res, err := RunPulse(nw, PulseSettings{Input: 0, Output: tc.output, Pulse: p, Kind: Limiter, After: 20 * period,
				Transient: Settings{RelativeTolerance: rel, VoltageTolerance: math.Min(1e-6, 1e-1*rel), CurrentTolerance: 1e-12}})
			if err != nil {
				t.Fatal(err)
			}
			e := res.Run.Energy
			t.Logf("%s at tolerance %g: source %.6g J (generator %.6g), dissipated %.6g J, stored %.6g J; imbalance %.2g; %d steps",
				tc.name, rel, e.Source, e.Generator, e.Dissipated, e.Stored, e.Imbalance, res.Run.Stats.Accepted)
			if rel == tc.tight && !(e.Imbalance <= 1e-6) {
				t.Errorf("%s: source %.9g J, dissipated %.9g J, stored %.9g J: imbalance %.3g; want within 1e-6", tc.name, e.Source, e.Dissipated, e.Stored, e.Imbalance)
			}
			if !(e.Dissipated > 0) || !(e.Generator > 0) {
				t.Errorf("%s: generator %g J, dissipated %g J; both must be positive", tc.name, e.Generator, e.Dissipated)
			}
		}
	}
}
