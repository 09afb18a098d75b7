package output

import (
	"bytes"
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestWriteFileWholeOrNothing: a failed write leaves the old file and no
// temporary file; a good one replaces the file, keeping its mode.
func TestWriteFileWholeOrNothing(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "out.csv")
	if err := os.WriteFile(path, []byte("old\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	var p Partials
	err := WriteFile(path, &p, func(w io.Writer) error {
		io.WriteString(w, strings.Repeat("x", 1<<16))
		return errors.New("the sweep failed")
	})
	if err == nil || !strings.Contains(err.Error(), path) || !strings.Contains(err.Error(), "the sweep failed") {
		t.Errorf("error %v, want it to name the path and the cause", err)
	}
	if got, _ := os.ReadFile(path); string(got) != "old\n" {
		t.Errorf("the old file changed to %q", got)
	}
	if err := WriteFile(path, nil, func(w io.Writer) error { _, err := io.WriteString(w, "new\n"); return err }); err != nil {
		t.Fatal(err)
	}
	if got, _ := os.ReadFile(path); string(got) != "new\n" {
		t.Errorf("the file holds %q, want the new content", got)
	}
	if st, _ := os.Stat(path); st.Mode().Perm() != 0o600 {
		t.Errorf("mode %v, want the old file's 0600", st.Mode().Perm())
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		t.Errorf("the folder holds %d entries, want only the output", len(entries))
	}
}

// TestPartialsRemove: a temporary file still being written is removed,
// and the write then fails at its rename.
func TestPartialsRemove(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "out.csv")
	var p Partials
	started, release, done := make(chan struct{}), make(chan struct{}), make(chan error)
	go func() {
		done <- WriteFile(path, &p, func(w io.Writer) error { close(started); <-release; return nil })
	}()
	<-started
	if n := p.Remove(); n != 1 {
		t.Errorf("removed %d, want 1", n)
	}
	close(release)
	if err := <-done; err == nil {
		t.Error("the interrupted write reported success")
	}
	if _, err := os.Stat(path); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("the output exists after an interrupted write: %v", err)
	}
}

// TestTargetRefuses: a directory and a path under a file are refused as
// *PathError; a device is written through.
func TestTargetRefuses(t *testing.T) {
	dir := t.TempDir()
	var pe *PathError
	if _, _, err := Target(dir); !errors.As(err, &pe) || !strings.Contains(err.Error(), "directory") {
		t.Errorf("Target(dir): %v, want a PathError about a directory", err)
	}
	file := filepath.Join(dir, "f")
	os.WriteFile(file, nil, 0o644)
	if err := CheckFolder(filepath.Join(file, "sub"), "x.csv"); !errors.As(err, &pe) {
		t.Errorf("CheckFolder under a file: %v, want a PathError", err)
	}
	if _, through, err := Target(os.DevNull); err != nil || !through {
		t.Errorf("Target(%s) = through %v, %v; want written through", os.DevNull, through, err)
	}
}

// TestEscaping: control and format characters become escapes, also when
// a character is split between writes; tabs and newlines pass.
func TestEscaping(t *testing.T) {
	var b bytes.Buffer
	e := &Escaping{W: &b}
	rlo := []byte("\u202e")
	e.Write([]byte("a\x1b[2J\tb\n"))
	e.Write(rlo[:1])
	e.Write(rlo[1:])
	if got, want := b.String(), "a\\x1b[2J\tb\n\\u202e"; got != want {
		t.Errorf("got %q, want %q", got, want)
	}
}

// TestChecked keeps the first error.
func TestChecked(t *testing.T) {
	c := &Checked{W: failing{}}
	c.Write([]byte("x"))
	if _, err := c.Write([]byte("y")); err == nil || c.Err == nil {
		t.Error("the error was not kept")
	}
}

type failing struct{}

func (failing) Write([]byte) (int, error) { return 0, errors.New("closed") }

// TestCheck: two outputs naming one file, directly or through a link or
// another spelling, are refused naming both; a folder that is a file is
// refused; distinct new names and empty ones pass.
func TestCheck(t *testing.T) {
	dir := t.TempDir()
	a := filepath.Join(dir, "a.csv")
	if err := os.WriteFile(a, nil, 0o600); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "link.csv")
	if err := os.Symlink(a, link); err != nil {
		t.Fatal(err)
	}
	var pe *PathError
	for _, c := range []struct {
		paths []string
		want  string // "" for no refusal
	}{
		{[]string{a, "", filepath.Join(dir, "b.csv")}, ""},
		{[]string{a, a}, "two outputs"},
		{[]string{a, link}, "name the same file"},
		{[]string{a, dir + "/./a.csv"}, "name the same file"},
		{[]string{filepath.Join(a, "fig.svg")}, "not a directory"},
	} {
		err := Check(c.paths...)
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%v: %v", c.paths, err)
		case c.want != "" && (!errors.As(err, &pe) || !strings.Contains(err.Error(), c.want)):
			t.Errorf("%v: %v, want a PathError saying %q", c.paths, err, c.want)
		}
	}
}
