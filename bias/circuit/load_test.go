package circuit

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"qpoint/bias/diode"
)

const fullFile = "../../testdata/loader/full.yaml"

// TestLoadFull loads the example that uses every key and checks each value
// against the file's text.
func TestLoadFull(t *testing.T) {
	c, err := Load(fullFile)
	if err != nil {
		t.Fatalf("Load(%s): %v", fullFile, err)
	}
	if c.File != fullFile || c.Name != "Wake-up detector, biased, 2.4 GHz band" {
		t.Errorf("File, Name = %q, %q", c.File, c.Name)
	}
	if c.TemperatureK != 35+273.15 {
		t.Errorf("TemperatureK = %v, want 308.15 (35C)", c.TemperatureK)
	}
	if want := []string{"detector_low_barrier", "clamp_silicon"}; !reflect.DeepEqual(c.ModelOrder, want) {
		t.Errorf("ModelOrder = %v, want %v", c.ModelOrder, want)
	}
	det := c.Models["detector_low_barrier"]
	if det == nil {
		t.Fatal("model detector_low_barrier missing")
	}
	wantDet := diode.Params{
		SaturationCurrent: 3e-6, Ideality: 1.05, SeriesResistance: 20,
		ZeroBiasCapacitance: 0.18e-12, BuiltInPotential: 0.25, Grading: 0.5,
		TransitTime: 0, BreakdownVoltage: 3.8, BreakdownCurrent: 100e-6,
		GapEnergy: 0.69, SaturationExponent: 2, MeasuredAtK: 300.15,
		Ratings: diode.Ratings{MaxCurrent: 20e-3, MaxReverseVoltage: 4, MaxPower: 75e-3},
	}
	if det.Params != wantDet || det.Pos != (Pos{7, 3}) {
		t.Errorf("detector_low_barrier = %+v at %v\n\twant %+v at 7:3", det.Params, det.Pos, wantDet)
	}
	// clamp_silicon gives few values: the rest are the file's defaults,
	// and the knee current defaults to 1 mA because a knee is given.
	wantClamp := diode.Defaults()
	wantClamp.SaturationCurrent, wantClamp.Ideality = 2.5e-9, 1.9
	wantClamp.BreakdownVoltage, wantClamp.BreakdownCurrent = 30, 1e-3
	if got := c.Models["clamp_silicon"].Params; got != wantClamp {
		t.Errorf("clamp_silicon = %+v\n\twant %+v", got, wantClamp)
	}

	wantParts := []Part{
		{Kind: VoltageSource, Name: "Vcc", Nodes: [2]string{"vcc", "gnd"}, Value: 3.3, Pos: Pos{28, 5}},
		{Kind: Resistor, Name: "Rbias", Nodes: [2]string{"vcc", "bias"}, Value: 47e3, Pos: Pos{29, 5}},
		{Kind: Inductor, Name: "Lchoke", Nodes: [2]string{"bias", "anode"}, Value: 39e-9, Pos: Pos{30, 5}},
		{Kind: Capacitor, Name: "Cblock", Nodes: [2]string{"rf", "anode"}, Value: 22e-12, Pos: Pos{31, 5}},
		{Kind: Diode, Name: "D1", Nodes: [2]string{"anode", "vout"}, Model: "detector_low_barrier", Pos: Pos{32, 5}},
		{Kind: Resistor, Name: "Rload", Nodes: [2]string{"vout", "gnd"}, Value: 100e3, Pos: Pos{33, 5}},
		{Kind: Capacitor, Name: "Cvideo", Nodes: [2]string{"vout", "gnd"}, Value: 10e-12, Pos: Pos{34, 5}},
		{Kind: CurrentSource, Name: "Itrim", Nodes: [2]string{"gnd", "vout"}, Value: 2e-6, Pos: Pos{35, 5}},
		{Kind: Diode, Name: "Dclamp", Nodes: [2]string{"gnd", "vout"}, Model: "clamp_silicon", Pos: Pos{40, 5}},
	}
	if !reflect.DeepEqual(c.Parts, wantParts) {
		t.Errorf("Parts =\n%+v\nwant\n%+v", c.Parts, wantParts)
	}
	wantPorts := []Port{
		{Name: "rf", Node: "rf", Return: "gnd", Impedance: 50, Pos: Pos{43, 5}},
		{Name: "video", Node: "vout", Return: "gnd", Impedance: 100e3, ACCoupled: true, Pos: Pos{44, 5}},
	}
	if !reflect.DeepEqual(c.Ports, wantPorts) {
		t.Errorf("Ports = %+v\nwant %+v", c.Ports, wantPorts)
	}
	if want := []string{"anode", "bias"}; !reflect.DeepEqual(c.Probes, want) {
		t.Errorf("Probes = %v, want %v", c.Probes, want)
	}
	if want := []string{"vcc", "bias", "anode", "rf", "vout"}; !reflect.DeepEqual(c.Nodes, want) {
		t.Errorf("Nodes = %v, want %v (order of first appearance, without gnd)", c.Nodes, want)
	}
	wantAnalysis := Analysis{
		Response: ResponseDefaults{Set: true, FromHz: 10e6, ToHz: 6e9, PerDecade: 40, Pos: Pos{49, 15}},
		Distortion: DistortionDefaults{Set: true, Input: "rf", Output: "video", OutputIsPort: true,
			FrequencyHz: 2.45e9, Level: Level{DBm: -30, IsPower: true}, SecondToneHz: 2.451e9, Pos: Pos{50, 15}},
		Study: StudyDefaults{Set: true, Vary: "Rbias.value", From: 10e3, To: 1e6, Steps: 20, Log: true, Pos: Pos{51, 15}},
	}
	if !reflect.DeepEqual(c.Analysis, wantAnalysis) {
		t.Errorf("Analysis = %+v\nwant %+v", c.Analysis, wantAnalysis)
	}
}

