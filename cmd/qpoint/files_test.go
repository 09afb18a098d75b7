package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"qpoint/ac"
	"qpoint/ac/touchstone"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/plots/results"
	"qpoint/smallsignal"
)

// failAfter is a writer that takes n bytes and then fails, as a full disk
// or a closed pipe would.
type failAfter struct {
	w io.Writer
	n int
}

var errDiskFull = errors.New("no space left on device (simulated)")

func (f *failAfter) Write(p []byte) (int, error) {
	if len(p) > f.n {
		k, _ := f.w.Write(p[:f.n])
		f.n = 0
		return k, errDiskFull
	}
	f.n -= len(p)
	return f.w.Write(p)
}

// detectorResponse is the detector demo's response on a log grid, for the
// writers to write.
func detectorResponse(t *testing.T) *ac.Response {
	t.Helper()
	c, err := circuit.Load(filepath.Join(demoDir, "detector.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		t.Fatal(err)
	}
	grid, err := ac.LogGrid(1e6, 1e10, 50)
	if err != nil {
		t.Fatal(err)
	}
	r, err := ac.Run(nw, grid, ac.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// dirEntries lists the names in dir, hidden ones (a temporary file) too.
func dirEntries(t *testing.T, dir string) []string {
	t.Helper()
	list, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range list {
		names = append(names, e.Name())
	}
	return names
}

// TestWriteInterrupted interrupts writes in every way a write can end early
// (the generator fails, the writer under it fails after some bytes, the
// generator panics) and checks that the old file is intact and no
// temporary file is left; a write that succeeds replaces the file whole.
func TestWriteInterrupted(t *testing.T) {
	r := detectorResponse(t)
	const old = "frequency,old contents\n1,2\n"
	big := strings.Repeat("x", 64<<10) // past any buffer, so bytes reach the temporary file
	cases := []struct {
		name  string
		write func(w io.Writer) error
		want  error // nil: must succeed
		panic bool
	}{
		{"generator fails midway", func(w io.Writer) error {
			io.WriteString(w, big)
			return errors.New("the sweep failed at 3 GHz")
		}, errors.New("the sweep failed at 3 GHz"), false},
		{"writer fails after 100 bytes", func(w io.Writer) error {
			return results.WriteResponseCSV(&failAfter{w, 100}, r)
		}, errDiskFull, false},
		{"writer fails after 20 kB", func(w io.Writer) error {
			return results.WriteResponseCSV(&failAfter{w, 20 << 10}, r)
		}, errDiskFull, false},
		{"Touchstone writer fails after 1 kB", func(w io.Writer) error {
			return results.WriteTouchstone(&failAfter{w, 1 << 10}, &circuit.Circuit{}, r, touchstone.FormatRI)
		}, errDiskFull, false},
		{"generator panics midway", func(w io.Writer) error {
			io.WriteString(w, big)
			panic("index out of range (simulated)")
		}, nil, true},
		{"complete write", func(w io.Writer) error { return results.WriteResponseCSV(w, r) }, nil, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			path := filepath.Join(dir, "out.csv")
			if err := os.WriteFile(path, []byte(old), 0o600); err != nil {
				t.Fatal(err)
			}
			var err error
			panicked := func() (p bool) {
				defer func() {
					if recover() != nil {
						p = true
					}
				}()
				err = (&fileGuard{}).writeFileAtomic(path, c.write)
				return false
			}()
			if panicked != c.panic {
				t.Fatalf("panicked = %v, want %v", panicked, c.panic)
			}
			got, rerr := os.ReadFile(path)
			if rerr != nil {
				t.Fatal(rerr)
			}
			if names := dirEntries(t, dir); len(names) != 1 || names[0] != "out.csv" {
				t.Errorf("the directory holds %q, want only out.csv (no temporary file left)", names)
			}
			if c.want == nil && !c.panic {
				if err != nil {
					t.Fatalf("write failed: %v", err)
				}
				var want bytes.Buffer
				results.WriteResponseCSV(&want, r)
				if !bytes.Equal(got, want.Bytes()) {
					t.Errorf("the new file holds %d bytes, want the %d written", len(got), want.Len())
				}
				return
			}
			if !c.panic && (err == nil || !strings.Contains(err.Error(), c.want.Error()) || !strings.Contains(err.Error(), path)) {
				t.Errorf("error %v; want it to name %s and say %q", err, path, c.want)
			}
			if string(got) != old {
				t.Errorf("the old file changed: %d bytes, %q...", len(got), got[:min(len(got), 40)])
			}
		})
	}
}

// TestWriteNoDirectory: writing into a missing directory fails, naming the
// path, and creates nothing.
func TestWriteNoDirectory(t *testing.T) {
	dir := t.TempDir()
	err := (&fileGuard{}).writeFileAtomic(filepath.Join(dir, "missing", "out.csv"), func(w io.Writer) error {
		_, err := io.WriteString(w, "a,b\n")
		return err
	})
	if err == nil || !strings.Contains(err.Error(), "missing") {
		t.Errorf("error %v, want one naming the path", err)
	}
	if names := dirEntries(t, dir); len(names) != 0 {
		t.Errorf("the directory holds %q, want nothing", names)
	}
}

// TestNoCommandWritesItsInput runs every command that writes a file with
// that file pointing at its own input: directly, through a symbolic link
// and through a hard link, and, for the commands that write figures into a
// folder, with the input in that folder under the name of one of the
// figures. Each refuses with exit status 2, saying why, and the input is
// unchanged, with no temporary file beside it.
func TestNoCommandWritesItsInput(t *testing.T) {
	src, err := os.ReadFile(filepath.Join(demoDir, "detector.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	const refused = "it is the input file"
	commands := []struct {
		name  string
		input string // the circuit file's name
		args  func(in, out string) []string
		why   string // what the refusal says
	}{
		{"response --csv", "circuit.yaml", func(in, out string) []string { return []string{"response", in, "--per-decade", "5", "--csv", out} }, refused},
		// The Touchstone writer wants .s2p: the input is named so.
		{"response --touchstone", "circuit.s2p", func(in, out string) []string {
			return []string{"response", in, "--per-decade", "5", "--touchstone", out}
		}, refused},
		{"response --plots", "circuit.yaml", func(in, out string) []string {
			return []string{"response", in, "--per-decade", "5", "--plots", out}
		}, "not a directory"},
		{"study --csv", "circuit.yaml", func(in, out string) []string { return []string{"study", in, "--steps", "3", "--csv", out} }, refused},
		{"report -o", "circuit.yaml", func(in, out string) []string { return []string{"report", in, "-o", out} }, refused},
		{"noise --csv", "circuit.yaml", func(in, out string) []string { return []string{"noise", in, "--csv", out} }, refused},
		{"noise --plots", "circuit.yaml", func(in, out string) []string { return []string{"noise", in, "--plots", out} }, "not a directory"},
		{"distortion --plots", "circuit.yaml", func(in, out string) []string {
			return []string{"distortion", in, "--no-limit", "--plots", out}
		}, "not a directory"},
	}
	links := []struct {
		name string
		make func(dir, in string) (string, error)
	}{
		{"same path", func(dir, in string) (string, error) { return in, nil }},
		{"symbolic link", func(dir, in string) (string, error) {
			l := filepath.Join(dir, "link"+filepath.Ext(in))
			return l, os.Symlink(in, l)
		}},
		{"hard link", func(dir, in string) (string, error) {
			l := filepath.Join(dir, "hard"+filepath.Ext(in))
			return l, os.Link(in, l)
		}},
	}
	// sameFiles: the folder must hold what it held before, and no
	// temporary file: every output is checked before any is written.
	check := func(t *testing.T, dir, in string, args []string, why string, sameFiles bool) {
		t.Helper()
		before := dirEntries(t, dir)
		_, errs, code := runCLI(t, args...)
		if code != exitInput {
			t.Errorf("exit %d, want %d\n%s", code, exitInput, errs)
		}
		if !strings.Contains(errs, why) {
			t.Errorf("the refusal does not say %q:\n%s", why, errs)
		}
		after, err := os.ReadFile(in)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(after, src) {
			t.Errorf("the input file changed (%d bytes, was %d)", len(after), len(src))
		}
		names := dirEntries(t, dir)
		if sameFiles && fmt.Sprint(names) != fmt.Sprint(before) {
			t.Errorf("the directory holds %q, held %q", names, before)
		}
		for _, n := range names {
			if strings.HasSuffix(n, ".partial") {
				t.Errorf("a temporary file is left: %s", n)
			}
		}
	}
	for _, c := range commands {
		for _, l := range links {
			t.Run(c.name+"/"+l.name, func(t *testing.T) {
				dir := t.TempDir()
				in := filepath.Join(dir, c.input)
				if err := os.WriteFile(in, src, 0o644); err != nil {
					t.Fatal(err)
				}
				out, err := l.make(dir, in)
				if err != nil {
					t.Skipf("cannot make a %s here: %v", l.name, err)
				}
				check(t, dir, in, c.args(in, out), c.why, true)
			})
		}
	}
	// Figures are written into a folder by name: an input that bears the
	// name of one of them is refused too.
	figures := []struct {
		name, file string
		args       func(in, dir string) []string
	}{
		{"response --plots", "smith.svg", func(in, dir string) []string { return []string{"response", in, "--per-decade", "5", "--plots", dir} }},
		{"noise --plots", "noise-density.csv", func(in, dir string) []string { return []string{"noise", in, "--plots", dir} }},
		// The last file written: everything before it would be left.
		{"noise --plots", "noise-contributions.png", func(in, dir string) []string { return []string{"noise", in, "--plots", dir} }},
		{"response --plots --csv", "smith.png", func(in, dir string) []string {
			return []string{"response", in, "--per-decade", "5", "--csv", filepath.Join(dir, "r.csv"), "--plots", dir}
		}},
		{"study --plots --csv", "study.png", func(in, dir string) []string {
			return []string{"study", in, "--steps", "3", "--csv", filepath.Join(dir, "s.csv"), "--plots", dir}
		}},
	}
	for _, f := range figures {
		t.Run(f.name+"/input named "+f.file, func(t *testing.T) {
			dir := t.TempDir()
			in := filepath.Join(dir, f.file)
			if err := os.WriteFile(in, src, 0o644); err != nil {
				t.Fatal(err)
			}
			check(t, dir, in, f.args(in, dir), refused, true)
		})
	}
}

// TestInterruptRemovesPartials: an interrupt during a write removes the
// temporary file, and the old output stays as it was.
func TestInterruptRemovesPartials(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out.csv")
	if err := os.WriteFile(out, []byte("old\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	started, release := make(chan struct{}), make(chan struct{})
	finished := make(chan error)
	g := &fileGuard{}
	go func() {
		finished <- g.writeFileAtomic(out, func(w io.Writer) error {
			fmt.Fprintln(w, "new, half")
			close(started)
			<-release
			return nil
		})
	}()
	<-started
	if n := g.removePartials(); n != 1 {
		t.Errorf("removed %d temporary files, want 1", n)
	}
	close(release)
	if err := <-finished; err == nil {
		t.Error("the interrupted write reported success")
	}
	if got, _ := os.ReadFile(out); string(got) != "old\n" {
		t.Errorf("the output holds %q, want the old content", got)
	}
	for _, n := range dirEntries(t, dir) {
		if strings.HasSuffix(n, ".partial") {
			t.Errorf("a temporary file is left: %s", n)
		}
	}
}

// TestGuardPerRun: the inputs a run reads are its own. A file one run
// read is refused as that run's output, and is a fine output for the
// next run, which did not read it; run gives every run a fresh guard.
func TestGuardPerRun(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "circuit.yaml")
	if err := os.WriteFile(in, []byte("old\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	write := func(w io.Writer) error { _, err := io.WriteString(w, "new\n"); return err }
	first := &fileGuard{}
	first.read(in)
	if err := first.writeFileAtomic(in, write); err == nil || !strings.Contains(err.Error(), "input file") {
		t.Errorf("writing over the run's own input: error %v, want a refusal", err)
	}
	if got, _ := os.ReadFile(in); string(got) != "old\n" {
		t.Errorf("the input changed to %q", got)
	}
	if err := (&fileGuard{}).writeFileAtomic(in, write); err != nil {
		t.Errorf("a run that did not read the file: %v", err)
	}
	// Through the command: the demo circuit as its own CSV output is
	// refused, and the next run in the same process is not affected.
	circuitPath := filepath.Join(dir, "attenuator.yaml")
	src, err := os.ReadFile(filepath.Join(demoDir, "attenuator.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(circuitPath, src, 0o644); err != nil {
		t.Fatal(err)
	}
	if _, stderr, code := runCLI(t, "response", circuitPath, "--points", "3", "--csv", circuitPath); code == exitOK || !strings.Contains(stderr, "input file") {
		t.Errorf("response writing over its circuit: exit %d, %q", code, stderr)
	}
	out := filepath.Join(dir, "out.csv")
	if _, stderr, code := runCLI(t, "response", circuitPath, "--points", "3", "--csv", out); code != exitOK {
		t.Errorf("second run: exit %d, %q", code, stderr)
	}
	if got, _ := os.ReadFile(circuitPath); !bytes.Equal(got, src) {
		t.Error("the circuit file changed")
	}
}
