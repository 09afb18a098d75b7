package main

import (
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

// TestDistortionMethodsAgree: on every demo, `distortion` gives the same
// waveform harmonics with harmonic balance as with shooting (0.001 dB on
// every harmonic within 120 dB of the largest), and the JSON says which
// method ran. A demo with lines, which shooting cannot carry, is refused
// by --method shooting with a message naming harmonic balance.
func TestDistortionMethodsAgree(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join(demoDir, "*.yaml"))
	for _, f := range files {
		if filepath.Base(f) == "matched_detector.yaml" {
			_, errs, code := runCLI(t, "distortion", f, "--no-limit", "--method", "shooting")
			if code != 2 || !strings.Contains(errs, "harmonic balance takes them") {
				t.Errorf("%s --method shooting: exit %d, %q; want 2 and a refusal naming harmonic balance", f, code, errs)
			}
			continue
		}
		get := func(method string) (string, []float64) {
			out, errs, code := runCLI(t, "distortion", f, "--json", "--no-limit", "--second-tone", "none", "--method", method, "--harmonics", "7")
			if code != 0 {
				t.Fatalf("%s --method %s: exit %d: %s", f, method, code, errs)
			}
			var doc struct {
				Waveform struct {
					Method    string
					Harmonics []struct{ Amplitude float64 }
				}
			}
			if err := json.Unmarshal([]byte(out), &doc); err != nil {
				t.Fatal(err)
			}
			var a []float64
			for _, h := range doc.Waveform.Harmonics {
				a = append(a, h.Amplitude)
			}
			return doc.Waveform.Method, a
		}
		m1, hb := get("hb")
		m2, sh := get("shooting")
		if m1 != "harmonic balance" || m2 != "shooting" {
			t.Errorf("%s: waveform.method %q and %q", f, m1, m2)
		}
		largest := 0.0
		for _, v := range sh {
			largest = math.Max(largest, math.Abs(v))
		}
		for k := range sh {
			if math.Abs(sh[k]) < 1e-6*largest {
				continue
			}
			if db := 20 * math.Log10(math.Abs(hb[k]/sh[k])); math.Abs(db) > 0.001 {
				t.Errorf("%s harmonic %d: harmonic balance %g V, shooting %g V (%.4f dB)", f, k, hb[k], sh[k], db)
			}
		}
	}
}

// TestDistortionTwoToneWaveform: with a second tone the waveform carries
// IM2, IM3 and every product (contract, second round), solved by harmonic
// balance, and IM3 agrees with the estimate at this small level.
func TestDistortionTwoToneWaveform(t *testing.T) {
	out, errs, code := runCLI(t, "distortion", "--json", "--no-limit", "--level", "-50dBm", "--second-tone", "2.46GHz", filepath.Join(demoDir, "detector.yaml"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Estimate map[string]any
		Waveform map[string]any
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	w := doc.Waveform
	if w["method"] != "harmonic balance" {
		t.Errorf("waveform.method = %v", w["method"])
	}
	for _, k := range []string{"im2_dbc", "im3_dbc", "products"} {
		if w[k] == nil {
			t.Fatalf("waveform lacks %q", k)
		}
	}
	p := w["products"].([]any)[0].(map[string]any)
	for _, k := range []string{"orders", "frequency", "amplitude", "phase"} {
		if p[k] == nil {
			t.Errorf("a product lacks %q: %v", k, p)
		}
	}
	if d := w["im3_dbc"].(float64) - doc.Estimate["im3_dbc"].(float64); math.Abs(d) > 0.05 {
		t.Errorf("waveform IM3 %v dBc against estimate %v dBc", w["im3_dbc"], doc.Estimate["im3_dbc"])
	}
}

// TestDistortionTwoToneSweep: a two-tone level sweep gives the intercept
// read from the waveform beside the estimate's, in the table and JSON.
func TestDistortionTwoToneSweep(t *testing.T) {
	args := []string{"distortion", "--no-limit", "--second-tone", "2.46GHz", "--sweep-level", "-70dBm:-40dBm:5dB", filepath.Join(demoDir, "detector.yaml")}
	out, errs, code := runCLI(t, args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"Two-tone waveform", "Two-tone level sweep", "measured intercept: IIP3", "estimate:           IIP3"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	out, errs, code = runCLI(t, append(args, "--json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		TwoToneSweep      []any          `json:"two_tone_sweep"`
		MeasuredIntercept map[string]any `json:"measured_intercept"`
		Estimate          map[string]any
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.TwoToneSweep) != 7 || doc.MeasuredIntercept == nil {
		t.Fatalf("two_tone_sweep %d levels, measured_intercept %v", len(doc.TwoToneSweep), doc.MeasuredIntercept)
	}
	if d := doc.MeasuredIntercept["iip3_dbm"].(float64) - doc.Estimate["iip3_dbm"].(float64); math.Abs(d) > 0.1 {
		t.Errorf("measured IIP3 %v dBm, estimate %v dBm", doc.MeasuredIntercept["iip3_dbm"], doc.Estimate["iip3_dbm"])
	}
}

// TestDistortionMethodBadFlags: bad method requests exit 2 naming the flag
// and what is accepted.
func TestDistortionMethodBadFlags(t *testing.T) {
	det := filepath.Join(demoDir, "detector.yaml")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--method", "fast"}, "accepted: auto, hb, shooting"},
		{[]string{"--method", "shooting", "--second-tone", "2.46GHz"}, "shooting solves one tone"},
		{[]string{"--second-tone", "4.9GHz"}, "same frequency"},
		{[]string{"--second-tone", "2.46GHz", "--truncation-order", "2"}, "at least 3"},
		{[]string{"--second-tone", "2.46GHz", "--truncation", "circle"}, "accepted: diamond, box"},
		{[]string{"--truncation-order", "99"}, "--truncation-order"},
	} {
		_, errs, code := runCLI(t, append([]string{"distortion", det, "--no-limit"}, c.args...)...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("distortion %s: exit %d, %q; want exit 2 and %q", strings.Join(c.args, " "), code, errs, c.want)
		}
	}
}
