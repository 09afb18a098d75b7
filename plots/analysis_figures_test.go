package plots

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"qpoint/ac"
	"qpoint/ac/study"
)

// analysisFigures are the distortion, study and noise figures of the
// fixtures, named as their golden files are: "SOURCE-FIGURE".
func analysisFigures(t *testing.T) []struct {
	name string
	fig  *Figure
} {
	t.Helper()
	det := detectorDistortion(t)
	freqs, density, names, shares := noiseSpectrum()
	sr := supplyStudy(t)
	fit := demoFit(t)
	return []struct {
		name string
		fig  *Figure
	}{
		{"detector-harmonics", HarmonicSpectrum(det.steady, det.estimate)},
		{"detector-level-sweep", LevelSweep(det.levels, det.estimate, det.compression, det.compressed)},
		{"detector-distortion-frequency", DistortionVsFrequency(det.freqs, det.perFreq)},
		{"supply-study", StudyCurves(sr, measures(t, "s11@2.45GHz", "hd2", "hd3", "current.D1", "dynamic_resistance.D1"), "Supply Vcc", "V")},
		{"supply-study-map", HeatMap(supplyFrequencyMap(t), measures(t, "s11")[0], "Supply Vcc", "V", "Frequency", "Hz")},
		{"synthetic-noise-density", NoiseDensity(freqs, density, "V/√Hz", math.Sqrt(4*1.380649e-23*300*50))},
		{"synthetic-noise-contributions", NoiseContributions(freqs, names, shares)},
		{"detector-fit-forward", ForwardFit(fit)},
		{"detector-fit-reverse", ReverseFit(fit)},
		{"detector-fit-capacitance", CapacitanceFit(fit)},
	}
}

// TestGoldenAnalysis compares the SVG of every analysis figure with
// testdata/NAME.golden.svg, as TestGolden does for the sweep figures. The
// distortion figures come from solving the detector demo, so a change in
// the solvers or the demo file also shows here; look at the figures
// (-samples DIR) before rewriting them with -update.
func TestGoldenAnalysis(t *testing.T) {
	for _, nf := range analysisFigures(t) {
		t.Run(nf.name, func(t *testing.T) {
			if !strings.HasSuffix(nf.name, nf.fig.Name) {
				t.Errorf("figure %q is named %q; its golden file name should end with the figure's name", nf.name, nf.fig.Name)
			}
			svg := render(t, nf.fig, "svg")
			checkSVG(t, nf.name, svg)
			checkPNG(t, nf.name, render(t, nf.fig, "png"), nf.fig)
			path := filepath.Join("testdata", nf.name+".golden.svg")
			if *update {
				if err := os.WriteFile(path, svg, 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run go test ./plots -update to create it)", err)
			}
			if !bytes.Equal(svg, want) {
				t.Errorf("%s differs from %s at %s; if the change is intended, look at it with -samples and rerun with -update",
					nf.name, path, firstDifference(svg, want))
			}
		})
	}
}