// TestBadFiles loads every file in testdata/bad. Each ends with lines
//
//	# want LINE:COL phrase
//
// one per expected problem, in file order. The load must report exactly
// these problems, each at that place and containing the phrase.
func TestBadFiles(t *testing.T) {
	paths, err := filepath.Glob("../../testdata/bad/*.yaml")
	if err != nil || len(paths) == 0 {
		t.Fatalf("no bad files found: %v", err)
	}
	for _, path := range paths {
		t.Run(filepath.Base(path), func(t *testing.T) {
			wants := readWants(t, path)
			if len(wants) == 0 {
				t.Fatalf("%s has no `# want LINE:COL phrase` lines", path)
			}
			c, err := Load(path)
			if err == nil {
				t.Fatalf("Load(%s) succeeded with %d parts; want %d problems", path, len(c.Parts), len(wants))
			}
			var list ErrorList
			if !errors.As(err, &list) {
				t.Fatalf("Load(%s) error is %T, not an ErrorList: %v", path, err, err)
			}
			if len(list) != len(wants) {
				t.Errorf("Load(%s) reported %d problems, want %d:\n%v", path, len(list), len(wants), err)
			}
			for i, w := range wants {
				if i >= len(list) {
					break
				}
				msg := list[i].Error()
				if prefix := path + ":" + w.pos + ": "; !strings.HasPrefix(msg, prefix) {
					t.Errorf("problem %d: %q\n\twant prefix %q", i+1, msg, prefix)
				}
				if !strings.Contains(msg, w.phrase) {
					t.Errorf("problem %d: %q\n\twant phrase %q", i+1, msg, w.phrase)
				}
				if !strings.Contains(msg, "; accepted") && !strings.Contains(msg, "; check the ") {
					t.Errorf("problem %d: %q\n\tdoes not say what is accepted", i+1, msg)
				}
			}
		})
	}
}

type want struct{ pos, phrase string }

func readWants(t *testing.T, path string) []want {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var wants []want
	sc := bufio.NewScanner(bytes.NewReader(data))
	for sc.Scan() {
		rest, ok := strings.CutPrefix(sc.Text(), "# want ")
		if !ok {
			continue
		}
		pos, phrase, ok := strings.Cut(rest, " ")
		if !ok {
			t.Fatalf("%s: malformed want line %q", path, sc.Text())
		}
		wants = append(wants, want{pos, phrase})
	}
	return wants
}

