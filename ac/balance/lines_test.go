package balance

import (
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"qpoint/ac"
	"qpoint/ac/touchstone"
	"qpoint/bias/circuit"
)

// detectorBehind returns a zero-bias detector fed from a 50 Ω port
// through feed, a part (or parts) from node a to node b.
func detectorBehind(feed string) string {
	return `
diode_models:
  sk: {saturation_current: 3uA, ideality: 1.05, series_resistance: 20, zero_bias_capacitance: 0.18pF, built_in_potential: 0.25V}
parts:
` + feed + `
  - {type: resistor, name: Rload, between: [b, gnd], value: 200}
  - {type: diode, name: D1, anode: b, cathode: vout, model: sk}
  - {type: capacitor, name: Cvideo, between: [vout, gnd], value: 20pF}
ports:
  - {name: rf, node: a, impedance: 50}
  - {name: video, node: vout, impedance: 10k}
`
}

// lcLadder is n π sections (C/2, L, C/2) of a line of impedance z0 and
// delay t from a to b: L = z0 t/n, C = t/(z0 n). Its phase error per
// section falls as (ω t/n)² (the π section's ABCD matrix matches the
// line's to second order in βl: Pozar, "Microwave Engineering", 4th ed.,
// sec. 2.1 and Table 4.1).
func lcLadder(n int, z0, t float64) string {
	var b strings.Builder
	l, c := z0*t/float64(n), t/(z0*float64(n))
	node := func(k int) string {
		switch k {
		case 0:
			return "a"
		case n:
			return "b"
		}
		return fmt.Sprintf("n%d", k)
	}
	for k := 0; k <= n; k++ {
		ck := c
		if k == 0 || k == n {
			ck = c / 2
		}
		fmt.Fprintf(&b, "  - {type: capacitor, name: C%d, between: [%s, gnd], value: %.17g}\n", k, node(k), ck)
		if k < n {
			fmt.Fprintf(&b, "  - {type: inductor, name: L%d, between: [%s, %s], value: %.17g}\n", k, node(k), node(k+1), l)
		}
	}
	return b.String()
}

