// Command qpoint finds the DC operating point of every diode in a bias
// network and, from there, what the circuit does to a small signal.
//
// Run `qpoint --help` for the commands, or `qpoint demo` for a tour.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"runtime/debug"
	"strings"

	"qpoint/plots/output"

	"github.com/spf13/cobra"
)

// Exit codes.
const (
	exitOK       = 0
	exitAnalysis = 1 // the analysis ran and failed
	exitInput    = 2 // bad input or usage
)

// exitError carries an exit code with an error.
type exitError struct {
	code int
	err  error
}

func (e *exitError) Error() string { return e.err.Error() }
func (e *exitError) Unwrap() error { return e.err }

func inputError(err error) error    { return &exitError{exitInput, err} }
func analysisError(err error) error { return &exitError{exitAnalysis, err} }

func main() {
	tuneGC(nil)
	g := &fileGuard{}
	stop := g.exitOnInterrupt(os.Stderr)
	code := runGuarded(g, os.Args[1:], os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

// run executes the command line args and returns the exit code. No panic
// escapes: one is reported as an internal error.
func run(args []string, stdout, stderr io.Writer) (code int) {
	return runGuarded(&fileGuard{}, args, stdout, stderr)
}

// runGuarded is run with the file guard g, which main also hands to the
// interrupt handler.
func runGuarded(g *fileGuard, args []string, stdout, stderr io.Writer) (code int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(stderr, "qpoint: internal error: %v\nPlease report this with the circuit file that caused it.\n", r)
			code = exitAnalysis
		}
	}()
	out := &output.Checked{W: &output.Escaping{W: stdout}}
	stderr = &output.Escaping{W: stderr}
	root := newRoot(out, stderr)
	root.SetArgs(args)
	err := root.ExecuteContext(withGuard(context.Background(), g))
	if err == nil && out.Err != nil {
		// A table or document that did not reach its reader is a
		// failure, whatever the analysis did (a closed or full output).
		err = analysisError(fmt.Errorf("writing standard output: %w", out.Err))
	}
	if err == nil {
		return exitOK
	}
	fmt.Fprintln(stderr, "qpoint:", err)
	var e *exitError
	if errors.As(err, &e) {
		return e.code
	}
	// Cobra's own errors are about flags and arguments.
	fmt.Fprintln(stderr, "Run 'qpoint --help' for usage.")
	return exitInput
}

// version describes the build from its build information: the module
// version (a tag, or "(devel)" for a build from a checkout) and, where
// the build recorded them, the revision, its time and whether the tree
// had changes.
func version() string {
	info, ok := debug.ReadBuildInfo()
	if !ok {
		return "(no build information)"
	}
	v := info.Main.Version
	if v == "" {
		v = "(devel)"
	}
	var rev, at string
	modified := false
	for _, s := range info.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.time":
			at = s.Value
		case "vcs.modified":
			modified = s.Value == "true"
		}
	}
	if rev != "" {
		if len(rev) > 12 {
			rev = rev[:12]
		}
		v += ", revision " + rev
		if modified {
			v += " with local changes"
		}
		if at != "" {
			v += ", " + at
		}
	}
	return v + ", " + info.GoVersion
}

func newRoot(stdout, stderr io.Writer) *cobra.Command {
	root := &cobra.Command{
		Use:   "qpoint",
		Short: "Bias points and small-signal behaviour of diode circuits",
		Long: `qpoint reads one circuit file describing a diode bias network (detector,
mixer, attenuator, limiter), finds the DC operating point of every diode,
and reports what the circuit does at that point.

Results are model estimates: confirm them by measurement before relying on
them, and let the parts' ratings and your local practice govern.`,
		Example: `  qpoint demo                                  the built-in circuits, with HTML reports
  qpoint bias detector.yaml                    node voltages and diode Q points
  qpoint bias detector.yaml --json             the same as one JSON document
  qpoint response attenuator.yaml --plots fig  S-parameters, impedance, figures
  qpoint distortion detector.yaml              Volterra estimate beside the waveform
  qpoint noise detector.yaml                   noise, NEP, tangential sensitivity
  qpoint study attenuator.yaml --target "s21=-6dB@900MHz"
  qpoint report mixer.yaml -o mixer.html       everything in one page`,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.SetOut(stdout)
	root.SetErr(stderr)
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return inputError(fmt.Errorf("%w (see '%s --help')", err, c.CommandPath()))
	})
	root.Version = version()
	root.SetVersionTemplate("qpoint {{.Version}}\n")
	root.SetHelpCommand(&cobra.Command{
		Use:   "help [command]",
		Short: "Help about any command",
		RunE: func(c *cobra.Command, args []string) error {
			target, rest, err := root.Find(args)
			if err != nil || target == nil || len(rest) > 0 {
				return inputError(fmt.Errorf("help: no command %q; accepted: one of the commands `qpoint --help` lists", strings.Join(args, " ")))
			}
			return target.Help()
		},
	})
	root.AddCommand(newBiasCmd(), newResponseCmd(), newDistortionCmd(), newStudyCmd(), newNoiseCmd(), newReportCmd(), newHarmonicsCmd(), newDemoCmd())
	root.AddCommand(newFitCmd(), newYieldCmd(), newPulseCmd(), newMixerCmd(), newExploreCmd())
	return root
}