// TestParseInline covers problems that need no file of their own or cannot
// carry a want comment.
func TestParseInline(t *testing.T) {
	const rc = "  - {type: resistor, name: R1, between: [a, gnd], value: 1k}\n"
	tests := []struct {
		name, data string
		wants      []want
	}{
		{"empty", "", []want{{"1:1", "the file is empty"}}},
		{"blank", "  \n\n\t\n", []want{{"1:1", "the file is empty"}}},
		{"null top level", "~\n", []want{{"1:1", "the top level is empty, not a mapping"}}},
		{"scalar top level", "hello\n", []want{{"1:1", "the top level is a single value"}}},
		{"empty parts", "parts: []\n", []want{{"1:8", "`parts` is an empty list"}}},
		{"parts not a list", "parts: {a: 1}\n", []want{{"1:8", "`parts` is a mapping, not a list"}}},
		{"part not a mapping", "parts:\n  - resistor\n", []want{{"2:5", "part #1 is a single value, not a mapping"}}},
		{"missing type", "parts:\n  - {tpye: resistor, name: R1, between: [a, gnd], value: 1}\n",
			[]want{{"2:5", "part `R1` has no `type` (is `tpye` meant to be `type`?)"}}},
		{"misspelt name", "parts:\n  - {type: resistor, nmae: R1, between: [a, gnd], value: 1}\n",
			[]want{{"2:22", "unknown key `nmae` in resistor #1 (did you mean `name`?)"}}},
		{"between of three", "parts:\n  - {type: resistor, name: R1, between: [a, b, gnd], value: 1}\n",
			[]want{{"2:41", "lists 3 nodes"}}},
		{"empty node name", "parts:\n  - {type: resistor, name: R1, between: [a, ''], value: 1}\n",
			[]want{{"2:45", "a terminal of resistor `R1` is empty"}}},
		{"null node name", "parts:\n  - {type: resistor, name: R1, between: [a, ~], value: 1}\n",
			[]want{{"2:45", "a terminal of resistor `R1` is empty"}}},
		{"value on diode", "diode_models: {d: {saturation_current: 1n}}\nparts:\n  - {type: diode, name: D1, anode: a, cathode: gnd, model: d, value: 1}\n",
			[]want{{"3:63", "a diode takes its values from its `model`"}}},
		{"no models at all", "parts:\n  - {type: diode, name: D1, anode: a, cathode: gnd, model: d}\n",
			[]want{{"2:60", "the file defines no diode_models"}}},
		{"source with between", "parts:\n  - {type: voltage_source, name: V1, between: [a, gnd], value: 1}\n" + rc,
			[]want{
				{"2:5", "voltage_source `V1` has no `plus`"},
				{"2:5", "voltage_source `V1` has no `minus`"},
				{"2:38", "`between` belongs to resistor, capacitor, inductor"},
			}},
		{"key not a scalar", "parts:\n" + rc + "[a]: 1\n", []want{{"3:1", "a key in the circuit file is a list"}}},
		{"duplicate top key", "parts:\n" + rc + "parts:\n" + rc, []want{{"3:1", "key `parts` appears twice in the circuit file, first at line 1"}}},
		{"alias in value", "x: &v 1k\nparts:\n  - {type: resistor, name: R1, between: [a, gnd], value: *v}\n",
			[]want{{"1:4", "anchor `&v`"}, {"3:58", "alias `*v`"}}},
		{"control character", "parts: \"\x01\"\n", []want{{"1:9", "control character U+0001"}}},
		{"tab indentation", "parts:\n\t- {type: resistor}\n", []want{{"2:1", "not valid YAML"}}},
		{"unknown alias", "parts: *nothing\n", []want{{"1:1", "not valid YAML: unknown anchor"}}},
		{"ac port floats node", "parts:\n" + rc + "  - {type: capacitor, name: C1, between: [a, b], value: 1p}\nports:\n  - {name: p, node: b, impedance: 50, coupling: ac}\n",
			[]want{{"3:5", "node `b` has no DC path to gnd, only capacitors or ac-coupled ports reach it"}}},
		{"port in DC path", "parts:\n" + rc + "  - {type: capacitor, name: C1, between: [a, b], value: 1p}\nports:\n  - {name: p, node: b, impedance: 50}\n", nil},
		// A series part between two ports returned to gnd is a whole
		// circuit: the ports' impedances are its DC path.
		{"series between ports", "parts:\n  - {type: resistor, name: R, between: [a, b], value: 33}\nports:\n" +
			"  - {name: p1, node: a, impedance: 50}\n  - {name: p2, node: b, impedance: 50}\n", nil},
		{"series between ac ports", "parts:\n  - {type: resistor, name: R, between: [a, b], value: 33}\nports:\n" +
			"  - {name: p1, node: a, impedance: 50, coupling: ac}\n  - {name: p2, node: b, impedance: 50, coupling: ac}\n",
			[]want{{"2:5", "nodes `a`, `b` have no DC path to gnd, only capacitors or ac-coupled ports reach it"}}},
		{"port to gnd", "parts:\n" + rc + "ports:\n  - {name: p, node: gnd, impedance: 50}\n",
			[]want{{"4:21", "`node` of port `p` is `gnd`, the reference node"}}},
		{"two floating groups", "parts:\n" + rc +
			"  - {type: current_source, name: I1, from: gnd, to: x, value: 1m}\n" +
			"  - {type: current_source, name: I2, from: y, to: x, value: 1m}\n" +
			"  - {type: capacitor, name: C1, between: [z, gnd], value: 1p}\n",
			[]want{
				// A current source does not join its nodes at DC, so x and
				// y are two groups.
				{"3:5", "node `x` has no DC path to gnd and is fed only by current sources (I1, I2)"},
				{"4:5", "node `y` has no DC path to gnd and is fed only by current sources (I2)"},
				{"5:5", "node `z` has no DC path to gnd, only capacitors"},
			}},
		{"inductor loop", "parts:\n" + rc +
			"  - {type: inductor, name: L1, between: [a, b], value: 1n}\n" +
			"  - {type: inductor, name: L2, between: [b, a], value: 1n}\n",
			[]want{{"4:5", "inductors `L2`, `L1` form a loop"}}},
		{"misspelt response keys", "parts:\n" + rc + "analysis:\n  response: {form: 1MHz, to: 1GHz, point: 5}\n",
			[]want{{"4:14", "unknown key `form` in the response analysis (did you mean `from`?)"},
				{"4:36", "unknown key `point` in the response analysis (did you mean `points`?)"}}},
		{"response without count", "parts:\n" + rc + "analysis:\n  response: {from: 1MHz, to: 1GHz}\n",
			[]want{{"4:13", "needs `per_decade` or `points`"}}},
		{"log sweep from zero", "parts:\n" + rc + "analysis:\n  response: {from: 0, to: 1GHz, per_decade: 10}\n",
			[]want{{"4:20", "`from` of the response analysis is `0`, which is not above zero"}}},
		{"linear sweep from zero", "parts:\n" + rc + "analysis:\n  response: {from: 0, to: 1GHz, points: 11}\n", nil},
		{"second tone on the first", "parts:\n" + rc + "ports:\n  - {name: p, node: a, impedance: 50}\n" +
			"analysis:\n  distortion: {input: p, output: a, frequency: 1GHz, level: 1V, second_tone: 1000MHz}\n",
			[]want{{"6:78", "`second_tone` of the distortion analysis equals its `frequency`"}}},
		{"distortion incomplete", "parts:\n" + rc + "analysis:\n  distortion: {input: p}\n",
			[]want{
				{"4:15", "has no `output`"},
				{"4:15", "has no `frequency`"},
				{"4:15", "has no `level`"},
				{"4:23", "`input` of the distortion analysis is `p`, which is not a port; accepted: a port name: (none)"},
			}},
		{"study of a diode", "diode_models: {d: {saturation_current: 1n}}\nparts:\n  - {type: diode, name: D1, anode: a, cathode: gnd, model: d}\n" +
			"analysis:\n  study: {vary: D1.value, from: 1, to: 2, steps: 1}\n",
			[]want{{"5:17", "names diode `D1`, which has no value; accepted: a value of its model, e.g. d.saturation_current"}}},
		{"study of a model range", "diode_models: {d: {saturation_current: 1n}}\nparts:\n  - {type: diode, name: D1, anode: a, cathode: gnd, model: d}\n" +
			"analysis:\n  study: {vary: d.ideality, from: 0.5, to: 2, steps: 5}\n",
			[]want{{"5:35", "`from` of the study (d.ideality) is `0.5`, which is outside 0.9 to 10"}}},
		{"study log through zero", "parts:\n  - {type: voltage_source, name: V1, plus: a, minus: gnd, value: 1}\n" + rc +
			"analysis:\n  study: {vary: V1.value, from: -1, to: 1, steps: 4, log: true}\n",
			[]want{{"5:33", "a logarithmic study needs `from` and `to` of the same sign and not zero"}}},
		{"study equal ends", "parts:\n" + rc + "analysis:\n  study: {vary: temperature, from: 27C, to: 300.15K, steps: 4, log: yes}\n",
			[]want{{"4:45", "`to` of the study equals `from`"}, {"4:69", "`log` of the study is `yes`; accepted: true or false"}}},
		{"study bad key of part", "parts:\n" + rc + "analysis:\n  study: {vary: R1.resistance, from: 1, to: 2, steps: 1}\n",
			[]want{{"4:17", "but a resistor has only `value`; accepted: R1.value"}}},
		{"study no dot", "parts:\n" + rc + "analysis:\n  study: {vary: R1, from: 1, to: 2, steps: 1}\n",
			[]want{{"4:17", "`vary` of the study is `R1`; accepted: temperature, PART.value"}}},
		{"output is gnd", "parts:\n" + rc + "ports:\n  - {name: p, node: a, impedance: 50}\n" +
			"analysis:\n  distortion: {input: p, output: gnd, frequency: 1GHz, level: -10dBm}\n",
			[]want{{"6:34", "`output` of the distortion analysis is the reference node"}}},
		{"unknown analysis", "parts:\n" + rc + "analysis:\n  sweep: {}\n",
			[]want{{"4:3", "unknown key `sweep` in `analysis`; accepted keys: response, distortion, study"}}},
		{"name not text", "name: [a]\nparts:\n" + rc, []want{{"1:7", "`name` is a list"}}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			checkProblems(t, "c.yaml", []byte(tt.data), tt.wants)
		})
	}
}

