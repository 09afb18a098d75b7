package main

import (
	"bytes"
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
		runs := []struct {
			golden string
			args   []string
			files  []string // outputs written, kept beside stdout
		}{
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
				struct {
					golden string
					args   []string
					files  []string
				}{"mixer.txt", []string{"mixer", file}, nil},
				struct {
					golden string
					args   []string
					files  []string
				}{"mixer.json", []string{"mixer", file, "--json"}, nil},
				struct {
					golden string
					args   []string
					files  []string
				}{"mixer-sweep.txt", []string{"mixer", file, "--sweep-lo-level", "-10dBm:12dBm:2dB"}, nil})
		}
		for _, r := range runs {
			out, errs, code := runCLI(t, r.args...)
			var b bytes.Buffer
			fmt.Fprintf(&b, "exit %d\n--- stdout\n%s--- stderr\n%s", code, out, errs)
			for _, f := range r.files {
				data, err := os.ReadFile(f)
				if err != nil {
					t.Fatalf("%s: %v", r.golden, err)
				}
				fmt.Fprintf(&b, "--- %s\n%s", filepath.Ext(f), data)
			}
			// Where the outputs went and how long a study took differ
			// from run to run; nothing else may.
			got := strings.ReplaceAll(b.String(), dir, "OUT")
			got = elapsed.ReplaceAllString(got, "steps in TIME,")
			path := filepath.Join("testdata", "golden", name+"-"+r.golden)
			if *updateGolden {
				if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
					t.Fatal(err)
				}
				if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
					t.Fatal(err)
				}
				continue
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run with -update to create it)", err)
			}
			if got != string(want) {
				t.Errorf("%s %s differs from %s at %s", name, strings.Join(r.args[:1], " "), path, firstDifference(got, string(want)))
			}
		}
	}
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
