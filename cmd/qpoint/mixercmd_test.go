package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestMixerDemo: the mixer demo prints its conversion loss, port
// impedances, LO power and noise figures, and --json carries the keys of
// the contract (circuit-file.md, Mixer analysis) with their shapes.
func TestMixerDemo(t *testing.T) {
	file := filepath.Join(demoDir, "mixer.yaml")
	out, errs, code := runCLI(t, "mixer", file)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"conversion loss, RF to IF", "image conversion loss", "noise figure, single sideband", "noise figure, double sideband",
		"Ports under the LO", "absorbed", "isolation, LO to RF", "Diodes under the LO", "shooting agrees"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	out, errs, code = runCLI(t, "mixer", file, "--json", "--no-shooting-check")
	if code != 0 {
		t.Fatalf("--json: exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("--json is not JSON: %v", err)
	}
	obj := func(key string) map[string]any {
		m, ok := doc[key].(map[string]any)
		if !ok {
			t.Fatalf("--json: %q is %T, want an object", key, doc[key])
		}
		return m
	}
	complexOf := func(where string, v any) {
		a, ok := v.([]any)
		if !ok || len(a) != 2 {
			t.Errorf("%s is %v, want [re, im]", where, v)
		}
	}
	lo, rf, iff := obj("lo"), obj("rf"), obj("if")
	for _, k := range []string{"port", "frequency", "level_dbm", "absorbed_power"} {
		if _, ok := lo[k]; !ok {
			t.Errorf("lo lacks %q", k)
		}
	}
	complexOf("lo.input_impedance", lo["input_impedance"])
	complexOf("rf.input_impedance", rf["input_impedance"])
	complexOf("if.output_impedance", iff["output_impedance"])
	if lo["port"] != "lo" || rf["port"] != "rf" || iff["port"] != "if" || lo["frequency"].(float64) != 1.8e9 || iff["frequency"].(float64) != 1e8 {
		t.Errorf("ports and frequencies: lo %v, rf %v, if %v", lo, rf, iff)
	}
	for _, k := range []string{"conversion_loss_db", "image_conversion_loss_db", "noise_figure_ssb_db", "noise_figure_dsb_db"} {
		if v, ok := doc[k].(float64); !ok || !(v > 0 && v < 20) {
			t.Errorf("%s = %v", k, doc[k])
		}
	}
	d := doc["diodes"].([]any)
	if len(d) != 2 {
		t.Fatalf("diodes %v", d)
	}
	for _, k := range []string{"name", "dc_current", "peak_current", "peak_reverse_voltage"} {
		if _, ok := d[0].(map[string]any)[k]; !ok {
			t.Errorf("diodes[0] lacks %q", k)
		}
	}
	m := obj("method")
	if m["steady_state"] != "harmonic balance" || m["harmonics"].(float64) < 1 {
		t.Errorf("method %v", m)
	}
	// Without the shooting check its difference is null, not a number.
	if m["shooting_difference"] != nil {
		t.Errorf("shooting_difference %v without the check; want null", m["shooting_difference"])
	}
}

// TestMixerSweep: --sweep-lo-level gives a row per level, the loss
// falling with the drive, and writes the figure.
func TestMixerSweep(t *testing.T) {
	dir := t.TempDir()
	out, errs, code := runCLI(t, "mixer", filepath.Join(demoDir, "mixer.yaml"), "--sweep-lo-level", "-12dBm:8dBm:4dB", "--json", "--plots", dir)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		LevelSweep []struct {
			LevelDBm float64 `json:"level_dbm"`
			Loss     float64 `json:"conversion_loss_db"`
		} `json:"level_sweep"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.LevelSweep) != 6 {
		t.Fatalf("%d levels, want 6", len(doc.LevelSweep))
	}
	for i := 1; i < len(doc.LevelSweep); i++ {
		if a, b := doc.LevelSweep[i-1], doc.LevelSweep[i]; !(b.Loss < a.Loss) {
			t.Errorf("the loss %.3f dB at %.0f dBm did not fall from %.3f dB at %.0f dBm", b.Loss, b.LevelDBm, a.Loss, a.LevelDBm)
		}
	}
	for _, ext := range []string{".svg", ".png"} {
		if _, err := os.Stat(filepath.Join(dir, "mixer-lo-sweep"+ext)); err != nil {
			t.Errorf("no figure: %v", err)
		}
	}
}

// TestMixerBadRequests: what the command refuses, with the flag or file
// position named and exit 2; a drive into breakdown fails with exit 1.
func TestMixerBadRequests(t *testing.T) {
	file := filepath.Join(demoDir, "mixer.yaml")
	dir := t.TempDir()
	noMixer := filepath.Join(dir, "no_mixer.yaml")
	data, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	src := string(data)
	if err := os.WriteFile(noMixer, []byte(strings.Replace(src, "  mixer:", "  # mixer:", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	collide := filepath.Join(dir, "collide.yaml")
	if err := os.WriteFile(collide, []byte(strings.Replace(src, "rf_frequency: 1.9GHz", "rf_frequency: 2.7GHz", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		args   []string
		code   int
		phrase string
	}{
		{[]string{"mixer", file, "--rf-frequency", "1.8GHz"}, 2, "flag --rf-frequency: the RF (1.8 GHz) equals the LO: the IF would be 0 Hz"},
		{[]string{"mixer", file, "--rf", "lo"}, 2, "flag --rf: the RF and the LO are both on port lo"},
		{[]string{"mixer", file, "--rf-frequency", "3.6GHz"}, 2, "falls on the LO's harmonic 1"},
		{[]string{"mixer", file, "--if", "nowhere"}, 2, "flag --if: `nowhere` is not a port; accepted: rf, lo, if"},
		{[]string{"mixer", file, "--lo-level", "1MV"}, 2, "flag --lo-level"},
		{[]string{"mixer", file, "--sidebands", "-3"}, 2, "flag --sidebands"},
		{[]string{"mixer", file, "--sweep-lo-level", "0dBm:-5dBm:1dB"}, 2, "flag --sweep-lo-level"},
		{[]string{"mixer", noMixer}, 2, "flag --lo: no LO port"},
		{[]string{"mixer", collide}, 2, "collide.yaml:"},
		{[]string{"mixer", filepath.Join(demoDir, "detector.yaml")}, 2, "a mixer needs three"},
		{[]string{"mixer", file, "--lo-level", "19dBm", "--no-shooting-check"}, 1, "past its breakdown knee"},
	} {
		_, errs, code := runCLI(t, c.args...)
		if code != c.code || !strings.Contains(errs, c.phrase) {
			t.Errorf("%s: exit %d, %q; want exit %d saying %q", strings.Join(c.args[2:], " "), code, errs, c.code, c.phrase)
		}
	}
}
