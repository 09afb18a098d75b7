package main

import (
	"errors"
	"fmt"

	"github.com/spf13/cobra"

	"qpoint/ac/mixer"
	"qpoint/ac/plan"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/plots"
	"qpoint/plots/output"
	"qpoint/plots/report"
	"qpoint/plots/results"
	"qpoint/smallsignal"
)

type mixerFlags struct {
	lo, rf, ifPort       string
	loFrequency, loLevel string
	rfFrequency          string
	sweepLOLevel         string
	sidebands            int
	noShooting           bool
	temperature          string
	asJSON               bool
	plotsDir             string
	sets                 []string
}

func newMixerCmd() *cobra.Command {
	var fl mixerFlags
	cmd := &cobra.Command{
		Use:   "mixer FILE",
		Short: "A diode mixer under its LO: conversion loss, port impedances, LO power, noise figure",
		Long: `mixer drives the LO port at its frequency and available power, solves the
circuit (with its DC bias) for the periodic steady state the LO sets, by
harmonic balance with shooting as a check, and analyses the small signal
about it with conversion matrices at the sidebands f_IF + k f_LO, every
port terminated in its reference impedance:

  conversion loss    RF available power over the IF power delivered into
                     the IF port's reference, single sideband; the image's
                     and the up-conversion loss beside it
  impedances         of the RF port at the RF and the image, of the IF
                     port at the IF and of the LO port at its fundamental,
                     under pump
  LO                 the power the mixer absorbs and the LO that reaches
                     the RF and IF ports (isolation)
  noise figure       single and double sideband at the IF port: thermal
                     noise of every resistor and port at every sideband,
                     the pumped junctions' shot noise with its sideband
                     correlation; the RF source at 290 K
  diodes             DC current, peak forward current and peak reverse
                     voltage under the LO, against ratings and knees

The IF is |f_RF - f_LO|. Settings come from the flags, else the file's
analysis.mixer. A drive that takes a diode past its breakdown knee is
refused (exit 1); --sweep-lo-level shows the figures against the LO's
available power, with breakdown marked rather than refused.`,
		Example: `  qpoint mixer testdata/demo/mixer.yaml
  qpoint mixer mixer.yaml --lo-level 10dBm --json
  qpoint mixer mixer.yaml --sweep-lo-level -10dBm:13dBm:1dB --plots figures/
  qpoint mixer mixer.yaml --lo lo --lo-frequency 2.4GHz --lo-level 7dBm --rf rf --rf-frequency 2.45GHz --if if`,
		Args: exactFile,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runMixer(cmd, args[0], &fl)
		},
	}
	f := cmd.Flags()
	addSetFlag(cmd, &fl.sets)
	f.StringVar(&fl.lo, "lo", "", "port the local oscillator drives (default: the file's analysis.mixer)")
	f.StringVar(&fl.loFrequency, "lo-frequency", "", "LO frequency, e.g. 2.4GHz")
	f.StringVar(&fl.loLevel, "lo-level", "", "LO available power such as 7dBm, or a peak voltage into a matched load")
	f.StringVar(&fl.rf, "rf", "", "port the RF signal enters")
	f.StringVar(&fl.rfFrequency, "rf-frequency", "", "RF frequency, e.g. 2.45GHz; the IF is |f_RF - f_LO|")
	f.StringVar(&fl.ifPort, "if", "", "port the IF leaves")
	f.StringVar(&fl.sweepLOLevel, "sweep-lo-level", "", "repeat over LO levels FROM:TO:STEP, e.g. -10dBm:13dBm:1dB")
	f.IntVar(&fl.sidebands, "sidebands", 0, "fix the sidebands each side of the IF (default: doubled from 4 until the figures settle, at most 128)")
	f.BoolVar(&fl.noShooting, "no-shooting-check", false, "skip solving the pump a second time by shooting")
	f.StringVar(&fl.temperature, "temperature", "", "circuit temperature, overriding the file's (e.g. 85C)")
	f.BoolVar(&fl.asJSON, "json", false, "print one JSON document (SI units) instead of tables")
	f.StringVar(&fl.plotsDir, "plots", "", "write the figure of the mixer against its LO drive (SVG and PNG) into this directory")
	return cmd
}

// mixerSetup is a resolved mixer run.
type mixerSetup struct {
	c    *circuit.Circuit
	p    *bias.Point
	nw   *smallsignal.Network
	plan *plan.Mixer
}