// TestLineAgainstLadders: harmonic balance of a detector behind a line
// equals the same detector behind LC ladders that approximate the line,
// within the ladders' error, which falls as 1/n² with the section count n
// (the π section's error is second order in βl per section): the largest
// difference over the harmonics 0 to 3 at the line's end shrinks about
// fourfold per doubling of n.
func TestLineAgainstLadders(t *testing.T) {
	if testing.Short() {
		t.Skip("harmonic balance of ladders up to 128 sections")
	}
	const z0, delay = 70.0, 50e-12
	d := ac.Drive{Input: 0, Output: ac.Output{Port: -1, Node: "b"}, FrequencyHz: 2.45e9, EMF: ac.DBmToEMF(-5, 50)}
	solve := func(src string) []complex128 {
		t.Helper()
		r, err := Solve(network(t, src), d, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		var h []complex128
		for _, p := range r.Output[:4] {
			h = append(h, p.Phasor)
		}
		return h
	}
	ref := solve(detectorBehind(fmt.Sprintf("  - {type: transmission_line, name: T1, ends: [a, b], impedance: %g, delay: %gs}", z0, delay)))
	var diffs []float64
	var prev []complex128
	extrapolated := 0.0
	for _, n := range []int{8, 16, 32, 64, 128} {
		h := solve(detectorBehind(lcLadder(n, z0, delay)))
		worst, rich := 0.0, 0.0
		for k := range ref {
			worst = math.Max(worst, cmplx.Abs(h[k]-ref[k])/cmplx.Abs(ref[k]))
			if prev != nil {
				// Richardson over n/2 and n removes the 1/n² term.
				r := (4*h[k] - prev[k]) / 3
				rich = math.Max(rich, cmplx.Abs(r-ref[k])/cmplx.Abs(ref[k]))
			}
		}
		prev = h
		extrapolated = rich
		diffs = append(diffs, worst)
		if n == 8 {
			t.Logf("%3d sections: largest relative difference over harmonics 0-3 at the line's end %.3g", n, worst)
		} else {
			t.Logf("%3d sections: largest relative difference over harmonics 0-3 at the line's end %.3g; Richardson over %d and %d sections %.3g", n, worst, n/2, n, rich)
		}
	}
	if extrapolated > 1e-6 {
		t.Errorf("the ladders extrapolated to infinitely many sections differ from the line by %.3g", extrapolated)
	}
	for i := 1; i < len(diffs); i++ {
		if r := diffs[i-1] / diffs[i]; r < 3 || r > 5 {
			t.Errorf("doubling the sections from %d cut the difference by %.2f; a second-order approximation gives 4", 8<<(i-1), r)
		}
	}
	if last := diffs[len(diffs)-1]; last > 1e-4 {
		t.Errorf("128 sections differ from the line by %.3g", last)
	}
}

// TestBlockBalance: a detector's matching network written as a Touchstone
// file at every harmonic the balance uses, read back as a block, gives
// the same harmonic balance as the lumped network itself, to 1e-9 of the
// largest harmonic at the output: the block's rows at each product are
// the network's own there, and its declared DC resistance matrix is the
// network's at DC.
func TestBlockBalance(t *testing.T) {
	const f0, harmonics = 2.45e9, 16
	matching := `
  - {type: resistor,  name: Rshunt, between: [a, gnd], value: 500}
  - {type: inductor,  name: L1, between: [a, m], value: 2nH}
  - {type: capacitor, name: C1, between: [m, gnd], value: 1pF}
  - {type: resistor,  name: R1, between: [m, b], value: 10}`
	twoPort := network(t, "parts:"+matching+`
ports:
  - {name: p1, node: a, impedance: 50}
  - {name: p2, node: b, impedance: 50}
`)
	var freqs []float64
	for k := 1; k <= harmonics; k++ {
		freqs = append(freqs, float64(k)*f0)
	}
	resp, err := ac.Run(twoPort, freqs, ac.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	var points []touchstone.Point
	for _, p := range resp.Points {
		points = append(points, touchstone.Point{FrequencyHz: p.FrequencyHz, S: p.S})
	}
	f, err := os.Create(filepath.Join(dir, "match.s2p"))
	if err != nil {
		t.Fatal(err)
	}
	if err := touchstone.Write(f, []touchstone.Port{{Name: "1", Impedance: 50}, {Name: "2", Impedance: 50}}, points, touchstone.FormatRI, nil); err != nil {
		t.Fatal(err)
	}
	f.Close()
	block := "  - {type: s_parameter_block, name: F1, file: match.s2p, terminals: [a, b], dc: {resistance: [[500, 500], [500, 510]]}}"
	c, err := circuit.Parse(filepath.Join(dir, "detector.yaml"), []byte(detectorBehind(block)))
	if err != nil {
		t.Fatal(err)
	}
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: f0, EMF: ac.DBmToEMF(-10, 50)}
	s := Settings{Harmonics: harmonics, FixedHarmonics: true}
	want, err := Solve(network(t, detectorBehind(matching)), d, s)
	if err != nil {
		t.Fatal(err)
	}
	got, err := Solve(linearise(t, c), d, s)
	if err != nil {
		t.Fatal(err)
	}
	scale := 0.0
	for _, p := range want.Output {
		scale = math.Max(scale, cmplx.Abs(p.Phasor))
	}
	worst := 0.0
	for k := range want.Output {
		worst = math.Max(worst, cmplx.Abs(got.Output[k].Phasor-want.Output[k].Phasor)/scale)
	}
	t.Logf("largest difference of the output's harmonics, block against lumped: %.3g of the largest", worst)
	if worst > 1e-9 {
		t.Errorf("block and lumped network differ by %.3g of the largest harmonic", worst)
	}
}

// TestLineVolterra: at a small drive the Volterra estimate (method of
// nonlinear currents, with the line's rows at f, 2f, 3f and its DC
// relation for the DC shift) and harmonic balance agree, as they do on
// lumped circuits (common practice: the series converges where the drive
// is small): within 0.05 dB for the fundamental, the second and third
// harmonics and the DC shift at -40 dBm.
func TestLineVolterra(t *testing.T) {
	nw := network(t, detectorBehind(`  - {type: transmission_line, name: T1, ends: [a, b], impedance: 70, delay: 50ps, dc_resistance: 2}
  - {type: transmission_line, name: S1, ends: [b, open], impedance: 40, electrical_length: 30deg@2.45GHz}`))
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9, EMF: ac.DBmToEMF(-40, 50)}
	est, err := ac.Volterra(nw, d)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Solve(nw, d, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	st := r.Steady()
	db := func(a, b float64) float64 { return 20 * math.Log10(math.Abs(a/b)) }
	for _, c := range []struct {
		name     string
		est, got float64
	}{
		{"DC shift", est.DCShift, st.Output[0].Amplitude},
		{"fundamental", cmplx.Abs(est.Fundamental), st.Output[1].Amplitude},
		{"second harmonic", cmplx.Abs(est.HD2), st.Output[2].Amplitude},
		{"third harmonic", cmplx.Abs(est.HD3), st.Output[3].Amplitude},
	} {
		e := db(c.est, c.got)
		t.Logf("%s: Volterra against harmonic balance %.2g dB", c.name, e)
		if math.Abs(e) > 0.05 {
			t.Errorf("%s: Volterra %g, harmonic balance %g (%.3f dB)", c.name, c.est, c.got, e)
		}
	}
}

// TestLineTwoTone: two tones through a line and stub, at a small drive:
// the harmonic balance's IM3 and IM2 (products at negative frequencies
// take the conjugate rows) meet the Volterra estimate within 0.05 dB
// (common practice: the series holds at small drive).
func TestLineTwoTone(t *testing.T) {
	nw := network(t, detectorBehind(`  - {type: transmission_line, name: T1, ends: [a, b], impedance: 70, delay: 50ps}
  - {type: transmission_line, name: S1, ends: [b, open], impedance: 40, electrical_length: 30deg@2.45GHz}`))
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9, SecondToneHz: 2.46e9, EMF: ac.DBmToEMF(-50, 50)}
	est, err := ac.Volterra(nw, d)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Solve(nw, d, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name     string
		est, got float64
	}{{"IM3", est.IM3dBc(), r.IM3dBc()}, {"IM2", est.IM2dBc(), r.IM2dBc()}} {
		t.Logf("%s: Volterra %.3f dBc, harmonic balance %.3f dBc", c.name, c.est, c.got)
		if math.Abs(c.est-c.got) > 0.05 {
			t.Errorf("%s: Volterra %.3f dBc, harmonic balance %.3f dBc", c.name, c.est, c.got)
		}
	}
}
