package main

import (
	"fmt"
	"io"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/ac/touchstone"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/si"
	"qpoint/plots"
	"qpoint/plots/report"
	"qpoint/plots/results"
	"qpoint/smallsignal"
)

type responseFlags struct {
	from, to    string
	perDecade   int
	points      int
	reference   string
	temperature string
	asJSON      bool
	csvPath     string
	touchstone  string
	format      string
	plotsDir    string
	rows        int
	sets        []string
}

func newResponseCmd() *cobra.Command {
	var fl responseFlags
	cmd := &cobra.Command{
		Use:   "response FILE",
		Short: "Small-signal frequency response at the bias point: S-parameters, impedance, probes",
		Long: `response solves the bias point, linearises every diode there and sweeps the
network over frequency. It prints a table at a handful of frequencies:
|S21| and its angle, port 1's return loss and VSWR, and port 1's input
impedance R + jX with the other ports terminated. The full sweep goes to
--json, --csv, a Touchstone file (--touchstone) and figures (--plots).

The sweep comes from the flags, else from the file's analysis.response,
else 1 MHz to 10 GHz at 20 points per decade.`,
		Example: `  qpoint response testdata/demo/detector.yaml
  qpoint response attenuator.yaml --from 100MHz --to 3GHz --per-decade 100
  qpoint response mixer.yaml --touchstone mixer.s3p --format ma
  qpoint response detector.yaml --plots figures/ --csv detector.csv`,
		Args: exactFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runResponse(cmd, args[0], &fl)
		},
	}
	f := cmd.Flags()
	addSetFlag(cmd, &fl.sets)
	f.StringVar(&fl.from, "from", "", "lowest frequency, e.g. 10MHz")
	f.StringVar(&fl.to, "to", "", "highest frequency, e.g. 6GHz")
	f.IntVar(&fl.perDecade, "per-decade", 0, "points per decade on a logarithmic grid")
	f.IntVar(&fl.points, "points", 0, "number of points on a linear grid (instead of --per-decade)")
	f.StringVar(&fl.reference, "reference", "", "reference impedances in ohms, one for all ports or one per port: 50 or 50,75")
	f.StringVar(&fl.temperature, "temperature", "", "circuit temperature, overriding the file's (e.g. 85C)")
	f.BoolVar(&fl.asJSON, "json", false, "print one JSON document (SI units) instead of the table")
	f.StringVar(&fl.csvPath, "csv", "", "write every point to this CSV file")
	f.StringVar(&fl.touchstone, "touchstone", "", "write a Touchstone file (.sNp) of the S-parameters")
	f.StringVar(&fl.format, "format", "ri", "Touchstone number format: ri, ma or db")
	f.StringVar(&fl.plotsDir, "plots", "", "write the response figures (SVG and PNG) into this directory")
	f.IntVar(&fl.rows, "rows", 9, "rows in the printed table")
	return cmd
}

func solveWithTemperature(c *circuit.Circuit, temperature string) (*bias.Point, error) {
	var s bias.Settings
	if err := quantityFlag("temperature", temperature, circuit.Temperature, &s.TemperatureK); err != nil {
		return nil, err
	}
	p, err := bias.Solve(c, s)
	if err != nil {
		return nil, analysisError(err)
	}
	return p, nil
}

// linearise solves c's bias at the flag's temperature, unless p is already
// that point, and linearises it there.
func linearise(c *circuit.Circuit, temperature string, p *bias.Point) (*bias.Point, *smallsignal.Network, error) {
	var err error
	if p == nil {
		if p, err = solveWithTemperature(c, temperature); err != nil {
			return nil, nil, err
		}
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		return nil, nil, analysisError(err)
	}
	return p, nw, nil
}

// responseSetup is a resolved response run: the circuit, its bias and
// linearisation, the grid and the output format.
type responseSetup struct {
	c      *circuit.Circuit
	p      *bias.Point
	nw     *smallsignal.Network
	grid   []float64
	ref    []float64
	format touchstone.Format
}

func runResponse(cmd *cobra.Command, path string, fl *responseFlags) error {
	g := guardOf(cmd)
	s, err := resolveResponse(cmd, g, path, fl)
	if err != nil {
		return err
	}
	var r *ac.Response
	out := cmd.OutOrStdout()
	if fl.plotsDir == "" {
		// Files, JSON and a table only: the points stream to the files
		// and standard output, and the sweep keeps just the table's
		// rows, whatever its length.
		if err := g.refuseInputs(fl.csvPath, fl.touchstone); err != nil {
			return err
		}
		var jsonOut io.Writer
		if fl.asJSON {
			jsonOut = out
		}
		if r, err = streamResponse(g, s, fl, jsonOut); err != nil {
			return err
		}
		if fl.asJSON {
			return nil
		}
	} else if r, err = heldResponse(g, s, fl); err != nil {
		return err
	}
	if fl.asJSON {
		return results.Write(out, results.ResponseOf(r, s.c))
	}
	report.WriteResponse(out, s.c, s.p, r, s.grid, fl.rows)
	writtenTo(out, "CSV", fl.csvPath, "Touchstone", fl.touchstone, "figures", fl.plotsDir)
	return nil
}

