package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestSetFlag: --set gives the same answer as editing the file, on every
// command that reads a circuit; the header echoes it; bad settings are
// usage errors that say what is accepted.
func TestSetFlag(t *testing.T) {
	src, err := os.ReadFile(filepath.Join(demoDir, "detector.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	edited := strings.Replace(string(src), "value: 220k", "value: 100k", 1)
	edited = strings.Replace(edited, "saturation_current: 3uA", "saturation_current: 2uA", 1)
	if edited == string(src) {
		t.Fatal("the demo no longer has the values this test edits")
	}
	dir := t.TempDir()
	file := filepath.Join(dir, "detector.yaml")
	if err := os.WriteFile(file, []byte(edited), 0o644); err != nil {
		t.Fatal(err)
	}
	sets := []string{"--set", "Rbias.value=100k", "--set", "detector_low_barrier.saturation_current=2uA"}
	for _, cmd := range [][]string{{"bias", "--json"}, {"response", "--json"}, {"distortion", "--json", "--no-limit"}, {"noise", "--json"}} {
		want, errs, code := runCLI(t, append(cmd, file)...)
		if code != 0 {
			t.Fatalf("%v on the edited file: exit %d, %s", cmd, code, errs)
		}
		got, errs, code := runCLI(t, append(append(cmd, filepath.Join(demoDir, "detector.yaml")), sets...)...)
		if code != 0 {
			t.Fatalf("%v --set: exit %d, %s", cmd, code, errs)
		}
		// Only the file's name may differ.
		got = strings.ReplaceAll(got, jsonString(filepath.Join(demoDir, "detector.yaml")), "FILE")
		want = strings.ReplaceAll(want, jsonString(file), "FILE")
		if got != want {
			t.Errorf("%s with --set differs from the edited file", cmd[0])
		}
	}
	out, _, _ := runCLI(t, append([]string{"bias", filepath.Join(demoDir, "detector.yaml")}, sets...)...)
	if !strings.Contains(out, "set          Rbias.value=100k, detector_low_barrier.saturation_current=2uA") {
		t.Errorf("the header does not echo the settings:\n%s", out)
	}
	for _, c := range []struct{ set, want string }{
		{"Rbais.value=1k", "did you mean `Rbias`"},
		{"Rbias.value=-5", "accepted: a positive resistance"},
		{"Rbias", "is not NAME=VALUE"},
		{"Rbias.value=3V", "not a valid resistance"},
		{"detector_low_barrier.ideality=50", "accepted"},
	} {
		_, errs, code := runCLI(t, "bias", filepath.Join(demoDir, "detector.yaml"), "--set", c.set)
		if code != 2 || !strings.Contains(errs, "flag --set") || !strings.Contains(errs, c.want) {
			t.Errorf("--set %s: exit %d, %q; want exit 2 naming the flag and %q", c.set, code, errs, c.want)
		}
	}
}

func jsonString(s string) string {
	b, _ := json.Marshal(s)
	return string(b)
}
