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
	if temperature != "" {
		tk, err := circuit.ParseBounded(temperature, circuit.Temperature)
		if err != nil {
			return nil, inputError(fmt.Errorf("flag --temperature: %w", err))
		}
		s.TemperatureK = tk
	}
	p, err := bias.Solve(c, s)
	if err != nil {
		return nil, analysisError(err)
	}
	return p, nil
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
	for _, x := range []struct{ what, path string }{{"CSV", fl.csvPath}, {"Touchstone", fl.touchstone}, {"figures", fl.plotsDir}} {
		if x.path != "" {
			fmt.Fprintf(out, "%s written to %s\n", x.what, x.path)
		}
	}
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
	if s.p, err = solveWithTemperature(c, fl.temperature); err != nil {
		return nil, err
	}
	if s.nw, err = smallsignal.New(s.p); err != nil {
		return nil, analysisError(err)
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
	if need := sweepBytes(len(s.grid), len(c.Ports), len(c.Probes)); need > maxHeldSweepBytes {
		return nil, inputError(fmt.Errorf("flag --plots: %d points of %d ports take about %s in memory to draw, more than the %s allowed; accepted: at most %d points with --plots (files and --json stream any number)",
			len(s.grid), len(c.Ports), si.Format(float64(need), "B", 2), si.Format(maxHeldSweepBytes, "B", 2), maxHeldSweepBytes/sweepBytes(1, len(c.Ports), len(c.Probes))))
	}
	r, err := ac.Run(s.nw, s.grid, ac.Settings{Reference: s.ref})
	if err != nil {
		return nil, analysisError(err)
	}
	figs := plots.ResponseFigures(r, designFrequency(c))
	if err := g.refuseInputs(append([]string{fl.csvPath, fl.touchstone}, figurePaths(fl.plotsDir, figs)...)...); err != nil {
		return nil, err
	}
	if fl.csvPath != "" {
		if err := g.writeFileAtomic(fl.csvPath, func(w io.Writer) error { return results.WriteResponseCSV(w, r) }); err != nil {
			return nil, err
		}
	}
	if fl.touchstone != "" {
		if err := g.writeFileAtomic(fl.touchstone, func(w io.Writer) error {
			return writeTouchstone(w, c, r, s.format)
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
// with only the points the table shows: the memory a sweep takes does not
// grow with its length.
func streamResponse(g *fileGuard, s *responseSetup, fl *responseFlags, jsonOut io.Writer) (*ac.Response, error) {
	settings := ac.Settings{Reference: s.ref}
	r := &ac.Response{Probes: s.c.Probes}
	for i, p := range s.nw.Ports {
		z := p.Impedance
		if s.ref != nil {
			z = s.ref[i]
		}
		r.Ports = append(r.Ports, ac.PortInfo{Name: p.Name, Impedance: z})
	}
	keep := map[int]bool{}
	for _, i := range report.PickRows(len(s.grid), fl.rows) {
		keep[i] = true
	}
	var sweepErr error
	sweep := func(csvOut, touchstoneOut io.Writer) error {
		sinks, err := openResponseSinks(r, s, csvOut, touchstoneOut, jsonOut)
		if err != nil {
			return err
		}
		k := 0
		var ws ac.Workspace
		_, _, sweepErr = ws.Sweep(s.nw, s.grid, settings, func(pt ac.Point) error {
			if keep[k] {
				r.Points = append(r.Points, pt)
			}
			k++
			return sinks.write(pt)
		})
		if sweepErr != nil {
			return sweepErr
		}
		r.Stats = ws.SweepStats()
		return sinks.close(r.Stats)
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

// responseSinks are the streams a sweep's points go to as they come; a
// nil one is not written.
type responseSinks struct {
	probes []string
	csv    *results.ResponseCSV
	ts     *touchstone.Writer
	json   *results.ResponseWriter
}

// openResponseSinks starts each stream that has a writer: its header.
func openResponseSinks(r *ac.Response, s *responseSetup, csvOut, touchstoneOut, jsonOut io.Writer) (*responseSinks, error) {
	k := responseSinks{probes: r.Probes}
	var err error
	if csvOut != nil {
		if k.csv, err = results.NewResponseCSV(csvOut, r.Ports, r.Probes); err != nil {
			return nil, err
		}
	}
	if touchstoneOut != nil {
		if k.ts, err = touchstone.NewWriter(touchstoneOut, touchstonePorts(r.Ports), s.format, touchstoneComment(s.c), len(s.grid)); err != nil {
			return nil, err
		}
	}
	if jsonOut != nil {
		if k.json, err = results.NewResponseWriter(jsonOut, r.Ports, results.LinePartsOf(s.c, nil)); err != nil {
			return nil, err
		}
	}
	return &k, nil
}

// write sends one point to every stream: JSON, CSV, Touchstone.
func (k *responseSinks) write(pt ac.Point) error {
	if k.json != nil {
		if err := k.json.Write(pt, k.probes); err != nil {
			return err
		}
	}
	if k.csv != nil {
		if err := k.csv.Write(pt); err != nil {
			return err
		}
	}
	if k.ts != nil {
		return k.ts.Write(touchstone.Point{FrequencyHz: pt.FrequencyHz, S: pt.S})
	}
	return nil
}

// close ends every stream: the JSON document's stats, the buffered CSV,
// the Touchstone file's check of its point count.
func (k *responseSinks) close(stats ac.Stats) error {
	if k.json != nil {
		if err := k.json.Close(stats); err != nil {
			return err
		}
	}
	if k.csv != nil {
		if err := k.csv.Close(); err != nil {
			return err
		}
	}
	if k.ts != nil {
		return k.ts.Close()
	}
	return nil
}

// maxHeldSweepBytes bounds the memory a sweep held whole (for figures)
// may take, so that every documented input stays within about 1 GB.
const maxHeldSweepBytes = 400 << 20

// sweepBytes estimates the memory of points held sweep points of a
// network with the given ports and probes: the S-matrix, the input
// impedances and probe voltages (16 bytes each), their slice headers and
// the point itself, and what the figures derive from each.
func sweepBytes(points, ports, probes int) int {
	perPoint := 16*(ports*ports+ports+probes) + 24*(ports+3) + 64 + 200
	return points * perPoint
}