// moreSamples are figures worth looking at that are not golden: other
// demos, other outputs, and figures of a real study.
func moreSamples(t *testing.T) map[string]*Figure {
	t.Helper()
	anode := detectorAtAnode(t)
	mixer := mixerDistortion(t)
	freqs, _, names, shares := noiseSpectrum()
	crowdedNames := append(append([]string(nil), names...), "Rbias thermal", "Rmatch thermal", "Cvideo loss", "port 2 load", "reader leakage")
	crowded := append([][]float64(nil), shares...)
	for k := range 5 {
		s := make([]float64, len(freqs))
		for i := range s {
			s[i] = 0.004 * float64(k+1) * (1 + math.Sin(float64(i)/9))
		}
		crowded = append(crowded, s)
	}
	twoAxis := supplyFrequencyMap(t)
	return map[string]*Figure{
		"anode-harmonics":              HarmonicSpectrum(anode.steady, anode.estimate),
		"anode-level-sweep":            LevelSweep(anode.levels, anode.estimate, anode.compression, anode.compressed),
		"mixer-harmonics":              HarmonicSpectrum(mixer.steady, mixer.estimate),
		"mixer-level-sweep":            LevelSweep(mixer.levels, mixer.estimate, mixer.compression, mixer.compressed),
		"mixer-distortion-frequency":   DistortionVsFrequency(mixer.freqs, mixer.perFreq),
		"crowded-noise-contributions":  NoiseContributions(freqs, crowdedNames, crowded),
		"supply-two-axis-study":        StudyCurves(twoAxis, measures(t, "s11", "zin_re", "zin_im"), "Supply Vcc", "V"),
		"supply-current-map":           HeatMap(twoAxis, measures(t, "current.D1")[0], "Supply Vcc", "V", "Frequency", "Hz"),
		"supply-one-measure-study":     StudyCurves(supplyStudy(t), measures(t, "dc_shift"), "Supply Vcc", "V"),
		"supply-single-row-study-map":  HeatMap(supplyStudy(t), measures(t, "hd2")[0], "Supply Vcc", "V", "", ""),
		"real-detector-study":          realStudyFigures(t)[0],
		"real-detector-study-map":      realStudyFigures(t)[1],
		"synthetic-noise-density-bare": NoiseDensity(freqs, noiseOnly(), "", 0),
	}
}

func noiseOnly() []float64 {
	_, d, _, _ := noiseSpectrum()
	return d
}

// realStudyFigures runs a study of the detector demo: the supply from 0
// to 3.3 V, and against frequency from 100 MHz to 6 GHz.
func realStudyFigures(t *testing.T) []*Figure {
	t.Helper()
	c := demoCircuit(t, "detector")
	vary, err := c.ResolveVary("Vcc.value")
	if err != nil {
		t.Fatal(err)
	}
	vs, _ := study.Grid(0, 3.3, 34, false)
	drive := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9, EMF: ac.DBmToEMF(-30, 50)}
	one, err := study.Run(c, study.Settings{Axis: study.Axis{Vary: vary, Values: vs}, FrequenciesHz: []float64{2.45e9}, Drive: drive})
	if err != nil {
		t.Fatal(err)
	}
	fs, _ := study.Grid(100e6, 6e9, 25, true)
	vs2, _ := study.Grid(0, 3.3, 12, false)
	two, err := study.Run(c, study.Settings{Axis: study.Axis{Vary: vary, Values: vs2}, Second: &study.Axis{Values: fs}, SecondIsFrequency: true})
	if err != nil {
		t.Fatal(err)
	}
	return []*Figure{
		StudyCurves(one, measures(t, "s11@2.45GHz", "hd2", "hd3", "current.D1", "dynamic_resistance.D1", "sensitivity"), "Supply Vcc", "V"),
		HeatMap(two, measures(t, "s11")[0], "Supply Vcc", "V", "Frequency", "Hz"),
	}
}

func TestWriteAnalysisSamples(t *testing.T) {
	if *samples == "" {
		t.Skip("no -samples directory given")
	}
	if err := os.MkdirAll(*samples, 0o755); err != nil {
		t.Fatal(err)
	}
	write := func(name string, f *Figure) {
		for _, format := range []string{"png", "svg"} {
			path := filepath.Join(*samples, name+"."+format)
			if err := os.WriteFile(path, render(t, f, format), 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
	for _, nf := range analysisFigures(t) {
		write(nf.name, nf.fig)
	}
	for name, f := range moreSamples(t) {
		write(name, f)
	}
}

func TestAnalysisFiguresRenderAndAreDeterministic(t *testing.T) {
	for name, f := range moreSamples(t) {
		a, b := render(t, f, "svg"), render(t, f, "svg")
		checkSVG(t, name, a)
		if !bytes.Equal(a, b) {
			t.Errorf("%s: two renderings of the same figure differ at %s", name, firstDifference(a, b))
		}
		checkPNG(t, name, render(t, f, "png"), f)
	}
}
