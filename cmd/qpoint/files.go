package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"

	"qpoint/plots/output"

	"github.com/spf13/cobra"
)

// fileGuard holds what one run of the command knows about its files: the
// inputs it reads, so that no output is ever written over one of them,
// and the temporary files being written, so that an interrupt can remove
// them (removePartials) instead of leaving them beside the outputs. Every
// output goes through its methods. run makes one per run and hands it to
// the commands in their context (guardOf).
type fileGuard struct {
	inputs   []string
	partials output.Partials
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

// removePartials deletes every temporary file still being written and
// returns how many it removed. It runs on the way out: a write still going
// fails at its rename, and the process exits.
func (g *fileGuard) removePartials() int { return g.partials.Remove() }

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

// writeFileAtomic writes a whole file or nothing (output.WriteFile), and
// refuses an input of the run. A refusal of the path is bad input.
func (g *fileGuard) writeFileAtomic(path string, write func(w io.Writer) error) error {
	if err := g.refuseInput(path); err != nil {
		return err
	}
	return pathError(output.WriteFile(path, &g.partials, write))
}

// pathError makes output's refusal of a path (*output.PathError) bad
// input; other errors pass unchanged.
func pathError(err error) error {
	var pe *output.PathError
	if errors.As(err, &pe) {
		return inputError(err)
	}
	return err
}

// refuseInputs checks a command's outputs before it writes any (or
// starts work): none may name an input file, two may not name one file
// (a CSV under a figure's name in the figure folder, two flags on one
// path), each must be a place writeFileAtomic can write (a regular file,
// a link to one, a device or pipe, or a new name), and each one's folder
// must be a folder or creatable. Empty paths are skipped.
func (g *fileGuard) refuseInputs(paths ...string) error {
	for _, p := range paths {
		if err := g.refuseInput(p); err != nil {
			return err
		}
	}
	return pathError(output.Check(paths...))
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
	return pathError(output.CheckFolder(plotsDir, plotsDir))
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
