package main

import (
	"errors"
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"qpoint/ac/plan"
	"qpoint/ac/yield"
	"qpoint/bias/circuit"
	"qpoint/plots"
	"qpoint/plots/output"
	"qpoint/plots/report"
	"qpoint/plots/results"
)

type yieldFlags struct {
	targets           []string
	runs              int
	seed              uint64
	seedSet           bool
	temperatureRange  string
	frequency, level  string
	input, output     string
	videoBandwidth    string
	workers           int
	asJSON            bool
	csvPath, plotsDir string
	sets              []string
}

func newYieldCmd() *cobra.Command {
	var fl yieldFlags
	cmd := &cobra.Command{
		Use:   "yield FILE",
		Short: "Build the circuit many times over its tolerances: the fraction that meets the targets, and which part to tighten",
		Long: `yield draws the circuit again and again (Monte Carlo), each part value and
diode-model key spreading as the file's tolerances say (tolerance: on a
part, spread: on a diode model, tolerance_groups for values that spread
together), analyses each drawn circuit and counts the runs that meet every
--target at every temperature of the operating range.

A target is MEASURE>VALUE or MEASURE<VALUE, with any study measure (see
qpoint study --help) and its frequency after the measure or the value:
"s21>-4.4dB@900MHz", "hd3<-43dBc", "current.D1<20mA". Give --target once
per target; all must hold for a run to pass.

It prints the yield with its 95 % confidence interval (Wilson score), each
target's spread (mean, standard deviation, the nominal circuit's value and
the first-order estimate of the spread), the values whose spread matters
most (first-order sensitivities by central differences, and each value's
share of the variance), and the worst-case corner of each target: every
value at the end of its band, or three standard deviations out, in the
direction that worsens the target.

--temperature-range LOW:HIGH analyses every run at LOW, at HIGH and at the
circuit's temperature when it lies between: a run passes only if it meets
its targets at each. Runs are drawn from streams keyed by --seed and the
run's index: the same seed gives the same runs whatever --workers is.
Defaults come from the file's analysis.yield and analysis.distortion.`,
		Example: `  qpoint yield testdata/demo/attenuator.yaml --target "s21>-4.4dB@900MHz" --target "s21<-4.0dB@900MHz"
  qpoint yield testdata/demo/attenuator.yaml --target "hd3<-43dBc" --level -10dBm --runs 10000 --seed 7
  qpoint yield attenuator.yaml --target "s21>-4.6dB@900MHz" --temperature-range -40C:85C --plots figures/
  qpoint yield detector.yaml --target "tss<-50dBm" --json > yield.json`,
		Args: exactFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			fl.seedSet = cmd.Flags().Changed("seed")
			return runYield(cmd, args[0], &fl)
		},
	}
	f := cmd.Flags()
	addSetFlag(cmd, &fl.sets)
	f.StringArrayVar(&fl.targets, "target", nil, `a condition every run must meet, MEASURE>VALUE or MEASURE<VALUE, e.g. "s21>-4.4dB@900MHz" (repeatable)`)
	f.IntVar(&fl.runs, "runs", 0, fmt.Sprintf("circuits to draw, 1 to %d (default: the file's, else %d)", yield.MaxRuns, plan.DefaultRuns))
	f.Uint64Var(&fl.seed, "seed", 0, "seed of the random draws (default: the file's, else 1)")
	f.StringVar(&fl.temperatureRange, "temperature-range", "", "operating range LOW:HIGH, e.g. -40C:85C (default: the file's, else the circuit's temperature)")
	f.StringVar(&fl.level, "level", "", "signal level for distortion targets, e.g. -10dBm (default: the file's)")
	f.StringVar(&fl.frequency, "frequency", "", "distortion frequency (default: the file's analysis.distortion frequency)")
	f.StringVar(&fl.input, "input", "", "input port (default: the file's, else the first)")
	f.StringVar(&fl.output, "output", "", "output port or node (default: the file's, else the last port)")
	f.StringVar(&fl.videoBandwidth, "video-bandwidth", "", "detector video band for nep and tss: HIGH (from 1 Hz) or LOW:HIGH [2MHz]")
	f.IntVar(&fl.workers, "workers", 0, "parallel workers (default: all cores)")
	f.BoolVar(&fl.asJSON, "json", false, "print one JSON document (SI units) instead of tables")
	f.StringVar(&fl.csvPath, "csv", "", "write one row per run to this CSV file")
	f.StringVar(&fl.plotsDir, "plots", "", "write a histogram of each target (SVG and PNG) into this directory")
	return cmd
}

// resolveYield reads the flags into a request and resolves it on the
// plan. With no target from either the flags or the file, it follows the
// main figures when observe is true (the report's spread of them), and
// fails otherwise.
func resolveYield(c *circuit.Circuit, fl *yieldFlags, observe bool) (*yield.Settings, error) {
	req := plan.YieldRequest{Targets: fl.targets, Runs: fl.runs, Workers: fl.workers, Input: fl.input, Output: fl.output, Observe: observe}
	if fl.seedSet {
		seed := fl.seed
		req.Seed = &seed
	}
	if fl.temperatureRange != "" {
		lo, hi, err := plan.ParseTemperatureRange("temperature-range", fl.temperatureRange)
		if err != nil {
			return nil, planError(err)
		}
		req.TemperatureRangeK = &[2]float64{lo, hi}
	}
	if err := quantityFlag("frequency", fl.frequency, circuit.Frequency, &req.FrequencyHz); err != nil {
		return nil, err
	}
	var err error
	if req.Level, err = levelFlag("level", fl.level); err != nil {
		return nil, err
	}
	if err := videoBandFlag(fl.videoBandwidth, &req.VideoBandHz); err != nil {
		return nil, err
	}
	s, err := plan.ResolveYield(c, req)
	if err != nil {
		var re *plan.RequestError
		if errors.As(err, &re) && re.Settings[0] == "tolerances" {
			return nil, inputError(re.Err)
		}
		return nil, planError(err)
	}
	return s, nil
}

func runYield(cmd *cobra.Command, path string, fl *yieldFlags) error {
	g := guardOf(cmd)
	c, err := g.loadCircuit(cmd.ErrOrStderr(), path, fl.sets, "")
	if err != nil {
		return err
	}
	s, err := resolveYield(c, fl, false)
	if err != nil {
		return err
	}
	bar := output.NewProgress(cmd.ErrOrStderr(), "yield", s.Runs)
	s.Progress = bar.Update
	r, err := yield.Run(c, *s)
	bar.Done()
	if err != nil {
		return analysisError(err)
	}
	if r.Stats.Failed == len(r.Runs) {
		return analysisError(fmt.Errorf("no run could be analysed: %w", r.Runs[0].Err))
	}
	var figs []*plots.Figure
	if fl.plotsDir != "" {
		figs = report.YieldFigures(r)
	}
	if err := g.refuseInputs(append([]string{fl.csvPath}, figurePaths(fl.plotsDir, figs)...)...); err != nil {
		return err
	}
	if err := g.writeIfNamed(fl.csvPath, func(w io.Writer) error { return results.WriteYieldCSV(w, r) }); err != nil {
		return err
	}
	if err := g.writeFigures(fl.plotsDir, figs); err != nil {
		return err
	}
	out := cmd.OutOrStdout()
	if fl.asJSON {
		return results.Write(out, results.YieldOf(r))
	}
	report.WriteYield(out, r)
	writtenTo(out, "CSV", fl.csvPath, "figures", fl.plotsDir)
	return nil
}
