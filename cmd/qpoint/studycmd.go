package main

import (
	"fmt"
	"io"
	"time"

	"github.com/spf13/cobra"

	"qpoint/ac/plan"
	"qpoint/ac/study"
	"qpoint/bias/circuit"
	"qpoint/plots"
	"qpoint/plots/output"
	"qpoint/plots/report"
	"qpoint/plots/results"
)

type studyFlags struct {
	vary, from, to       string
	steps                int
	log                  bool
	vary2, from2, to2    string
	steps2               int
	log2                 bool
	frequencies          string
	distortionFrequency  string
	videoBandwidth       string
	signed               bool
	level, input, output string
	target               string
	maximize, minimize   string
	tolerance            float64
	workers              int
	asJSON               bool
	csvPath, plotsDir    string
	show                 string
	sets                 []string
}

func newStudyCmd() *cobra.Command {
	var fl studyFlags
	cmd := &cobra.Command{
		Use:   "study FILE",
		Short: "Vary a part, a model parameter or the temperature and follow the bias and response",
		Long: `study steps one quantity (and optionally a second) across a range. At each
step it re-solves the bias from the previous step's solution and reports each
diode's Q point (current, dynamic resistance, capacitance), the small-signal
response at the study frequencies (S21 and S11 in dB, input impedance, probe
gains), distortion estimates at a chosen level, and for detectors the current
and voltage sensitivity and the video resistance (Cowley and Sorensen 1966).

WHAT is temperature, PART.value (e.g. Vcc.value, Rbias.value) or
MODEL.KEY (e.g. detector_low_barrier.saturation_current). A second quantity
(--vary2) makes a grid; --vary2 frequency puts frequency on the second axis.

--target "MEASURE=VALUE" finds where a measure meets a value, and
--maximize / --minimize MEASURE find its best value in the range. Measures:
s11, s21, s12, s22 (dB, @FREQ), zin_re, zin_im, zin_mag (ohm, @FREQ),
probe.NODE (dB, @FREQ), noise_figure (dB, @FREQ), hd2, hd3 (dBc, @FREQ of
the distortion), dc_shift (V), sensitivity (V/W), nep (W/√Hz) and tss
(tangential sensitivity, dBm) of a detector, current.D, voltage.D,
dynamic_resistance.D, junction_capacitance.D, video_resistance.D,
current_sensitivity.D and voltage_sensitivity.D (@FREQ).

Distortion (hd2, hd3, dc_shift, sensitivity) is estimated at the file's
distortion frequency, or at each of --frequency; its columns name their
frequency. A measure whose sign only says which way a detector's output
moves (sensitivity, dc_shift, voltage_sensitivity, current_sensitivity)
is maximised or minimised on its magnitude; --signed uses the sign.
nep and tss count the output noise over --video-bandwidth (1 Hz to 2 MHz
unless given) with the carrier at the distortion frequency.

Steps run in parallel on all cores; the output is the same whatever the
worker count. Defaults come from the file's analysis.study.`,
		Example: `  qpoint study testdata/demo/attenuator.yaml --vary Vctl.value --from 0.9V --to 5V --steps 42
  qpoint study attenuator.yaml --vary Vctl.value --from 0.9V --to 5V --steps 40 --target "s21=-6dB@900MHz"
  qpoint study detector.yaml --vary Rbias.value --from 10k --to 1M --steps 30 --log --maximize "sensitivity"
  qpoint study detector.yaml --vary Rbias.value --from 47k --to 4.7M --steps 25 --log --minimize tss
  qpoint study detector.yaml --frequency 915MHz,2.45GHz --level -30dBm
  qpoint study detector.yaml --vary Vcc.value --from 0V --to 3.3V --steps 12 --vary2 temperature --from2 -40C --to2 85C --steps2 6
  qpoint study mixer.yaml --csv mixer-study.csv --plots figures/`,
		Args: exactFile,
		RunE: func(cmd *cobra.Command, args []string) error { return runStudy(cmd, args[0], &fl) },
	}
	f := cmd.Flags()
	addSetFlag(cmd, &fl.sets)
	f.StringVar(&fl.vary, "vary", "", "what to vary: temperature, PART.value or MODEL.KEY")
	f.StringVar(&fl.from, "from", "", "first value, with units (e.g. 0V, 10k, -40C)")
	f.StringVar(&fl.to, "to", "", "last value")
	f.IntVar(&fl.steps, "steps", 0, "number of steps, ends included")
	f.BoolVar(&fl.log, "log", false, "space the steps geometrically")
	f.StringVar(&fl.vary2, "vary2", "", "a second quantity for a grid, or frequency")
	f.StringVar(&fl.from2, "from2", "", "first value of the second quantity")
	f.StringVar(&fl.to2, "to2", "", "last value of the second quantity")
	f.IntVar(&fl.steps2, "steps2", 0, "steps of the second quantity")
	f.BoolVar(&fl.log2, "log2", false, "space the second quantity geometrically")
	f.StringVar(&fl.frequencies, "frequencies", "", "comma-separated frequencies for the response, e.g. 900MHz,2.45GHz")
	f.StringVar(&fl.level, "level", "", "signal level for the distortion estimates, e.g. -30dBm (default: the file's)")
	f.StringVar(&fl.distortionFrequency, "frequency", "", "distortion frequency, or several comma-separated (default: the file's analysis.distortion frequency)")
	f.StringVar(&fl.videoBandwidth, "video-bandwidth", "", "detector video band for nep and tss: HIGH (from 1 Hz) or LOW:HIGH [2MHz]")
	f.BoolVar(&fl.signed, "signed", false, "optimise a polarity measure (sensitivity, dc_shift) on its signed value, not its magnitude")
	f.StringVar(&fl.input, "input", "", "input port for distortion (default: the file's, else the first)")
	f.StringVar(&fl.output, "output", "", "output port or node for distortion (default: the file's, else the last port)")
	f.StringVar(&fl.target, "target", "", `find where MEASURE meets VALUE: "s21=-10dB@900MHz"`)
	f.StringVar(&fl.maximize, "maximize", "", "find the value that maximises MEASURE")
	f.StringVar(&fl.minimize, "minimize", "", "find the value that minimises MEASURE")
	f.Float64Var(&fl.tolerance, "tolerance", 1e-6, "target and optimum tolerance, relative to the range")
	f.IntVar(&fl.workers, "workers", 0, "parallel workers (default: all cores)")
	f.BoolVar(&fl.asJSON, "json", false, "print one JSON document (SI units) instead of tables")
	f.StringVar(&fl.csvPath, "csv", "", "write one row per step to this CSV file")
	f.StringVar(&fl.plotsDir, "plots", "", "write the study figures (SVG and PNG) into this directory")
	f.StringVar(&fl.show, "show", "", "comma-separated measures to plot (default: a useful set)")
	return cmd
}

