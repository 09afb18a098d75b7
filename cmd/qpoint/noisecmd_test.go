package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runNoiseCLI runs `qpoint noise ARGS` as run does, registering the
// command on the root when main.go does not (yet).
func runNoiseCLI(t *testing.T, args ...string) (stdout, stderr string, code int) {
	t.Helper()
	var out, errb bytes.Buffer
	root := newRoot(&out, &errb)
	if c, _, err := root.Find([]string{"noise"}); err != nil || c.Name() != "noise" {
		root.AddCommand(newNoiseCmd())
	}
	root.SetArgs(append([]string{"noise"}, args...))
	if err := root.Execute(); err != nil {
		fmt.Fprintln(&errb, "qpoint:", err)
		var e *exitError
		if errors.As(err, &e) {
			return out.String(), errb.String(), e.code
		}
		return out.String(), errb.String(), exitInput
	}
	return out.String(), errb.String(), exitOK
}

func TestNoiseDemos(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join(demoDir, "*.yaml"))
	if len(files) == 0 {
		t.Fatal("no demos")
	}
	for _, f := range files {
		out, errs, code := runNoiseCLI(t, f)
		if code != 0 {
			t.Fatalf("qpoint noise %s: exit %d, %s", f, code, errs)
		}
		want := []string{"Noise at the output", "Integrated from", "Where the noise comes from"}
		if strings.Contains(f, "detector") {
			want = append(want, "Detector sensitivity", "noise-equivalent power", "tangential sensitivity", "dBm")
		} else {
			want = append(want, "noise figure", "input-referred")
		}
		for _, w := range want {
			if !strings.Contains(out, w) {
				t.Errorf("qpoint noise %s: output lacks %q\n%s", f, w, out)
			}
		}
	}
}

