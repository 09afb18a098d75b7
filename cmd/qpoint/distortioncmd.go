package main

import (
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/ac/steady"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/plots/output"
	"qpoint/plots/report"
	"qpoint/plots/results"
	"qpoint/smallsignal"
)

type distortionFlags struct {
	input, output, frequency, level, secondTone string
	sweepLevel, sweepFrequency                  string
	temperature                                 string
	videoBandwidth                              string
	samples, harmonics                          int
	noLimit                                     bool
	asJSON                                      bool
	plotsDir                                    string
	sets                                        []string
	steady                                      steadyFlags
}

func newDistortionCmd() *cobra.Command {
	var fl distortionFlags
	cmd := &cobra.Command{
		Use:   "distortion FILE",
		Short: "Distortion at the bias point: Volterra estimates beside a full waveform solve",
		Long: `distortion drives the input port's generator at the chosen frequency and
level and reports, at the output port or node:

  estimate   the Volterra (weakly nonlinear) estimate to third order: the
             fundamental, HD2, HD3 and the DC shift; with --second-tone also
             IM2, IM3 and the intercept points IIP3, OIP3, IIP2; and which
             diode and which nonlinearity (current or charge) supplies each
             product
  waveform   the full nonlinear circuit solved to periodic steady state and
             its harmonics, THD and DC shift, by harmonic balance or shooting
             (--method); with --second-tone also every mixing product, IM2
             and IM3 beside the estimate, and with --sweep-level the
             intercept read from the waveform as a bench reads it
  side by side, with the difference in dB, and the highest input level at
             which the estimates hold within 0.5 dB: the small-signal
             validity limit at this bias

A level is the generator's available power (-30dBm) or the peak voltage it
delivers into a matched load (10mV, the same as -30dBm at 50 Ω).
Settings come from the flags, else from the file's analysis.distortion.`,
		Example: `  qpoint distortion testdata/demo/detector.yaml
  qpoint distortion mixer.yaml --input rf --output if --frequency 1.9GHz --level -20dBm --second-tone 1.91GHz
  qpoint distortion detector.yaml --sweep-level -50dBm:0dBm:1dB --plots figures/
  qpoint distortion attenuator.yaml --sweep-frequency 100MHz:3GHz:20 --json`,
		Args: exactFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runDistortion(cmd, args[0], &fl)
		},
	}
	f := cmd.Flags()
	addSetFlag(cmd, &fl.sets)
	f.StringVar(&fl.input, "input", "", "input port name (default: the file's, else the first port)")
	f.StringVar(&fl.output, "output", "", "output port or node name (default: the file's, else the last port)")
	f.StringVar(&fl.frequency, "frequency", "", "signal frequency, e.g. 2.45GHz")
	f.StringVar(&fl.level, "level", "", "signal level per tone: -30dBm or a peak voltage such as 10mV")
	f.StringVar(&fl.secondTone, "second-tone", "", "frequency of a second tone of the same level, for IM2, IM3 and intercepts; none drops the file's")
	f.StringVar(&fl.sweepLevel, "sweep-level", "", "solve the waveform over levels FROM:TO:STEP, e.g. -50dBm:0dBm:1dB or 1mV:300mV:1dB (peak volts into a matched load)")
	f.StringVar(&fl.sweepFrequency, "sweep-frequency", "", "estimate over frequencies FROM:TO:PER-DECADE, e.g. 100MHz:6GHz:20")
	f.StringVar(&fl.temperature, "temperature", "", "circuit temperature, overriding the file's (e.g. 85C)")
	f.StringVar(&fl.videoBandwidth, "video-bandwidth", "", "a detector's video band for its tangential sensitivity: HIGH (from 1 Hz) or LOW:HIGH [2MHz]")
	f.IntVar(&fl.samples, "samples", 255, "waveform samples per period (the solver also uses 2N+1)")
	f.IntVar(&fl.harmonics, "harmonics", 5, "highest harmonic order reported from the waveform")
	f.BoolVar(&fl.noLimit, "no-limit", false, "skip the search for the validity limit")
	f.BoolVar(&fl.asJSON, "json", false, "print one JSON document (SI units) instead of tables")
	f.StringVar(&fl.plotsDir, "plots", "", "write the distortion figures (SVG and PNG) into this directory")
	addSteadyFlags(f, &fl.steady)
	return cmd
}

// distortionSetup is a resolved distortion run.
type distortionSetup struct {
	planned *plan.Drive
	c       *circuit.Circuit
	p       *bias.Point
	nw      *smallsignal.Network
	drive   ac.Drive
}

func resolveDistortion(g *fileGuard, warn io.Writer, path string, fl *distortionFlags) (*distortionSetup, error) {
	c, err := g.loadCircuit(warn, path, fl.sets, fl.temperature)
	if err != nil {
		return nil, err
	}
	if err := g.checkOutputsEarly(fl.plotsDir); err != nil {
		return nil, err
	}
	return resolveDistortionFor(c, fl, nil)
}

// resolveDistortionFor resolves the flags and the file's defaults for a
// loaded circuit and linearises it at p, solving the bias first when p is
// nil.
func resolveDistortionFor(c *circuit.Circuit, fl *distortionFlags, p *bias.Point) (*distortionSetup, error) {
	s, err := distortionDrive(c, fl)
	if err != nil {
		return nil, err
	}
	if s.p, s.nw, err = linearise(c, fl.temperature, p); err != nil {
		return nil, err
	}
	return s, nil
}

