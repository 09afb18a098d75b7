package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"qpoint/ac/touchstone"
)

// TestResponseJSONContract checks the response document's shape: ports,
// points with s[i][j] as [re, im], input impedances and probes.
func TestResponseJSONContract(t *testing.T) {
	out, errs, code := runCLI(t, "response", "--json", "--from", "1MHz", "--to", "1GHz", "--per-decade", "2", filepath.Join(demoDir, "detector.yaml"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Ports []struct {
			Name      string
			Impedance float64
		}
		Points []struct {
			Frequency      float64
			S              [][][2]float64
			InputImpedance [][2]float64 `json:"input_impedance"`
			Probes         map[string][2]float64
		}
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("not the response document: %v", err)
	}
	if len(doc.Ports) != 2 || doc.Ports[0].Name != "rf" || doc.Ports[0].Impedance != 50 || doc.Ports[1].Impedance != 100e3 {
		t.Errorf("ports = %+v", doc.Ports)
	}
	if len(doc.Points) != 7 || doc.Points[0].Frequency != 1e6 || doc.Points[6].Frequency != 1e9 {
		t.Fatalf("%d points, want 7 from 1 MHz to 1 GHz", len(doc.Points))
	}
	p := doc.Points[3]
	if len(p.S) != 2 || len(p.S[0]) != 2 || len(p.InputImpedance) != 2 {
		t.Errorf("S is %dx?, %d input impedances", len(p.S), len(p.InputImpedance))
	}
	if _, ok := p.Probes["anode"]; !ok {
		t.Errorf("probe anode missing: %v", p.Probes)
	}
	// Input impedance and S11 describe the same load: Z = Z0 (1+S)/(1-S).
	s := complex(p.S[0][0][0], p.S[0][0][1])
	z := 50 * (1 + s) / (1 - s)
	if math.Abs(real(z)-p.InputImpedance[0][0]) > 1e-9*math.Abs(real(z)) {
		t.Errorf("input impedance %v inconsistent with S11 %v", p.InputImpedance[0], s)
	}
}

// TestResponseFiles: CSV and Touchstone files are written and read back.
func TestResponseFiles(t *testing.T) {
	dir := t.TempDir()
	csvPath, tsPath := filepath.Join(dir, "a.csv"), filepath.Join(dir, "a.s2p")
	_, errs, code := runCLI(t, "response", filepath.Join(demoDir, "attenuator.yaml"), "--csv", csvPath, "--touchstone", tsPath, "--per-decade", "10")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	data, err := os.ReadFile(csvPath)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(data)), "\n")
	if !strings.HasPrefix(lines[0], "frequency_Hz,S11_re,S11_im") || len(lines) < 10 {
		t.Errorf("CSV header %q, %d lines", lines[0], len(lines))
	}
	f, err := os.Open(tsPath)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	_, pts, err := touchstone.Read(f, 2)
	if err != nil || len(pts) != len(lines)-1 {
		t.Errorf("Touchstone read back: %d points, err %v", len(pts), err)
	}
	// A wrong extension is refused before anything is written.
	_, _, code = runCLI(t, "response", filepath.Join(demoDir, "attenuator.yaml"), "--touchstone", filepath.Join(dir, "b.s3p"))
	if code != 2 {
		t.Errorf("--touchstone b.s3p for a 2-port: exit %d, want 2", code)
	}
	if _, err := os.Stat(filepath.Join(dir, "b.s3p")); err == nil {
		t.Error("b.s3p was written")
	}
}

// TestDistortionJSONContract checks the contract's keys for distortion.
func TestDistortionJSONContract(t *testing.T) {
	out, errs, code := runCLI(t, "distortion", "--json", "--no-limit", filepath.Join(demoDir, "detector.yaml"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if doc["input"] != "rf" || doc["output"] != "video" || doc["frequency"].(float64) != 2.45e9 || doc["level_dbm"].(float64) != -30 {
		t.Errorf("header keys: %v %v %v %v", doc["input"], doc["output"], doc["frequency"], doc["level_dbm"])
	}
	est := doc["estimate"].(map[string]any)
	for _, k := range []string{"fundamental", "hd2_dbc", "hd3_dbc", "dc_shift"} {
		if _, ok := est[k]; !ok {
			t.Errorf("estimate lacks %q", k)
		}
	}
	wave := doc["waveform"].(map[string]any)
	h := wave["harmonics"].([]any)
	if h[0].(map[string]any)["order"].(float64) != 0 || h[1].(map[string]any)["phase"] == nil {
		t.Errorf("harmonics: %v", h[:2])
	}
	if _, ok := wave["thd_percent"]; !ok {
		t.Error("waveform lacks thd_percent")
	}
	// The waveform's order 0 is the DC shift, close to the estimate's.
	dc := h[0].(map[string]any)["amplitude"].(float64)
	if e := est["dc_shift"].(float64); math.Abs(dc/e-1) > 0.05 {
		t.Errorf("waveform DC shift %g V against estimate %g V", dc, e)
	}
}

func TestDistortionTwoTone(t *testing.T) {
	out, errs, code := runCLI(t, "distortion", "--json", "--no-limit", "--second-tone", "2.46GHz", filepath.Join(demoDir, "detector.yaml"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Estimate map[string]any
	}
	json.Unmarshal([]byte(out), &doc)
	for _, k := range []string{"im2_dbc", "im3_dbc", "iip3_dbm", "oip3_dbm"} {
		if doc.Estimate[k] == nil {
			t.Errorf("two-tone estimate lacks %q", k)
		}
	}
}

func TestDistortionLevelSweep(t *testing.T) {
	out, errs, code := runCLI(t, "distortion", "--no-limit", "--sweep-level", "-20dBm:10dBm:5dB", filepath.Join(demoDir, "limiter.yaml"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "1 dB compression at") {
		t.Errorf("a limiter driven to +10 dBm must compress:\n%s", out)
	}
}
