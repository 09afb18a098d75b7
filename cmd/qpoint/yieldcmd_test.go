package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

var attenuatorFile = filepath.Join(demoDir, "attenuator.yaml")

func TestYieldTable(t *testing.T) {
	dir := t.TempDir()
	out, errs, code := runCLI(t, "yield", attenuatorFile, "--target", "s21>-4.4dB@900MHz", "--target", "hd3<-43dBc",
		"--runs", "300", "--csv", filepath.Join(dir, "runs.csv"), "--plots", dir)
	if code != 0 {
		t.Fatalf("exit %d\n%s", code, errs)
	}
	for _, want := range []string{"Yield ", "95 % interval", "Wilson score", "Which value to tighten", "Dshunt.ideality", "Worst-case corners", "hd3<-43dBc"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	csv, err := os.ReadFile(filepath.Join(dir, "runs.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if lines := strings.Count(string(csv), "\n"); lines != 301 {
		t.Errorf("CSV has %d lines; want a header and 300 runs", lines)
	}
	for _, f := range []string{"yield-1-s21.png", "yield-2-hd3.svg"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Errorf("figure %s: %v", f, err)
		}
	}
}

// TestYieldJSONWorkers: the contract's keys are there, and one worker
// and two give the same document but for the timing and worker count.
func TestYieldJSONWorkers(t *testing.T) {
	var docs []map[string]any
	for _, w := range []string{"1", "2"} {
		out, errs, code := runCLI(t, "yield", attenuatorFile, "--target", "s21>-4.4dB@900MHz", "--runs", "200", "--seed", "9",
			"--temperature-range", "-40C:85C", "--workers", w, "--json")
		if code != 0 {
			t.Fatalf("exit %d\n%s", code, errs)
		}
		var doc map[string]any
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatalf("%v\n%s", err, out)
		}
		docs = append(docs, doc)
	}
	d := docs[0]
	for _, k := range []string{"runs", "seed", "passed", "yield", "interval_95", "targets", "sensitivities", "temperatures"} {
		if _, ok := d[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	if d["runs"].(float64) != 200 || d["seed"].(float64) != 9 || len(d["temperatures"].([]any)) != 3 {
		t.Errorf("runs %v, seed %v, temperatures %v; want 200, 9 and three", d["runs"], d["seed"], d["temperatures"])
	}
	tg := d["targets"].([]any)[0].(map[string]any)
	for _, k := range []string{"target", "mean", "std", "pass_fraction"} {
		if _, ok := tg[k]; !ok {
			t.Errorf("target lacks %q: %v", k, tg)
		}
	}
	s := d["sensitivities"].([]any)[0].(map[string]any)
	for _, k := range []string{"value", "target", "share"} {
		if _, ok := s[k]; !ok {
			t.Errorf("sensitivity lacks %q: %v", k, s)
		}
	}
	for _, doc := range docs {
		delete(doc["stats"].(map[string]any), "seconds")
		delete(doc["stats"].(map[string]any), "workers")
	}
	a, _ := json.Marshal(docs[0])
	b, _ := json.Marshal(docs[1])
	if string(a) != string(b) {
		t.Errorf("one worker and two give different documents")
	}
}

func TestYieldErrors(t *testing.T) {
	dir := t.TempDir()
	badTarget := filepath.Join(dir, "bad_target.yaml")
	data, err := os.ReadFile(attenuatorFile)
	if err != nil {
		t.Fatal(err)
	}
	// The demo without its yield targets, and with a bad one.
	lines := strings.Split(string(data), "\n")
	var kept []string
	for _, l := range lines {
		if !strings.HasPrefix(l, "  yield:") {
			kept = append(kept, l)
		}
	}
	if len(kept) != len(lines)-1 {
		t.Fatal("attenuator demo has no analysis.yield line; update the test")
	}
	noTargets := filepath.Join(dir, "no_targets.yaml")
	if err := os.WriteFile(noTargets, []byte(strings.Join(kept, "\n")), 0o644); err != nil {
		t.Fatal(err)
	}
	bad := strings.Replace(strings.Join(kept, "\n"), "analysis:\n", "analysis:\n  yield:      {targets: [\"s21>-4dB@900MHz\", \"gain>3dB\"]}\n", 1)
	if err := os.WriteFile(badTarget, []byte(bad), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		args   []string
		phrase string
	}{
		{[]string{noTargets}, "flag --target is missing"},
		{[]string{attenuatorFile, "--target", "s21=-6dB"}, "MEASURE>VALUE"},
		{[]string{attenuatorFile, "--target", "s21>-6dB", "--runs", "-3"}, "flag --runs"},
		{[]string{attenuatorFile, "--target", "s21>-6dB", "--temperature-range", "85C:-40C"}, "does not rise"},
		{[]string{attenuatorFile, "--target", "s21>-6dB", "--temperature-range", "-40C"}, "LOW:HIGH"},
		{[]string{attenuatorFile, "--target", "hd3<-40dBc", "--level", "loud"}, "level"},
		{[]string{filepath.Join(demoDir, "detector.yaml"), "--target", "tss<-40dBm"}, "no tolerances"},
		{[]string{attenuatorFile, "--target", "current.D9<20mA"}, "accepted: Dshunt"},
		// The bad target is on the line after `analysis:`, its quote at column 45.
		{[]string{badTarget}, fmt.Sprintf("bad_target.yaml:%d:45: target of the yield analysis: `gain` is not a measure; accepted:", slices.Index(kept, "analysis:")+2)},
	}
	for _, c := range cases {
		_, errs, code := runCLI(t, append([]string{"yield"}, c.args...)...)
		if code != 2 || !strings.Contains(errs, c.phrase) {
			t.Errorf("yield %v: exit %d, %q; want exit 2 and %q", c.args, code, errs, c.phrase)
		}
	}
}
