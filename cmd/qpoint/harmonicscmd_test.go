package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

const waveformDir = "../../testdata/waveforms"

// runHarmonicsCLI runs `qpoint harmonics args...` through run when main.go
// registers the command, and otherwise through a root built the same way
// with the command added here, mapping errors to exit codes as run does.
func runHarmonicsCLI(t *testing.T, args ...string) (stdout, stderr string, code int) {
	t.Helper()
	var out, errb bytes.Buffer
	args = append([]string{"harmonics"}, args...)
	root := newRoot(&out, &errb)
	for _, c := range root.Commands() {
		if c.Name() == "harmonics" {
			code = run(args, &out, &errb)
			return out.String(), errb.String(), code
		}
	}
	root.AddCommand(newHarmonicsCmd())
	root.SetArgs(args)
	if err := root.Execute(); err != nil {
		errb.WriteString("qpoint: " + err.Error() + "\n")
		var e *exitError
		code = exitInput
		if errors.As(err, &e) {
			code = e.code
		}
	}
	return out.String(), errb.String(), code
}

// clippedTHD is the THD over orders 2..k of a sine clipped at ±sin α, from
// its Fourier series b_1 = (2α + sin 2α)/π and, for odd k ≥ 3,
// b_k = (4/π)[(sin((k-1)α)/(k-1) - sin((k+1)α)/(k+1))/2 + sin α cos kα / k]
// (elementary integrals; the same series as ac/measure's tests).
func clippedTHD(alpha float64, k int) float64 {
	b1 := (2*alpha + math.Sin(2*alpha)) / math.Pi
	var s float64
	for j := 3; j <= k; j += 2 {
		fj := float64(j)
		b := 4 / math.Pi * ((math.Sin((fj-1)*alpha)/(fj-1)-math.Sin((fj+1)*alpha)/(fj+1))/2 + math.Sin(alpha)*math.Cos(fj*alpha)/fj)
		s += b * b
	}
	return 100 * math.Sqrt(s) / b1
}

