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
