package main

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"sync"
	"syscall"

	"github.com/spf13/cobra"
)

// fileGuard holds what one run of the command knows about its files: the
// inputs it reads, so that no output is ever written over one of them,
// and the temporary files being written, so that an interrupt can remove
// them (removePartials) instead of leaving them beside the outputs. Every
// output goes through its methods. run makes one per run and hands it to
// the commands in their context (guardOf).
type fileGuard struct {
	inputs []string

	mu       sync.Mutex
	partials map[string]bool
}

type guardKey struct{}

// withGuard returns ctx carrying g.
func withGuard(ctx context.Context, g *fileGuard) context.Context {
	return context.WithValue(ctx, guardKey{}, g)
}

// guardOf returns the file guard of the run cmd belongs to. A command
// run outside newRoot's tree (a test that builds one alone) gets a guard
// of its own, kept on the command's context from then on.
func guardOf(cmd *cobra.Command) *fileGuard {
	if g, ok := cmd.Context().Value(guardKey{}).(*fileGuard); ok {
		return g
	}
	g := &fileGuard{}
	cmd.SetContext(withGuard(cmd.Context(), g))
	return g
}

// read records path as an input of the run.
func (g *fileGuard) read(path string) {
	g.inputs = append(g.inputs, path)
}

func (g *fileGuard) addPartial(name string) {
	g.mu.Lock()
	if g.partials == nil {
		g.partials = map[string]bool{}
	}
	g.partials[name] = true
	g.mu.Unlock()
}

func (g *fileGuard) dropPartial(name string) {
	g.mu.Lock()
	delete(g.partials, name)
	g.mu.Unlock()
}

// removePartials deletes every temporary file still being written and
// returns how many it removed. It runs on the way out: a write still going
// fails at its rename, and the process exits.
func (g *fileGuard) removePartials() int {
	g.mu.Lock()
	defer g.mu.Unlock()
	n := 0
	for name := range g.partials {
		if os.Remove(name) == nil {
			n++
		}
		delete(g.partials, name)
	}
	return n
}

