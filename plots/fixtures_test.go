package plots

import (
	"math"
	"math/cmplx"
	"sync"
	"testing"

	"qpoint/ac"
	"qpoint/ac/steady"
	"qpoint/ac/study"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// Fixtures for the distortion, study and noise figures. The distortion
// figures read the Volterra estimate and the steady-state waveform of the
// demo circuits, since an ac.Estimate cannot be built by hand outside its
// package; the study and noise figures take synthetic data built here.

func demoCircuit(t *testing.T, name string) *circuit.Circuit {
	t.Helper()
	path := "../testdata/demo/" + name + ".yaml"
	if name == balancedPair {
		path = "../testdata/fixtures/" + name + ".yaml"
	}
	c, err := circuit.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// demoNetwork loads a demo circuit and linearises it at its bias point.
func demoNetwork(t *testing.T, name string) *smallsignal.Network {
	t.Helper()
	c := demoCircuit(t, name)
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		t.Fatalf("%s: bias: %v", name, err)
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		t.Fatalf("%s: small-signal network: %v", name, err)
	}
	return nw
}

// distortionCase is everything the distortion figures of one drive need.
type distortionCase struct {
	estimate    *ac.Estimate
	steady      *steady.State
	levels      []steady.LevelPoint
	compression float64
	compressed  bool
	freqs       []float64
	perFreq     []*ac.Estimate
}

var (
	distortionOnce  = map[string]*sync.Once{}
	distortionCache = map[string]*distortionCase{}
	distortionMu    sync.Mutex
)

// detectorDistortion is the detector demo driven at 2.45 GHz, -30 dBm,
// into its video port: the estimate, the waveform with seven harmonics, a
// level sweep from -40 to +10 dBm, and two-tone estimates (10 MHz
// spacing) from 100 MHz to 6 GHz.
func detectorDistortion(t *testing.T) *distortionCase {
	return distortionFixture(t, "detector", ac.Output{Port: 1}, 2.45e9, -30)
}

// detectorAtAnode observes the detector at its anode, a bare node, so
// that the level sweep is in dBV.
func detectorAtAnode(t *testing.T) *distortionCase {
	return distortionFixture(t, "detector", ac.Output{Port: -1, Node: "anode"}, 2.45e9, -30)
}

// balancedPair is a matched pair of diodes in series with the signal at
// their midpoint (the mixer demo before it had its LO balun), kept as a
// fixture whose symmetry cancels the even orders.
const balancedPair = "balanced_pair"

// mixerDistortion drives the balanced pair's RF port and observes its IF
// port, where its symmetry cancels the even orders and the DC shift.
func mixerDistortion(t *testing.T) *distortionCase {
	return distortionFixture(t, balancedPair, ac.Output{Port: 2}, 1.9e9, -20)
}

func distortionFixture(t *testing.T, demo string, out ac.Output, hz, dBm float64) *distortionCase {
	t.Helper()
	key := demo + "/" + outputText(out)
	distortionMu.Lock()
	once, ok := distortionOnce[key]
	if !ok {
		once = &sync.Once{}
		distortionOnce[key] = once
	}
	distortionMu.Unlock()
	once.Do(func() {
		nw := demoNetwork(t, demo)
		z0 := nw.Ports[0].Impedance
		d := ac.Drive{Input: 0, Output: out, FrequencyHz: hz, EMF: ac.DBmToEMF(dBm, z0)}
		dc := &distortionCase{}
		var err error
		if dc.estimate, err = ac.Volterra(nw, d); err != nil {
			t.Fatal(err)
		}
		if dc.steady, err = steady.Solve(nw, d, steady.Settings{Harmonics: 7}); err != nil {
			t.Fatal(err)
		}
		var levels []float64
		for l := -40.0; l <= 10; l += 2.5 {
			levels = append(levels, l)
		}
		if dc.levels, err = steady.LevelSweep(nw, d, levels, steady.Settings{}, nil); err != nil {
			t.Fatal(err)
		}
		gain := cmplx.Abs(dc.estimate.Linear) / d.EMF
		dc.compression, dc.compressed = steady.Compression(dc.levels, gain)
		dc.freqs = logSweep(100e6, 6e9, 12)
		for _, f := range dc.freqs {
			two := d
			two.FrequencyHz, two.SecondToneHz = f, f+10e6
			e, err := ac.Volterra(nw, two)
			if err != nil {
				t.Fatal(err)
			}
			dc.perFreq = append(dc.perFreq, e)
		}
		distortionMu.Lock()
		distortionCache[key] = dc
		distortionMu.Unlock()
	})
	distortionMu.Lock()
	defer distortionMu.Unlock()
	dc := distortionCache[key]
	if dc == nil {
		t.Fatalf("the %s fixture failed in an earlier test", key)
	}
	return dc
}

// measures parses measure texts, failing the test on a bad one.
func measures(t *testing.T, texts ...string) []*study.Measure {
	t.Helper()
	var ms []*study.Measure
	for _, s := range texts {
		m, err := study.ParseMeasure(s)
		if err != nil {
			t.Fatal(err)
		}
		ms = append(ms, m)
	}
	return ms
}

// supplyStudy is a synthetic study of a detector diode fed from a supply
// swept from 0 to 3.3 V in 12 steps through 220 kΩ: the diode current
// follows (V - 0.1 V)/220 kΩ above a 10 nA leakage, the dynamic resistance
// n V_T / I, the match S11 at 2.45 GHz improves slowly and HD2 rises with
// current. Step 5 did not solve.
func supplyStudy(t *testing.T) *study.Result {
	t.Helper()
	vary, err := demoCircuit(t, "detector").ResolveVary("Vcc.value")
	if err != nil {
		t.Fatal(err)
	}
	values, err := study.Grid(0, 3.3, 12, false)
	if err != nil {
		t.Fatal(err)
	}
	r := &study.Result{
		Settings: study.Settings{Axis: study.Axis{Vary: vary, Values: values}, FrequenciesHz: []float64{2.45e9}},
		Probes:   []string{"anode"},
		Shape:    [2]int{len(values), 1},
	}
	for i, v := range values {
		st := study.Step{Index: [2]int{i, 0}, Values: [2]float64{v, 0}}
		if i == 5 {
			st.Err = errNoSolution
			r.Steps = append(r.Steps, st)
			continue
		}
		current := 10e-9 + math.Max(0, v-0.1)/220e3
		rd := 1.05 * 0.02585 / current
		s11 := complex(-0.12-0.02*v, 0.1)
		st.Diodes = []study.DiodeState{{Name: "D1", Current: current, DynamicResistance: rd, VideoResistance: rd + 20}}
		st.Responses = []study.Spot{{FrequencyHz: 2.45e9, S: [][]complex128{{s11, 0}, {0.01, 0}}, InputImpedance: []complex128{50 * (1 + s11) / (1 - s11)}, Probes: []complex128{0.5}}}
		st.Distortion = []study.Distortion{{FrequencyHz: 2.45e9, HD2dBc: -45 + 1.4*v, HD3dBc: -75 + 2.1*v, DCShift: 3e-4 * (1 + v/4)}}
		r.Steps = append(r.Steps, st)
	}
	return r
}

type stepError string

func (e stepError) Error() string { return string(e) }

const errNoSolution = stepError("no operating point found")

// supplyFrequencyMap is a synthetic two-axis study: the supply from 0 to
// 3.3 V in 12 steps across, and frequency from 100 MHz to 6 GHz in 15
// geometric steps up, the second axis being frequency. |S11| dips where a
// series resonance, moving down with bias, meets 50 Ω. One step did not
// solve.
func supplyFrequencyMap(t *testing.T) *study.Result {
	t.Helper()
	vary, err := demoCircuit(t, "detector").ResolveVary("Vcc.value")
	if err != nil {
		t.Fatal(err)
	}
	xs, _ := study.Grid(0, 3.3, 12, false)
	fs, _ := study.Grid(100e6, 6e9, 15, true)
	r := &study.Result{
		Settings: study.Settings{
			Axis: study.Axis{Vary: vary, Values: xs}, Second: &study.Axis{Values: fs}, SecondIsFrequency: true,
		},
		Shape: [2]int{len(xs), len(fs)},
		Steps: make([]study.Step, len(xs)*len(fs)),
	}
	for j, f := range fs {
		for i, v := range xs {
			st := r.At(i, j)
			st.Index, st.Values = [2]int{i, j}, [2]float64{v, f}
			if i == 7 && j == 3 {
				st.Err = errNoSolution
				continue
			}
			f0 := 2.4e9 * (1 - 0.08*v)
			q := 3.0
			detune := q * (f/f0 - f0/f)
			z := complex(50*(1+0.3*v/3.3), 50*detune)
			s11 := (z - 50) / (z + 50)
			st.Responses = []study.Spot{{FrequencyHz: f, S: [][]complex128{{s11}}, InputImpedance: []complex128{z}}}
			st.Diodes = []study.DiodeState{{Name: "D1", Current: 1e-8 * math.Pow(10, 3*v/3.3), DynamicResistance: 1}}
		}
	}
	return r
}

// noiseSpectrum is a synthetic output noise density: a white floor of
// 12 nV/√Hz, flicker noise with a 2 MHz corner and a resonant bump near
// 900 MHz, from 10 kHz to 3 GHz; and the shares of four sources: the
// diode's shot noise, its flicker noise, the series resistance and the
// load resistor.
func noiseSpectrum() (freqs, density []float64, names []string, shares [][]float64) {
	freqs = logSweep(1e4, 3e9, 20)
	names = []string{"D1 shot", "D1 flicker", "D1 series resistance", "Rload thermal"}
	shares = make([][]float64, len(names))
	for _, f := range freqs {
		white := 12e-9 * 12e-9
		flicker := white * 2e6 / f
		x := f / 900e6
		bump := white * 3 / (1 + 40*(x-1/x)*(x-1/x))
		total := white + flicker + bump
		density = append(density, math.Sqrt(total))
		parts := []float64{0.55 * white, flicker, 0.15*white + bump*0.8, 0.3*white + bump*0.2}
		for k, p := range parts {
			shares[k] = append(shares[k], p/total)
		}
	}
	return freqs, density, names, shares
}
