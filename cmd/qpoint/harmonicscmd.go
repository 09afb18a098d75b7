package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"

	"qpoint/bias/si"
	"qpoint/plots/report"
	"qpoint/plots/results"

	"github.com/spf13/cobra"

	"qpoint/ac/measure"
	"qpoint/ac/plan"
	"qpoint/ac/steady"
	"qpoint/bias/circuit"
)

type waveformFlags struct {
	sampleRate  string
	window      string
	fundamental string
	harmonics   int
	asJSON      bool
	// Prediction to compare with: a circuit file and its drive.
	circuitPath, input, output, level string
	sets                              []string
}

func newHarmonicsCmd() *cobra.Command {
	var fl waveformFlags
	cmd := &cobra.Command{
		Use:   "harmonics FILE.csv",
		Short: "Harmonics, THD and SINAD of a waveform captured on an instrument",
		Long: `harmonics reads a waveform you captured (a detector's output, a limiter's
clipped sine, a mixer's IF) and measures its harmonic content: the
fundamental frequency, the amplitude and phase of each harmonic, the total
harmonic distortion and the ratio of the fundamental to all noise and
distortion (SINAD).

The file holds two columns, time in seconds and value in volts, or one
value column with --sample-rate. Commas, semicolons (with decimal commas),
tabs or spaces separate the columns; a first line of names is skipped and
'#' starts a comment. Times must be uniformly spaced.

The fundamental is the largest spectral peak above DC unless --fundamental
gives it; it is then refined by a least-squares fit of all the harmonics,
so the record need not hold a whole number of periods. Phases are those of
a cosine at the first sample. Harmonics above half the sample rate are
shown as absent, never folded back.

With --circuit the capture is set beside the prediction: the circuit is
solved to periodic steady state at the measured fundamental, driven at the
given level, and its output's harmonics are compared order by order.

Windows: blackman-harris (default; -92 dB sidelobes, needs 4 periods),
hann (2 periods), flat-top (5 periods), rectangular (1 period).`,
		Example: `  qpoint harmonics testdata/waveforms/clipped_sine.csv
  qpoint harmonics capture.csv --harmonics 20 --json
  qpoint harmonics ripple.csv --sample-rate 2MHz --fundamental 50kHz
  qpoint harmonics short.csv --window hann
  qpoint harmonics video.csv --circuit detector.yaml --level -20dBm`,
		Args: exactWaveform,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runWaveformHarmonics(cmd, args[0], &fl)
		},
	}
	f := cmd.Flags()
	f.StringVar(&fl.sampleRate, "sample-rate", "", "sample rate of a file with one value column, e.g. 1MHz")
	f.StringVar(&fl.window, "window", "blackman-harris", "window: blackman-harris, hann, flat-top or rectangular")
	f.StringVar(&fl.fundamental, "fundamental", "", "fundamental frequency, e.g. 10kHz (default: the largest spectral peak)")
	f.IntVar(&fl.harmonics, "harmonics", measure.DefaultHarmonics, "highest harmonic order to report")
	f.BoolVar(&fl.asJSON, "json", false, "print one JSON document (SI units) instead of the tables")
	f.StringVar(&fl.circuitPath, "circuit", "", "compare with the waveform this circuit file predicts at the measured fundamental")
	addSetFlag(cmd, &fl.sets)
	f.StringVar(&fl.input, "input", "", "with --circuit: the input port (default: the file's, else the first)")
	f.StringVar(&fl.output, "output", "", "with --circuit: the output port or node that was captured (default: the file's)")
	f.StringVar(&fl.level, "level", "", "with --circuit: the drive level, e.g. -20dBm (default: the file's)")
	return cmd
}

// exactWaveform accepts exactly one argument, the waveform file.
func exactWaveform(cmd *cobra.Command, args []string) error {
	if len(args) != 1 {
		return inputError(fmt.Errorf("%s needs exactly one waveform file, got %d arguments; e.g. qpoint %s testdata/waveforms/clipped_sine.csv", cmd.Name(), len(args), cmd.Name()))
	}
	return nil
}