// resolveMixer reads the flags into a request, resolves the plan, and
// solves the bias (when p is nil) and linearises it.
func resolveMixer(c *circuit.Circuit, fl *mixerFlags, p *bias.Point) (*mixerSetup, error) {
	req := plan.MixerRequest{LO: fl.lo, RF: fl.rf, IF: fl.ifPort, Sidebands: fl.sidebands, CheckShooting: !fl.noShooting}
	if err := quantityFlag("lo-frequency", fl.loFrequency, circuit.Frequency, &req.LOFrequencyHz); err != nil {
		return nil, err
	}
	if err := quantityFlag("rf-frequency", fl.rfFrequency, circuit.Frequency, &req.RFFrequencyHz); err != nil {
		return nil, err
	}
	var err error
	if req.LOLevel, err = levelFlag("lo-level", fl.loLevel); err != nil {
		return nil, err
	}
	if fl.sidebands < 0 || fl.sidebands > 512 {
		return nil, inputError(fmt.Errorf("flag --sidebands: %d; accepted: 1 to 512", fl.sidebands))
	}
	s := &mixerSetup{c: c}
	if s.plan, err = plan.ResolveMixer(c, req); err != nil {
		return nil, planError(err)
	}
	if s.p, s.nw, err = linearise(c, fl.temperature, p); err != nil {
		return nil, err
	}
	return s, nil
}

func runMixer(cmd *cobra.Command, path string, fl *mixerFlags) error {
	g := guardOf(cmd)
	c, err := g.loadCircuit(cmd.ErrOrStderr(), path, fl.sets, fl.temperature)
	if err != nil {
		return err
	}
	if err := g.checkOutputsEarly(fl.plotsDir); err != nil {
		return err
	}
	var levels []float64
	if fl.sweepLOLevel != "" {
		if levels, err = plan.ParseMixerLevels(c, "sweep-lo-level", fl.lo, fl.sweepLOLevel); err != nil {
			return planError(err)
		}
		fl.noShooting = true // a check per level would double the sweep's time
	}
	s, err := resolveMixer(c, fl, nil)
	if err != nil {
		return err
	}
	out := cmd.OutOrStdout()
	if levels != nil {
		return runMixerSweep(cmd, s, fl, levels)
	}
	res, runErr := mixer.Analyze(s.nw, s.plan.Settings)
	if res == nil {
		return analysisError(runErr)
	}
	var be *mixer.BreakdownError
	if errors.As(runErr, &be) {
		// The figures about a junction in breakdown are not shown.
		return analysisError(fmt.Errorf("%w (run --sweep-lo-level to see the drive the diodes take)", runErr))
	}
	if fl.plotsDir != "" {
		pts := mixer.SweepLO(s.nw, s.plan.Settings, plan.DefaultMixerLevels(s.plan.LOLevelDBm), nil)
		if err := g.writeFigures(fl.plotsDir, []*plots.Figure{plots.MixerLevelSweep(pts, s.plan.LOLevelDBm)}); err != nil {
			return err
		}
	}
	if fl.asJSON {
		return results.Write(out, results.MixerOf(s.p, s.plan, res))
	}
	report.WriteMixer(out, s.nw, s.plan, res)
	if fl.plotsDir != "" {
		fmt.Fprintf(out, "\nfigure written to %s\n", fl.plotsDir)
	}
	return nil
}

// runMixerSweep repeats the analysis over LO levels.
func runMixerSweep(cmd *cobra.Command, s *mixerSetup, fl *mixerFlags, levels []float64) error {
	g := guardOf(cmd)
	bar := output.NewProgress(cmd.ErrOrStderr(), "LO level sweep", len(levels))
	pts := mixer.SweepLO(s.nw, s.plan.Settings, levels, bar.Update)
	bar.Done()
	failed := 0
	for _, p := range pts {
		if p.Result == nil {
			failed++
		}
	}
	if fl.plotsDir != "" {
		if err := g.writeFigures(fl.plotsDir, []*plots.Figure{plots.MixerLevelSweep(pts, s.plan.LOLevelDBm)}); err != nil {
			return err
		}
	}
	out := cmd.OutOrStdout()
	if fl.asJSON {
		if err := results.Write(out, results.MixerSweepOf(s.p, s.plan, pts)); err != nil {
			return err
		}
	} else {
		report.WriteMixerSweep(out, s.nw, s.plan, pts)
		if fl.plotsDir != "" {
			fmt.Fprintf(out, "\nfigure written to %s\n", fl.plotsDir)
		}
	}
	if failed > 0 {
		return analysisError(fmt.Errorf("%d of %d LO levels could not be analysed; their rows say why", failed, len(pts)))
	}
	return nil
}
