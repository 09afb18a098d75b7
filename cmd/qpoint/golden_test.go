package main

import (
	"bytes"
	"crypto/sha256"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// elapsed matches the study's timing in its header.
var elapsed = regexp.MustCompile(`steps in [0-9.]+[µmn]?s,`)

// Timings that differ from run to run in the other commands' outputs: the
// yield's "in 14ms" and JSON "seconds", the transient's "0.29 s" and JSON
// "runtime".
var (
	yieldElapsed   = regexp.MustCompile(`workers, in [0-9.]+[µmn]?s\b`)
	yieldSeconds   = regexp.MustCompile(`"seconds": [0-9.e+-]+`)
	pulseElapsed   = regexp.MustCompile(`per stage, [0-9.]+ [µmn]?s;`)
	pulseRuntime   = regexp.MustCompile(`"runtime": [0-9.e+-]+`)
	timingPatterns = []struct {
		re   *regexp.Regexp
		with string
	}{
		{elapsed, "steps in TIME,"},
		{yieldElapsed, "workers, in TIME"},
		{yieldSeconds, `"seconds": TIME`},
		{pulseElapsed, "per stage, TIME;"},
		{pulseRuntime, `"runtime": TIME`},
	}
)

// goldenRun is one command line whose output a golden file holds.
type goldenRun struct {
	golden string
	args   []string
	files  []string // outputs written, kept beside stdout
}

var updateGolden = flag.Bool("update", false, "rewrite the command goldens in testdata/golden from the current output")

// TestCommandGoldens holds every command's output on the five demos to
// the bytes in testdata/golden: the tables, JSON, CSV and Touchstone
// files and the report. A change that is meant shows here first; look at
// the difference, then rewrite them with
//
//	go test ./cmd/qpoint -run CommandGoldens -update
func TestCommandGoldens(t *testing.T) {
	if testing.Short() {
		t.Skip("every command on every demo")
	}
	dir := t.TempDir()
	for _, name := range []string{"detector", "attenuator", "limiter", "mixer", "matched_detector"} {
		file := filepath.Join(demoDir, name+".yaml")
		csv := filepath.Join(dir, name+".csv")
		ts := filepath.Join(dir, name+".s2p")
		html := filepath.Join(dir, name+".html")
		runs := []goldenRun{
			{"bias.txt", []string{"bias", file}, nil},
			{"bias.json", []string{"bias", file, "--json"}, nil},
			{"response.txt", []string{"response", file, "--csv", csv, "--touchstone", ts}, []string{csv, ts}},
			{"response.json", []string{"response", file, "--json"}, nil},
			{"distortion.txt", []string{"distortion", file}, nil},
			{"distortion.json", []string{"distortion", file, "--json"}, nil},
			{"noise.txt", []string{"noise", file}, nil},
			{"noise.json", []string{"noise", file, "--json"}, nil},
			{"study.txt", []string{"study", file, "--steps", "9"}, nil},
			{"study.json", []string{"study", file, "--steps", "9", "--json"}, nil},
			{"report.txt", []string{"report", file, "-o", html}, []string{html}},
		}
		if name == "mixer" {
			// The mixer has three ports: its Touchstone file is .s3p.
			ts = strings.TrimSuffix(ts, ".s2p") + ".s3p"
			runs[2].args[5] = ts
			runs[2].files[1] = ts
			// And it is a mixer under its LO.
			runs = append(runs,
				goldenRun{"mixer.txt", []string{"mixer", file}, nil},
				goldenRun{"mixer.json", []string{"mixer", file, "--json"}, nil},
				goldenRun{"mixer-sweep.txt", []string{"mixer", file, "--sweep-lo-level", "-10dBm:12dBm:2dB"}, nil},
				goldenRun{"mixer-sweep.json", []string{"mixer", file, "--sweep-lo-level", "-10dBm:12dBm:4dB", "--json"}, nil})
		}
		runs = append(runs, extraGoldenRuns(name, file, dir)...)
		for _, r := range runs {
			checkGolden(t, dir, name, r)
		}
	}
	// The commands that read measurements and captures rather than a demo.
	fitIV, fitCV := filepath.Join(fitDir, "detector_iv.csv"), filepath.Join(fitDir, "detector_cv.csv")
	capture := filepath.Join("..", "..", "testdata", "waveforms", "clipped_sine.csv")
	export := filepath.Join("..", "..", "testdata", "waveforms", "instrument_export.csv")
	for _, r := range []goldenRun{
		{"fit.txt", []string{"fit", "--iv", fitIV, "--cv", fitCV}, nil},
		{"fit.json", []string{"fit", "--iv", fitIV, "--cv", fitCV, "--json"}, nil},
		{"fit-iv.txt", []string{"fit", "--iv", fitIV, "--name", "detector_fitted"}, nil},
		{"harmonics.txt", []string{"harmonics", capture}, nil},
		{"harmonics.json", []string{"harmonics", capture, "--json"}, nil},
		{"harmonics-export.txt", []string{"harmonics", export, "--harmonics", "5", "--window", "hann"}, nil},
		{"harmonics-circuit.txt", []string{"harmonics", capture, "--circuit", filepath.Join(demoDir, "limiter.yaml"), "--level", "0dBm"}, nil},
		{"harmonics-circuit.json", []string{"harmonics", capture, "--circuit", filepath.Join(demoDir, "limiter.yaml"), "--level", "0dBm", "--json"}, nil},
	} {
		checkGolden(t, dir, "measured", r)
	}
}

// extraGoldenRuns are the runs beyond the common set that one demo shows
// best: sweeps, second tones, targets, pulses and yield.
func extraGoldenRuns(name, file, dir string) []goldenRun {
	switch name {
	case "detector":
		return []goldenRun{
			{"distortion-sweep.txt", []string{"distortion", file, "--sweep-level", "-60dBm:10dBm:10dB"}, nil},
			{"distortion-sweep.json", []string{"distortion", file, "--sweep-level", "-60dBm:10dBm:10dB", "--json"}, nil},
			{"distortion-tones.txt", []string{"distortion", file, "--second-tone", "2.46GHz", "--sweep-level", "-70dBm:-30dBm:10dB"}, nil},
			{"distortion-tones.json", []string{"distortion", file, "--second-tone", "2.46GHz", "--json"}, nil},
			{"distortion-frequency.txt", []string{"distortion", file, "--sweep-frequency", "100MHz:6GHz:5"}, nil},
			{"distortion-frequency.json", []string{"distortion", file, "--sweep-frequency", "100MHz:6GHz:5", "--json"}, nil},
			{"study-optimum.txt", []string{"study", file, "--vary", "Rbias.value", "--from", "4.7k", "--to", "4.7M", "--steps", "8", "--log", "--minimize", "tss"}, nil},
			{"study-optimum.json", []string{"study", file, "--vary", "Rbias.value", "--from", "4.7k", "--to", "4.7M", "--steps", "8", "--log", "--minimize", "tss", "--json"}, nil},
			{"pulse.txt", []string{"pulse", file, "--level", "-10dBm", "--width", "300ns", "--after", "2us"}, nil},
			{"pulse.json", []string{"pulse", file, "--level", "-10dBm", "--width", "300ns", "--after", "2us", "--json"}, nil},
		}
	case "attenuator":
		csv := filepath.Join(dir, name+"-yield.csv")
		return []goldenRun{
			{"yield.txt", []string{"yield", file, "--target", "s21>-4.4dB@900MHz", "--target", "hd3<-43dBc", "--workers", "2", "--runs", "300", "--csv", csv}, []string{csv}},
			{"yield.json", []string{"yield", file, "--target", "s21>-4.4dB@900MHz", "--target", "hd3<-43dBc", "--workers", "2", "--runs", "300", "--json"}, nil},
			{"study-target.txt", []string{"study", file, "--steps", "9", "--target", "s21=-6dB@900MHz"}, nil},
			{"study-target.json", []string{"study", file, "--steps", "9", "--target", "s21=-6dB@900MHz", "--json"}, nil},
			{"noise-band.txt", []string{"noise", file, "--bandwidth", "800MHz:1GHz", "--points", "21"}, nil},
		}
	case "limiter":
		csv := filepath.Join(dir, name+"-pulse.csv")
		return []goldenRun{
			{"pulse.txt", []string{"pulse", file, "--width", "20ns", "--csv", csv}, []string{csv}},
			{"pulse.json", []string{"pulse", file, "--width", "20ns", "--json"}, nil},
			{"pulse-sweep.txt", []string{"pulse", file, "--width", "10ns", "--sweep-level", "10dBm:30dBm:10dB"}, nil},
			{"pulse-sweep.json", []string{"pulse", file, "--width", "10ns", "--sweep-level", "10dBm:30dBm:10dB", "--json"}, nil},
			{"distortion-sweep.txt", []string{"distortion", file, "--no-limit", "--sweep-level", "-20dBm:10dBm:5dB"}, nil},
		}
	case "matched_detector":
		return []goldenRun{
			{"study-grid.txt", []string{"study", file, "--steps", "3", "--vary2", "frequency", "--from2", "1GHz", "--to2", "3GHz", "--steps2", "3"}, nil},
		}
	}
	return nil
}

// checkGolden runs one command line and compares what it printed and
// wrote with its golden file, or rewrites the file under -update.
func checkGolden(t *testing.T, dir, name string, r goldenRun) {
	t.Helper()
	out, errs, code := runCLI(t, r.args...)
	// Where the outputs went and how long a run took differ from run to
	// run; nothing else may.
	clean := func(s string) string {
		s = strings.ReplaceAll(s, dir, "OUT")
		for _, p := range timingPatterns {
			s = p.re.ReplaceAllString(s, p.with)
		}
		return abridged(s)
	}
	var b bytes.Buffer
	fmt.Fprintf(&b, "exit %d\n--- stdout\n%s--- stderr\n%s", code, clean(out), clean(errs))
	for _, f := range r.files {
		data, err := os.ReadFile(f)
		if err != nil {
			t.Fatalf("%s: %v", r.golden, err)
		}
		fmt.Fprintf(&b, "--- %s\n%s", filepath.Ext(f), clean(string(data)))
	}
	got := b.String()
	path := filepath.Join("testdata", "golden", name+"-"+r.golden)
	if *updateGolden {
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run with -update to create it)", err)
	}
	if got != string(want) {
		t.Errorf("%s %s differs from %s at %s", name, strings.Join(r.args[:1], " "), path, firstDifference(got, string(want)))
	}
}

// abridged keeps an output of at most 1 MiB whole; of a longer one (a
// transient's waveform or envelope) it keeps the first 40 lines, the line
// count and the SHA-256 of the whole, which still holds every byte.
func abridged(s string) string {
	if len(s) <= 1<<20 {
		return s
	}
	lines := strings.SplitAfter(s, "\n")
	return fmt.Sprintf("%s... %d lines, %d bytes, sha256 %x\n", strings.Join(lines[:40], ""), len(lines), len(s), sha256.Sum256([]byte(s)))
}

// firstDifference locates the first line where a and b differ.
func firstDifference(a, b string) string {
	la, lb := strings.Split(a, "\n"), strings.Split(b, "\n")
	for i := 0; i < len(la) && i < len(lb); i++ {
		if la[i] != lb[i] {
			return fmt.Sprintf("line %d: got %.200q, want %.200q", i+1, la[i], lb[i])
		}
	}
	return fmt.Sprintf("length: got %d lines, want %d", len(la), len(lb))
}
