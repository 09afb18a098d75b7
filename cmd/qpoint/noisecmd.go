package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"

	"github.com/spf13/cobra"

	"qpoint/ac/plan"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/plots"
	"qpoint/plots/report"
	"qpoint/plots/results"
	"qpoint/smallsignal"
)

type noiseFlags struct {
	input, output     string
	from, to          string
	perDecade, points int
	temperature       string
	bandwidth         string
	carrier           string
	videoBandwidth    string
	asJSON            bool
	csvPath           string
	plotsDir          string
	rows              int
	sets              []string
}

func newNoiseCmd() *cobra.Command {
	var fl noiseFlags
	cmd := &cobra.Command{
		Use:   "noise FILE",
		Short: "Small-signal noise at the bias point: density, noise figure, contributions, detector sensitivity",
		Long: `noise linearises the circuit at its DC bias point and finds the noise at the
output port or node across frequency. Every resistor and diode series
resistance makes thermal noise 4kT/R at the circuit temperature; every
junction makes shot noise 2q(I_D + 2 I_S), and flicker noise K·|I_D|^a/f
where its model gives flicker_coefficient; every port's reference
resistance makes thermal noise at the port's noise_temperature (290 K
unless the file says otherwise).

It prints, at a handful of frequencies:
  output noise     V/√Hz at the output, every source as operated
  input-referred   the circuit's own noise as an EMF in series with the
                   input port's generator, V/√Hz
  noise figure     with the input port's source at 290 K and the output
                   port's load left out (IEEE definition)
then the noise integrated over a band (--bandwidth, else the sweep) and
each source's share of it.

Where the output is a detector's (a carrier from --carrier or the file's
analysis.distortion, at -20 dBm, leaves more rectified DC than carrier at
an output that is not AC-coupled), or when --carrier or --video-bandwidth
ask for it, it also reports the voltage sensitivity, the
noise-equivalent power and the tangential sensitivity in the video band
(--video-bandwidth, default 1 Hz to 2 MHz); the default sweep is then that
video band. Noise is that of the network linearised at its DC bias point:
a mixer's conversion noise, with a local oscillator pumping the diodes,
is qpoint mixer's.`,
		Example: `  qpoint noise testdata/demo/attenuator.yaml
  qpoint noise testdata/demo/detector.yaml --video-bandwidth 10MHz
  qpoint noise detector.yaml --carrier 915MHz --video-bandwidth 100Hz:1MHz --json
  qpoint noise attenuator.yaml --from 100MHz --to 3GHz --bandwidth 800MHz:1GHz --csv noise.csv`,
		Args: exactFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runNoise(cmd, args[0], &fl)
		},
	}
	f := cmd.Flags()
	addSetFlag(cmd, &fl.sets)
	f.StringVar(&fl.input, "input", "", "port of the signal source (default: the file's distortion input, else the first port)")
	f.StringVar(&fl.output, "output", "", "output port or node (default: the file's distortion output, else the last port)")
	f.StringVar(&fl.from, "from", "", "lowest frequency of the sweep, e.g. 10MHz")
	f.StringVar(&fl.to, "to", "", "highest frequency of the sweep, e.g. 6GHz")
	f.IntVar(&fl.perDecade, "per-decade", 0, "points per decade on a logarithmic grid")
	f.IntVar(&fl.points, "points", 0, "number of points on a linear grid (instead of --per-decade)")
	f.StringVar(&fl.temperature, "temperature", "", "circuit temperature, overriding the file's (e.g. 85C)")
	f.StringVar(&fl.bandwidth, "bandwidth", "", "integrate the noise over LOW:HIGH, e.g. 800MHz:1GHz (default: the sweep)")
	f.StringVar(&fl.carrier, "carrier", "", "carrier frequency a detector detects (default: the file's analysis.distortion frequency)")
	f.StringVar(&fl.videoBandwidth, "video-bandwidth", "", "detector video bandwidth: HIGH (from 1 Hz) or LOW:HIGH [2MHz]")
	f.BoolVar(&fl.asJSON, "json", false, "print one JSON document (SI units) instead of tables")
	f.StringVar(&fl.csvPath, "csv", "", "write every point, with each source's contribution, to this CSV file")
	f.StringVar(&fl.plotsDir, "plots", "", "write the noise figures (density; stacked contributions) as SVG and PNG, with their data as CSV, into this directory")
	f.IntVar(&fl.rows, "rows", 9, "rows in the printed table")
	return cmd
}