// checkProblems parses data and compares the problems with wants; no wants
// means the file must load.
func checkProblems(t *testing.T, file string, data []byte, wants []want) {
	t.Helper()
	c, err := Parse(file, data)
	if len(wants) == 0 {
		if err != nil {
			t.Fatalf("Parse: unexpected problems:\n%v", err)
		}
		if c == nil {
			t.Fatal("Parse returned neither circuit nor error")
		}
		return
	}
	if err == nil {
		t.Fatalf("Parse succeeded; want %d problems starting with %s: %s", len(wants), wants[0].pos, wants[0].phrase)
	}
	var list ErrorList
	if !errors.As(err, &list) {
		t.Fatalf("error is %T, not an ErrorList: %v", err, err)
	}
	if len(list) != len(wants) {
		t.Errorf("%d problems, want %d:\n%v", len(list), len(wants), err)
	}
	for i := 0; i < len(wants) && i < len(list); i++ {
		msg := list[i].Error()
		prefix := file + ":" + wants[i].pos + ": "
		if !strings.HasPrefix(msg, prefix) || !strings.Contains(msg, wants[i].phrase) {
			t.Errorf("problem %d: %q\n\twant prefix %q and phrase %q", i+1, msg, prefix, wants[i].phrase)
		}
	}
}