func TestHarmonicsTable(t *testing.T) {
	out, errs, code := runHarmonicsCLI(t, filepath.Join(waveformDir, "clipped_sine.csv"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	t.Logf("\n%s", out)
	for _, want := range []string{"clipped_sine.csv", "samples      5000 at 1 MHz", "9.87 kHz", "49.35 periods captured",
		"window       blackman-harris", "Harmonics", "order", "dBc", "phase °", "total harmonic distortion", "SINAD", "noise and distortion"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q", want)
		}
	}
}

// TestHarmonicsJSON checks the keys and units of --json and the figures
// for the example clipped sine against its Fourier series.
func TestHarmonicsJSON(t *testing.T) {
	out, errs, code := runHarmonicsCLI(t, "--json", "--harmonics", "60", filepath.Join(waveformDir, "clipped_sine.csv"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		File        string   `json:"file"`
		SampleRate  float64  `json:"sample_rate"`
		Fundamental float64  `json:"fundamental"`
		THDPercent  float64  `json:"thd_percent"`
		THDdB       float64  `json:"thd_db"`
		SINADdB     *float64 `json:"sinad_db"`
		Harmonics   []struct {
			Order     int      `json:"order"`
			Frequency float64  `json:"frequency"`
			Amplitude *float64 `json:"amplitude"`
			Phase     *float64 `json:"phase"`
		} `json:"harmonics"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("not one JSON document: %v\n%s", err, out)
	}
	if doc.SampleRate != 1e6 || math.Abs(doc.Fundamental/9870-1) > 1e-6 || len(doc.Harmonics) != 61 || doc.SINADdB == nil {
		t.Errorf("sample_rate %g, fundamental %g, %d harmonics, sinad %v; want 1e6 Hz, 9870 Hz, 61, a number",
			doc.SampleRate, doc.Fundamental, len(doc.Harmonics), doc.SINADdB)
	}
	if h := doc.Harmonics[0]; h.Order != 0 || h.Frequency != 0 || h.Phase != nil || h.Amplitude == nil {
		t.Errorf("order 0: %+v; want DC with a phase of null", h)
	}
	// 50 x 9.87 kHz = 493.5 kHz is below fs/2; 51 x 9.87 kHz is above.
	for _, h := range doc.Harmonics[1:] {
		if absent := h.Amplitude == nil; absent != (h.Order > 50) || (h.Phase == nil) != absent {
			t.Errorf("order %d at %g Hz: amplitude %v, phase %v", h.Order, h.Frequency, h.Amplitude, h.Phase)
		}
	}
	want := clippedTHD(math.Asin(0.8), 50) // Fourier series of the clipped sine the file holds
	if math.Abs(doc.THDPercent/want-1) > 1e-3 {
		t.Errorf("thd_percent %.5f, want %.5f within 0.1 %% (Fourier series of a sine clipped at 0.8)", doc.THDPercent, want)
	}
	if math.Abs(doc.THDdB-20*math.Log10(doc.THDPercent/100)) > 1e-9 {
		t.Errorf("thd_db %g does not match thd_percent %g", doc.THDdB, doc.THDPercent)
	}
	t.Logf("THD %.5f %% (Fourier series %.5f %%), SINAD %.3f dB", doc.THDPercent, want, *doc.SINADdB)
}

func TestHarmonicsOneColumn(t *testing.T) {
	file := filepath.Join(waveformDir, "one_column.csv")
	out, errs, code := runHarmonicsCLI(t, "--json", "--sample-rate", "2MHz", "--fundamental", "50kHz", "--harmonics", "3", file)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Harmonics []struct {
			Amplitude float64 `json:"amplitude"`
			DBc       float64 `json:"dbc"`
		} `json:"harmonics"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	// The file's own comment: 0.2 V DC, 50 mV at 50 kHz, 2nd harmonic 30 dB down.
	if h := doc.Harmonics; math.Abs(h[0].Amplitude-0.2) > 1e-6 || math.Abs(h[1].Amplitude-0.05) > 1e-6 || math.Abs(h[2].DBc+30) > 0.01 {
		t.Errorf("DC %g V, fundamental %g V, 2nd %g dBc; want 0.2 V, 0.05 V, -30 dBc", h[0].Amplitude, h[1].Amplitude, h[2].DBc)
	}
}

var waveformPlace = regexp.MustCompile(`^qpoint: [^:]+\.csv:\d+:\d+: .+; .+`)

// TestHarmonicsBadInput: bad files give FILE:LINE:COL errors saying what
// is accepted, and bad flags are usage errors; all exit 2.
func TestHarmonicsBadInput(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join(waveformDir, "bad", "*.csv"))
	if len(files) < 5 {
		t.Fatalf("found %d bad waveform files, want at least 5", len(files))
	}
	files = append(files, filepath.Join(waveformDir, "one_column.csv")) // no --sample-rate
	for _, f := range files {
		_, errs, code := runHarmonicsCLI(t, f)
		if code != 2 {
			t.Errorf("%s: exit %d, want 2\n%s", f, code, errs)
			continue
		}
		if !waveformPlace.MatchString(errs) {
			t.Errorf("%s: %q is not `FILE:LINE:COL: what is wrong; what is accepted`", f, errs)
		}
	}
	clipped := filepath.Join(waveformDir, "clipped_sine.csv")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{clipped, "--window", "hamming"}, "flag --window"},
		{[]string{clipped, "--harmonics", "0"}, "flag --harmonics: 0; accepted: 1 to 1000"},
		{[]string{clipped, "--fundamental", "600kHz"}, "Nyquist"},
		{[]string{clipped, "--fundamental", "fast"}, "flag --fundamental"},
		{[]string{clipped, "--sample-rate", "1MHz"}, ""}, // agrees with the time column: no error
		{[]string{clipped, "--sample-rate", "2MHz"}, "was given"},
		{[]string{"--sample-rate", "0Hz", clipped}, "flag --sample-rate"},
		{[]string{filepath.Join(waveformDir, "no_such_file.csv")}, "cannot read"},
		{[]string{}, "exactly one waveform file"},
	} {
		_, errs, code := runHarmonicsCLI(t, c.args...)
		if c.want == "" {
			if code != 0 {
				t.Errorf("%v: exit %d: %s", c.args, code, errs)
			}
			continue
		}
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q; want exit 2 and %q", c.args, code, errs, c.want)
		}
	}
}