// studySetup is a resolved study.
type studySetup struct {
	c        *circuit.Circuit
	settings study.Settings
	planned  *plan.Study
}

func resolveStudy(g *fileGuard, warn io.Writer, path string, fl *studyFlags) (*studySetup, error) {
	c, err := g.loadCircuit(warn, path, fl.sets, "")
	if err != nil {
		return nil, err
	}
	if err := g.checkOutputsEarly(fl.plotsDir, fl.csvPath); err != nil {
		return nil, err
	}
	return resolveStudyFor(c, fl)
}

// resolveStudyFor reads the flags into a study request and resolves it
// on the plan.
func resolveStudyFor(c *circuit.Circuit, fl *studyFlags) (*studySetup, error) {
	if !(fl.tolerance > 0 && fl.tolerance < 1) {
		return nil, inputError(fmt.Errorf("flag --tolerance: %g; accepted: a fraction of the range above 0 and below 1, e.g. 1e-6", fl.tolerance))
	}
	if fl.workers < 0 || fl.workers > maxWorkers {
		return nil, inputError(fmt.Errorf("flag --workers: %d; accepted: 0 (all cores) to %d", fl.workers, maxWorkers))
	}
	req := plan.StudyRequest{
		Axis:    plan.AxisRequest{Vary: fl.vary, From: fl.from, To: fl.to, Steps: fl.steps, Log: fl.log},
		Input:   fl.input,
		Output:  fl.output,
		Signed:  fl.signed,
		Workers: fl.workers,
	}
	if fl.vary2 != "" {
		req.Second = &plan.AxisRequest{Vary: fl.vary2, From: fl.from2, To: fl.to2, Steps: fl.steps2, Log: fl.log2}
	}
	var err error
	if req.FrequenciesHz, err = plan.ParseFrequencies("frequencies", fl.frequencies); err != nil {
		return nil, planError(err)
	}
	if req.DistortionHz, err = plan.ParseFrequencies("frequency", fl.distortionFrequency); err != nil {
		return nil, planError(err)
	}
	if req.Level, err = levelFlag("level", fl.level); err != nil {
		return nil, err
	}
	if err := videoBandFlag(fl.videoBandwidth, &req.VideoBandHz); err != nil {
		return nil, err
	}
	if err := plan.ParseGoal(&req, fl.target, fl.maximize, fl.minimize); err != nil {
		return nil, planError(err)
	}
	st, err := plan.ResolveStudy(c, req)
	if err != nil {
		return nil, planError(err)
	}
	return &studySetup{c: c, settings: st.Settings, planned: st}, nil
}

func runStudy(cmd *cobra.Command, path string, fl *studyFlags) error {
	g := guardOf(cmd)
	s, err := resolveStudy(g, cmd.ErrOrStderr(), path, fl)
	if err != nil {
		return err
	}
	bar := output.NewProgress(cmd.ErrOrStderr(), "study", s.settings.Total())
	s.settings.Progress = bar.Update
	begin := time.Now()
	r, err := study.Run(s.c, s.settings)
	bar.Done()
	if err != nil {
		return inputError(err)
	}
	elapsed := time.Since(begin)
	failed := r.Failed()
	if failed == len(r.Steps) {
		return analysisError(fmt.Errorf("no step of the study could be solved: %w", r.Steps[0].Err))
	}
	sol, err := s.planned.Solve(r, fl.tolerance)
	if err != nil {
		return planError(err)
	}
	cols := report.StudyColumns(r)
	var figs []*plots.Figure
	if fl.plotsDir != "" {
		if figs, err = studyPlots(r, fl.show, report.SolutionMarks(s.planned, sol)...); err != nil {
			return err
		}
	}
	// Every named output is checked before any is written.
	if err := g.refuseInputs(append([]string{fl.csvPath}, figurePaths(fl.plotsDir, figs)...)...); err != nil {
		return err
	}
	if err := g.writeIfNamed(fl.csvPath, func(w io.Writer) error { return results.WriteStudyCSV(w, r, cols) }); err != nil {
		return err
	}
	if err := g.writeFigures(fl.plotsDir, figs); err != nil {
		return err
	}
	out := cmd.OutOrStdout()
	if fl.asJSON {
		return results.Write(out, results.StudyOf(r, cols, s.planned, sol))
	}
	report.WriteStudy(out, r, cols, elapsed, failed)
	if sol != nil {
		report.WriteSolution(out, s.planned, r, sol)
	}
	writtenTo(out, "CSV", fl.csvPath, "figures", fl.plotsDir)
	return nil
}

// maxWorkers bounds --workers: far more than any machine's cores, and few
// enough that their workspaces fit in memory.
const maxWorkers = 1024
