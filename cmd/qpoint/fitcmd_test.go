package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"qpoint/bias/circuit"
	"qpoint/bias/diode"
)

const fitDir = "../../testdata/fit"

var (
	demoIV = filepath.Join(fitDir, "detector_iv.csv")
	demoCV = filepath.Join(fitDir, "detector_cv.csv")
)

// modelBlock returns the diode_models block at the end of fit's output.
func modelBlock(t *testing.T, out string) string {
	t.Helper()
	i := strings.Index(out, "diode_models:\n")
	if i < 0 {
		t.Fatalf("no diode_models block in\n%s", out)
	}
	return out[i:]
}

// TestFitDemo: the demo measurements give a block that a circuit file
// takes, whose values are the fit's to the digits printed, and that the
// bias command then solves; the circuit in testdata/fit holds the block
// as fit prints it today.
func TestFitDemo(t *testing.T) {
	out, errs, code := runCLI(t, "fit", "--iv", demoIV, "--cv", demoCV, "--name", "detector_fitted")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"Fitted values", "standard error", "Correlations", "saturation current with ideality", "Residuals", "breakdown"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q", want)
		}
	}
	block := modelBlock(t, out)
	text := "name: pasted\n" + block + "parts:\n  - {type: voltage_source, name: V1, plus: a, minus: gnd, value: 0.3}\n" +
		"  - {type: diode, name: D1, anode: a, cathode: gnd, model: detector_fitted}\n"
	c, err := circuit.Parse("pasted.yaml", []byte(text))
	if err != nil {
		t.Fatalf("the printed block does not load: %v\n%s", err, block)
	}
	pasted := c.Models["detector_fitted"].Params

	jout, errs, code := runCLI(t, "fit", "--iv", demoIV, "--cv", demoCV, "--json")
	if code != 0 {
		t.Fatalf("--json: exit %d: %s", code, errs)
	}
	var doc struct {
		Model map[string]struct {
			Value, Error *float64
			Status       string
		}
	}
	if err := json.Unmarshal([]byte(jout), &doc); err != nil {
		t.Fatal(err)
	}
	for key, v := range doc.Model {
		got := *circuit.ModelParam(&pasted, key)
		if v.Status == "default" {
			continue
		}
		// The block prints each value to a twentieth of its standard
		// error (digitsFor); values without an error to six digits.
		tol := 5e-6 * math.Abs(*v.Value)
		if v.Error != nil {
			tol = *v.Error / 20
		}
		if math.Abs(got-*v.Value) > tol {
			t.Errorf("%s: the pasted block gives %.9g, the fit %.9g (± %v)", key, got, *v.Value, tol)
		}
	}

	fitted, err := circuit.Load(filepath.Join(fitDir, "detector_fitted.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	kept := fitted.Models["detector_fitted"].Params
	kept.Ratings = diode.Ratings{}
	if kept != pasted {
		t.Errorf("testdata/fit/detector_fitted.yaml holds\n%+v\nbut fit prints\n%+v\n(paste the block again)", kept, pasted)
	}
	bout, errs, code := runCLI(t, "bias", filepath.Join(fitDir, "detector_fitted.yaml"))
	if code != 0 || !strings.Contains(bout, "detector_fitted") {
		t.Errorf("bias on the pasted model: exit %d\n%s%s", code, bout, errs)
	}
}

// TestFitJSONContract: the keys the contract fixes for `fit --json`, each
// model value with its error and unit, finite numbers or null.
func TestFitJSONContract(t *testing.T) {
	out, errs, code := runCLI(t, "fit", "--iv", demoIV, "--cv", demoCV, "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("not one JSON document: %v", err)
	}
	for _, k := range []string{"model", "residual_rms", "points", "cautions", "correlations"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("missing key %q", k)
		}
	}
	model := doc["model"].(map[string]any)
	units := map[string]string{"saturation_current": "A", "ideality": "", "series_resistance": "ohm",
		"zero_bias_capacitance": "F", "built_in_potential": "V", "grading_coefficient": "",
		"breakdown_voltage": "V", "gap_energy": "eV", "saturation_temperature_exponent": "", "measured_at": "K"}
	for k, u := range units {
		v, ok := model[k].(map[string]any)
		if !ok {
			t.Errorf("model lacks %q", k)
			continue
		}
		if v["unit"] != u {
			t.Errorf("%s: unit %v, want %q (SI base units)", k, v["unit"], u)
		}
		if _, ok := v["value"].(float64); !ok {
			t.Errorf("%s: value %v", k, v["value"])
		}
		if e, ok := v["error"].(float64); v["status"] == "fitted" && (!ok || !(e > 0)) {
			t.Errorf("%s: fitted without a positive error (%v)", k, v["error"])
		}
	}
	if rms := doc["residual_rms"].(float64); !(rms > 0.002 && rms < 0.05) {
		t.Errorf("residual_rms %g; the demo's noise is 0.5 %% of each reading plus a floor", rms)
	}
	if n := doc["points"].(float64); n != 226+9+42 {
		t.Errorf("points %g, want the 226 forward, 9 breakdown and 42 C–V points fitted", n)
	}
}

// TestFitPlots: --plots writes the three figures, SVG and PNG.
func TestFitPlots(t *testing.T) {
	dir := t.TempDir()
	_, errs, code := runCLI(t, "fit", "--iv", demoIV, "--cv", demoCV, "--plots", dir)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, name := range []string{"fit-forward", "fit-reverse", "fit-capacitance"} {
		for _, ext := range []string{".svg", ".png"} {
			if st, err := os.Stat(filepath.Join(dir, name+ext)); err != nil || st.Size() < 1000 {
				t.Errorf("%s%s: %v", name, ext, err)
			}
		}
	}
}

