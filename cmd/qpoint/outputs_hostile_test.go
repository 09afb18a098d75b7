package main

import (
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestOutputsNeverReplaceSpecialFiles: an output that names a named pipe,
// a character device, or a symbolic link is written through it, and one
// that names a directory, a socket-like special file or a dangling link is
// refused; none is ever replaced by a regular file (issue 13, item 10).
func TestOutputsNeverReplaceSpecialFiles(t *testing.T) {
	dir := t.TempDir()
	circuitFile := filepath.Join(demoDir, "attenuator.yaml")

	// A FIFO with a reader: the CSV streams through it.
	fifo := filepath.Join(dir, "pipe")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skip("no named pipes here:", err)
	}
	got := make(chan string, 1)
	go func() {
		f, err := os.Open(fifo)
		if err != nil {
			got <- "open: " + err.Error()
			return
		}
		b, _ := io.ReadAll(f)
		f.Close()
		got <- string(b)
	}()
	_, errs, code := runCLI(t, "response", circuitFile, "--per-decade", "5", "--csv", fifo)
	if code != 0 {
		t.Fatalf("--csv FIFO: exit %d, %s", code, errs)
	}
	select {
	case body := <-got:
		if !strings.HasPrefix(body, "frequency_Hz") {
			t.Errorf("the FIFO's reader got %.60q, want the CSV", body)
		}
	case <-time.After(5 * time.Second):
		t.Errorf("nothing reached the FIFO's reader")
	}
	if st, err := os.Lstat(fifo); err != nil || st.Mode()&os.ModeNamedPipe == 0 {
		t.Errorf("the FIFO was replaced: %v %v", st.Mode(), err)
	}

	// A character device is written through, and stays a device. The
	// test makes its own null device (major 1, minor 3 on Linux) so that
	// a build with the old fault replaces that one, not the system's.
	null := filepath.Join(dir, "null")
	if err := syscall.Mknod(null, syscall.S_IFCHR|0o666, 1<<8|3); err == nil {
		link := filepath.Join(dir, "null-link")
		if err := os.Symlink(null, link); err != nil {
			t.Fatal(err)
		}
		for _, target := range []string{null, link} {
			if _, errs, code := runCLI(t, "response", circuitFile, "--per-decade", "5", "--csv", target); code != 0 {
				t.Errorf("--csv %s: exit %d, %s", target, code, errs)
			}
		}
		if st, err := os.Stat(null); err != nil || st.Mode()&os.ModeCharDevice == 0 {
			t.Fatalf("the device is no longer a device: %v %v", st.Mode(), err)
		}
		if st, err := os.Lstat(link); err != nil || st.Mode()&os.ModeSymlink == 0 {
			t.Errorf("the link to the device was replaced: %v %v", st.Mode(), err)
		}
	} else {
		t.Logf("no device node made (%v): the device case is not run", err)
	}

	// A link to a regular file: the file is replaced, the link stays.
	real := filepath.Join(dir, "real.csv")
	if err := os.WriteFile(real, []byte("old\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "link.csv")
	if err := os.Symlink(real, link); err != nil {
		t.Fatal(err)
	}
	if _, errs, code := runCLI(t, "response", circuitFile, "--per-decade", "5", "--csv", link); code != 0 {
		t.Fatalf("--csv link: exit %d, %s", code, errs)
	}
	if st, err := os.Lstat(link); err != nil || st.Mode()&os.ModeSymlink == 0 {
		t.Errorf("the link was replaced: %v", err)
	}
	if b, _ := os.ReadFile(real); !strings.HasPrefix(string(b), "frequency_Hz") {
		t.Errorf("the link's target holds %.40q, want the CSV", b)
	}
	// Item 12: a replaced output keeps its file mode.
	if st, err := os.Stat(real); err != nil || st.Mode().Perm() != 0o600 {
		t.Errorf("replaced output has mode %v, want 0600 as before", st.Mode().Perm())
	}

	// Refused: a directory, a dangling link.
	sub := filepath.Join(dir, "folder")
	os.Mkdir(sub, 0o755)
	dangling := filepath.Join(dir, "dangling.csv")
	os.Symlink(filepath.Join(dir, "nowhere", "x.csv"), dangling)
	for _, target := range []string{sub, dangling} {
		_, errs, code := runCLI(t, "response", circuitFile, "--per-decade", "5", "--csv", target)
		if code != 2 || !strings.Contains(errs, "refusing to write") {
			t.Errorf("--csv %s: exit %d, %q; want 2 and a refusal", target, code, errs)
		}
	}
	if st, err := os.Lstat(sub); err != nil || !st.IsDir() {
		t.Errorf("the folder was replaced")
	}
}

// TestCollidingOutputsRefusedFirst: two outputs naming one file, or an
// output whose folder is a regular file, are refused before any output is
// written or any analysis runs (issue 13, item 11).
func TestCollidingOutputsRefusedFirst(t *testing.T) {
	dir := t.TempDir()
	circuitFile := filepath.Join(demoDir, "attenuator.yaml")
	csvPath := filepath.Join(dir, "old.csv")
	touch := func() {
		if err := os.WriteFile(csvPath, []byte("untouched\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	notFolder := filepath.Join(dir, "not-a-folder")
	os.WriteFile(notFolder, []byte("x"), 0o644)
	figs := filepath.Join(dir, "figs")
	cases := [][]string{
		{"response", circuitFile, "--csv", csvPath, "--plots", notFolder},
		{"response", circuitFile, "--csv", filepath.Join(figs, "smith.png"), "--plots", figs},
		{"response", circuitFile, "--csv", csvPath, "--touchstone", filepath.Join(dir, ".", "old.csv")},
		{"study", circuitFile, "--steps", "3", "--csv", csvPath, "--plots", notFolder},
		{"noise", filepath.Join(demoDir, "detector.yaml"), "--csv", csvPath, "--plots", notFolder},
		{"report", circuitFile, "-o", filepath.Join(notFolder, "r.html")},
	}
	for _, args := range cases {
		touch()
		_, errs, code := runCLI(t, args...)
		if code != 2 {
			t.Errorf("%q: exit %d, %s; want 2", args, code, errs)
		}
		if b, _ := os.ReadFile(csvPath); string(b) != "untouched\n" {
			t.Errorf("%q: the CSV was written before the refusal", args)
		}
		if _, err := os.Stat(figs); err == nil {
			t.Errorf("%q: the figure folder was made before the refusal", args)
		}
	}
}

// TestStdoutWriteFailure: a table that cannot be written to standard
// output (a full device) is a failure with a message, not exit 0
// (issue 13, item 12).
func TestStdoutWriteFailure(t *testing.T) {
	var errb strings.Builder
	code := run([]string{"bias", filepath.Join(demoDir, "attenuator.yaml")}, &failAfter{w: io.Discard, n: 100}, &errb)
	if code != exitAnalysis || !strings.Contains(errb.String(), "writing standard output") {
		t.Errorf("exit %d, %q; want %d and a message", code, errb.String(), exitAnalysis)
	}
	code = run([]string{"bias", filepath.Join(demoDir, "attenuator.yaml"), "--json"}, &failAfter{w: io.Discard, n: 100}, &errb)
	if code == exitOK {
		t.Errorf("--json to a failing output: exit 0")
	}
}