func TestParseTooLarge(t *testing.T) {
	data := bytes.Repeat([]byte("# padding\n"), MaxFileSize/10+1)
	_, err := Parse("big.yaml", data)
	if err == nil || !strings.HasPrefix(err.Error(), "big.yaml:1:1: the file is ") || !strings.Contains(err.Error(), "up to 1048576 bytes") {
		t.Errorf("Parse of %d bytes: %v; want a size error at 1:1", len(data), err)
	}

	path := filepath.Join(t.TempDir(), "big.yaml")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	_, err = Load(path)
	if err == nil || !strings.HasPrefix(err.Error(), path+":1:1: the file is ") {
		t.Errorf("Load of %d bytes: %v; want a size error at 1:1", len(data), err)
	}
}

func TestLoadMissingFile(t *testing.T) {
	_, err := Load(filepath.Join(t.TempDir(), "none.yaml"))
	if !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("Load of a missing file: %v; want an error wrapping fs.ErrNotExist", err)
	}
}

// TestDefaults checks the values a file may leave out, as the format page
// gives them.
func TestDefaults(t *testing.T) {
	data := `
diode_models:
  d: {saturation_current: 1n}
parts:
  - {type: diode, name: D1, anode: a, cathode: gnd, model: d}
ports:
  - {name: p, node: a, impedance: 50}
`
	c, err := Parse("d.yaml", []byte(data))
	if err != nil {
		t.Fatal(err)
	}
	if c.TemperatureK != 300.15 {
		t.Errorf("TemperatureK = %v, want 300.15 (27C)", c.TemperatureK)
	}
	want := diode.Defaults()
	want.SaturationCurrent = 1e-9
	if got := c.Models["d"].Params; got != want {
		t.Errorf("model d = %+v\n\twant %+v", got, want)
	}
	if got := c.Models["d"].Params.BreakdownCurrent; got != 0 {
		t.Errorf("BreakdownCurrent without a knee = %v, want 0", got)
	}
	if p := c.Ports[0]; p.Return != Ground || p.ACCoupled {
		t.Errorf("port defaults: Return %q, ACCoupled %v; want gnd, false", p.Return, p.ACCoupled)
	}
	if c.Analysis.Response.Set || c.Analysis.Distortion.Set || c.Analysis.Study.Set {
		t.Errorf("analysis defaults set without an analysis section: %+v", c.Analysis)
	}
}