// TestHarmonicsDecimalComma reads semicolons with decimal commas and checks
// that phases refer to the first sample (t = 1 ms in this file): the file's
// sin(2π 62.5 kHz (t - 1 ms) + 0.3) is cos(... + 0.3 - π/2), -72.81°.
func TestHarmonicsDecimalComma(t *testing.T) {
	out, errs, code := runHarmonicsCLI(t, "--json", filepath.Join(waveformDir, "semicolon_comma.csv"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		StartTime   float64 `json:"start_time"`
		Fundamental float64 `json:"fundamental"`
		Harmonics   []struct {
			Amplitude float64 `json:"amplitude"`
			Phase     float64 `json:"phase"`
		} `json:"harmonics"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	wantPhase := (0.3 - math.Pi/2) * 180 / math.Pi
	h := doc.Harmonics[1]
	if math.Abs(doc.Fundamental/62.5e3-1) > 1e-6 || math.Abs(h.Amplitude-1) > 1e-5 || math.Abs(h.Phase-wantPhase) > 0.01 || doc.StartTime != 1e-3 {
		t.Errorf("f0 %g Hz, %g V at %g° from t0 = %g s; want 62.5 kHz, 1 V at %.2f° from 1 ms", doc.Fundamental, h.Amplitude, h.Phase, doc.StartTime, wantPhase)
	}
}

// TestHarmonicsInstrumentExport: a recorder export with metadata lines
// before its header and decimal commas inside quoted comma-separated
// fields reads whole: 1 kHz at 200 kHz (from `Sample Interval,5e-06`),
// and the 1 % third harmonic the file was written with is -40 dBc.
func TestHarmonicsInstrumentExport(t *testing.T) {
	out, errs, code := runHarmonicsCLI(t, "../../testdata/waveforms/instrument_export.csv", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		SampleRate  float64 `json:"sample_rate"`
		Fundamental float64 `json:"fundamental"`
		Harmonics   []struct {
			Order int      `json:"order"`
			DBc   *float64 `json:"dbc"`
		} `json:"harmonics"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if math.Abs(doc.SampleRate/200e3-1) > 1e-9 || math.Abs(doc.Fundamental/1e3-1) > 1e-6 {
		t.Fatalf("rate %g Hz, fundamental %g Hz; want 200 kHz and 1 kHz", doc.SampleRate, doc.Fundamental)
	}
	for _, h := range doc.Harmonics {
		if h.Order == 3 && (h.DBc == nil || math.Abs(*h.DBc+40) > 0.01) {
			t.Errorf("third harmonic %v dBc, want -40 dBc", h.DBc)
		}
	}
}

// TestHarmonicsTimeOffsetCaution: a record whose time stamps carry an
// offset of 1e9 s with a 1 µs step says that its frequencies can be off,
// and by how much (issue 13, item 14).
func TestHarmonicsTimeOffsetCaution(t *testing.T) {
	var b strings.Builder
	b.WriteString("time,voltage\n")
	for i := 0; i < 1000; i++ {
		fmt.Fprintf(&b, "%.17g,%.9g\n", 1e9+float64(i)*1e-6, math.Sin(2*math.Pi*float64(i)/100))
	}
	file := filepath.Join(t.TempDir(), "offset.csv")
	if err := os.WriteFile(file, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	out, errs, code := runCLI(t, "harmonics", file)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "can be off by 0.00012") {
		t.Errorf("no caution on the time offset:\n%s", out)
	}
}
