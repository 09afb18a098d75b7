package main

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"
)

// hostileLine is the form of every problem line: FILE:LINE:COL: what is
// wrong; what is accepted.
var hostileLine = regexp.MustCompile(`^(.+):(\d+):(\d+): .+; .+`)

// hostileFiles returns the files of testdata/hostile and, made here because
// they are too big to keep, a file just over the size limit and one of
// 50 MB.
func hostileFiles(t *testing.T) []string {
	t.Helper()
	files, err := filepath.Glob("../../testdata/hostile/*.yaml")
	if err != nil || len(files) < 20 {
		t.Fatalf("found %d hostile files: %v", len(files), err)
	}
	dir := t.TempDir()
	over := filepath.Join(dir, "just_over_the_limit.yaml")
	line := "  - {type: resistor, name: R, between: [a, gnd], value: 1k}\n"
	body := "parts:\n" + strings.Repeat(line, (1<<20)/len(line)+1)
	if err := os.WriteFile(over, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	huge := filepath.Join(dir, "fifty_megabytes.yaml")
	f, err := os.Create(huge)
	if err != nil {
		t.Fatal(err)
	}
	if err := f.Truncate(50 << 20); err != nil { // sparse: no disk used
		t.Fatal(err)
	}
	f.Close()
	return append(files, over, huge)
}

// TestHostileFilesCLI runs every hostile file through every command that
// reads a circuit: each answers with exit status 2 and problems in the
// FILE:LINE:COL form naming that file, never a panic, in under a second.
func TestHostileFilesCLI(t *testing.T) {
	out := filepath.Join(t.TempDir(), "report.html")
	commands := [][]string{
		{"bias"}, {"bias", "--json"}, {"response"}, {"distortion"}, {"noise"}, {"study"}, {"report", "-o", out}, {"yield", "--target", "s21>-6dB"},
	}
	var slowest time.Duration
	for _, file := range hostileFiles(t) {
		for _, cmd := range commands {
			args := append(append([]string(nil), cmd...), file)
			t.Run(filepath.Base(file)+"/"+strings.Join(cmd, " "), func(t *testing.T) {
				start := time.Now()
				stdout, stderr, code := runCLI(t, args...)
				took := time.Since(start)
				slowest = max(slowest, took)
				if code != exitInput {
					t.Errorf("exit %d, want %d\n%s", code, exitInput, stderr)
				}
				if took > time.Second {
					t.Errorf("took %v, want under a second", took)
				}
				if stdout != "" {
					t.Errorf("printed on standard output: %.200s", stdout)
				}
				if strings.Contains(stderr, "internal error") || strings.Contains(stderr, "goroutine") {
					t.Fatalf("a panic reached the user:\n%s", stderr)
				}
				placed := 0
				for _, l := range strings.Split(strings.TrimSpace(stderr), "\n") {
					l = strings.TrimPrefix(l, "qpoint: ")
					if m := hostileLine.FindStringSubmatch(l); m != nil && m[1] == file {
						placed++
					} else if strings.HasPrefix(l, file+":") {
						t.Errorf("%q is not `FILE:LINE:COL: what is wrong; what is accepted`", l)
					}
				}
				if placed == 0 {
					t.Errorf("no FILE:LINE:COL line naming %s in\n%s", file, stderr)
				}
				if len(stderr) > 64<<10 {
					t.Errorf("%d bytes of messages", len(stderr))
				}
			})
		}
	}
	t.Logf("slowest answer %v", slowest)
}

// TestHostileFlags: the limits that hold in files hold on flags, and where
// a limit is broken by a value from the file the message points at the
// file (issue 13, item 13). Each case exits 2 with the phrase shown.
func TestHostileFlags(t *testing.T) {
	dir := t.TempDir()
	att := filepath.Join(demoDir, "attenuator.yaml")
	src, err := os.ReadFile(att)
	if err != nil {
		t.Fatal(err)
	}
	// The same circuit with a distortion level of 1 MV peak in the file.
	fileLevel := filepath.Join(dir, "level.yaml")
	if err := os.WriteFile(fileLevel, []byte(strings.Replace(string(src), "level: -10dBm", "level: 1e6V", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		args   []string
		phrase string
	}{
		// 1 MV peak into 50 Ω: 10 log10((1e6)²/(2·50)/1e-3) = +130 dBm.
		{[]string{"distortion", att, "--no-limit", "--level", "1e6V"}, "flag --level: 1 MV peak at port input's 50 Ω is 130 dBm"},
		{[]string{"distortion", fileLevel, "--no-limit"}, fileLevel + ":43:15: analysis.distortion.level"},
		{[]string{"study", att, "--steps", "3", "--tolerance", "NaN"}, "flag --tolerance: NaN"},
		{[]string{"study", att, "--steps", "3", "--tolerance", "-1"}, "flag --tolerance: -1"},
		{[]string{"help", "nosuch"}, `no command "nosuch"`},
	}
	for _, c := range cases {
		_, stderr, code := runCLI(t, c.args...)
		if code != exitInput || !strings.Contains(stderr, c.phrase) {
			t.Errorf("qpoint %q: exit %d, %q; want %d and %q", c.args, code, stderr, exitInput, c.phrase)
		}
	}
}

// TestControlCharactersEscaped: YAML's escapes put control characters and
// bidirectional overrides into names; printed raw they would act on the
// terminal. Tables and messages show them as escapes (issue 13, item 13);
// JSON escapes them itself.
func TestControlCharactersEscaped(t *testing.T) {
	file := filepath.Join(t.TempDir(), "ctl.yaml")
	body := `name: "clear \e[2J\u202e"
diode_models:
  m: {saturation_current: 1e-14}
parts:
  - {type: voltage_source, name: "V\x07", plus: a, minus: gnd, value: 1}
  - {type: resistor, name: R1, between: [a, "k\x1b[31m"], value: 1k}
  - {type: diode, name: D1, anode: "k\x1b[31m", cathode: gnd, model: m}
`
	if err := os.WriteFile(file, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, args := range [][]string{{"bias", file}, {"bias", file, "--json"}, {"distortion", file, "--input", "\x1b[2Jport"}} {
		stdout, stderr, _ := runCLI(t, args...)
		for _, r := range stdout + stderr {
			if r != '\n' && r != '\t' && (r < 0x20 || r == 0x7f || (r >= 0x80 && r < 0xa0) || r == 0x202e) {
				t.Errorf("qpoint %q printed the raw character %U", args, r)
				break
			}
		}
	}
	stdout, _, _ := runCLI(t, "bias", file)
	if !strings.Contains(stdout, `k\x1b[31m`) || !strings.Contains(stdout, `\u202e`) {
		t.Errorf("the escapes are not shown:\n%s", stdout)
	}
}
