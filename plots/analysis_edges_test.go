package plots

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/plot"

	"qpoint/ac"
	"qpoint/ac/steady"
	"qpoint/ac/study"
)

// checkFigure renders f as SVG and PNG, failing on an error or a malformed
// image, and keeps the PNG under -samples DIR/edge-cases.
func checkFigure(t *testing.T, what string, f *Figure) {
	t.Helper()
	if f == nil {
		t.Fatalf("%s: nil figure", what)
	}
	checkSVG(t, what, render(t, f, "svg"))
	b := render(t, f, "png")
	checkPNG(t, what, b, f)
	if *samples != "" {
		dir := filepath.Join(*samples, "edge-cases")
		if err := os.MkdirAll(dir, 0o755); err != nil {
			t.Fatal(err)
		}
		name := strings.NewReplacer(" ", "-", "/", "-").Replace(what) + ".png"
		if err := os.WriteFile(filepath.Join(dir, name), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// Awkward inputs that the distortion figures must draw without error or
// panic.
func TestDistortionEdgeCases(t *testing.T) {
	det := detectorDistortion(t)
	mixer := mixerDistortion(t)
	nan := math.NaN()

	short := &steady.State{Drive: det.steady.Drive, Output: det.steady.Output[:1]}
	holes := &steady.State{Drive: det.steady.Drive, THDPercent: nan}
	holes.Output = append(holes.Output, det.steady.Output...)
	holes.Output[2].Amplitude = nan
	holes.Output[3].Amplitude = math.Inf(1)
	deadFund := &steady.State{Drive: det.steady.Drive, Output: append([]steady.Harmonic(nil), det.steady.Output...)}
	deadFund.Output[1].Amplitude = 0
	blank := &ac.Estimate{} // no generator impedance, zero phasors: every ratio NaN
	multiplier := &steady.State{Drive: det.steady.Drive, Output: append([]steady.Harmonic(nil), det.steady.Output...)}
	multiplier.Output[2].Amplitude = 4 * multiplier.Output[1].Amplitude // a doubler: 12 dB above the fundamental

	onePoint := det.levels[10:11]
	withGaps := append([]steady.LevelPoint(nil), det.levels...)
	withGaps[3].Steady = nil
	withGaps[6] = steady.LevelPoint{LevelDBm: nan, Steady: det.levels[6].Steady}

	nilEst := append([]*ac.Estimate(nil), det.perFreq...)
	nilEst[2], nilEst[5] = nil, nil
	oneTone := []*ac.Estimate{det.estimate, det.estimate}

	cases := []struct {
		what string
		fig  *Figure
	}{
		{"spectrum nothing", HarmonicSpectrum(nil, nil)},
		{"spectrum waveform only", HarmonicSpectrum(det.steady, nil)},
		{"spectrum estimate only", HarmonicSpectrum(nil, det.estimate)},
		{"spectrum DC only", HarmonicSpectrum(short, det.estimate)},
		{"spectrum NaN and Inf harmonics", HarmonicSpectrum(holes, det.estimate)},
		{"spectrum zero fundamental", HarmonicSpectrum(deadFund, blank)},
		{"spectrum balanced", HarmonicSpectrum(mixer.steady, mixer.estimate)},
		{"spectrum empty estimate", HarmonicSpectrum(det.steady, blank)},
		{"spectrum harmonic above the fundamental", HarmonicSpectrum(multiplier, nil)},
		{"level nothing", LevelSweep(nil, nil, 0, false)},
		{"level estimate only", LevelSweep(nil, det.estimate, 0, false)},
		{"level one point", LevelSweep(onePoint, det.estimate, onePoint[0].LevelDBm, true)},
		{"level gaps", LevelSweep(withGaps, det.estimate, det.compression, det.compressed)},
		{"level NaN compression", LevelSweep(det.levels, det.estimate, nan, true)},
		{"level compression off the sweep", LevelSweep(det.levels, det.estimate, 80, true)},
		{"level empty estimate", LevelSweep(det.levels, blank, 0, false)},
		{"level balanced", LevelSweep(mixer.levels, mixer.estimate, 0, false)},
		{"frequency nothing", DistortionVsFrequency(nil, nil)},
		{"frequency nil estimates", DistortionVsFrequency(det.freqs, nilEst)},
		{"frequency fewer estimates than frequencies", DistortionVsFrequency(det.freqs, det.perFreq[:4])},
		{"frequency more estimates than frequencies", DistortionVsFrequency(det.freqs[:3], det.perFreq)},
		{"frequency one point", DistortionVsFrequency(det.freqs[:1], det.perFreq[:1])},
		{"frequency one tone", DistortionVsFrequency([]float64{1e9, 2e9}, oneTone)},
		{"frequency empty estimates", DistortionVsFrequency([]float64{1e9, 2e9}, []*ac.Estimate{blank, blank})},
		{"frequency bad frequencies", DistortionVsFrequency([]float64{0, -1, nan, 1e9}, det.perFreq[:4])},
		{"frequency balanced", DistortionVsFrequency(mixer.freqs, mixer.perFreq)},
	}
	for _, c := range cases {
		t.Run(c.what, func(t *testing.T) { checkFigure(t, c.what, c.fig) })
	}
}

func TestHarmonicSpectrumMarksFloorAndBalance(t *testing.T) {
	det := detectorDistortion(t)
	fig := HarmonicSpectrum(det.steady, det.estimate)
	sp := newSpectrum(det.steady, det.estimate)
	if got, want := len(sp.wave), len(det.steady.Output)-1; got != want {
		t.Errorf("%d bars, want one per harmonic order, %d", got, want)
	}
	if sp.wave[0] != 0 {
		t.Errorf("the fundamental is %g dBc, want 0 by definition", sp.wave[0])
	}
	// The demo's sixth and seventh harmonics lie under the steady-state
	// solver's floor (ac/levels.go puts it near -140 dBc).
	if v := sp.wave[5]; v >= waveformFloorDBc {
		t.Errorf("harmonic 6 at %g dBc: the detector demo's sixth harmonic should be below the %d dBc floor and drawn as absent", v, waveformFloorDBc)
	}
	if !strings.Contains(fig.Note, "DC shift +") || !strings.Contains(fig.Note, "estimate +") {
		t.Errorf("note %q: want the waveform's and the estimate's DC shift, both positive for a detector", fig.Note)
	}

	mixer := mixerDistortion(t)
	msp := newSpectrum(mixer.steady, mixer.estimate)
	if len(msp.est) != 2 || !msp.est[0].balanced {
		t.Errorf("mixer estimate marks %+v: want HD2 marked balanced, as ac.Estimate.Balanced(HD2) reports for the single-balanced demo", msp.est)
	}
}

func TestLevelSweepUnitsAndKey(t *testing.T) {
	det := detectorDistortion(t)
	port := LevelSweep(det.levels, det.estimate, det.compression, det.compressed)
	if got := port.Panels[0].Y.Label.Text; got != "Output power (dBm)" {
		t.Errorf("output at a port: y label %q, want power in dBm", got)
	}
	if !strings.Contains(port.Note, "100 kΩ") {
		t.Errorf("note %q: want the video port's 100 kΩ reference, which the dBm are referred to", port.Note)
	}
	if !strings.Contains(port.Note, "1 dB compression at") {
		t.Errorf("note %q: want the compression point", port.Note)
	}
	anode := detectorAtAnode(t)
	node := LevelSweep(anode.levels, anode.estimate, 0, false)
	if got := node.Panels[0].Y.Label.Text; got != "Output level (dBV, peak)" {
		t.Errorf("output at a bare node: y label %q, want dBV", got)
	}
	bare := LevelSweep(det.levels, nil, 0, false)
	if got := bare.Panels[0].Y.Label.Text; got != "Output level (dBV, peak)" {
		t.Errorf("no estimate to give the output impedance: y label %q, want dBV", got)
	}
	// The fundamental's level at the estimate's input level must sit on
	// the estimate's line: both are the small-signal output there.
	if y := interpolate(newCurve([]float64{-40, -20}, []float64{-10, 10}, false, false), -30); y != 0 {
		t.Errorf("interpolate at the midpoint = %g, want 0", y)
	}
	if y := interpolate(newCurve([]float64{-40, -20}, []float64{-10, 10}, false, false), -50); !math.IsNaN(y) {
		t.Errorf("interpolate outside the curve = %g, want NaN", y)
	}
}

func TestDistortionVsFrequencyProducts(t *testing.T) {
	det := detectorDistortion(t)
	keyOf := func(f *Figure) string {
		var ls []string
		for _, e := range f.Key {
			ls = append(ls, e.Label)
		}
		return strings.Join(ls, "|")
	}
	if got, want := keyOf(DistortionVsFrequency(det.freqs, det.perFreq)), "HD2|HD3|IM3 (2f₁ − f₂)"; got != want {
		t.Errorf("two-tone key %q, want %q", got, want)
	}
	if got, want := keyOf(DistortionVsFrequency([]float64{2.45e9}, []*ac.Estimate{det.estimate})), "HD2|HD3"; got != want {
		t.Errorf("one-tone key %q, want %q: no IM3 without a second tone", got, want)
	}
	mixer := mixerDistortion(t)
	f := DistortionVsFrequency(mixer.freqs, mixer.perFreq)
	if got := keyOf(f); !strings.HasPrefix(got, "HD2 (balanced out)") {
		t.Errorf("balanced mixer key %q: want HD2 named as balanced out", got)
	}
}

// Awkward studies that the study figures must draw without error or
// panic.
func TestStudyEdgeCases(t *testing.T) {
	sr := supplyStudy(t)
	ms := measures(t, "s11@2.45GHz", "hd2", "current.D1")

	failed := supplyStudy(t)
	for i := range failed.Steps {
		failed.Steps[i].Err = errNoSolution
	}
	single := supplyStudy(t)
	single.Steps, single.Shape = single.Steps[:1], [2]int{1, 1}
	single.Settings.Axis.Values = single.Settings.Axis.Values[:1]
	flat := supplyStudy(t)
	for i := range flat.Steps {
		flat.Steps[i].Distortion = []study.Distortion{{FrequencyHz: 2.45e9, HD2dBc: -40}}
		flat.Steps[i].Err = nil
		if flat.Steps[i].Diodes == nil {
			flat.Steps[i] = sr.Steps[0]
		}
	}
	nanSteps := supplyStudy(t)
	for i := range nanSteps.Steps {
		if i%3 == 0 {
			nanSteps.Steps[i].Distortion = []study.Distortion{{FrequencyHz: 2.45e9, HD2dBc: math.NaN(), DCShift: math.Inf(1)}}
		}
	}
	logAxis := supplyStudy(t)
	logAxis.Settings.Axis.Values, _ = study.Grid(1e-3, 10, len(logAxis.Steps), true)
	for i, v := range logAxis.Settings.Axis.Values {
		logAxis.Steps[i].Values[0] = v
	}
	shortSteps := supplyStudy(t) // a shape promising more steps than there are
	shortSteps.Steps = shortSteps.Steps[:5]
	noSettings := supplyStudy(t) // steps only, as a hand-built result might be
	noSettings.Settings = study.Settings{}
	twoAxis := supplyFrequencyMap(t)
	oneByOne := supplyFrequencyMap(t)
	oneByOne.Steps, oneByOne.Shape = oneByOne.Steps[:1], [2]int{1, 1}
	oneByOne.Settings.Axis.Values = oneByOne.Settings.Axis.Values[:1]
	oneByOne.Settings.Second = &study.Axis{Values: oneByOne.Settings.Second.Values[:1]}
	many := measures(t, "s11@2.45GHz", "hd2", "current.D1", "dynamic_resistance.D1", "dc_shift", "sensitivity", "zin_re@2.45GHz")
	badProbe := measures(t, "probe.nowhere@2.45GHz")
	atOtherFreq := measures(t, "s11@1GHz")

	cases := []struct {
		what string
		fig  *Figure
	}{
		{"curves nil", StudyCurves(nil, nil, "", "")},
		{"curves no measures", StudyCurves(sr, nil, "Supply", "V")},
		{"curves nil measure", StudyCurves(sr, []*study.Measure{nil}, "Supply", "V")},
		{"curves empty result", StudyCurves(&study.Result{}, ms, "Supply", "V")},
		{"curves all failed", StudyCurves(failed, ms, "Supply", "V")},
		{"curves single step", StudyCurves(single, ms, "Supply", "V")},
		{"curves flat", StudyCurves(flat, measures(t, "hd2", "dc_shift"), "Supply", "V")},
		{"curves NaN and Inf", StudyCurves(nanSteps, measures(t, "hd2", "dc_shift"), "Supply", "V")},
		{"curves log axis", StudyCurves(logAxis, ms, "Series resistance", "Ω")},
		{"curves no settings", StudyCurves(noSettings, ms, "", "")},
		{"curves fewer steps than the shape", StudyCurves(shortSteps, ms, "Supply", "V")},
		{"map fewer steps than the shape", HeatMap(shortSteps, ms[1], "Supply", "V", "", "")},
		{"curves too many units", StudyCurves(sr, many, "Supply", "V")},
		{"curves unknown probe", StudyCurves(sr, badProbe, "Supply", "V")},
		{"curves frequency not studied", StudyCurves(sr, atOtherFreq, "Supply", "V")},
		{"curves two axes", StudyCurves(twoAxis, measures(t, "s11", "current.D1"), "Supply", "V")},
		{"map nil", HeatMap(nil, nil, "", "", "", "")},
		{"map no measure", HeatMap(twoAxis, nil, "Supply", "V", "Frequency", "Hz")},
		{"map empty result", HeatMap(&study.Result{}, ms[0], "Supply", "V", "Frequency", "Hz")},
		{"map all failed", HeatMap(failed, ms[1], "Supply", "V", "", "")},
		{"map one by one", HeatMap(oneByOne, measures(t, "s11")[0], "Supply", "V", "Frequency", "Hz")},
		{"map flat", HeatMap(flat, measures(t, "hd2")[0], "Supply", "V", "", "")},
		{"map NaN", HeatMap(nanSteps, measures(t, "hd2")[0], "Supply", "V", "", "")},
		{"map unknown probe", HeatMap(twoAxis, badProbe[0], "Supply", "V", "Frequency", "Hz")},
		{"map frequency not studied", HeatMap(twoAxis, atOtherFreq[0], "Supply", "V", "Frequency", "Hz")},
		{"map log values", HeatMap(twoAxis, measures(t, "current.D1")[0], "Supply", "V", "Frequency", "Hz")},
	}
	for _, c := range cases {
		t.Run(c.what, func(t *testing.T) { checkFigure(t, c.what, c.fig) })
	}
}

func TestStudyCurvesPanels(t *testing.T) {
	sr := supplyStudy(t)
	f := StudyCurves(sr, measures(t, "s11@2.45GHz", "hd2", "hd3", "current.D1"), "Supply", "V")
	if got := len(f.Panels); got != 3 {
		t.Errorf("%d panels, want 3: one each for dB, dBc and A", got)
	}
	if got := f.Panels[1].Y.Label.Text; got != "Relative to the fundamental (dBc)" {
		t.Errorf("HD2 and HD3 share a panel labelled %q, want the dBc group's name", got)
	}
	if _, ok := f.Panels[2].Y.Scale.(decadeScale); !ok {
		t.Errorf("current from 10 nA to 15 µA: y scale %T, want a decade (logarithmic) axis", f.Panels[2].Y.Scale)
	}
	if !strings.Contains(f.Note, "1 did not solve") {
		t.Errorf("note %q: want the failed step counted", f.Note)
	}
	many := StudyCurves(sr, measures(t, "s11@2.45GHz", "hd2", "current.D1", "dynamic_resistance.D1", "dc_shift", "sensitivity"), "Supply", "V")
	if got := len(many.Panels); got != maxStudyPanels {
		t.Errorf("six units: %d panels, want %d", got, maxStudyPanels)
	}
	if !strings.Contains(many.Note, "DC shift") || !strings.Contains(many.Note, "Detector sensitivity") {
		t.Errorf("note %q: want the measures left out named", many.Note)
	}
	bad := StudyCurves(sr, measures(t, "probe.nowhere@2.45GHz"), "Supply", "V")
	if !strings.Contains(bad.Note, "nowhere") {
		t.Errorf("note %q: want the reason the probe measure has no values", bad.Note)
	}
	two := StudyCurves(supplyFrequencyMap(t), measures(t, "s11"), "Supply", "V")
	if got := len(two.Key); got != maxStudyCurves {
		t.Errorf("two-axis study with 15 frequencies: %d curves in the key, want %d", got, maxStudyCurves)
	}
	if got := two.Key[0].Label; got != "frequency 100 MHz" {
		t.Errorf("first curve of the two-axis study labelled %q, want the second axis' first value", got)
	}
}

func TestHeatMapScale(t *testing.T) {
	m := supplyFrequencyMap(t)
	f := HeatMap(m, measures(t, "s11")[0], "Supply", "V", "Frequency", "Hz")
	if f.Scale == nil {
		t.Fatal("no colour scale")
	}
	if f.Scale.Log {
		t.Error("S11 in dB on a logarithmic colour scale")
	}
	if f.Scale.Missing == "" {
		t.Error("a map with a failed step shows no swatch for cells without a value")
	}
	if _, ok := f.Panels[0].Y.Scale.(plot.LogScale); !ok {
		t.Errorf("frequency spaced geometrically: y scale %T, want logarithmic", f.Panels[0].Y.Scale)
	}
	cur := HeatMap(m, measures(t, "current.D1")[0], "Supply", "V", "Frequency", "Hz")
	if !cur.Scale.Log {
		t.Error("diode current over three decades: want a logarithmic colour scale")
	}
	// Pale for low values, dark for high.
	s := &ColourScale{Min: -20, Max: 0}
	if l0, l1 := cieLab(linearRGB(s.Colour(-20)))[0], cieLab(linearRGB(s.Colour(0)))[0]; !(l0 > l1) {
		t.Errorf("lightness at the low end %.1f, at the high end %.1f: want the low end paler", l0, l1)
	}
	if c := s.Colour(math.NaN()); c != missingFill {
		t.Errorf("NaN coloured %v, want the missing-value grey", c)
	}
}

func TestCellEdges(t *testing.T) {
	lo, hi, from, to := cellEdges([]float64{0, 1, 2}, false)
	if lo[1] != 0.5 || hi[1] != 1.5 || from != -0.5 || to != 2.5 {
		t.Errorf("linear cells: lo %v hi %v span %g..%g; want cells halfway between values and the ends as wide", lo, hi, from, to)
	}
	lo, hi, from, to = cellEdges([]float64{1, 10, 100}, true)
	if math.Abs(lo[1]-math.Sqrt(10)) > 1e-12 || math.Abs(hi[1]-math.Sqrt(1000)) > 1e-9 || math.Abs(from-1/math.Sqrt(10)) > 1e-12 || math.Abs(to-1000/math.Sqrt(10)) > 1e-9 {
		t.Errorf("logarithmic cells: lo %v hi %v span %g..%g; want edges at the geometric means", lo, hi, from, to)
	}
	if _, _, from, to := cellEdges([]float64{3}, false); from != 1.5 || to != 4.5 {
		t.Errorf("one value 3: span %g..%g, want 1.5..4.5", from, to)
	}
	if _, _, from, to := cellEdges(nil, false); !(to > from) {
		t.Errorf("no values: span %g..%g, want some span for the axis", from, to)
	}
	if _, _, from, to := cellEdges([]float64{5, 3, 1}, false); from != 0 || to != 6 {
		t.Errorf("falling values: span %g..%g, want 0..6", from, to)
	}
}

func TestGeometricSpacing(t *testing.T) {
	log, _ := study.Grid(1e6, 1e9, 10, true)
	lin, _ := study.Grid(0, 3.3, 10, false)
	tests := []struct {
		what string
		vs   []float64
		want bool
	}{
		{"geometric", log, true},
		{"linear", lin, false},
		{"linear from 1", []float64{1, 2, 3, 4}, false},
		{"two values", []float64{1, 10}, false},
		{"negative", []float64{-1, -10, -100}, false},
		{"constant", []float64{2, 2, 2}, false},
		{"NaN", []float64{1, math.NaN(), 100}, false},
	}
	for _, tt := range tests {
		if got := geometric(tt.vs); got != tt.want {
			t.Errorf("%s %v: geometric %v, want %v", tt.what, tt.vs, got, tt.want)
		}
	}
}

// Awkward noise data that the noise figures must draw without error or
// panic.
func TestNoiseEdgeCases(t *testing.T) {
	freqs, density, names, shares := noiseSpectrum()
	nan := math.NaN()
	holes := append([]float64(nil), density...)
	holes[3], holes[10], holes[11] = nan, 0, math.Inf(1)
	badShares := [][]float64{append([]float64(nil), shares[0]...), append([]float64(nil), shares[1]...)}
	badShares[0][4], badShares[1][4] = nan, nan // a column with nothing: a gap
	badShares[0][7] = -1
	cases := []struct {
		what string
		fig  *Figure
	}{
		{"density nothing", NoiseDensity(nil, nil, "", 0)},
		{"density floor only", NoiseDensity(nil, nil, "V/√Hz", 1e-9)},
		{"density one point", NoiseDensity(freqs[:1], density[:1], "", 1e-9)},
		{"density holes", NoiseDensity(freqs, holes, "", nan)},
		{"density short", NoiseDensity(freqs, density[:5], "", 0)},
		{"density flat", NoiseDensity(freqs, make([]float64, len(freqs)), "", 0)},
		{"density current unit", NoiseDensity(freqs, density, "A/√Hz", -1)},
		{"contributions nothing", NoiseContributions(nil, nil, nil)},
		{"contributions names only", NoiseContributions(freqs, names, nil)},
		{"contributions one point", NoiseContributions(freqs[:1], names, [][]float64{{0.5}, {0.2}, {0.2}, {0.1}})},
		{"contributions gaps", NoiseContributions(freqs, nil, badShares)},
		{"contributions ragged", NoiseContributions(freqs, names[:1], [][]float64{shares[0][:10], shares[1]})},
		{"contributions bad frequencies", NoiseContributions([]float64{0, -1, nan, 1e6, 1e7}, names[:2], [][]float64{{1, 1, 1, 0.5, 0.3}, {0, 0, 0, 0.5, 0.7}})},
	}
	for _, c := range cases {
		t.Run(c.what, func(t *testing.T) { checkFigure(t, c.what, c.fig) })
	}
}

func TestNoiseContributionsStack(t *testing.T) {
	// Shares that do not sum to one are rescaled; the top of the stack is
	// 100 % at every frequency.
	st, _ := stackShares([]float64{1e6, 1e7}, []string{"a", "b"}, [][]float64{{0.2, 0.5}, {0.2, 0.1}})
	if len(st.runs) != 1 || len(st.runs[0]) != 2 {
		t.Fatalf("stacked bands %+v: want one run of two columns", st)
	}
	for _, col := range st.runs[0] {
		if top := col.tops[len(col.tops)-1]; math.Abs(top-100) > 1e-9 {
			t.Errorf("at %g Hz the stack tops out at %g %%, want 100", col.x, top)
		}
	}
	if got := st.runs[0][0].tops[0]; math.Abs(got-50) > 1e-9 {
		t.Errorf("equal shares 0.2 and 0.2: the first band reaches %g %%, want 50", got)
	}
	// A frequency where no source has a share breaks the stack.
	gappy, _ := stackShares([]float64{1e6, 2e6, 3e6, 4e6}, nil, [][]float64{{1, math.NaN(), 1, 1}, {0, 0, 1, math.Inf(1)}})
	if len(gappy.runs) != 2 || len(gappy.runs[0]) != 1 || len(gappy.runs[1]) != 2 {
		t.Errorf("runs %+v: want a gap at the second frequency, whose shares are NaN and 0", gappy.runs)
	}
	// Nine sources: five kept, four summed.
	freqs, _, names, shares := noiseSpectrum()
	for k := range 5 {
		names = append(names, "extra "+string(rune('a'+k)))
		shares = append(shares, make([]float64, len(freqs)))
	}
	crowded := NoiseContributions(freqs, names, shares)
	if got := len(crowded.Key); got != maxNoiseBands {
		t.Errorf("nine sources: %d key entries, want %d", got, maxNoiseBands)
	}
	if got := crowded.Key[0].Label; !strings.HasPrefix(got, "other sources") {
		t.Errorf("top band labelled %q, want the summed small sources", got)
	}
}

func TestNoiseDensityFloorInKey(t *testing.T) {
	freqs, density, _, _ := noiseSpectrum()
	f := NoiseDensity(freqs, density, "V/√Hz", 1e-9)
	if len(f.Key) != 2 || f.Key[1].Label != "reference floor 1 nV/√Hz" {
		t.Errorf("key %+v: want the floor named with its value", f.Key)
	}
	if f := NoiseDensity(freqs, density, "V/√Hz", 0); len(f.Key) != 1 {
		t.Errorf("no floor: key %+v, want the noise alone", f.Key)
	}
}