func TestAnalysisVariants(t *testing.T) {
	data := `
diode_models:
  d: {saturation_current: 1n}
parts:
  - {type: diode, name: D.1, anode: a, cathode: gnd, model: d}
  - {type: resistor, name: R.load, between: [a, gnd], value: 1k}
analysis:
  response: {from: 0Hz, to: 1GHz, points: 101}
  distortion: {input: p, output: a, frequency: 1GHz, level: 50mV}
  study: {vary: R.load.value, from: 1k, to: 10k, steps: 9}
ports:
  - {name: p, node: a, impedance: 50}
`
	c, err := Parse("v.yaml", []byte(data))
	if err != nil {
		t.Fatal(err)
	}
	r := c.Analysis.Response
	if !r.Set || r.FromHz != 0 || r.ToHz != 1e9 || r.Points != 101 || r.PerDecade != 0 {
		t.Errorf("Response = %+v", r)
	}
	d := c.Analysis.Distortion
	if !d.Set || d.OutputIsPort || d.Output != "a" || d.Level != (Level{PeakVolts: 0.05}) || d.SecondToneHz != 0 {
		t.Errorf("Distortion = %+v; want output node a, 50 mV peak", d)
	}
	// Part names may hold dots: vary splits at the last one.
	s := c.Analysis.Study
	if !s.Set || s.Vary != "R.load.value" || s.From != 1e3 || s.To != 10e3 || s.Steps != 9 || s.Log {
		t.Errorf("Study = %+v", s)
	}

	for _, tt := range []struct {
		vary, from, to string
		wantFrom       float64
	}{
		{"temperature", "-40C", "85C", 233.15},
		{"d.saturation_current", "1n", "1u", 1e-9},
		{"d.measured_at", "250K", "350K", 250},
		{"d.gap_energy", "0.6eV", "1.2eV", 0.6},
	} {
		text := strings.Replace(data, "vary: R.load.value, from: 1k, to: 10k",
			fmt.Sprintf("vary: %s, from: %s, to: %s", tt.vary, tt.from, tt.to), 1)
		c, err := Parse("v.yaml", []byte(text))
		if err != nil {
			t.Errorf("vary %s: %v", tt.vary, err)
			continue
		}
		if s := c.Analysis.Study; !s.Set || s.From != tt.wantFrom {
			t.Errorf("vary %s: From = %v, want %v", tt.vary, s.From, tt.wantFrom)
		}
	}
}

func TestModelParam(t *testing.T) {
	var p diode.Params
	for _, mk := range modelKeys {
		f := ModelParam(&p, mk.key)
		if f == nil {
			t.Errorf("ModelParam(%q) = nil", mk.key)
			continue
		}
		*f = 1
	}
	p.Ratings = diode.Ratings{} // not reachable through ModelParam
	// Every float64 field of Params is reachable exactly once.
	v := reflect.ValueOf(p)
	for i := 0; i < v.NumField(); i++ {
		if fv := v.Field(i); fv.Kind() == reflect.Float64 && fv.Float() != 1 {
			t.Errorf("Params.%s is not set by any model key", v.Type().Field(i).Name)
		}
	}
	if ModelParam(&p, "ratings") != nil || ModelParam(&p, "value") != nil {
		t.Error("ModelParam of a non-numeric key should be nil")
	}
}