var placed = regexp.MustCompile(`^qpoint: [^:]+\.csv:\d+:\d+: .+; accepted: .+`)

// TestFitBadData: each bad file in testdata/fit/bad earns a
// FILE:LINE:COL error saying what is accepted, exit status 2, or (a file
// without units) a caution naming the file and line.
func TestFitBadData(t *testing.T) {
	cases := []struct {
		flag, file string
		line, col  int
	}{
		{"--iv", "too_few.csv", 4, 1},
		{"--iv", "negative_forward.csv", 4, 7},
		{"--iv", "unsorted.csv", 4, 1},
		{"--iv", "duplicate.csv", 4, 1},
		{"--cv", "capacitance_no_unit.csv", 2, 5},
		{"--iv", "temperature_no_unit.csv", 1, 28},
		{"--iv", "unknown_column.csv", 1, 1},
		{"--iv", "wrong_unit.csv", 1, 14},
	}
	files, _ := filepath.Glob(filepath.Join(fitDir, "bad", "*.csv"))
	if len(files) != len(cases)+1 {
		t.Errorf("%d files in testdata/fit/bad, %d cases here and no_units.csv", len(files), len(cases))
	}
	for _, c := range cases {
		path := filepath.Join(fitDir, "bad", c.file)
		args := []string{"fit", c.flag, path}
		if c.flag == "--cv" {
			args = append(args, "--iv", demoIV)
		}
		_, errs, code := runCLI(t, args...)
		first := strings.SplitN(errs, "\n", 2)[0]
		if code != 2 || !placed.MatchString(first) || !strings.HasPrefix(first, fmt.Sprintf("qpoint: %s:%d:%d: ", path, c.line, c.col)) {
			t.Errorf("%s: exit %d, %q; want exit 2 at %d:%d", c.file, code, first, c.line, c.col)
		}
	}
	path := filepath.Join(fitDir, "bad", "no_units.csv")
	out, errs, code := runCLI(t, "fit", "--iv", path)
	if code != 0 || !strings.Contains(out, path+":2: column current gives no unit; its values are read in A") {
		t.Errorf("no_units.csv: exit %d, want 0 and a caution at line 2\n%s%s", code, out, errs)
	}
}

// TestFitFileTemperatures: FILE@TEMPERATURE sets the temperature of a file
// without a temperature column, and three of them determine the gap energy
// and the exponent.
func TestFitFileTemperatures(t *testing.T) {
	dir := t.TempDir()
	p := diode.Defaults()
	p.SaturationCurrent, p.Ideality, p.SeriesResistance, p.GapEnergy, p.SaturationExponent = 3e-6, 1.05, 20, 0.69, 2
	var args []string
	for _, tc := range []float64{-40, 27, 85} {
		d := diode.New(p, diode.ZeroCelsius+tc)
		var b strings.Builder
		b.WriteString("voltage [mV], current [uA]\n")
		for e := -8.0; e <= -1.5; e += 0.25 {
			i := math.Pow(10, e)
			fmt.Fprintf(&b, "%.9g, %.9g\n", 1e3*(d.NVT()*math.Log1p(i/d.SaturationCurrent)+i*20), 1e6*i)
		}
		name := filepath.Join(dir, fmt.Sprintf("at%g.csv", tc))
		if err := os.WriteFile(name, []byte(b.String()), 0o644); err != nil {
			t.Fatal(err)
		}
		args = append(args, "--iv", fmt.Sprintf("%s@%gC", name, tc))
	}
	out, errs, code := runCLI(t, append([]string{"fit", "--json"}, args...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Model map[string]struct {
			Value  float64
			Status string
		}
		Temperatures []float64
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Temperatures) != 3 {
		t.Errorf("temperatures %v, want three", doc.Temperatures)
	}
	for key, want := range map[string]float64{"gap_energy": 0.69, "saturation_temperature_exponent": 2, "saturation_current": 3e-6} {
		if v := doc.Model[key]; v.Status != "fitted" || math.Abs(v.Value-want) > 1e-4*want {
			t.Errorf("%s = %g (%s), drawn from %g", key, v.Value, v.Status, want)
		}
	}
	// A temperature after @ for a file that has its own column is refused.
	_, errs, code = runCLI(t, "fit", "--iv", demoIV+"@85C")
	if code != 2 || !strings.Contains(errs, "has a temperature column") {
		t.Errorf("@ on a file with a temperature column: exit %d, %s", code, errs)
	}
}

func TestFitUsageErrors(t *testing.T) {
	cases := [][]string{
		{"fit"},
		{"fit", demoIV},
		{"fit", "--iv", demoCV},
		{"fit", "--iv", demoIV, "--cv", demoIV},
		{"fit", "--iv", "/no/such/file.csv"},
		{"fit", "--iv", demoIV, "--temperature", "hot"},
		{"fit", "--iv", demoIV, "--measured-at", "300"},
		{"fit", "--iv", demoIV, "--name", "two words"},
		{"fit", "--iv", "nofile.csv@warm"},
	}
	for _, args := range cases {
		_, errs, code := runCLI(t, args...)
		if code != 2 || strings.Contains(errs, "panic") {
			t.Errorf("qpoint %s: exit %d, want 2\n%s", strings.Join(args, " "), code, errs)
		}
	}
}
