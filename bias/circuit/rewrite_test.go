package circuit

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestRewriteDemo: values the file writes are replaced where they stand,
// a model key it leaves out is added to the model's block, and every
// other line — comments included — is unchanged. The result loads with
// the values asked for (the loader is the reference: a rewrite that it
// reads differently is refused by Rewrite itself, and checked again here).
func TestRewriteDemo(t *testing.T) {
	path := filepath.Join("..", "..", "testdata", "demo", "detector.yaml")
	src, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	edits := []Edit{
		{"Rbias.value", "47k"},
		{"Rbias.value", "100k"}, // the last edit of a target wins
		{"temperature", "85C"},
		{"detector_low_barrier.ideality", "1.07"},
		{"detector_low_barrier.transit_time", "5p"}, // not in the file
		{"analysis.distortion.level", "-20dBm"},
		{"analysis.distortion.frequency", "915MHz"},
	}
	out, err := Rewrite(path, src, edits)
	if err != nil {
		t.Fatal(err)
	}
	c, err := Parse(path, out)
	if err != nil {
		t.Fatalf("rewritten file does not load: %v\n%s", err, out)
	}
	var rbias float64
	for _, p := range c.Parts {
		if p.Name == "Rbias" {
			rbias = p.Value
		}
	}
	m := c.Models["detector_low_barrier"].Params
	checks := []struct {
		name      string
		got, want float64
	}{
		{"Rbias", rbias, 100e3},
		{"temperature", c.TemperatureK, 85 + 273.15},
		{"ideality", m.Ideality, 1.07},
		{"transit time", m.TransitTime, 5e-12},
		{"frequency", c.Analysis.Distortion.FrequencyHz, 915e6},
		{"level", c.Analysis.Distortion.Level.DBm, -20},
		{"saturation current (untouched)", m.SaturationCurrent, 3e-6},
	}
	for _, k := range checks {
		if k.got != k.want {
			t.Errorf("%s: %g, want %g", k.name, k.got, k.want)
		}
	}
	before := strings.Split(string(src), "\n")
	after := strings.Split(string(out), "\n")
	if len(after) != len(before)+1 {
		t.Fatalf("%d lines became %d; want one more (transit_time)\n%s", len(before), len(after), out)
	}
	changed := 0
	j := 0
	for i := 0; i < len(after); i++ {
		if strings.TrimSpace(after[i]) == "transit_time: 5p" {
			if !strings.HasPrefix(after[i], "    transit_time") {
				t.Errorf("inserted line %q is not indented as the model's keys", after[i])
			}
			continue
		}
		if after[i] != before[j] {
			changed++
		}
		j++
	}
	// Rbias's line, the temperature, the ideality and the distortion line.
	if changed != 4 {
		t.Errorf("%d lines changed, want 4:\n%s", changed, out)
	}
	if !strings.Contains(string(out), "# A 2.45 GHz presence-sensing tag") {
		t.Error("the file's comments were lost")
	}
}

// TestRewriteFlowAndMissing: a flow-style model, quoted values, a file
// without temperature or analysis block.
func TestRewriteFlowAndMissing(t *testing.T) {
	src := `# a bare file
name: "flow"
diode_models:
  d: {saturation_current: "2uA", series_resistance: '10'}
parts:
  - {type: voltage_source, name: "V1", plus: a, minus: gnd, value: "1V"}
  - {type: resistor, name: R1, between: [a, b], value: 1k}
  - {type: diode, name: D1, anode: b, cathode: gnd, model: d}
ports:
  - {name: p, node: b, impedance: 50}
  - {name: q, node: a, impedance: 50}
`
	out, err := Rewrite("flow.yaml", []byte(src), []Edit{
		{"V1.value", "2.5V"},
		{"d.series_resistance", "12"},
		{"d.ideality", "1.2"},
		{"temperature", "-40C"},
		{"analysis.distortion.input", "p"},
		{"analysis.distortion.output", "q"},
		{"analysis.distortion.frequency", "1GHz"},
		{"analysis.distortion.level", "-10dBm"},
	})
	if err != nil {
		t.Fatal(err)
	}
	c, err := Parse("flow.yaml", out)
	if err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	m := c.Models["d"].Params
	if c.Parts[0].Value != 2.5 || m.SeriesResistance != 12 || m.Ideality != 1.2 || c.TemperatureK != 233.15 ||
		!c.Analysis.Distortion.Set || c.Analysis.Distortion.FrequencyHz != 1e9 {
		t.Errorf("values not as asked:\n%s", out)
	}
	if !strings.HasPrefix(string(out), "# a bare file\n") {
		t.Errorf("the leading comment moved:\n%s", out)
	}
}

// TestRewriteRefuses: a target the file does not have, and a value the
// loader would not take, are refused rather than written.
func TestRewriteRefuses(t *testing.T) {
	path := filepath.Join("..", "..", "testdata", "demo", "detector.yaml")
	src, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range []Edit{
		{"Rnone.value", "1k"},
		{"Rbias.value", "12V"},
		{"Rbias.value", "1\n2"},
		{"analysis.distortion.colour", "red"},
	} {
		if out, err := Rewrite(path, src, []Edit{e}); err == nil {
			t.Errorf("%s=%q: accepted\n%s", e.Target, e.Text, out)
		}
	}
}