func TestErrorFormat(t *testing.T) {
	e := &Error{File: "a.yaml", Line: 3, Col: 7, Msg: "what is wrong; accepted: this"}
	if got, want := e.Error(), "a.yaml:3:7: what is wrong; accepted: this"; got != want {
		t.Errorf("Error() = %q, want %q", got, want)
	}
	list := ErrorList{e, {File: "a.yaml", Line: 4, Col: 1, Msg: "second"}}
	if got, want := list.Error(), "a.yaml:3:7: what is wrong; accepted: this\na.yaml:4:1: second"; got != want {
		t.Errorf("ErrorList.Error() = %q, want %q", got, want)
	}
	var first *Error
	if !errors.As(error(list), &first) || first != e {
		t.Errorf("errors.As(list) = %v, want the first *Error", first)
	}
	if finish(nil) != nil {
		t.Error("finish(nil) must be a nil error, not a nil ErrorList in an interface")
	}
}

// TestValueErrorWrapped checks that a bad value's *ValueError is reachable
// from the load error.
func TestValueErrorWrapped(t *testing.T) {
	_, err := Parse("w.yaml", []byte("parts:\n  - {type: resistor, name: R1, between: [a, gnd], value: 4.7K}\n"))
	var ve *ValueError
	if !errors.As(err, &ve) || ve.Text != "4.7K" || ve.What != "resistance" {
		t.Errorf("errors.As(*ValueError) from %v: got %+v", err, ve)
	}
}

func TestErrorCap(t *testing.T) {
	var b strings.Builder
	b.WriteString("parts:\n")
	for i := 0; i < 30; i++ {
		fmt.Fprintf(&b, "  - {type: resistor, name: R%d, between: [a, gnd], value: -1}\n", i)
	}
	_, err := Parse("many.yaml", []byte(b.String()))
	var list ErrorList
	if !errors.As(err, &list) {
		t.Fatalf("error %T is not an ErrorList", err)
	}
	if len(list) != MaxErrors+1 {
		t.Fatalf("%d entries, want %d problems and one summary line", len(list), MaxErrors+1)
	}
	last := list[MaxErrors].Error()
	if want := "many.yaml:22:59: 10 more problems not shown"; !strings.HasPrefix(last, want) {
		t.Errorf("summary line %q, want prefix %q", last, want)
	}
	if lines := strings.Count(err.Error(), "\n") + 1; lines != MaxErrors+1 {
		t.Errorf("error text has %d lines, want %d", lines, MaxErrors+1)
	}
}

// TestNoiseKeys reads the flicker-noise keys of a diode model and a port's
// noise temperature, with their defaults.
func TestNoiseKeys(t *testing.T) {
	data := `
diode_models:
  plain: {saturation_current: 1n}
  given: {saturation_current: 1n, flicker_coefficient: 2e-12}
  both:  {saturation_current: 1n, flicker_coefficient: 2e-12, flicker_exponent: 1.3}
parts:
  - {type: diode, name: D1, anode: a, cathode: gnd, model: plain}
  - {type: diode, name: D2, anode: a, cathode: gnd, model: given}
  - {type: diode, name: D3, anode: a, cathode: gnd, model: both}
ports:
  - {name: antenna, node: a, impedance: 50, noise_temperature: 50K}
  - {name: load,    node: a, impedance: 50, noise_temperature: 0K}
  - {name: warm,    node: a, impedance: 50, noise_temperature: 85C}
  - {name: plain,   node: a, impedance: 50}
`
	c, err := Parse("n.yaml", []byte(data))
	if err != nil {
		t.Fatal(err)
	}
	for _, tt := range []struct {
		model  string
		k, exp float64
	}{{"plain", 0, 0}, {"given", 2e-12, 1}, {"both", 2e-12, 1.3}} {
		p := c.Models[tt.model].Params
		if p.FlickerCoefficient != tt.k || p.FlickerExponent != tt.exp {
			t.Errorf("model %s: flicker %g, exponent %g; want %g, %g", tt.model, p.FlickerCoefficient, p.FlickerExponent, tt.k, tt.exp)
		}
	}
	for i, want := range []struct {
		k   float64
		set bool
	}{{50, true}, {0, true}, {358.15, true}, {0, false}} {
		p := c.Ports[i]
		if p.NoiseTemperatureK != want.k || p.NoiseTemperatureSet != want.set {
			t.Errorf("port %s: noise temperature %g K (set %v), want %g K (set %v)", p.Name, p.NoiseTemperatureK, p.NoiseTemperatureSet, want.k, want.set)
		}
	}
}