// noiseSetup is a resolved noise run: the circuit, its bias and network,
// and the plan.
type noiseSetup struct {
	c    *circuit.Circuit
	p    *bias.Point
	nw   *smallsignal.Network
	plan *plan.Noise
}

// resolveNoiseFor reads the flags into a request, solves the bias (when p
// is nil) and linearises it, and resolves the plan.
func resolveNoiseFor(c *circuit.Circuit, fl *noiseFlags, p *bias.Point) (*noiseSetup, error) {
	req := plan.NoiseRequest{Input: fl.input, Output: fl.output}
	var err error
	if req.Grid, err = gridRequest(fl.from, fl.to, fl.perDecade, fl.points); err != nil {
		return nil, err
	}
	if err := quantityFlag("carrier", fl.carrier, circuit.Frequency, &req.CarrierHz); err != nil {
		return nil, err
	}
	if err := videoBandFlag(fl.videoBandwidth, &req.VideoBandHz); err != nil {
		return nil, err
	}
	if fl.bandwidth != "" {
		lo, hi, err := plan.ParseBand("bandwidth", fl.bandwidth, 0)
		if err != nil {
			return nil, planError(err)
		}
		req.BandHz = [2]float64{lo, hi}
	}
	// The path's errors come before the bias is solved.
	if _, err := plan.SignalPath(c, fl.input, fl.output); err != nil {
		return nil, planError(err)
	}
	s := &noiseSetup{c: c}
	if s.p, s.nw, err = linearise(c, fl.temperature, p); err != nil {
		return nil, err
	}
	if s.plan, err = plan.ResolveNoise(c, s.nw, req); err != nil {
		return nil, planError(err)
	}
	return s, nil
}

func runNoise(cmd *cobra.Command, path string, fl *noiseFlags) error {
	g := guardOf(cmd)
	if fl.rows < 1 {
		return inputError(fmt.Errorf("flag --rows: %d; accepted: 1 or more", fl.rows))
	}
	c, err := g.loadCircuit(cmd.ErrOrStderr(), path, fl.sets, fl.temperature)
	if err != nil {
		return err
	}
	if err := g.checkOutputsEarly(fl.plotsDir, fl.csvPath); err != nil {
		return err
	}
	s, err := resolveNoiseFor(c, fl, nil)
	if err != nil {
		return err
	}
	o, err := s.plan.Run(s.nw)
	if err != nil {
		return analysisError(err)
	}
	cautionOutside(cmd.ErrOrStderr(), o.Result.Outside)
	if err := g.writeNoiseFiles(fl, o); err != nil {
		return err
	}
	out := cmd.OutOrStdout()
	if fl.asJSON {
		return results.Write(out, results.NoiseOf(s.c, o))
	}
	report.WriteNoise(out, s.nw, o, fl.rows)
	fmt.Fprintln(out)
	writtenTo(out, "CSV", fl.csvPath)
	if fl.plotsDir != "" {
		fmt.Fprintf(out, "figures written to %s (noise-density, noise-contributions: SVG, PNG and CSV data)\n", fl.plotsDir)
	}
	return nil
}

// writeNoiseFiles writes the CSV file and the figures with their data
// the flags name, after checking every one of them.
func (g *fileGuard) writeNoiseFiles(fl *noiseFlags, o *plan.NoiseRun) error {
	// The figures' data go beside them.
	tables := results.NoiseFigureData
	paths := []string{fl.csvPath}
	var figs []*plots.Figure
	if fl.plotsDir != "" {
		figs = report.NoiseFigures(o.Result)
		for _, tb := range tables {
			paths = append(paths, filepath.Join(fl.plotsDir, tb.Name))
		}
		paths = append(paths, figurePaths(fl.plotsDir, figs)...)
	}
	// Every named output is checked before any is written.
	if err := g.refuseInputs(paths...); err != nil {
		return err
	}
	if err := g.writeIfNamed(fl.csvPath, func(w io.Writer) error { return results.WriteNoiseCSV(w, o) }); err != nil {
		return err
	}
	if fl.plotsDir == "" {
		return nil
	}
	if err := os.MkdirAll(fl.plotsDir, 0o755); err != nil {
		return inputError(fmt.Errorf("flag --plots: %w", err))
	}
	for _, tb := range tables {
		if err := g.writeFileAtomic(filepath.Join(fl.plotsDir, tb.Name), func(w io.Writer) error { return tb.Write(w, o.Result) }); err != nil {
			return err
		}
	}
	return g.writeFigures(fl.plotsDir, figs)
}
