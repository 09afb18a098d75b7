package main

import (
	"errors"
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"qpoint/ac/plan"
	"qpoint/ac/transient"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/plots"
	"qpoint/plots/output"
	"qpoint/plots/report"
	"qpoint/plots/results"
	"qpoint/smallsignal"
)

type pulseFlags struct {
	input, output, carrier, level, width, rise, fall, period string
	pulses                                                   int
	probe, probeFrequency, after                             string
	tolerance                                                float64
	maxSteps                                                 int
	sweepLevel                                               string
	temperature                                              string
	asJSON                                                   bool
	csvPath, plotsDir                                        string
	sets                                                     []string
}

func newPulseCmd() *cobra.Command {
	var fl pulseFlags
	cmd := &cobra.Command{
		Use:   "pulse FILE",
		Short: "Pulses: spike and flat leakage, recovery of a limiter; rise and fall of a detector",
		Long: `pulse drives the input port with a pulsed carrier and follows the full
nonlinear circuit in time from its DC point, through the pulse and after
it (TR-BDF2 with error control, the diodes' charge included), then reads
at the output:

  limiter    spike leakage (the highest envelope power at the leading edge
             and the energy above the flat leakage), flat leakage (the
             output power once limiting has settled), and the recovery
             time: from the pulse's end until the loss of a small probe
             tone is back within 1 dB and 3 dB of its value before
  detector   the video output's 10-90 % rise and fall times, and its value
             at the end of the pulse against the steady-state DC shift
             under the continuous carrier

and every diode's peak junction current, peak reverse voltage and
dissipation over the pulse against its ratings. Which figures apply is
read from the circuit: an output whose DC level the carrier moves more
than its fundamental is a detector's.

Width is between the 50 % points; rise and fall are 10-90 % times of the
carrier's amplitude, which ramps linearly (IEEE Std 181). Powers are
delivered into the output port's reference impedance. Settings come from
the flags, else from the file's analysis.pulse.`,
		Example: `  qpoint pulse testdata/demo/limiter.yaml
  qpoint pulse limiter.yaml --carrier 3GHz --level 40dBm --width 1us --rise 10ns --fall 10ns
  qpoint pulse limiter.yaml --period 2us --pulses 3 --plots figures/
  qpoint pulse limiter.yaml --sweep-level 20dBm:45dBm:5dB
  qpoint pulse detector.yaml --width 200ns --json`,
		Args: exactFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runPulse(cmd, args[0], &fl)
		},
	}
	f := cmd.Flags()
	addSetFlag(cmd, &fl.sets)
	f.StringVar(&fl.input, "input", "", "input port name (default: the file's pulse input, else its distortion input, else the first port)")
	f.StringVar(&fl.output, "output", "", "output port or node name (default: the file's, else the last port)")
	f.StringVar(&fl.carrier, "carrier", "", "carrier frequency, e.g. 3GHz (default: the file's pulse carrier, else its distortion frequency)")
	f.StringVar(&fl.level, "level", "", "carrier level at full amplitude: available power such as 40dBm, or a peak voltage into a matched load")
	f.StringVar(&fl.width, "width", "", "pulse width between the 50 % points, e.g. 1us")
	f.StringVar(&fl.rise, "rise", "", "10-90 % rise time of the carrier's amplitude [5 % of the width, at least one carrier period]")
	f.StringVar(&fl.fall, "fall", "", "10-90 % fall time [as the rise]")
	f.StringVar(&fl.period, "period", "", "repetition interval of a pulse train; none for a single pulse")
	f.IntVar(&fl.pulses, "pulses", 0, "number of pulses in the train [2 with a period, else 1]")
	f.StringVar(&fl.probe, "probe", "", fmt.Sprintf("level of a limiter's probe tone for the recovery, or none [%d dBm]", transient.DefaultProbeDBm))
	f.StringVar(&fl.probeFrequency, "probe-frequency", "", "frequency of the probe tone [the carrier's]")
	f.StringVar(&fl.after, "after", "", "time to follow the circuit after the last pulse [until recovered, at most 10 pulse lengths (100 for a detector)]")
	f.Float64Var(&fl.tolerance, "tolerance", 1e-3, "relative error bound of each time step")
	f.IntVar(&fl.maxSteps, "max-steps", 2_000_000, "most time steps a run may take (accepted and rejected)")
	f.StringVar(&fl.sweepLevel, "sweep-level", "", "repeat the run over carrier levels FROM:TO:STEP, e.g. 20dBm:45dBm:5dB")
	f.StringVar(&fl.temperature, "temperature", "", "circuit temperature, overriding the file's (e.g. 85C)")
	f.BoolVar(&fl.asJSON, "json", false, "print one JSON document (SI units) instead of tables")
	f.StringVar(&fl.csvPath, "csv", "", "write the output waveform, the generator's EMF and each diode's junction current and voltage at every time point to this CSV file")
	f.StringVar(&fl.plotsDir, "plots", "", "write the pulse figures (SVG and PNG) into this directory")
	return cmd
}

// pulseSetup is a resolved pulse run: the circuit at its bias point and
// the plan.
type pulseSetup struct {
	c        *circuit.Circuit
	p        *bias.Point
	nw       *smallsignal.Network
	settings transient.PulseSettings
	plan     *plan.Pulse
}