func runWaveformHarmonics(cmd *cobra.Command, path string, fl *waveformFlags) error {
	g := guardOf(cmd)
	var opts measure.CSVOptions
	var s measure.Settings
	if err := quantityFlag("sample-rate", fl.sampleRate, circuit.Frequency, &opts.SampleRateHz); err != nil {
		return err
	}
	if v := opts.SampleRateHz; fl.sampleRate != "" && !(v >= measure.MinSampleRateHz && v <= measure.MaxSampleRateHz) {
		return inputError(fmt.Errorf("flag --sample-rate: %s; accepted: %s to %s", si.Format(v, "Hz", 4),
			si.Format(measure.MinSampleRateHz, "Hz", 3), si.Format(measure.MaxSampleRateHz, "Hz", 3)))
	}
	if err := quantityFlag("fundamental", fl.fundamental, circuit.Frequency, &s.FundamentalHz); err != nil {
		return err
	}
	if fl.fundamental != "" && !(s.FundamentalHz > 0) {
		return inputError(fmt.Errorf("flag --fundamental: %s; accepted: a positive frequency, e.g. 10kHz", fl.fundamental))
	}
	win, err := measure.ParseWindow(fl.window)
	if err != nil {
		return inputError(fmt.Errorf("flag --window: %w", err))
	}
	s.Window = win
	if fl.harmonics < 1 || fl.harmonics > measure.MaxHarmonics {
		return inputError(fmt.Errorf("flag --harmonics: %d; accepted: 1 to %d", fl.harmonics, measure.MaxHarmonics))
	}
	s.Harmonics = fl.harmonics

	w, err := g.readWaveformFile(path, opts)
	if err != nil {
		return err
	}
	r, err := measure.Analyze(w, s)
	var se *measure.SettingsError
	switch {
	case errors.As(err, &se):
		return inputError(fmt.Errorf("%s: %w", path, err))
	case err != nil:
		return analysisError(fmt.Errorf("%s: %w", path, err))
	}
	var pred *steady.State
	if fl.circuitPath != "" {
		if pred, err = predictHarmonics(g, cmd.ErrOrStderr(), fl, r.FundamentalHz); err != nil {
			return err
		}
	}
	out := cmd.OutOrStdout()
	if fl.asJSON {
		return results.Write(out, results.HarmonicsOf(path, w, r, pred))
	}
	report.WriteHarmonics(out, path, w, r)
	if pred != nil {
		report.WritePredictionComparison(out, fl.circuitPath, r, pred)
	}
	return nil
}

// predictHarmonics solves the circuit's steady state at the measured
// fundamental with the flags' (or the file's) drive.
func predictHarmonics(g *fileGuard, warn io.Writer, fl *waveformFlags, fundamentalHz float64) (*steady.State, error) {
	ds, err := resolveDistortion(g, warn, fl.circuitPath, &distortionFlags{input: fl.input, output: fl.output, level: fl.level, sets: fl.sets,
		frequency: strconv.FormatFloat(fundamentalHz, 'g', -1, 64) + "Hz"})
	if err != nil {
		return nil, err
	}
	st, err := plan.PredictHarmonics(ds.nw, ds.drive, fl.harmonics)
	if err != nil {
		return nil, analysisError(fmt.Errorf("prediction from %s at %s: %w", fl.circuitPath, si.Format(fundamentalHz, "Hz", 6), err))
	}
	return st, nil
}

// readWaveformFile reads a waveform file; every failure is an input error,
// placed as FILE:LINE:COL.
func (g *fileGuard) readWaveformFile(path string, opts measure.CSVOptions) (*measure.Waveform, error) {
	g.read(path)
	f, err := os.Open(path)
	if err != nil {
		return nil, inputError(fmt.Errorf("cannot read the waveform file: %w", err))
	}
	defer f.Close()
	w, err := measure.ReadCSV(f, opts)
	var pe *measure.ParseError
	switch {
	case errors.As(err, &pe):
		msg := pe.Msg
		if errors.Is(err, measure.ErrNoSampleRate) {
			msg = "one value column and no sample rate; accepted: a time column before the values, or --sample-rate (e.g. --sample-rate 1MHz)"
		}
		return nil, inputError(fmt.Errorf("%s:%d:%d: %s", path, pe.Line, pe.Column, msg))
	case err != nil:
		return nil, inputError(fmt.Errorf("%s: %w", path, err))
	}
	return w, nil
}