// distortionDrive reads the drive flags into a request and resolves it
// on the plan, without solving anything.
func distortionDrive(c *circuit.Circuit, fl *distortionFlags) (*distortionSetup, error) {
	req := plan.DriveRequest{Input: fl.input, Output: fl.output}
	if err := quantityFlag("frequency", fl.frequency, circuit.Frequency, &req.FrequencyHz); err != nil {
		return nil, err
	}
	var err error
	if req.Level, err = levelFlag("level", fl.level); err != nil {
		return nil, err
	}
	if req.DropSecondTone = fl.secondTone == "none"; !req.DropSecondTone {
		if err := quantityFlag("second-tone", fl.secondTone, circuit.Frequency, &req.SecondToneHz); err != nil {
			return nil, err
		}
	}
	d, err := plan.ResolveDrive(c, req)
	if err != nil {
		return nil, planError(err)
	}
	return &distortionSetup{planned: d, c: c, drive: d.Drive}, nil
}

func runDistortion(cmd *cobra.Command, path string, fl *distortionFlags) error {
	g := guardOf(cmd)
	s, err := resolveDistortion(g, cmd.ErrOrStderr(), path, fl)
	if err != nil {
		return err
	}
	if fl.sweepFrequency != "" {
		return runDistortionFrequency(cmd, g, s, fl)
	}
	req, err := distortionRequest(cmd, s, fl)
	if err != nil {
		return err
	}
	res, err := plan.RunDistortion(s.nw, s.planned, req)
	if err != nil {
		return analysisError(err)
	}
	if res.ValidityErr != nil {
		return analysisError(fmt.Errorf("validity limit: %w", res.ValidityErr))
	}
	if res.SweepErr != nil && len(res.Sweep) == 0 {
		return analysisError(res.SweepErr)
	}
	if res.SweepErr != nil {
		fmt.Fprintf(cmd.ErrOrStderr(), "qpoint: level sweep stopped: %v\n", res.SweepErr)
	}
	if res.TransferErr != nil {
		return analysisError(res.TransferErr)
	}
	if res.TwoToneSweepErr != nil {
		fmt.Fprintf(cmd.ErrOrStderr(), "qpoint: two-tone level sweep stopped: %v\n", res.TwoToneSweepErr)
	}
	if fl.plotsDir != "" {
		if err := g.writeFigures(fl.plotsDir, report.DistortionRunFigures(res)); err != nil {
			return err
		}
	}
	out := cmd.OutOrStdout()
	if fl.asJSON {
		return results.Write(out, results.DistortionOf(s.planned, res))
	}
	report.WriteDistortion(out, s.nw, s.planned, res)
	writtenTo(out, "figures", fl.plotsDir)
	return nil
}

// distortionRequest checks the waveform flags and reads them, with the
// level sweep and the video band, into a request on the plan.
func distortionRequest(cmd *cobra.Command, s *distortionSetup, fl *distortionFlags) (plan.DistortionRequest, error) {
	var req plan.DistortionRequest
	if fl.harmonics < 3 || fl.harmonics > 50 {
		return req, inputError(fmt.Errorf("flag --harmonics: %d; accepted: 3 to 50", fl.harmonics))
	}
	if fl.samples < 4*fl.harmonics+1 || fl.samples > 65536 {
		return req, inputError(fmt.Errorf("flag --samples: %d; accepted: at least 4 × harmonics + 1 and at most 65536", fl.samples))
	}
	req.Sweep = steady.Settings{Samples: fl.samples, Harmonics: fl.harmonics}
	req.Waveform = req.Sweep
	var err error
	if req.Sweep.Method, req.Waveform.Method, err = fl.steady.steadyMethods(s); err != nil {
		return req, err
	}
	req.TwoTone = true
	req.Validity = !fl.noLimit
	if fl.sweepLevel == "" {
		return req, nil
	}
	if req.Levels, err = plan.ParseLevels("sweep-level", fl.sweepLevel, s.c.Ports[s.drive.Input].Impedance, 2000); err != nil {
		return req, planError(err)
	}
	band := fl.videoBandwidth
	if band == "" {
		band = "2MHz"
	}
	if err := videoBandFlag(band, &req.VideoHz); err != nil {
		return req, err
	}
	req.Progress = func(stage string, n int) (func(done, total int), func()) {
		bar := output.NewProgress(cmd.ErrOrStderr(), stage, n)
		return bar.Update, bar.Done
	}
	return req, nil
}

// runDistortionFrequency sweeps the estimate alone over frequency.
func runDistortionFrequency(cmd *cobra.Command, g *fileGuard, s *distortionSetup, fl *distortionFlags) error {
	from, to, perDec, err := plan.ParseRange("sweep-frequency", fl.sweepFrequency, circuit.Frequency, circuit.Dimensionless)
	if err != nil {
		return planError(err)
	}
	grid, err := ac.LogGrid(from, to, int(perDec))
	if err != nil {
		return inputError(fmt.Errorf("flag --sweep-frequency: %w", err))
	}
	var rows []report.FrequencyRow
	err = ac.VolterraSweep(s.nw, s.drive, grid, func(e *ac.Estimate) error {
		rows = append(rows, report.FrequencyRow{FrequencyHz: e.Drive.FrequencyHz, Estimate: e.Clone()})
		return nil
	})
	if err != nil {
		return analysisError(err)
	}
	if fl.plotsDir != "" {
		if err := g.writeFigures(fl.plotsDir, report.FrequencySweepFigures(rows)); err != nil {
			return err
		}
	}
	out := cmd.OutOrStdout()
	if fl.asJSON {
		return results.Write(out, results.DistortionFrequencyOf(s.planned, rows))
	}
	report.WriteDistortionFrequency(out, s.nw, s.planned, rows)
	return nil
}