// resolvePulse reads the flags into a request, resolves it on the plan,
// and linearises the circuit at p, solving the bias first when p is nil.
func resolvePulse(c *circuit.Circuit, fl *pulseFlags, p *bias.Point) (*pulseSetup, error) {
	req := plan.PulseRequest{Input: fl.input, Output: fl.output, Pulses: fl.pulses,
		RelativeTolerance: fl.tolerance, MaxSteps: fl.maxSteps, NoPeriod: fl.period == "none", NoProbe: fl.probe == "none"}
	for _, t := range []struct {
		flag, text string
		dst        *float64
	}{{"width", fl.width, &req.Width}, {"rise", fl.rise, &req.Rise}, {"fall", fl.fall, &req.Fall}, {"period", fl.period, &req.Period}, {"after", fl.after, &req.After}} {
		if t.text == "none" {
			continue
		}
		if err := quantityFlag(t.flag, t.text, circuit.Time, t.dst); err != nil {
			return nil, err
		}
	}
	if fl.after != "" && !(req.After > 0) {
		return nil, inputError(fmt.Errorf("flag --after: %s; accepted: a positive time", fl.after))
	}
	if err := quantityFlag("carrier", fl.carrier, circuit.Frequency, &req.CarrierHz); err != nil {
		return nil, err
	}
	if err := quantityFlag("probe-frequency", fl.probeFrequency, circuit.Frequency, &req.ProbeFrequencyHz); err != nil {
		return nil, err
	}
	var err error
	if req.Level, err = levelFlag("level", fl.level); err != nil {
		return nil, err
	}
	if fl.probe != "" && fl.probe != "none" {
		lv, err := circuit.ParseLevel(fl.probe)
		if err != nil {
			return nil, inputError(fmt.Errorf("flag --probe: %w; or none", err))
		}
		req.Probe = &lv
	}
	pl, err := plan.ResolvePulse(c, req)
	if err != nil {
		return nil, planError(err)
	}
	s := &pulseSetup{c: c, settings: pl.Settings, plan: pl}
	if s.p, s.nw, err = linearise(c, fl.temperature, p); err != nil {
		return nil, err
	}
	return s, nil
}

func runPulse(cmd *cobra.Command, path string, fl *pulseFlags) error {
	g := guardOf(cmd)
	c, err := g.loadCircuit(cmd.ErrOrStderr(), path, fl.sets, fl.temperature)
	if err != nil {
		return err
	}
	s, err := resolvePulse(c, fl, nil)
	if err != nil {
		return err
	}
	if err := g.refuseInputs(fl.csvPath); err != nil {
		return err
	}
	out := cmd.OutOrStdout()
	if fl.sweepLevel != "" {
		return runPulseSweep(cmd, s, fl)
	}
	res, runErr := transient.RunPulse(s.nw, s.settings)
	var stopped *transient.Stopped
	switch {
	case runErr == nil:
	case errors.As(runErr, &stopped) && res != nil:
		// What it reached is still shown; the exit status says it failed.
	case res == nil:
		// A refused request names its flag or key; else the run failed.
		return planError(s.plan.RequestError(runErr))
	}
	var figs []*plots.Figure
	if fl.plotsDir != "" {
		figs = plots.PulseFigures(res, s.nw)
		if err := g.refuseInputs(figurePaths(fl.plotsDir, figs)...); err != nil {
			return err
		}
	}
	if err := g.writeIfNamed(fl.csvPath, func(w io.Writer) error { return results.WritePulseCSV(w, s.plan, res) }); err != nil {
		return err
	}
	if err := g.writeFigures(fl.plotsDir, figs); err != nil {
		return err
	}
	if fl.asJSON {
		if err := results.Write(out, results.PulseOf(s.c, s.plan, res, runErr)); err != nil {
			return err
		}
	} else {
		report.WritePulse(out, s.nw, s.plan, res)
		writtenTo(out, "figures", fl.plotsDir, "waveform", fl.csvPath)
	}
	if runErr != nil {
		return analysisError(fmt.Errorf("the run %w; the figures above are of what it reached", runErr))
	}
	return nil
}

// runPulseSweep repeats the run over carrier levels and prints the figures
// against the level.
func runPulseSweep(cmd *cobra.Command, s *pulseSetup, fl *pulseFlags) error {
	g := guardOf(cmd)
	z0 := s.c.Ports[s.settings.Input].Impedance
	levels, err := plan.ParseLevels("sweep-level", fl.sweepLevel, z0, 200)
	if err != nil {
		return planError(err)
	}
	if fl.csvPath != "" {
		return inputError(fmt.Errorf("flag --csv: a level sweep keeps no waveform; run one level for it"))
	}
	bar := output.NewProgress(cmd.ErrOrStderr(), "pulse level sweep", len(levels))
	pts := transient.SweepLevel(s.nw, s.settings, levels, 0, bar.Update)
	bar.Done()
	ok := 0
	for _, p := range pts {
		if p.Err == nil {
			ok++
		} else {
			var re *transient.RequestError
			if errors.As(p.Err, &re) {
				return planError(s.plan.RequestError(p.Err))
			}
		}
	}
	if fl.plotsDir != "" {
		if err := g.writeFigures(fl.plotsDir, []*plots.Figure{plots.PulseLevelSweep(pts)}); err != nil {
			return err
		}
	}
	out := cmd.OutOrStdout()
	if fl.asJSON {
		if err := results.Write(out, results.PulseSweepOf(s.plan, pts)); err != nil {
			return err
		}
	} else {
		report.WritePulseSweep(out, s.nw, s.plan, pts)
		writtenTo(out, "figures", fl.plotsDir)
	}
	if ok < len(pts) {
		return analysisError(fmt.Errorf("%d of %d levels did not run to the end; their rows show what they reached", len(pts)-ok, len(pts)))
	}
	return nil
}
