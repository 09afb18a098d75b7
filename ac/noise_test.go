package ac

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"qpoint/bias/diode"
	"qpoint/smallsignal"
)

func noiseAt(t *testing.T, nw *smallsignal.Network, s NoiseSettings, freqs ...float64) *NoiseResult {
	t.Helper()
	r, err := Noise(nw, freqs, s)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func relDiff(a, b float64) float64 { return math.Abs(a-b) / math.Max(math.Abs(b), 1e-300) }

// nodeOut observes the named node.
func nodeOut(name string) NoiseSettings {
	return NoiseSettings{Input: -1, Output: Output{Port: -1, Node: name}}
}

// TestJohnsonNoise: the open-circuit noise of 1 kΩ at 290 K is
// sqrt(4kTR) = 4.0 nV/√Hz (Johnson 1928; Nyquist 1928).
func TestJohnsonNoise(t *testing.T) {
	nw := network(t, `
temperature: 290K
parts:
  - {type: resistor, name: R, between: [a, gnd], value: 1k}
`)
	r := noiseAt(t, nw, nodeOut("a"), 1e3)
	got := r.Points[0].Density()
	t.Logf("1 kΩ at 290 K: %.4g V/√Hz", got)
	if math.Abs(got-4.0e-9) > 0.05e-9 {
		t.Errorf("1 kΩ at 290 K: %.4g V/√Hz, want 4.0 nV/√Hz (Johnson 1928, Nyquist 1928)", got)
	}
	if want := math.Sqrt(4 * diode.Boltzmann * 290 * 1e3); relDiff(got, want) > 1e-12 {
		t.Errorf("1 kΩ at 290 K: %.15g, want sqrt(4kTR) = %.15g", got, want)
	}
}

// TestShotNoise: 1 mA of junction current carries sqrt(2qI) =
// 17.9 pA/√Hz (Schottky 1918). Fed by an ideal current source, the noise
// current flows through the diode's own r_d.
func TestShotNoise(t *testing.T) {
	nw := network(t, `
diode_models:
  ideal: {saturation_current: 1e-14}
parts:
  - {type: current_source, name: I, from: gnd, to: a, value: 1mA}
  - {type: diode, name: D, anode: a, cathode: gnd, model: ideal}
`)
	var shot NoiseSource
	for _, s := range NoiseSources(nw) {
		if s.Kind == ShotNoise {
			shot = s
		}
	}
	in := math.Sqrt(shot.Density(1e3))
	t.Logf("1 mA shot noise: %.4g A/√Hz", in)
	if math.Abs(in-17.9e-12) > 0.05e-12 {
		t.Errorf("1 mA shot noise: %.4g A/√Hz, want 17.9 pA/√Hz (Schottky 1918)", in)
	}
	r := noiseAt(t, nw, nodeOut("a"), 1e3)
	rd := 1 / nw.Diodes[0].G1
	if got := r.Points[0].Density(); relDiff(got, in*rd) > 1e-9 {
		t.Errorf("node noise %.6g V/√Hz, want i_n r_d = %.6g", got, in*rd)
	}
}

// TestZeroBiasDiodeIsThermal: at zero bias the shot noise of the forward
// and reverse flows, 2q(I_D + 2 I_S) = 4q I_S, equals the thermal noise
// 4kT/R_0 of the zero-bias resistance R_0 = n V_T / I_S for an ideal
// junction, as equilibrium requires (Sze and Ng, "Physics of Semiconductor
// Devices", 3rd ed., 2007, ch. 2; Nyquist 1928).
func TestZeroBiasDiodeIsThermal(t *testing.T) {
	diodeNW := network(t, `
temperature: 290K
diode_models:
  ideal: {saturation_current: 3uA, ideality: 1}
parts:
  - {type: diode, name: D, anode: a, cathode: gnd, model: ideal}
`)
	d := diodeNW.Diodes[0]
	if d.JunctionVoltage != 0 {
		t.Fatalf("junction voltage %g, want 0", d.JunctionVoltage)
	}
	r0 := 1 / d.G1
	shot := d.Device.ShotNoise(0)
	want := 4 * diode.Boltzmann * 290 / r0
	t.Logf("zero-bias diode: R_0 = %.6g Ω, shot %.6g A²/Hz, 4kT/R_0 %.6g A²/Hz", r0, shot, want)
	if relDiff(shot, want) > 1e-12 {
		t.Errorf("zero-bias shot noise %.12g A²/Hz, want 4kT/R_0 = %.12g (Sze and Ng)", shot, want)
	}
	// Through the network: the diode's node noise equals that of a
	// resistor R_0 in its place.
	resNW := network(t, fmt.Sprintf(`
temperature: 290K
parts:
  - {type: resistor, name: R, between: [a, gnd], value: %.17g}
`, r0))
	vd := noiseAt(t, diodeNW, nodeOut("a"), 1e3).Points[0].Density()
	vr := noiseAt(t, resNW, nodeOut("a"), 1e3).Points[0].Density()
	t.Logf("zero-bias diode %.6g V/√Hz, resistor R_0 %.6g V/√Hz", vd, vr)
	if relDiff(vd, vr) > 1e-12 {
		t.Errorf("zero-bias diode node noise %.12g V/√Hz, resistor R_0 %.12g", vd, vr)
	}
	// With n > 1 the law gives n times the thermal value (documented).
	dev := diode.New(diode.Params{SaturationCurrent: 3e-6, Ideality: 1.05, BuiltInPotential: 0.7, Grading: 0.5,
		GapEnergy: 1.11, SaturationExponent: 3, MeasuredAtK: 290}, 290)
	g0 := dev.Current(0).D1
	if ratio := dev.ShotNoise(0) / (4 * diode.Boltzmann * 290 * g0); relDiff(ratio, 1.05) > 1e-12 {
		t.Errorf("n = 1.05: shot/thermal at zero bias %.12g, want n", ratio)
	}
}

// attenuator returns a pi attenuator of lossDB between 50 Ω ports at
// temperature temp, with the textbook resistor values (Pozar ch. 10;
// common practice): K = 10^(L/20), shunt Z0 (K+1)/(K-1), series
// Z0 (K²-1)/(2K).
func attenuator(t *testing.T, lossDB float64, temp string) *smallsignal.Network {
	k := math.Pow(10, lossDB/20)
	shunt := 50 * (k + 1) / (k - 1)
	series := 50 * (k*k - 1) / (2 * k)
	// %.17g writes each value so that it reads back exactly.
	return network(t, fmt.Sprintf(`
temperature: %s
parts:
  - {type: resistor, name: Rshunt_in,  between: [in, gnd],  value: %.17g}
  - {type: resistor, name: Rseries,    between: [in, out],  value: %.17g}
  - {type: resistor, name: Rshunt_out, between: [out, gnd], value: %.17g}
ports:
  - {name: in,  node: in,  impedance: 50}
  - {name: out, node: out, impedance: 50}
`, temp, shunt, series, shunt))
}

// TestAttenuatorNoiseFigure: a matched resistive attenuator at T0 = 290 K
// has a noise figure equal to its loss; at another temperature T,
// F = 1 + (L - 1) T/T0 (Pozar, "Microwave Engineering", 4th ed., 2012,
// ch. 10; common practice).
func TestAttenuatorNoiseFigure(t *testing.T) {
	for _, c := range []struct {
		lossDB float64
		temp   string
		tempK  float64
	}{{6, "290K", 290}, {3, "290K", 290}, {10, "290K", 290}, {6, "85C", 358.15}} {
		nw := attenuator(t, c.lossDB, c.temp)
		s := NoiseSettings{Input: 0, Output: Output{Port: 1}}
		r := noiseAt(t, nw, s, 1e6, 1e9)
		resp := run(t, nw, 1e6)
		loss := 1 / sqAbs(resp.Points[0].S[1][0])
		if math.Abs(10*math.Log10(loss)-c.lossDB) > 1e-9 || cmplx.Abs(resp.Points[0].S[0][0]) > 1e-12 {
			t.Fatalf("%g dB attenuator: loss %.12g dB, |S11| %g", c.lossDB, 10*math.Log10(loss), cmplx.Abs(resp.Points[0].S[0][0]))
		}
		want := 1 + (loss-1)*c.tempK/290
		for _, pt := range r.Points {
			t.Logf("%g dB pi attenuator at %s, %g Hz: noise figure %.6f dB", c.lossDB, c.temp, pt.FrequencyHz, pt.FigureDB())
			if relDiff(pt.Factor(), want) > 1e-12 {
				t.Errorf("%g dB attenuator at %s: F = %.12g, want 1 + (L-1)T/T0 = %.12g (Pozar ch. 10)", c.lossDB, c.temp, pt.Factor(), want)
			}
			// F = 1 + e_n²/(4 k T0 Z0): the input-referred noise and
			// the noise figure tell one story.
			en := pt.InputReferred()
			if f := 1 + en*en/(4*diode.Boltzmann*290*50); relDiff(f, pt.Factor()) > 1e-12 {
				t.Errorf("1 + e_n²/(4kT0 Z0) = %.12g, F = %.12g", f, pt.Factor())
			}
		}
	}
}

// TestLosslessNoiseFigure: a lossless network adds no noise: its noise
// figure is 0 dB at every frequency (common practice; Pozar ch. 10).
func TestLosslessNoiseFigure(t *testing.T) {
	nw := network(t, `
parts:
  - {type: inductor,  name: L1, between: [in, mid],  value: 8nH}
  - {type: capacitor, name: C1, between: [mid, gnd], value: 3.2pF}
  - {type: inductor,  name: L2, between: [mid, out], value: 8nH}
ports:
  - {name: in,  node: in,  impedance: 50}
  - {name: out, node: out, impedance: 50}
`)
	r := noiseAt(t, nw, NoiseSettings{Input: 0, Output: Output{Port: 1}}, 1e8, 1e9, 3e9)
	for _, pt := range r.Points {
		t.Logf("lossless LC ladder, %g Hz: noise figure %.3g dB", pt.FrequencyHz, pt.FigureDB())
		if math.Abs(pt.FigureDB()) > 1e-12 {
			t.Errorf("%g Hz: noise figure %g dB, want 0", pt.FrequencyHz, pt.FigureDB())
		}
	}
}

// TestNoiseAdjointMatchesForward checks every source's adjoint transfer
// against a forward solve with that source alone, on each demo, and that
// the contributions add to the total.
func TestNoiseAdjointMatchesForward(t *testing.T) {
	for _, name := range []string{"detector", "mixer", "attenuator", "limiter"} {
		nw := network(t, demo(t, name))
		s := NoiseSettings{Input: 0, Output: Output{Port: len(nw.Ports) - 1}}
		for _, hz := range []float64{1e3, 1e8, 2.45e9} {
			r := noiseAt(t, nw, s, hz)
			pt := r.Points[0]
			f := newLU(nw.N)
			g, c := nw.G.RawMatrix(), nw.C.RawMatrix()
			f.load(g.Data, c.Data, g.Stride, c.Stride, 2*math.Pi*hz)
			if err := f.factor(); err != nil {
				t.Fatal(err)
			}
			sum := 0.0
			for k, src := range r.Sources {
				x := make([]complex128, nw.N)
				if src.a >= 0 {
					x[src.a] -= 1
				}
				if src.b >= 0 {
					x[src.b] += 1
				}
				f.solve(x)
				v := nw.PortVoltage(s.Output.Port, x)
				want := src.Density(hz) * sqAbs(v)
				if relDiff(pt.Contributions[k], want) > 1e-9 && math.Abs(pt.Contributions[k]-want) > 1e-12*pt.Total {
					t.Errorf("%s at %g Hz, %s: adjoint %.10g V²/Hz, forward %.10g", name, hz, src.Label(), pt.Contributions[k], want)
				}
				sum += pt.Contributions[k]
			}
			if relDiff(sum, pt.Total) > 1e-12 {
				t.Errorf("%s at %g Hz: contributions sum to %.15g, total %.15g", name, hz, sum, pt.Total)
			}
		}
	}
}

// TestIntegratedRC: the thermal noise of R across C integrates to
// S0 f_c (atan(f_b/f_c) - atan(f_a/f_c)), and to kT/C over all frequencies
// (common practice: the kT/C noise of a sampling capacitor).
func TestIntegratedRC(t *testing.T) {
	nw := network(t, `
temperature: 290K
parts:
  - {type: resistor,  name: R, between: [a, gnd], value: 10k}
  - {type: capacitor, name: C, between: [a, gnd], value: 1nF}
`)
	corner := 1 / (2 * math.Pi * 10e3 * 1e-9)
	s0 := 4 * diode.Boltzmann * 290 * 10e3
	for _, band := range [][2]float64{{1, 1e9}, {1e3, 1e5}, {corner, 2 * corner}} {
		b, err := IntegrateNoise(nw, nodeOut("a"), band[0], band[1])
		if err != nil {
			t.Fatal(err)
		}
		want := s0 * corner * (math.Atan(band[1]/corner) - math.Atan(band[0]/corner))
		t.Logf("RC noise %g–%g Hz: %.8g V² (closed form %.8g), %d per decade", band[0], band[1], b.Total, want, b.PerDecade)
		if relDiff(b.Total, want) > 1e-5 {
			t.Errorf("%g–%g Hz: %.10g V², want %.10g", band[0], band[1], b.Total, want)
		}
	}
	b, _ := IntegrateNoise(nw, nodeOut("a"), 1e-3, 1e12)
	if want := diode.Boltzmann * 290 / 1e-9; relDiff(b.Total, want) > 1e-5 {
		t.Errorf("whole band: %.8g V², want kT/C = %.8g", b.Total, want)
	}
}

// TestPowerLaw: the segment rule is exact for f^α.
func TestPowerLaw(t *testing.T) {
	for _, a := range []float64{0, -1, -2, 1, -0.999999999} {
		f1, f2 := 3.0, 7.0
		got := powerLaw(f1, f2, math.Pow(f1, a), math.Pow(f2, a))
		var want float64
		switch {
		case a == -1:
			want = math.Log(f2 / f1)
		case math.Abs(a+1) < 1e-6:
			// First two terms of the series in a + 1; the closed form
			// below cancels.
			l1, l2 := math.Log(f1), math.Log(f2)
			want = l2 - l1 + (a+1)*(l2*l2-l1*l1)/2
		default:
			want = (math.Pow(f2, a+1) - math.Pow(f1, a+1)) / (a + 1)
		}
		if relDiff(got, want) > 1e-8 {
			t.Errorf("α = %g: %.12g, want %.12g", a, got, want)
		}
	}
}

// TestFlickerNoise: the model's K |I|^a / f adds to the junction's noise
// and falls 10 dB per decade.
func TestFlickerNoise(t *testing.T) {
	nw := network(t, `
diode_models:
  noisy: {saturation_current: 1e-14, flicker_coefficient: 1e-12, flicker_exponent: 1}
parts:
  - {type: current_source, name: I, from: gnd, to: a, value: 1mA}
  - {type: diode, name: D, anode: a, cathode: gnd, model: noisy}
`)
	var fl *NoiseSource
	srcs := NoiseSources(nw)
	for i := range srcs {
		if srcs[i].Kind == FlickerNoise {
			fl = &srcs[i]
		}
	}
	if fl == nil {
		t.Fatal("no flicker source")
	}
	if relDiff(fl.Density(10), 1e-12*1e-3/10) > 1e-6 {
		t.Errorf("flicker at 10 Hz: %g A²/Hz, want K I/f = %g", fl.Density(10), 1e-12*1e-3/10)
	}
	r := noiseAt(t, nw, nodeOut("a"), 1, 10)
	k := -1
	for i, s := range r.Sources {
		if s.Kind == FlickerNoise {
			k = i
		}
	}
	if ratio := r.Points[0].Contributions[k] / r.Points[1].Contributions[k]; relDiff(ratio, 10) > 1e-9 {
		t.Errorf("flicker falls by %g per decade, want 10", ratio)
	}
}

// detectorCircuit is an ideal zero-bias detector: the carrier reaches the
// junction through a 50 Ω port, a choke returns the anode to ground at DC
// and a large capacitor grounds the cathode at RF, where the video port
// takes the rectified voltage.
func detectorCircuit(rs, cj0, video, coupling string) string {
	return `
temperature: 290K
diode_models:
  zb: {saturation_current: 25uA, ideality: 1, series_resistance: ` + rs + `, zero_bias_capacitance: ` + cj0 + `}
parts:
  - {type: inductor,  name: Lchoke, between: [a, gnd], value: 1mH}
  - {type: diode,     name: D, anode: a, cathode: v, model: zb}
  - {type: capacitor, name: Cvideo, between: [v, gnd], value: 1uF}
ports:
  - {name: rf,    node: a, impedance: 50, coupling: ac}
  - {name: video, node: v, impedance: ` + video + `, noise_temperature: 0K, coupling: ` + coupling + `}
`
}

// TestVoltageSensitivity: the DC shift of a square-law junction is
// β = 1/(2 n V_T) amperes per absorbed watt, about 19.3 A/W at 290 K; into
// an open video circuit it gives R_j β volts per watt, reduced by the
// fraction of the power that reaches the junction past R_S and C_j,
// 1/(1 + R_S/R_j + w² C_j² R_S R_j) (Cowley and Sorensen, IEEE Trans. MTT
// 14(12), 1966, whose factors 1/(1 + R_S/R_j) and 1/(1 + w² C_j² R_S R_j)
// this is the exact form of).
func TestVoltageSensitivity(t *testing.T) {
	const carrier = 1e9
	for _, c := range []struct{ rs, cj0 string }{{"0", "0"}, {"10", "0"}, {"10", "0.2pF"}} {
		nw := network(t, detectorCircuit(c.rs, c.cj0, "1T", "dc"))
		s := NoiseSettings{Input: 0, Output: Output{Port: 1}}
		g, err := VoltageSensitivity(nw, s, carrier)
		if err != nil {
			t.Fatal(err)
		}
		d := nw.Diodes[0]
		rj := 1 / d.G1
		beta := 1 / (2 * d.Device.NVT())
		w := 2 * math.Pi * carrier
		cj, rsv := d.C1, d.SeriesResistance
		// Available to absorbed: 1 - |S11|².
		s11 := run(t, nw, carrier).Points[0].S[0][0]
		absorbed := 1 - sqAbs(s11)
		want := rj * beta / (1 + rsv/rj + w*w*cj*cj*rsv*rj) * absorbed * 1e12 / (1e12 + rj + rsv)
		t.Logf("R_S %s, C_j0 %s: γ = %.6g V/W (β = %.4g A/W, R_j = %.4g Ω)", c.rs, c.cj0, g, beta, rj)
		if relDiff(g, want) > 1e-6 {
			t.Errorf("R_S %s, C_j0 %s: γ = %.8g V/W, want %.8g (Cowley and Sorensen 1966)", c.rs, c.cj0, g, want)
		}
	}
	if beta := 1 / (2 * diode.ThermalVoltage(290)); math.Abs(beta-20.0) > 0.1 {
		t.Errorf("β at 290 K = %.4g A/W", beta)
	}
}

// TestDetectorNEP: for a zero-bias ideal detector with a noiseless open
// video load, the video noise is the thermal noise of R_j, so
// NEP = sqrt(4kT R_j)/γ (common practice), and P_TSS = 2.5 V_n/γ.
func TestDetectorNEP(t *testing.T) {
	nw := network(t, detectorCircuit("0", "0", "1T", "dc"))
	s := NoiseSettings{Input: 0, Output: Output{Port: 1}}
	// Far below the video corner 1/(2π R_j 1 µF), about 32 Hz for
	// R_j = 5 kΩ, the density is white.
	det, err := Detector(nw, s, 1e9, 1e-3, 1e-2)
	if err != nil {
		t.Fatal(err)
	}
	rj := 1 / nw.Diodes[0].G1
	want := math.Sqrt(4*diode.Boltzmann*290*rj) / det.Sensitivity
	t.Logf("zero-bias detector: γ = %.5g V/W, NEP = %.5g W/√Hz (sqrt(4kTR_j)/γ = %.5g), TSS %.2f dBm in 9 mHz",
		det.Sensitivity, det.NEP, want, det.TangentialDBm())
	if relDiff(det.NEP, want) > 1e-6 {
		t.Errorf("NEP %.6g W/√Hz, want sqrt(4kTR_j)/γ = %.6g", det.NEP, want)
	}
	if tss := 2.5 * det.Video.RMS() / det.Sensitivity; relDiff(det.TangentialW, tss) > 1e-12 {
		t.Errorf("TSS %.6g W, want 2.5 V_n/γ = %.6g", det.TangentialW, tss)
	}
	// The video response: at DC it is the Volterra sensitivity; the
	// video node is R_j in parallel with 1 µF, one pole at
	// 1/(2π R_j C) (textbook RC low-pass).
	corner := 1 / (2 * math.Pi * rj * 1e-6)
	gv, err := VideoSensitivity(nw, s, 1e9, []float64{0, corner})
	if err != nil {
		t.Fatal(err)
	}
	if relDiff(real(gv[0]), det.Sensitivity) > 1e-12 || imag(gv[0]) != 0 {
		t.Errorf("γ(0) = %v, Volterra %g", gv[0], det.Sensitivity)
	}
	// The choke's 0.2 Ω of reactance at the pole shifts it by 4e-5.
	if h := gv[1] / gv[0]; cmplx.Abs(h-complex(0.5, -0.5)) > 1e-4 {
		t.Errorf("video response at the pole %v, want 1/(1 + j) (one pole at 1/(2π R_j C))", h)
	}
	// An AC-coupled output sees no rectified DC.
	blocked := network(t, detectorCircuit("0", "0", "1T", "ac"))
	if _, err := VoltageSensitivity(blocked, s, 1e9); !errors.Is(err, ErrNoRectification) {
		t.Errorf("AC-coupled output: error %v, want ErrNoRectification", err)
	}
}

// TestNoiseSettingsErrors: bad ports and bands are refused.
func TestNoiseSettingsErrors(t *testing.T) {
	nw := attenuator(t, 6, "290K")
	for _, s := range []NoiseSettings{
		{Input: 0, Output: Output{Port: 0}},
		{Input: 2, Output: Output{Port: 1}},
		{Input: 0, Output: Output{Port: 5}},
		{Input: 0, Output: Output{Port: -1, Node: "nowhere"}},
	} {
		if _, err := Noise(nw, []float64{1e6}, s); err == nil {
			t.Errorf("%+v: no error", s)
		}
	}
	if _, err := IntegrateNoise(nw, NoiseSettings{Input: 0, Output: Output{Port: 1}}, 1e6, 1e6); err == nil {
		t.Error("empty band: no error")
	}
	r := noiseAt(t, nw, NoiseSettings{Input: -1, Output: Output{Port: 1}}, 1e6)
	if !math.IsNaN(r.Points[0].Factor()) || !math.IsNaN(r.Points[0].InputReferred()) {
		t.Error("without an input, noise factor and input-referred noise should be NaN")
	}
}
