package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestPulseLimiterDemo: the limiter demo's own pulse prints the spike, the
// flat leakage and the recovery, and --json carries the contract's keys.
func TestPulseLimiterDemo(t *testing.T) {
	lim := filepath.Join(demoDir, "limiter.yaml")
	dir := t.TempDir()
	csvPath := filepath.Join(dir, "wave.csv")
	out, errs, code := runCLI(t, "pulse", lim, "--width", "20ns", "--plots", dir, "--csv", csvPath)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"spike leakage, peak", "flat leakage", "recovery to within 1 dB", "recovery to within 3 dB", "read as a limiter", "Diodes under the pulse", "TR-BDF2"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	for _, name := range []string{"pulse-output", "pulse-edges", "pulse-junctions", "pulse-recovery"} {
		if _, err := os.Stat(filepath.Join(dir, name+".png")); err != nil {
			t.Errorf("no figure %s: %v", name, err)
		}
	}
	data, err := os.ReadFile(csvPath)
	if err != nil || !strings.HasPrefix(string(data), "time_s,emf_V,output_lna_V,Dup_current_A,Dup_junction_V") {
		t.Errorf("CSV missing or with the wrong header: %v\n%.200s", err, data)
	}

	out, errs, code = runCLI(t, "pulse", lim, "--width", "20ns", "--json")
	if code != 0 {
		t.Fatalf("--json: exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("--json is not JSON: %v", err)
	}
	// The keys of the contract (circuit-file.md, Pulses).
	for _, key := range []string{"carrier", "level_dbm", "width", "steps", "spike_leakage_dbm", "spike_energy", "flat_leakage_dbm",
		"recovery_time_1db", "recovery_time_3db", "rise_time", "fall_time", "diodes", "envelope"} {
		if _, ok := doc[key]; !ok {
			t.Errorf("--json lacks %q", key)
		}
	}
	steps := doc["steps"].(map[string]any)
	if steps["accepted"].(float64) < 100 {
		t.Errorf("steps %v", steps)
	}
	// A limiter has no rise or fall time of a video output: null.
	if doc["rise_time"] != nil || doc["fall_time"] != nil {
		t.Errorf("a limiter's rise_time and fall_time must be null, got %v and %v", doc["rise_time"], doc["fall_time"])
	}
	if d := doc["diodes"].([]any); len(d) != 2 || d[0].(map[string]any)["peak_current"].(float64) <= 0 {
		t.Errorf("diodes %v", d)
	}
}

// TestPulseDetector: a detector's pulse reads rise and fall, and its
// recovery figures are null.
func TestPulseDetector(t *testing.T) {
	out, errs, code := runCLI(t, "pulse", filepath.Join(demoDir, "detector.yaml"), "--level", "-10dBm", "--width", "300ns", "--after", "2us", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if doc["kind"] != "detector" || doc["recovery_time_1db"] != nil || doc["flat_leakage_dbm"] != nil {
		t.Errorf("kind %v, recovery %v, flat %v; want a detector with null limiter figures", doc["kind"], doc["recovery_time_1db"], doc["flat_leakage_dbm"])
	}
	if v, ok := doc["settled_output"].(float64); !ok || v <= 0 {
		t.Errorf("settled_output %v; want the video's positive change", doc["settled_output"])
	}
	if _, ok := doc["steady_dc_shift"].(float64); !ok {
		t.Errorf("steady_dc_shift %v", doc["steady_dc_shift"])
	}
}

// TestPulseBadRequests: requests that cannot be run are refused with a
// message naming the flag or key, exit 2; a run that stops early says how
// far it got, exit 1.
func TestPulseBadRequests(t *testing.T) {
	lim := filepath.Join(demoDir, "limiter.yaml")
	for _, tc := range []struct {
		name   string
		args   []string
		code   int
		phrase string
	}{
		{"shorter than a carrier period", []string{"--width", "100ps"}, 2, "flag --width: 100 ps is shorter than one period"},
		{"rise longer than the width", []string{"--width", "10ns", "--rise", "20ns"}, 2, "flag --rise: 20 ns is longer than the width"},
		{"period shorter than the width", []string{"--width", "50ns", "--period", "30ns"}, 2, "flag --period: 30 ns is shorter than the width"},
		{"too many steps", []string{"--width", "100us", "--max-steps", "100000"}, 2, "flag --max-steps: the run needs at least"},
		{"no level", []string{"--level", "loud"}, 2, "flag --level"},
		{"pulses without period", []string{"--pulses", "3"}, 2, "need a period"},
		{"tolerance", []string{"--tolerance", "0.5"}, 2, "flag --tolerance"},
		{"stops early", []string{"--width", "20ns", "--max-steps", "5000"}, 1, "stopped at t = "},
	} {
		out, errs, code := runCLI(t, append([]string{"pulse", lim}, tc.args...)...)
		if code != tc.code || !strings.Contains(errs, tc.phrase) {
			t.Errorf("%s: exit %d, stderr %q; want exit %d and %q", tc.name, code, errs, tc.code, tc.phrase)
		}
		if tc.code == 1 && !strings.Contains(out, "flat leakage") {
			t.Errorf("%s: a run that stops early still shows what it reached:\n%s", tc.name, out)
		}
	}
}

// TestPulseSweep: --sweep-level gives a row per level.
func TestPulseSweep(t *testing.T) {
	out, errs, code := runCLI(t, "pulse", filepath.Join(demoDir, "limiter.yaml"), "--width", "10ns", "--sweep-level", "10dBm:30dBm:10dB")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"10.0 dBm", "20.0 dBm", "30.0 dBm", "flat leakage"} {
		if !strings.Contains(out, want) {
			t.Errorf("sweep output lacks %q:\n%s", want, out)
		}
	}
}
