package main

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// inputs lists the files the current command reads, so that no output is
// ever written over one of them.
var inputs []string

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