// resolveResponse loads the circuit, checks the flags and the outputs,
// and solves and linearises the bias.
func resolveResponse(cmd *cobra.Command, g *fileGuard, path string, fl *responseFlags) (*responseSetup, error) {
	c, err := g.loadCircuit(cmd.ErrOrStderr(), path, fl.sets, fl.temperature)
	if err != nil {
		return nil, err
	}
	if err := g.checkOutputsEarly(fl.plotsDir, fl.csvPath, fl.touchstone); err != nil {
		return nil, err
	}
	if len(c.Ports) == 0 {
		return nil, inputError(fmt.Errorf("%s: the circuit has no ports; a response needs at least one (add a `ports:` list)", path))
	}
	for _, name := range []string{"points", "per-decade"} {
		if f := cmd.Flags().Lookup(name); f.Changed && f.Value.String() != "" {
			if v, _ := strconv.Atoi(f.Value.String()); v < 1 {
				return nil, inputError(fmt.Errorf("flag --%s: %s; accepted: a whole number of at least 1", name, f.Value.String()))
			}
		}
	}
	s := &responseSetup{c: c}
	grid, err := gridRequest(fl.from, fl.to, fl.perDecade, fl.points)
	if err != nil {
		return nil, err
	}
	if s.grid, err = plan.ResponseGrid(c, grid); err != nil {
		return nil, planError(err)
	}
	if s.ref, err = plan.ParseReference(fl.reference, len(c.Ports)); err != nil {
		return nil, planError(err)
	}
	if s.format, err = parseTouchstoneFormat(fl.format); err != nil {
		return nil, err
	}
	if s.p, s.nw, err = linearise(c, fl.temperature, nil); err != nil {
		return nil, err
	}
	cautionOutside(cmd.ErrOrStderr(), s.nw.Outside(s.grid))
	// Every named output is checked before any is written, so that a
	// refusal leaves none behind.
	if fl.touchstone != "" {
		if want := touchstone.Ext(len(c.Ports)); !strings.EqualFold(filepath.Ext(fl.touchstone), want) {
			return nil, inputError(fmt.Errorf("flag --touchstone: %s has %d ports, so its file should end in %s (got %q)", c.Name, len(c.Ports), want, filepath.Ext(fl.touchstone)))
		}
	}
	return s, nil
}

// heldResponse runs the whole sweep in memory, as figures need, and
// writes the files and figures.
func heldResponse(g *fileGuard, s *responseSetup, fl *responseFlags) (*ac.Response, error) {
	c := s.c
	// Refuse a sweep that would not fit rather than run out of memory.
	if need := results.HeldSweepBytes(len(s.grid), len(c.Ports), len(c.Probes)); need > results.MaxHeldSweepBytes {
		return nil, inputError(fmt.Errorf("flag --plots: %d points of %d ports take about %s in memory to draw, more than the %s allowed; accepted: at most %d points with --plots (files and --json stream any number)",
			len(s.grid), len(c.Ports), si.Format(float64(need), "B", 2), si.Format(results.MaxHeldSweepBytes, "B", 2), results.MaxHeldSweepBytes/results.HeldSweepBytes(1, len(c.Ports), len(c.Probes))))
	}
	r, err := ac.Run(s.nw, s.grid, ac.Settings{Reference: s.ref})
	if err != nil {
		return nil, analysisError(err)
	}
	figs := plots.ResponseFigures(r, plan.DesignFrequency(c))
	if err := g.refuseInputs(append([]string{fl.csvPath, fl.touchstone}, figurePaths(fl.plotsDir, figs)...)...); err != nil {
		return nil, err
	}
	if err := g.writeIfNamed(fl.csvPath, func(w io.Writer) error { return results.WriteResponseCSV(w, r) }); err != nil {
		return nil, err
	}
	if fl.touchstone != "" {
		if err := g.writeFileAtomic(fl.touchstone, func(w io.Writer) error {
			return results.WriteTouchstone(w, c, r, s.format)
		}); err != nil {
			return nil, err
		}
	}
	if err := g.writeFigures(fl.plotsDir, figs); err != nil {
		return nil, err
	}
	return r, nil
}

// streamResponse sweeps the circuit over its grid writing every point
// to the CSV and Touchstone files flags name, and to jsonOut when not nil,
// as it comes, each file whole or not at all, and returns the response
// with only the points the table shows (results.ResponseStream).
func streamResponse(g *fileGuard, s *responseSetup, fl *responseFlags, jsonOut io.Writer) (*ac.Response, error) {
	var r *ac.Response
	var sweepErr error
	sweep := func(csvOut, touchstoneOut io.Writer) error {
		st, err := results.NewResponseStream(s.c, s.nw, s.grid, s.ref,
			results.ResponseOutputs{CSV: csvOut, Touchstone: touchstoneOut, JSON: jsonOut, Format: s.format, Rows: fl.rows})
		if err != nil {
			return err
		}
		if sweepErr = st.Sweep(); sweepErr != nil {
			return sweepErr
		}
		r = st.Response()
		return st.Close()
	}
	// One file inside the other: each is renamed into place only when the
	// whole sweep has gone into it.
	withTouchstone := func(csvOut io.Writer) error {
		if fl.touchstone == "" {
			return sweep(csvOut, nil)
		}
		return g.writeFileAtomic(fl.touchstone, func(w io.Writer) error { return sweep(csvOut, w) })
	}
	var err error
	if fl.csvPath != "" {
		err = g.writeFileAtomic(fl.csvPath, withTouchstone)
	} else {
		err = withTouchstone(nil)
	}
	if sweepErr != nil {
		return nil, analysisError(sweepErr)
	}
	return r, err
}