// exitOnInterrupt makes an interrupt (Ctrl-C), a termination request or a
// hang-up (the terminal closed) remove the temporary files of outputs not yet finished, say so, and exit
// with the shell's status for that signal (128 + its number). Finished
// outputs are whole already; unfinished ones are left as they were before
// the command ran. It returns a function that stops listening.
func (g *fileGuard) exitOnInterrupt(stderr io.Writer) (stop func()) {
	ch := make(chan os.Signal, 1)
	signal.Notify(ch, os.Interrupt, syscall.SIGTERM, syscall.SIGHUP)
	done := make(chan struct{})
	go func() {
		select {
		case sig := <-ch:
			g.removePartials()
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
// old file at path untouched and removes the temporary file. A file
// replaced keeps its permission bits; a new one gets 0644.
//
// Only a regular file is ever replaced. A symbolic link is followed and
// its target written (atomically, when the target is a regular file); a
// character device or a named pipe (/dev/null, /dev/stdout, a FIFO) is
// written through, as a stream that cannot be whole or nothing; anything
// else (a directory, a socket, a block device, a dangling link) is
// refused.
func (g *fileGuard) writeFileAtomic(path string, write func(w io.Writer) error) (err error) {
	if err := g.refuseInput(path); err != nil {
		return err
	}
	target, through, err := outputTarget(path)
	if err != nil {
		return err
	}
	if through {
		return writeThrough(path, target, write)
	}
	mode := os.FileMode(0o644)
	if st, err := os.Stat(target); err == nil {
		mode = st.Mode().Perm()
	}
	dir := filepath.Dir(target)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(target)+".*.partial")
	if err != nil {
		return inputError(fmt.Errorf("cannot write %s: %w", path, err))
	}
	g.addPartial(tmp.Name())
	defer g.dropPartial(tmp.Name())
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
	if err := os.Chmod(tmp.Name(), mode); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := os.Rename(tmp.Name(), target); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	renamed = true
	return nil
}

// outputTarget returns the file an output named path goes to: path itself,
// or the target of the symbolic link it names, and whether that is a
// device or pipe to write through rather than replace. It refuses what
// may not be written.
func outputTarget(path string) (target string, through bool, err error) {
	st, err := os.Lstat(path)
	if errors.Is(err, os.ErrNotExist) {
		return path, false, nil
	}
	if err != nil {
		return "", false, inputError(fmt.Errorf("cannot write %s: %w", path, err))
	}
	target = path
	if st.Mode()&os.ModeSymlink != 0 {
		resolved, err := filepath.EvalSymlinks(path)
		if err != nil {
			return "", false, inputError(fmt.Errorf("refusing to write %s: it is a symbolic link whose target cannot be reached (%v); accepted: a regular file, a link to one, or a device such as /dev/null", path, err))
		}
		target = resolved
		if st, err = os.Stat(resolved); err != nil {
			return "", false, inputError(fmt.Errorf("cannot write %s: %w", path, err))
		}
	}
	switch m := st.Mode(); {
	case m.IsRegular():
		return target, false, nil
	case m&os.ModeCharDevice != 0, m&os.ModeNamedPipe != 0:
		return target, true, nil
	case m.IsDir():
		return "", false, inputError(fmt.Errorf("refusing to write %s: it is a directory; accepted: a file name", path))
	default:
		return "", false, inputError(fmt.Errorf("refusing to write %s: it is a %v, not a regular file; accepted: a regular file, a link to one, or a character device or named pipe to write through", path, m.Type()))
	}
}

// writeThrough writes to an existing device or named pipe as a stream.
func writeThrough(path, target string, write func(w io.Writer) error) error {
	f, err := os.OpenFile(target, os.O_WRONLY, 0)
	if err != nil {
		return fmt.Errorf("cannot write %s: %w", path, err)
	}
	bw := bufio.NewWriter(f)
	err = write(bw)
	if err == nil {
		err = bw.Flush()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}

// refuseInputs checks a command's outputs before it writes any (or
// starts work): none may name an input file, two may not name one file
// (a CSV under a figure's name in the figure folder, two flags on one
// path), each must be a place writeFileAtomic can write (a regular file,
// a link to one, a device or pipe, or a new name), and each one's folder
// must be a folder or creatable. Empty paths are skipped.
func (g *fileGuard) refuseInputs(paths ...string) error {
	seen := map[string]string{}
	for _, p := range paths {
		if p == "" {
			continue
		}
		if err := g.refuseInput(p); err != nil {
			return err
		}
		target, _, err := outputTarget(p)
		if err != nil {
			return err
		}
		key, err := filepath.Abs(target)
		if err != nil {
			key = filepath.Clean(target)
		}
		if first, ok := seen[key]; ok {
			if first == p {
				return inputError(fmt.Errorf("refusing to write %s twice: two outputs (a flag and a figure, or two flags) name it; choose different output names", p))
			}
			return inputError(fmt.Errorf("refusing to write %s twice: %s and %s name the same file; choose different output names", target, first, p))
		}
		seen[key] = p
		if err := refuseFolder(filepath.Dir(target), p); err != nil {
			return err
		}
	}
	return nil
}

// checkOutputsEarly checks a command's named files and its figure folder
// before any work, so that a wrong output is refused in a moment rather
// than after a long analysis or after another output was replaced. The
// files a figure folder will hold are checked again, by name, before any
// is written.
func (g *fileGuard) checkOutputsEarly(plotsDir string, files ...string) error {
	if err := g.refuseInputs(files...); err != nil {
		return err
	}
	if plotsDir == "" {
		return nil
	}
	if st, err := os.Stat(plotsDir); err == nil && !st.IsDir() {
		return inputError(fmt.Errorf("flag --plots: %s is not a directory; accepted: a folder, existing or new", plotsDir))
	}
	return refuseFolder(plotsDir, plotsDir)
}

// refuseFolder fails when dir, the folder an output goes to, exists as
// something other than a folder, or lies under such a thing.
func refuseFolder(dir, output string) error {
	for d := dir; ; d = filepath.Dir(d) {
		st, err := os.Stat(d)
		if err == nil {
			if !st.IsDir() {
				return inputError(fmt.Errorf("cannot write %s: %s is not a directory", output, d))
			}
			return nil
		}
		if !errors.Is(err, os.ErrNotExist) {
			return inputError(fmt.Errorf("cannot write %s: %w", output, err))
		}
		if parent := filepath.Dir(d); parent == d {
			return nil
		}
	}
}

// refuseInput fails when path names one of the command's input files.
func (g *fileGuard) refuseInput(path string) error {
	out, err := os.Stat(path)
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		return nil // let the write report it
	}
	for _, in := range g.inputs {
		if st, err := os.Stat(in); err == nil && os.SameFile(st, out) {
			return inputError(fmt.Errorf("refusing to write %s: it is the input file; choose another output name", path))
		}
	}
	return nil
}
