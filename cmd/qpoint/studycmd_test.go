package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestStudyErrors(t *testing.T) {
	det := filepath.Join(demoDir, "detector.yaml")
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"study", det, "--vary", "Rbais.value", "--from", "1k", "--to", "2k", "--steps", "3"}, "did you mean `Rbias`"},
		{[]string{"study", det, "--vary", "D1.value", "--from", "1", "--to", "2", "--steps", "3"}, "has no value"},
		{[]string{"study", det, "--vary", "Vcc.value", "--from", "1V", "--to", "1V", "--steps", "3"}, "range is empty"},
		{[]string{"study", det, "--vary", "Rbias.value", "--from", "-1k", "--to", "2k", "--steps", "3"}, "accepted"},
		{[]string{"study", det, "--vary", "Vcc.value", "--from", "1V", "--to", "3V", "--steps", "5", "--target", "s21=+40dB@2.45GHz"}, "does not reach the target"},
		{[]string{"study", det, "--vary", "Vcc.value", "--from", "1V", "--to", "3V", "--steps", "5", "--target", "s99=1"}, "not a measure"},
		{[]string{"study", det, "--vary", "temperature", "--from", "27", "--to", "85C", "--steps", "5"}, "--from"},
	}
	for _, c := range cases {
		_, errs, code := runCLI(t, c.args...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("qpoint %s: exit %d, stderr %q; want exit 2 mentioning %q", strings.Join(c.args, " "), code, errs, c.want)
		}
	}
}

// TestStudyCSVWorkers: the study's CSV is byte-identical with one worker
// and with several.
func TestStudyCSVWorkers(t *testing.T) {
	dir := t.TempDir()
	var files [][]byte
	for _, w := range []string{"1", "3"} {
		path := filepath.Join(dir, "w"+w+".csv")
		_, errs, code := runCLI(t, "study", filepath.Join(demoDir, "detector.yaml"), "--vary", "Vcc.value", "--from", "0V", "--to", "3.3V",
			"--steps", "50", "--level", "-30dBm", "--frequencies", "1GHz,2.45GHz", "--workers", w, "--csv", path)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, errs)
		}
		data, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		files = append(files, data)
	}
	if !bytes.Equal(files[0], files[1]) {
		t.Error("CSV differs between 1 and 3 workers")
	}
	header := strings.SplitN(string(files[0]), "\n", 2)[0]
	for _, want := range []string{"Vcc.value_V", "D1.current_A", "s21_dB@2.45GHz", "hd2_dBc"} {
		if !strings.Contains(header, want) {
			t.Errorf("CSV header %q lacks %q", header, want)
		}
	}
}

func TestStudyTarget(t *testing.T) {
	out, errs, code := runCLI(t, "study", filepath.Join(demoDir, "attenuator.yaml"), "--steps", "30", "--target", "s21=-6dB@900MHz")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "met at Vctl.value") {
		t.Errorf("no solution line in\n%s", out)
	}
}
