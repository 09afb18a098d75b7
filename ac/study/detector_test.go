package study

import (
	"math"
	"testing"

	"qpoint/ac"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// negativeDetector is the demo detector with the diode turned round and
// the supply negative: its video output falls as the carrier rises, so its
// voltage sensitivity and DC shift are negative.
const negativeDetector = `
diode_models:
  det: {saturation_current: 3uA, ideality: 1.05, series_resistance: 20, zero_bias_capacitance: 0.18pF, built_in_potential: 0.25V}
parts:
  - {type: voltage_source, name: Vee, plus: vee, minus: gnd, value: -3.3V}
  - {type: resistor, name: Rbias, between: [vee, cathode], value: 220k}
  - {type: capacitor, name: Cblock, between: [rf, cathode], value: 22pF}
  - {type: resistor, name: Rmatch, between: [rf, gnd], value: 68}
  - {type: diode, name: D1, anode: vout, cathode: cathode, model: det}
  - {type: capacitor, name: Cvideo, between: [vout, gnd], value: 100pF}
ports:
  - {name: rf, node: rf, impedance: 50, coupling: ac}
  - {name: video, node: vout, impedance: 100k}
`

func detectorStudy(t *testing.T, src string, s Settings) *Result {
	t.Helper()
	c := load(t, src)
	s.Axis = axis(t, c, "Rbias.value", 20e3, 2e6, 25)
	s.Axis.Values, _ = Grid(20e3, 2e6, 25, true)
	s.Drive = ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9, EMF: ac.DBmToEMF(-30, 50)}
	r, err := Run(c, s)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestOptimizePolarity: maximising the sensitivity of a negative-going
// detector seeks the largest magnitude (the best detector), not the
// signed value nearest zero (the worst); --signed asks for the signed
// optimum explicitly.
func TestOptimizePolarity(t *testing.T) {
	r := detectorStudy(t, negativeDetector, Settings{})
	m, err := ParseMeasure("sensitivity")
	if err != nil {
		t.Fatal(err)
	}
	if !m.Polar() {
		t.Fatal("sensitivity is a polarity measure")
	}
	best, worst := 0.0, math.Inf(-1)
	for i := range r.Steps {
		v, err := m.Of(&r.Steps[i], nil, nil)
		if err != nil {
			t.Fatal(err)
		}
		if v >= 0 {
			t.Fatalf("step %d: sensitivity %g V/W, want negative for this detector", i, v)
		}
		best = math.Min(best, v)
		worst = math.Max(worst, v)
	}
	sol, err := Optimize(r, m, true, 1e-6)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("largest |sensitivity| %.4g V/W at %.4g Ω (grid best %.4g, worst %.4g)", sol.Measure, sol.Value, best, worst)
	if !sol.OnMagnitude || sol.Measure > best*(1-1e-6) {
		t.Errorf("maximising sensitivity gave %.4g V/W (on magnitude: %v); the grid's largest magnitude is %.4g V/W", sol.Measure, sol.OnMagnitude, best)
	}
	m.Signed = true
	signed, err := Optimize(r, m, true, 1e-6)
	if err != nil {
		t.Fatal(err)
	}
	if signed.OnMagnitude || signed.Measure < worst {
		t.Errorf("signed maximum %.4g V/W, want at least the grid's %.4g V/W", signed.Measure, worst)
	}
}

// TestDistortionFrequencies: distortion belongs to the distortion
// frequencies, not the first response frequency, and several give one
// set each; each equals a Volterra estimate made directly there.
func TestDistortionFrequencies(t *testing.T) {
	c := demo(t, "detector")
	s := Settings{Axis: axis(t, c, "Vcc.value", 1, 3.3, 3), FrequenciesHz: []float64{100e6, 1e9},
		Drive:        ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 915e6, EMF: ac.DBmToEMF(-30, 50)},
		DistortionHz: []float64{915e6, 2.45e9}}
	r, err := Run(c, s)
	if err != nil {
		t.Fatal(err)
	}
	st := &r.Steps[2]
	if len(st.Distortion) != 2 || st.Distortion[0].FrequencyHz != 915e6 || st.Distortion[1].FrequencyHz != 2.45e9 {
		t.Fatalf("distortion at %+v; want 915 MHz and 2.45 GHz", st.Distortion)
	}
	nw := network(t, c)
	for k, f := range s.DistortionHz {
		d := s.Drive
		d.FrequencyHz = f
		e, err := ac.Volterra(nw, d)
		if err != nil {
			t.Fatal(err)
		}
		if got := st.Distortion[k].HD2dBc; math.Abs(got-e.HD2dBc()) > 1e-9 {
			t.Errorf("HD2 at %g Hz: study %.6f dBc, direct estimate %.6f dBc", f, got, e.HD2dBc())
		}
	}
	m, _ := ParseMeasure("hd2@2.45GHz")
	if v, err := m.Of(st, s.FrequenciesHz, nil); err != nil || v != st.Distortion[1].HD2dBc {
		t.Errorf("hd2@2.45GHz = %v (%v), want the second set's %v", v, err, st.Distortion[1].HD2dBc)
	}
	if _, err := (&Measure{}).Of(st, nil, nil); err == nil {
		t.Error("an empty measure read a value")
	}
}

// TestDetectorMeasures: nep and tss in a study equal ac.Detector at the
// same bias, and tss is minimised where the grid says.
func TestDetectorMeasures(t *testing.T) {
	r := detectorStudy(t, negativeDetector, Settings{Detector: &DetectorSettings{VideoFromHz: 1, VideoToHz: 2e6}})
	st := &r.Steps[len(r.Steps)-1]
	if st.Detection == nil || !st.Detection.Detects {
		t.Fatal("no detector figures")
	}
	c := load(t, negativeDetector)
	c.Parts[1].Value = r.Settings.Axis.Values[len(r.Steps)-1]
	nw := network(t, c)
	det, err := ac.Detector(nw, ac.NoiseSettings{Input: 0, Output: ac.Output{Port: 1}}, 2.45e9, 1, 2e6)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(st.Detection.NEP/det.NEP-1) > 1e-6 || math.Abs(st.Detection.TangentialDBm-det.TangentialDBm()) > 1e-6 {
		t.Errorf("study NEP %g, TSS %g dBm; direct %g, %g dBm", st.Detection.NEP, st.Detection.TangentialDBm, det.NEP, det.TangentialDBm())
	}
	m, _ := ParseMeasure("tss")
	sol, err := Optimize(r, m, false, 1e-6)
	if err != nil {
		t.Fatal(err)
	}
	for i := range r.Steps {
		if v, _ := m.Of(&r.Steps[i], nil, nil); v < sol.Measure-1e-9 {
			t.Errorf("step %d has TSS %.4f dBm below the minimum found, %.4f dBm", i, v, sol.Measure)
		}
	}
}

func network(t *testing.T, c *circuit.Circuit) *smallsignal.Network {
	t.Helper()
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
