package transient

import (
	"math"
	"math/cmplx"
	"os"
	"testing"

	"qpoint/ac"
	"qpoint/ac/steady"
)

// TestSettlesToSteadyState runs a long pulse of a carrier and, over the
// last whole periods of its flat top, reads the output's DC shift and
// harmonics; they must match the periodic steady state that shooting
// finds (steady.Solve: Aprille and Trick, Proc. IEEE 60(1), 1972, an
// independent method on the trapezoidal rule with Richardson's
// extrapolation) within 0.01 dB on every harmonic that stands above
// -80 dBc (the even harmonics of the symmetric limiter are zero but for
// rounding), and the DC shift within 0.01 dB as well. The rectifier's
// generator is DC-coupled: an AC-coupled port's ideal DC block holds its
// DC-point voltage through a transient, while the steady state charges it
// until it carries no mean current (see Settings).
func TestSettlesToSteadyState(t *testing.T) {
	limiter, err := os.ReadFile("../../testdata/demo/limiter.yaml")
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name, file string
		carrier    float64
		levelDBm   float64
		output     ac.Output
	}{
		{"limiter demo", string(limiter), 5.8e9, 10, ac.Output{Port: 1}},
		{"half-wave rectifier", `
name: rectifier
diode_models:
  fast: {saturation_current: 1uA, ideality: 1.1, series_resistance: 10, zero_bias_capacitance: 0.2pF, built_in_potential: 0.4V, transit_time: 20ps}
parts:
  - {type: diode, name: D1, anode: in, cathode: out, model: fast}
  - {type: capacitor, name: Cv, between: [out, gnd], value: 5pF}
  - {type: resistor, name: Rv, between: [out, gnd], value: 200}
ports:
  - {name: rf, node: in, impedance: 50}
`, 1e9, 5, ac.Output{Port: -1, Node: "out"}},
	} {
		nw := network(t, tc.file)
		emf := ac.DBmToEMF(tc.levelDBm, nw.Ports[0].Impedance)
		const harmonics = 5
		st, err := steady.Solve(nw, ac.Drive{Input: 0, Output: tc.output, FrequencyHz: tc.carrier, EMF: emf}, steady.Settings{Harmonics: harmonics, Samples: 1023})
		if err != nil {
			t.Fatal(err)
		}
		period := 1 / tc.carrier
		p := Pulse{CarrierHz: tc.carrier, CarrierEMF: emf, Width: 150 * period, Rise: 5 * period, Fall: 5 * period}
		// The harmonics are read off the run's points joined by straight
		// lines, which attenuates harmonic k by about (2πk/N)²/12 at N
		// points per period: steps of at most 1/600 period keep the 5th
		// within 0.002 dB.
		res, err := RunPulse(nw, PulseSettings{Input: 0, Output: tc.output, Pulse: p, Kind: Limiter, Probe: &Probe{},
			After: period, Transient: Settings{RelativeTolerance: 1e-6, MaxStep: period / 600}})
		if err != nil {
			t.Fatal(err)
		}
		f := res.Figures
		// The carrier phase restarts at the pulse's start; the
		// harmonics' amplitudes do not depend on it.
		a, b := f.FallStart-50*period, f.FallStart
		y := res.Output
		fund := st.Output[1].Amplitude
		for k := 0; k <= harmonics; k++ {
			w := newWaveform(res.Run.Times, y, 2*math.Pi*float64(k)*tc.carrier)
			mean, ph := w.window(a, b)
			got := cmplx.Abs(ph)
			want := st.Output[k].Amplitude
			if k == 0 {
				got, want = mean-res.Baseline, st.Output[0].Amplitude
			}
			if math.Abs(want) < fund*1e-4 {
				t.Logf("%s: harmonic %d is %.3g V, below -80 dBc: not compared (transient %.3g V)", tc.name, k, want, got)
				continue
			}
			d := 20 * math.Log10(got/want)
			t.Logf("%s: harmonic %d: transient %.6g V, steady state %.6g V, %+.4f dB", tc.name, k, got, want, d)
			if math.IsNaN(d) || math.Abs(d) > 0.01 {
				t.Errorf("%s: harmonic %d: transient %.6g V against the steady state's %.6g V (%+.4f dB); want within 0.01 dB", tc.name, k, got, want, d)
			}
		}
		t.Logf("%s: %d steps, %d rejected", tc.name, res.Run.Stats.Accepted, res.Run.Stats.Rejected)
	}
}