// TestNoiseJSON checks the document's shape and that each point's
// contributions add to its output density.
func TestNoiseJSON(t *testing.T) {
	out, errs, code := runNoiseCLI(t, "--json", filepath.Join(demoDir, "detector.yaml"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Input   *string `json:"input"`
		Output  string  `json:"output"`
		Sources []struct {
			Name, Where, Kind, Role string
		} `json:"sources"`
		Points []struct {
			Frequency     float64   `json:"frequency"`
			OutputDensity float64   `json:"output_density"`
			NEP           *float64  `json:"nep"`
			Contributions []float64 `json:"contributions"`
		} `json:"points"`
		Band *struct {
			OutputRMS     float64   `json:"output_rms"`
			Contributions []float64 `json:"contributions"`
		} `json:"band"`
		Detector *struct {
			VoltageSensitivity float64 `json:"voltage_sensitivity"`
			NEP                float64 `json:"nep"`
			TangentialDBm      float64 `json:"tangential_sensitivity_dbm"`
		} `json:"detector"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("not one JSON document: %v\n%s", err, out)
	}
	if doc.Input == nil || *doc.Input != "rf" || doc.Output != "video" {
		t.Errorf("input %v, output %q; want rf, video", doc.Input, doc.Output)
	}
	if len(doc.Points) == 0 || doc.Band == nil || doc.Detector == nil {
		t.Fatalf("points %d, band %v, detector %v", len(doc.Points), doc.Band, doc.Detector)
	}
	for _, p := range doc.Points {
		if len(p.Contributions) != len(doc.Sources) {
			t.Fatalf("%d contributions for %d sources", len(p.Contributions), len(doc.Sources))
		}
		sum := 0.0
		for _, c := range p.Contributions {
			sum += c
		}
		if math.Abs(math.Sqrt(sum)-p.OutputDensity) > 1e-12*p.OutputDensity {
			t.Errorf("%g Hz: contributions give %g V/√Hz, output_density %g", p.Frequency, math.Sqrt(sum), p.OutputDensity)
		}
		if p.NEP == nil {
			t.Errorf("%g Hz: detector point without nep", p.Frequency)
		}
	}
	sum := 0.0
	for _, c := range doc.Band.Contributions {
		sum += c
	}
	if math.Abs(math.Sqrt(sum)-doc.Band.OutputRMS) > 1e-12*doc.Band.OutputRMS {
		t.Errorf("band contributions give %g V rms, output_rms %g", math.Sqrt(sum), doc.Band.OutputRMS)
	}
	d := doc.Detector
	if !(d.VoltageSensitivity > 0) || !(d.NEP > 0) || !(d.TangentialDBm < 0) {
		t.Errorf("detector figures %+v", *d)
	}
}

func writeCircuit(t *testing.T, text string) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "c.yaml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestNoiseOutsideChecks runs the outside checks through the command.
func TestNoiseOutsideChecks(t *testing.T) {
	// 1 kΩ at 290 K: 4.0 nV/√Hz (Johnson 1928; Nyquist 1928).
	path := writeCircuit(t, "temperature: 290K\nparts:\n  - {type: resistor, name: R, between: [a, gnd], value: 1k}\n")
	out, errs, code := runNoiseCLI(t, path, "--output", "a", "--from", "1kHz", "--to", "1kHz")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	t.Logf("1 kΩ at 290 K:\n%s", out)
	if !strings.Contains(out, "4.002 nV/√Hz") {
		t.Errorf("1 kΩ at 290 K: want 4.002 nV/√Hz (Johnson 1928, Nyquist 1928) in\n%s", out)
	}

	// A matched 6 dB pi attenuator at 290 K: noise figure 6 dB (Pozar
	// ch. 10; common practice). K = 10^(6/20): shunt 50 (K+1)/(K-1),
	// series 50 (K²-1)/(2K).
	k := math.Pow(10, 6.0/20)
	shunt, series := 50*(k+1)/(k-1), 50*(k*k-1)/(2*k)
	path = writeCircuit(t, fmt.Sprintf(`temperature: 290K
parts:
  - {type: resistor, name: R1, between: [in, gnd], value: %.17g}
  - {type: resistor, name: R2, between: [in, out], value: %.17g}
  - {type: resistor, name: R3, between: [out, gnd], value: %.17g}
ports:
  - {name: in,  node: in,  impedance: 50}
  - {name: out, node: out, impedance: 50}
`, shunt, series, shunt))
	out, errs, code = runNoiseCLI(t, path, "--from", "1MHz", "--to", "1GHz")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	t.Logf("6 dB pi attenuator at 290 K:\n%s", out)
	if !strings.Contains(out, "6.00 dB") {
		t.Errorf("6 dB attenuator: want a noise figure of 6.00 dB (Pozar ch. 10) in\n%s", out)
	}
}

func TestNoiseErrors(t *testing.T) {
	det := filepath.Join(demoDir, "detector.yaml")
	att := filepath.Join(demoDir, "attenuator.yaml")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{det, "--bandwidth", "1MHz"}, "LOW:HIGH"},
		{[]string{det, "--bandwidth", "2MHz:1MHz"}, "not a rising band"},
		{[]string{det, "--video-bandwidth", "fast"}, "--video-bandwidth"},
		{[]string{det, "--input", "video", "--output", "video"}, "both name port"},
		{[]string{det, "--output", "nowhere"}, "neither a port nor a node"},
		{[]string{det, "--input", "nowhere"}, "is not a port"},
		{[]string{att, "--video-bandwidth", "1MHz"}, "not a detector output"},
		{[]string{det, "--carrier", "2THz"}, "--carrier"},
		{[]string{det, "--rows", "0"}, "--rows"},
	} {
		_, errs, code := runNoiseCLI(t, c.args...)
		if code != exitInput || !strings.Contains(errs, c.want) {
			t.Errorf("qpoint noise %v: exit %d, %q; want exit 2 and %q", c.args, code, errs, c.want)
		}
	}
}

func TestNoiseFiles(t *testing.T) {
	dir := t.TempDir()
	csvPath := filepath.Join(dir, "noise.csv")
	plotDir := filepath.Join(dir, "figures")
	out, errs, code := runNoiseCLI(t, filepath.Join(demoDir, "attenuator.yaml"), "--csv", csvPath, "--plots", plotDir)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "CSV written to") || !strings.Contains(out, "figures written to") {
		t.Errorf("output does not name the files:\n%s", out)
	}
	for _, p := range []string{csvPath, filepath.Join(plotDir, "noise-density.csv"), filepath.Join(plotDir, "noise-contributions.csv")} {
		f, err := os.Open(p)
		if err != nil {
			t.Fatal(err)
		}
		rows, err := csv.NewReader(f).ReadAll()
		f.Close()
		if err != nil || len(rows) < 2 || rows[0][0] != "frequency_Hz" {
			t.Errorf("%s: %d rows, %v", p, len(rows), err)
		}
	}
	for _, name := range []string{"noise-density", "noise-contributions"} {
		for _, ext := range []string{".svg", ".png"} {
			if st, err := os.Stat(filepath.Join(plotDir, name+ext)); err != nil || st.Size() == 0 {
				t.Errorf("figure %s%s: %v", name, ext, err)
			}
		}
	}
}

// TestNoiseDetectorChoice: an attenuator whose output is DC-coupled
// rectifies a little but is no detector; the command keeps its noise
// figure unless asked for detector figures.
func TestNoiseDetectorChoice(t *testing.T) {
	data, err := os.ReadFile(filepath.Join(demoDir, "attenuator.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(data), "{type: capacitor,      name: Cout,  between: [line, out],  value: 100pF, tolerance: 5%}",
		"{type: resistor,       name: Rout,  between: [line, out],  value: 1}", 1)
	if text == string(data) {
		t.Fatal("attenuator demo changed; update the test")
	}
	path := writeCircuit(t, text)
	out, errs, code := runNoiseCLI(t, path)
	if code != 0 || strings.Contains(out, "Detector sensitivity") || !strings.Contains(out, "noise figure") {
		t.Errorf("DC-coupled attenuator: exit %d, %s\n%s", code, errs, out)
	}
	out, errs, code = runNoiseCLI(t, path, "--video-bandwidth", "1MHz")
	if code != 0 || !strings.Contains(out, "Detector sensitivity") {
		t.Errorf("DC-coupled attenuator asked for detector figures: exit %d, %s\n%s", code, errs, out)
	}
}
