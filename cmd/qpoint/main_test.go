package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"qpoint/bias"
	"qpoint/plots/report"
)

func runCLI(t *testing.T, args ...string) (stdout, stderr string, code int) {
	t.Helper()
	var out, errb bytes.Buffer
	code = run(args, &out, &errb)
	return out.String(), errb.String(), code
}

const demoDir = "../../testdata/demo"

func TestBiasDemos(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join(demoDir, "*.yaml"))
	if len(files) != 5 {
		t.Fatalf("found %d demo circuits, want 5", len(files))
	}
	for _, f := range files {
		out, errs, code := runCLI(t, "bias", f)
		if code != 0 {
			t.Fatalf("qpoint bias %s: exit %d, %s", f, code, errs)
		}
		for _, want := range []string{"Node voltages", "Diode Q points", "dynamic resistance", "junction capacitance", "of power rating"} {
			if !strings.Contains(out, want) {
				t.Errorf("qpoint bias %s: output lacks %q", f, want)
			}
		}
	}
}

// TestBiasJSONContract checks the keys, units and sign conventions the
// circuit-file contract fixes for `bias --json`.
func TestBiasJSONContract(t *testing.T) {
	out, errs, code := runCLI(t, "bias", "--json", filepath.Join(demoDir, "detector.yaml"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("not one JSON document: %v\n%s", err, out)
	}
	for _, k := range []string{"temperature", "nodes", "diodes", "sources", "warnings"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("missing top-level key %q", k)
		}
	}
	if doc["temperature"].(float64) != 300.15 {
		t.Errorf("temperature = %v, want 300.15 (kelvin)", doc["temperature"])
	}
	nodes := doc["nodes"].(map[string]any)
	if nodes["vcc"].(float64) != 3.3 {
		t.Errorf("nodes.vcc = %v, want 3.3", nodes["vcc"])
	}
	d := doc["diodes"].([]any)[0].(map[string]any)
	for _, k := range []string{"name", "voltage", "junction_voltage", "current", "dynamic_resistance", "junction_capacitance", "diffusion_capacitance", "power"} {
		if _, ok := d[k]; !ok {
			t.Errorf("diode lacks key %q", k)
		}
	}
	// voltage = anode - cathode at the terminals; junction excludes the R_S drop.
	v, vj, i := d["voltage"].(float64), d["junction_voltage"].(float64), d["current"].(float64)
	if got := (v - vj) / 20; abs(got-i) > 1e-12 {
		t.Errorf("(voltage - junction_voltage)/R_S = %g A, current = %g A", got, i)
	}
	an, vo := nodes["anode"].(float64), nodes["vout"].(float64)
	if abs(v-(an-vo)) > 1e-12 {
		t.Errorf("voltage %g != V(anode) - V(vout) = %g", v, an-vo)
	}
	// The supply delivers power, so its current into `plus` is negative.
	src := doc["sources"].([]any)[0].(map[string]any)
	if src["name"] != "Vcc" || src["current"].(float64) >= 0 || abs(src["current"].(float64)+i) > 1e-12 {
		t.Errorf("source %v: want Vcc with current -%g A", src, i)
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

var place = regexp.MustCompile(`^[^:]+\.yaml:\d+:\d+: .+; .+`)

// TestBadInput: every kind of bad file gives FILE:LINE:COL errors, exit 2
// and no panic.
func TestBadInput(t *testing.T) {
	files, _ := filepath.Glob("../../testdata/bad/*.yaml")
	if len(files) < 10 {
		t.Fatalf("found %d bad circuit files, want at least 10", len(files))
	}
	for _, f := range files {
		_, errs, code := runCLI(t, "bias", f)
		if code != 2 {
			t.Errorf("%s: exit %d, want 2\n%s", f, code, errs)
			continue
		}
		var lines []string
		for _, l := range strings.Split(strings.TrimSpace(errs), "\n") {
			l = strings.TrimPrefix(l, "qpoint: ")
			if strings.Contains(l, ".yaml:") {
				lines = append(lines, l)
			}
		}
		if len(lines) == 0 {
			t.Errorf("%s: no FILE:LINE:COL line in\n%s", f, errs)
		}
		for _, l := range lines {
			if !place.MatchString(l) {
				t.Errorf("%s: %q is not `FILE:LINE:COL: what is wrong; what is accepted`", f, l)
			}
		}
	}
}

func TestUsageErrors(t *testing.T) {
	cases := [][]string{
		{"bias"},
		{"bias", "a.yaml", "b.yaml"},
		{"bias", "--no-such-flag", filepath.Join(demoDir, "detector.yaml")},
		{"bias", "--temperature", "hot", filepath.Join(demoDir, "detector.yaml")},
		{"bias", "/no/such/file.yaml"},
		{"response", "--from", "10MHz", "--to", "1MHz", filepath.Join(demoDir, "detector.yaml")},
		{"response", "--reference", "50,75,100", filepath.Join(demoDir, "detector.yaml"), "--per-decade", "2"},
		{"no-such-command"},
	}
	for _, args := range cases {
		_, errs, code := runCLI(t, args...)
		if code != 2 {
			t.Errorf("qpoint %s: exit %d, want 2\n%s", strings.Join(args, " "), code, errs)
		}
		if strings.Contains(errs, "panic") || strings.Contains(errs, "goroutine") {
			t.Errorf("qpoint %s: %s", strings.Join(args, " "), errs)
		}
	}
}

func TestTemperatureFlag(t *testing.T) {
	out, _, code := runCLI(t, "bias", "--json", "--temperature", "85C", filepath.Join(demoDir, "mixer.yaml"))
	if code != 0 {
		t.Fatal(out)
	}
	var doc struct{ Temperature float64 }
	json.Unmarshal([]byte(out), &doc)
	if abs(doc.Temperature-358.15) > 1e-9 {
		t.Errorf("temperature %g K, want 358.15", doc.Temperature)
	}
}

func TestDemo(t *testing.T) {
	dir := t.TempDir()
	out, errs, code := runCLI(t, "demo", "--dir", dir)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if strings.Count(out, "Diode Q points") != 5 {
		t.Errorf("demo printed %d Q-point tables, want 5", strings.Count(out, "Diode Q points"))
	}
	for _, name := range []string{"index", "detector", "attenuator", "limiter", "mixer", "matched_detector"} {
		data, err := os.ReadFile(filepath.Join(dir, name+".html"))
		if err != nil {
			t.Errorf("demo wrote no %s.html: %v", name, err)
			continue
		}
		if name != "index" {
			for _, want := range []string{"Operating point", "Small-signal response", "Distortion", "<svg"} {
				if !strings.Contains(string(data), want) {
					t.Errorf("%s.html lacks %q", name, want)
				}
			}
		}
	}
}

// TestOutputNeverOverwritesInput: naming the circuit file as an output is
// refused and the file is unchanged.
func TestOutputNeverOverwritesInput(t *testing.T) {
	dir := t.TempDir()
	src, _ := os.ReadFile(filepath.Join(demoDir, "detector.yaml"))
	in := filepath.Join(dir, "c.yaml")
	os.WriteFile(in, src, 0o644)
	_, _, code := runCLI(t, "response", in, "--csv", in)
	if code != 2 {
		t.Errorf("exit %d, want 2", code)
	}
	after, _ := os.ReadFile(in)
	if !bytes.Equal(after, src) {
		t.Error("the input file changed")
	}
}

// TestBiasLine: a command's header names up to six diodes with their
// currents, and gives many diodes' count and current range instead.
func TestBiasLine(t *testing.T) {
	p := &bias.Point{TemperatureK: 300.15}
	p.Stats.Strategy = bias.Newton
	for k := 0; k < 3; k++ {
		p.Diodes = append(p.Diodes, bias.QPoint{Name: "D" + strconv.Itoa(k+1), Current: 1e-3 * float64(k+1)})
	}
	if got, want := report.BiasLine(p), "solved at 27.00 °C by newton; D1 at 1 mA; D2 at 2 mA; D3 at 3 mA"; got != want {
		t.Errorf("three diodes: %q, want %q", got, want)
	}
	p.Diodes = nil
	for k := 0; k < 9; k++ {
		p.Diodes = append(p.Diodes, bias.QPoint{Name: "D" + strconv.Itoa(k+1), Current: 1e-3 * float64((k+4)%9+1)})
	}
	if got, want := report.BiasLine(p), "solved at 27.00 °C by newton; 9 diodes from 1 mA (D6) to 9 mA (D5); the bias command lists them all"; got != want {
		t.Errorf("nine diodes: %q, want %q", got, want)
	}
	for k := range p.Diodes {
		p.Diodes[k].Current = 2e-3
	}
	if got, want := report.BiasLine(p), "solved at 27.00 °C by newton; 9 diodes, each at 2 mA; the bias command lists them all"; got != want {
		t.Errorf("nine equal diodes: %q, want %q", got, want)
	}
}

// TestVersionAndFlagHints: --version prints the build's version and Go
// release; an unknown flag names the command once, with its help.
func TestVersionAndFlagHints(t *testing.T) {
	out, _, code := runCLI(t, "--version")
	if code != 0 || !strings.HasPrefix(out, "qpoint ") || !strings.Contains(out, "go1.") {
		t.Errorf("--version: exit %d, %q; want qpoint VERSION ..., goVERSION", code, out)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--nosuch"}, "(see 'qpoint --help')"},
		{[]string{"bias", "--nosuch", "x.yaml"}, "(see 'qpoint bias --help')"},
	} {
		_, errs, code := runCLI(t, c.args...)
		if code != 2 || !strings.Contains(errs, c.want) || strings.Contains(errs, "qpoint qpoint") {
			t.Errorf("%v: exit %d, %q; want exit 2 and %q", c.args, code, errs, c.want)
		}
	}
}
