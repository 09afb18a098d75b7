package main

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"sync"
	"syscall"
)

// inputs lists the files the current command reads, so that no output is
// ever written over one of them.
var inputs []string

// partials holds the temporary files writeFileAtomic is writing, so that
// an interrupt can remove them (removePartials) instead of leaving them
// beside the outputs.
var partials = struct {
	sync.Mutex
	names map[string]bool
}{names: map[string]bool{}}

func addPartial(name string) {
	partials.Lock()
	partials.names[name] = true
	partials.Unlock()
}

func dropPartial(name string) {
	partials.Lock()
	delete(partials.names, name)
	partials.Unlock()
}

// removePartials deletes every temporary file still being written and
// returns how many it removed. It runs on the way out: a write still going
// fails at its rename, and the process exits.
func removePartials() int {
	partials.Lock()
	defer partials.Unlock()
	n := 0
	for name := range partials.names {
		if os.Remove(name) == nil {
			n++
		}
		delete(partials.names, name)
	}
	return n
}

// exitOnInterrupt makes an interrupt (Ctrl-C) or a termination request
// remove the temporary files of outputs not yet finished, say so, and exit
// with the shell's status for that signal (128 + its number). Finished
// outputs are whole already; unfinished ones are left as they were before
// the command ran. It returns a function that stops listening.
func exitOnInterrupt(stderr io.Writer) (stop func()) {
	ch := make(chan os.Signal, 1)
	signal.Notify(ch, os.Interrupt, syscall.SIGTERM)
	done := make(chan struct{})
	go func() {
		select {
		case sig := <-ch:
			removePartials()
			fmt.Fprintf(stderr, "\nqpoint: %v; outputs not yet written were left as they were\n", sig)
			code := 130
			if s, ok := sig.(syscall.Signal); ok {
				code = 128 + int(s)
			}
			os.Exit(code)
		case <-done:
		}
	}()
	return func() {
		signal.Stop(ch)
		close(done)
	}
}

// writeFileAtomic writes a whole file or nothing: the content goes to a
// temporary file in the same directory, which is synced and renamed over
// path only when write succeeded. A write that fails or panics leaves any
// old file at path untouched and removes the temporary file.
func writeFileAtomic(path string, write func(w io.Writer) error) (err error) {
	if err := refuseInput(path); err != nil {
		return err
	}
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".*.partial")
	if err != nil {
		return fmt.Errorf("cannot write %s: %w", path, err)
	}
	addPartial(tmp.Name())
	defer dropPartial(tmp.Name())
	// Until the rename, the temporary file goes away on every way out,
	// a panic in write included (run recovers it, far from here).
	renamed := false
	defer func() {
		if !renamed {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	bw := bufio.NewWriter(tmp)
	if err := write(bw); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := tmp.Sync(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := tmp.Close(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := os.Chmod(tmp.Name(), 0o644); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	renamed = true
	return nil
}

// refuseInputs fails when any of paths ("" skipped) names one of the
// command's input files: a command with several outputs checks them all
// before it writes any, so that a refusal leaves none behind.
func refuseInputs(paths ...string) error {
	for _, p := range paths {
		if p == "" {
			continue
		}
		if err := refuseInput(p); err != nil {
			return err
		}
	}
	return nil
}

// refuseInput fails when path names one of the command's input files.
func refuseInput(path string) error {
	out, err := os.Stat(path)
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		return nil // let the write report it
	}
	for _, in := range inputs {
		if st, err := os.Stat(in); err == nil && os.SameFile(st, out) {
			return inputError(fmt.Errorf("refusing to write %s: it is the input file; choose another output name", path))
		}
	}
	return nil
}
