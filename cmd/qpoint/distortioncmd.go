package main

import (
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"os"
	"sort"
	"strconv"
	"strings"
	"time"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"
	"golang.org/x/term"

	"qpoint/ac"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/si"
	"qpoint/plots/report"
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
	c        *circuit.Circuit
	p        *bias.Point
	nw       *smallsignal.Network
	drive    ac.Drive
	inName   string
	outName  string
	levelDBm float64
}

func resolveDistortion(warn io.Writer, path string, fl *distortionFlags) (*distortionSetup, error) {
	c, err := loadCircuit(warn, path, fl.sets, fl.temperature)
	if err != nil {
		return nil, err
	}
	if err := checkOutputsEarly(fl.plotsDir); err != nil {
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
	if p == nil {
		if p, err = solveWithTemperature(c, fl.temperature); err != nil {
			return nil, err
		}
	}
	s.p = p
	if s.nw, err = smallsignal.New(p); err != nil {
		return nil, analysisError(err)
	}
	return s, nil
}

// distortionDrive resolves the input, output and drive from the flags and
// the file's defaults, without solving anything.
func distortionDrive(c *circuit.Circuit, fl *distortionFlags) (*distortionSetup, error) {
	path := c.File
	var err error
	if len(c.Ports) == 0 {
		return nil, inputError(fmt.Errorf("%s: the circuit has no ports; distortion needs an input port (add a `ports:` list)", path))
	}
	def := c.Analysis.Distortion
	s := &distortionSetup{c: c}
	sp, err := resolveSignalPath(c, fl.input, fl.output)
	if err != nil {
		return nil, err
	}
	inIdx, in, o, out := sp.in, sp.inName, sp.out, sp.outName
	freq := def.FrequencyHz
	if fl.frequency != "" {
		if freq, err = circuit.ParseBounded(fl.frequency, circuit.Frequency); err != nil {
			return nil, inputError(fmt.Errorf("flag --frequency: %w", err))
		}
	}
	if freq == 0 {
		return nil, inputError(fmt.Errorf("no signal frequency: give --frequency (e.g. 2.45GHz) or analysis.distortion.frequency in the file"))
	}
	if err := ac.CheckFrequency(freq); err != nil {
		return nil, inputError(fmt.Errorf("%s%w", origin(c, "frequency", fl.frequency != "", def.Pos), err))
	}
	lv := def.Level
	haveLevel := def.Set
	if fl.level != "" {
		if lv, err = circuit.ParseLevel(fl.level); err != nil {
			return nil, inputError(fmt.Errorf("flag --level: %w", err))
		}
		haveLevel = true
	}
	if !haveLevel {
		lv = circuit.Level{DBm: -30, IsPower: true}
	}
	z0 := c.Ports[inIdx].Impedance
	if lv.IsPower {
		s.levelDBm = lv.DBm
	} else {
		// A peak voltage is what the generator delivers into a matched
		// load: half its EMF.
		s.levelDBm = ac.EMFToDBm(2*lv.PeakVolts, z0)
	}
	// A peak voltage within the voltage range can still be a power
	// beyond the level range at the port's impedance (1 MV into 50 Ω is
	// +130 dBm): the limits hold for the level, however it is written.
	if !(s.levelDBm >= circuit.MinLevelDBm && s.levelDBm <= circuit.MaxLevelDBm) {
		return nil, inputError(fmt.Errorf("%s%s at port %s's %s is %.4g dBm; accepted: %g dBm to %+g dBm of available power (a peak voltage into a matched load of that port)",
			origin(c, "level", fl.level != "", def.Pos), levelText(lv), in, si.Format(z0, "Ω", 4), s.levelDBm, float64(circuit.MinLevelDBm), float64(circuit.MaxLevelDBm)))
	}
	second := def.SecondToneHz
	if fl.secondTone == "none" {
		second = 0
	} else if fl.secondTone != "" {
		if second, err = circuit.ParseBounded(fl.secondTone, circuit.Frequency); err != nil {
			return nil, inputError(fmt.Errorf("flag --second-tone: %w", err))
		}
	}
	if second != 0 {
		if err := ac.CheckFrequency(second); err != nil {
			return nil, inputError(fmt.Errorf("%s%w", origin(c, "second-tone", fl.secondTone != "", def.Pos), err))
		}
		if second == freq {
			return nil, inputError(fmt.Errorf("flag --second-tone: must differ from the signal frequency %s", si.Format(freq, "Hz", 6)))
		}
	}
	s.drive = ac.Drive{Input: inIdx, Output: o, FrequencyHz: freq, EMF: ac.DBmToEMF(s.levelDBm, z0), SecondToneHz: second}
	s.inName, s.outName = in, out
	return s, nil
}

// parseRange reads FROM:TO:STEP.
func parseRange(flag, s string, q circuit.Quantity, stepQ circuit.Quantity) (from, to, step float64, err error) {
	parts := strings.Split(s, ":")
	if len(parts) != 3 {
		return 0, 0, 0, inputError(fmt.Errorf("flag --%s: `%s` is not FROM:TO:STEP; e.g. -50dBm:0dBm:1dB", flag, s))
	}
	read := func(t string, q circuit.Quantity) (float64, error) {
		if q == circuit.Dimensionless {
			t = strings.TrimSuffix(strings.TrimSuffix(t, "dBm"), "dB")
		}
		return circuit.ParseBounded(strings.TrimSpace(t), q)
	}
	if from, err = read(parts[0], q); err == nil {
		if to, err = read(parts[1], q); err == nil {
			step, err = read(parts[2], stepQ)
		}
	}
	if err != nil {
		return 0, 0, 0, inputError(fmt.Errorf("flag --%s: %w", flag, err))
	}
	if !(step > 0) || !(to > from) {
		return 0, 0, 0, inputError(fmt.Errorf("flag --%s: `%s` must rise from FROM to TO with a positive STEP", flag, s))
	}
	return from, to, step, nil
}

// parseLevelRange reads a level sweep FROM:TO:STEP: each end a power
// (-50dBm, or a bare number in dBm) or a peak voltage into a matched load
// (10mV, as --level takes it), the step in dB. It returns the ends in dBm
// of available power behind z0.
func parseLevelRange(flag, s string, z0 float64) (from, to, step float64, err error) {
	const example = "e.g. -50dBm:0dBm:1dB or 1mV:300mV:1dB"
	parts := strings.Split(s, ":")
	if len(parts) != 3 {
		return 0, 0, 0, inputError(fmt.Errorf("flag --%s: `%s` is not FROM:TO:STEP; %s", flag, s, example))
	}
	level := func(t string) (float64, error) {
		t = strings.TrimSpace(t)
		if v, err := circuit.ParseBounded(t, circuit.Dimensionless); err == nil {
			return v, nil // a bare number is dBm
		}
		lv, err := circuit.ParseLevel(t)
		if err != nil {
			return 0, err
		}
		if lv.IsPower {
			return lv.DBm, nil
		}
		return ac.EMFToDBm(2*lv.PeakVolts, z0), nil
	}
	if from, err = level(parts[0]); err == nil {
		if to, err = level(parts[1]); err == nil {
			step, err = circuit.ParseBounded(strings.TrimSpace(strings.TrimSuffix(strings.TrimSpace(parts[2]), "dB")), circuit.Dimensionless)
		}
	}
	if err != nil {
		return 0, 0, 0, inputError(fmt.Errorf("flag --%s: %w; %s", flag, err, example))
	}
	if !(step > 0) || !(to > from) {
		return 0, 0, 0, inputError(fmt.Errorf("flag --%s: `%s` must rise from FROM to TO with a positive STEP in dB; %s", flag, s, example))
	}
	if from < -200 || to > 90 {
		return 0, 0, 0, inputError(fmt.Errorf("flag --%s: `%s` spans %.1f to %.1f dBm; accepted: levels within -200 to +90 dBm", flag, s, from, to))
	}
	return from, to, step, nil
}

func runDistortion(cmd *cobra.Command, path string, fl *distortionFlags) error {
	s, err := resolveDistortion(cmd.ErrOrStderr(), path, fl)
	if err != nil {
		return err
	}
	if fl.harmonics < 3 || fl.harmonics > 50 {
		return inputError(fmt.Errorf("flag --harmonics: %d; accepted: 3 to 50", fl.harmonics))
	}
	settings := ac.SteadySettings{Samples: fl.samples, Harmonics: fl.harmonics}
	if fl.samples < 4*fl.harmonics+1 || fl.samples > 65536 {
		return inputError(fmt.Errorf("flag --samples: %d; accepted: at least 4 × harmonics + 1 and at most 65536", fl.samples))
	}
	waveSettings := settings
	if settings.Method, waveSettings.Method, err = fl.steady.steadyMethods(s); err != nil {
		return err
	}
	out := cmd.OutOrStdout()
	doc := &distortionJSON{Input: s.inName, Output: s.outName, Frequency: number(s.drive.FrequencyHz), LevelDBm: number(s.levelDBm)}

	// Frequency sweep of the estimate only.
	if fl.sweepFrequency != "" {
		from, to, perDec, err := parseRange("sweep-frequency", fl.sweepFrequency, circuit.Frequency, circuit.Dimensionless)
		if err != nil {
			return err
		}
		grid, err := ac.LogGrid(from, to, int(perDec))
		if err != nil {
			return inputError(fmt.Errorf("flag --sweep-frequency: %w", err))
		}
		var rows []frequencyRow
		err = ac.VolterraSweep(s.nw, s.drive, grid, func(e *ac.Estimate) error {
			rows = append(rows, frequencyRow{e.Drive.FrequencyHz, e.Clone()})
			return nil
		})
		if err != nil {
			return analysisError(err)
		}
		if fl.plotsDir != "" {
			if err := writeDistortionFrequencyPlot(fl.plotsDir, rows); err != nil {
				return err
			}
		}
		if fl.asJSON {
			for _, r := range rows {
				doc.FrequencySweep = append(doc.FrequencySweep, estimateJSONOf(r.est))
			}
			return writeJSON(out, doc)
		}
		writeDistortionHeader(out, s)
		writeFrequencySweep(out, rows)
		return nil
	}

	est, err := ac.Volterra(s.nw, s.drive)
	if err != nil {
		return analysisError(err)
	}
	doc.Estimate = estimateJSONOf(est)
	one := s.drive
	one.SecondToneHz = 0
	st, err := ac.SteadyState(s.nw, one, waveSettings)
	if err != nil {
		return analysisError(fmt.Errorf("waveform at %.1f dBm: %w", s.levelDBm, err))
	}
	doc.Waveform = waveformJSONOf(st)
	doc.Cautions = append([]string{}, st.Cautions()...)
	outside := st.Outside
	if len(outside) == 0 {
		outside = est.Outside
	}
	doc.Cautions = append(doc.Cautions, outsideMessages(outside)...)
	if note := truncationNote(st); note != "" {
		doc.Cautions = append(doc.Cautions, note)
	}
	oneEst := est.OneTone()
	cmp := ac.Compare(oneEst, st)
	for _, c := range cmp {
		doc.Comparison = append(doc.Comparison, comparisonJSON{c.Order, number(c.Estimate), number(c.Waveform), number(c.DiffDB), c.Trustable})
	}
	var two *ac.Steady
	if s.drive.SecondToneHz != 0 {
		if two, err = ac.SteadyState(s.nw, s.drive, waveSettings); err != nil {
			return analysisError(fmt.Errorf("two-tone waveform at %.1f dBm per tone: %w", s.levelDBm, err))
		}
		doc.Waveform.addTwoTone(two)
		doc.Cautions = append(doc.Cautions, two.Cautions()...)
		if note := truncationNote(two); note != "" {
			doc.Cautions = append(doc.Cautions, note)
		}
	}
	var limit *ac.Validity
	if !fl.noLimit {
		limit, err = ac.ValidityLimit(s.nw, one, s.levelDBm-40, s.levelDBm+40, 0.5, settings)
		if err != nil {
			return analysisError(fmt.Errorf("validity limit: %w", err))
		}
		doc.setValidity(limit)
	}

	var sweep, twoSweep []ac.LevelPoint
	var ip *ac.Intercept
	var ipErr error
	var transfer *ac.Transfer
	tss := math.NaN()
	var compression float64
	var compressed bool
	if fl.sweepLevel != "" {
		from, to, step, err := parseLevelRange("sweep-level", fl.sweepLevel, s.c.Ports[s.drive.Input].Impedance)
		if err != nil {
			return err
		}
		n := int(math.Floor((to-from)/step+1e-9)) + 1
		if n > 2000 {
			return inputError(fmt.Errorf("flag --sweep-level: %d levels; accepted: at most 2000", n))
		}
		levels := make([]float64, n)
		for i := range levels {
			levels[i] = from + float64(i)*step
		}
		bar := newProgress(cmd.ErrOrStderr(), "level sweep", n)
		sweep, err = ac.LevelSweep(s.nw, one, levels, settings, bar.update)
		bar.done()
		if err != nil && len(sweep) == 0 {
			return analysisError(err)
		}
		if err != nil {
			fmt.Fprintf(cmd.ErrOrStderr(), "qpoint: level sweep stopped: %v\n", err)
		}
		gain := cmplx.Abs(oneEst.Linear) / oneEst.Drive.EMF
		compression, compressed = ac.Compression(sweep, gain)
		if compressed {
			doc.CompressionDBm = number(compression)
		}
		for _, p := range sweep {
			doc.LevelSweep = append(doc.LevelSweep, levelJSON{number(p.LevelDBm), waveformJSONOf(p.Steady)})
		}
		doc.Cautions = append(doc.Cautions, sweepCautions(sweep)...)
		if transfer, tss, err = detectorTransfer(s, sweep, fl.videoBandwidth); err != nil {
			return err
		}
		if transfer != nil {
			doc.Transfer = transferJSONOf(transfer, tss)
		}
		if two != nil {
			twoSweep, ip, ipErr = twoToneLevelSweep(cmd, s, waveSettings, levels, doc)
		}
	}
	if fl.plotsDir != "" {
		if err := writeDistortionPlots(fl.plotsDir, s, oneEst, st, sweep, transfer, tss, twoToneFigures(two, est)...); err != nil {
			return err
		}
	}
	if fl.asJSON {
		return writeJSON(out, doc)
	}
	writeDistortionHeader(out, s)
	writeEstimate(out, est)
	writeJunctionDrive(out, s, est)
	writeContributions(out, est)
	writeWaveform(out, st)
	if note := truncationNote(st); note != "" {
		fmt.Fprintf(out, "  %s\n", note)
	}
	writeCautions(out, st.Cautions())
	writeOutside(out, outside)
	writeComparison(out, cmp, limit)
	if two != nil {
		writeTwoTone(out, two, est)
		writeCautions(out, two.Cautions())
	}
	if len(sweep) > 0 {
		writeLevelSweep(out, sweep, oneEst, compression, compressed)
		writeCautions(out, sweepCautions(sweep))
	}
	if transfer != nil {
		writeTransfer(out, transfer, tss)
	}
	if len(twoSweep) > 0 {
		writeTwoToneSweep(out, twoSweep, ip, ipErr, est)
	}
	if fl.plotsDir != "" {
		fmt.Fprintf(out, "figures written to %s\n", fl.plotsDir)
	}
	return nil
}

// detectorTransfer returns the transfer curve of a detector output from
// the level sweep, with its tangential sensitivity over the video band
// (NaN when it cannot be found); nil when the output is not a detector's.
func detectorTransfer(s *distortionSetup, sweep []ac.LevelPoint, videoBand string) (*ac.Transfer, float64, error) {
	path := ac.NoiseSettings{Input: s.drive.Input, Output: s.drive.Output}
	if len(sweep) < 3 || !ac.Detects(s.nw, path, s.drive.FrequencyHz) {
		return nil, math.NaN(), nil
	}
	if videoBand == "" {
		videoBand = "2MHz"
	}
	lo, hi, err := parseBand("video-bandwidth", videoBand, defaultVideoFromHz)
	if err != nil {
		return nil, math.NaN(), err
	}
	gamma, err := ac.VoltageSensitivity(s.nw, path, s.drive.FrequencyHz)
	if err != nil {
		return nil, math.NaN(), analysisError(err)
	}
	t, err := ac.DetectorTransfer(sweep, gamma)
	if err != nil {
		return nil, math.NaN(), nil
	}
	tss := math.NaN()
	if det, err := ac.Detector(s.nw, path, s.drive.FrequencyHz, lo, hi); err == nil {
		tss = det.TangentialDBm()
	}
	return t, tss, nil
}

// writeTransfer prints a detector's transfer curve and its square-law
// range.
func writeTransfer(w io.Writer, t *ac.Transfer, tssDBm float64) {
	tb := &table{title: "Detector transfer curve (waveform)", header: []string{"input", "output DC change", "from square law"}}
	for _, p := range t.Points {
		tb.add(fmt.Sprintf("%.1f dBm", p.LevelDBm), si.Format(p.Volts, "V", 4), fmt.Sprintf("%+.3f dB", p.DeviationDB))
	}
	tb.write(w)
	fmt.Fprintf(w, "  square law V = γP with γ = %s (small-signal voltage sensitivity)\n", si.Format(t.SensitivityVPerW, "V/W", 4))
	fmt.Fprintf(w, "  log-log slope %.3f at the lowest level, %.3f at the highest (1: square law, 0.5: linear detection)\n", t.LowSlope, t.HighSlope)
	if math.IsNaN(t.DeviationDBm) {
		fmt.Fprintf(w, "  within 1 dB of square law over the whole sweep, or beyond it from the lowest level\n")
	} else {
		fmt.Fprintf(w, "  1 dB from square law at %.2f dBm input\n", t.DeviationDBm)
	}
	if !math.IsNaN(tssDBm) {
		fmt.Fprintf(w, "  tangential sensitivity %.2f dBm", tssDBm)
		if dr := t.DynamicRangeDB(tssDBm); !math.IsNaN(dr) {
			fmt.Fprintf(w, "; square-law dynamic range %.1f dB", dr)
		}
		fmt.Fprintln(w)
		if len(t.Points) > 0 && t.Points[0].LevelDBm > tssDBm {
			fmt.Fprintf(w, "  the sweep starts above the tangential sensitivity; start below %.0f dBm to see the whole range\n", math.Floor(tssDBm))
		}
	}
	fmt.Fprintln(w)
}

type frequencyRow struct {
	f   float64
	est *ac.Estimate
}

func writeDistortionHeader(w io.Writer, s *distortionSetup) {
	fmt.Fprintf(w, "%s\n", s.c.Name)
	fmt.Fprintf(w, "  file         %s\n", s.c.File)
	writeOverrides(w, s.c)
	fmt.Fprintf(w, "  bias         %s\n", report.BiasLine(s.p))
	z0 := s.c.Ports[s.drive.Input].Impedance
	fmt.Fprintf(w, "  drive        port %s, %s, %.2f dBm available (EMF %s peak behind %s)\n", s.inName,
		si.Format(s.drive.FrequencyHz, "Hz", 6), s.levelDBm, si.Format(s.drive.EMF, "V", 4), si.Format(z0, "Ω", 4))
	if s.drive.SecondToneHz != 0 {
		fmt.Fprintf(w, "               second tone %s at the same level\n", si.Format(s.drive.SecondToneHz, "Hz", 6))
	}
	kind := "node"
	if s.drive.Output.Port >= 0 {
		kind = "port"
	}
	fmt.Fprintf(w, "  output       %s %s\n", kind, s.outName)
}

func dbc(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	return strconv.FormatFloat(v, 'f', 1, 64) + " dBc"
}

// waveDBc prints a waveform harmonic relative to the fundamental, or says
// it is lost in the solver's numerical floor (about -150 dBc).
func waveDBc(v float64) string {
	if v < -150 {
		return "below floor"
	}
	return dbc(v)
}

func writeEstimate(w io.Writer, e *ac.Estimate) {
	t, notes := estimateTable(e)
	t.write(w)
	for _, n := range notes {
		fmt.Fprintf(w, "  %s\n", n)
	}
}

// estimateTable returns the Volterra estimate as a table, and notes to
// print under it.
func estimateTable(e *ac.Estimate) (*table, []string) {
	var notes []string
	t := &table{title: "Volterra estimate (third order)", header: []string{"quantity", "value"}}
	if cmplx.Abs(e.Linear) <= 1e-12*e.Drive.EMF {
		t.add("fundamental", "none: this output is isolated from the input")
	} else {
		t.add("fundamental", si.Format(cmplx.Abs(e.Fundamental), "V", 4)+" peak")
	}
	if p, ok := e.OutputDBm(); ok && cmplx.Abs(e.Linear) > 1e-12*e.Drive.EMF {
		t.add("fundamental power", fmt.Sprintf("%.2f dBm", p+e.GainChangeDB()))
	}
	if cmplx.Abs(e.Linear) > 1e-12*e.Drive.EMF {
		t.add("gain change at f1", gainChange(e.GainChangeDB()))
		t.add("phase change at f1", fmt.Sprintf("%+.3g° (AM-to-PM %+.3g°/dB)", e.PhaseChangeDeg(), e.AMPMDegPerDB()))
		if l, compress := e.GainStepDBm(1); !math.IsNaN(l) {
			kind := "1 dB compression (series)"
			if !compress {
				kind = "1 dB expansion (series)"
			}
			t.add(kind, fmt.Sprintf("%.2f dBm input", l))
		}
	}
	const cancelled = "cancelled by symmetry"
	pick := func(p ac.Product, v string) string {
		if e.Balanced(p) {
			return cancelled
		}
		return v
	}
	t.add("second harmonic", pick(ac.HD2, dbc(e.HD2dBc())))
	t.add("third harmonic", pick(ac.HD3, dbc(e.HD3dBc())))
	t.add("DC shift", pick(ac.DC, si.Format(e.DCShift, "V", 4)))
	if e.Drive.SecondToneHz != 0 {
		t.add("IM2 at |f2 - f1|", pick(ac.IM2Diff, dbc(e.IM2dBc())))
		t.add("IM3 at 2f1 - f2", pick(ac.IM3, dbc(e.IM3dBc())))
		t.add("input intercept IIP3", pick(ac.IM3, fmt.Sprintf("%.2f dBm", e.IIP3dBm())))
		if o, ok := e.OIP3dBm(); ok {
			t.add("output intercept OIP3", pick(ac.IM3, fmt.Sprintf("%.2f dBm", o)))
		}
		t.add("input intercept IIP2", pick(ac.IM2Diff, fmt.Sprintf("%.2f dBm", e.IIP2dBm())))
	}
	for _, p := range []ac.Product{ac.DC, ac.HD2, ac.HD3, ac.IM2Diff, ac.IM3} {
		if e.Balanced(p) {
			notes = append(notes, fmt.Sprintf("products marked %q balance out between matched diodes; in a built circuit they follow the parts' mismatch", cancelled))
			break
		}
	}
	return t, notes
}

// gainChange prints the third-order gain change at f1 with its sense.
func gainChange(db float64) string {
	switch {
	case math.IsNaN(db):
		return "—"
	case db < 0:
		return fmt.Sprintf("%+.3g dB (compression)", db)
	case db > 0:
		return fmt.Sprintf("%+.3g dB (expansion)", db)
	}
	return "0 dB"
}

func writeContributions(w io.Writer, e *ac.Estimate) {
	contributionTable(e).write(w)
}

func contributionTable(e *ac.Estimate) *table {
	t := &table{title: "Where the distortion comes from", header: []string{"product", "diode", "nonlinearity", "phasor at output", "share"}}
	byProduct := map[ac.Product][]ac.Contribution{}
	var order []ac.Product
	for _, c := range e.Contributions {
		if _, ok := byProduct[c.Product]; !ok {
			order = append(order, c.Product)
		}
		byProduct[c.Product] = append(byProduct[c.Product], c)
	}
	label := map[ac.Product]string{ac.DC: "DC shift", ac.Gain3: "f1, 3rd order", ac.HD2: "HD2", ac.HD3: "HD3", ac.IM2Sum: "IM2 f1+f2", ac.IM2Diff: "IM2 f1-f2", ac.IM3: "IM3"}
	for _, p := range order {
		cs := byProduct[p]
		sort.SliceStable(cs, func(i, j int) bool { return cmplx.Abs(cs[i].Phasor) > cmplx.Abs(cs[j].Phasor) })
		for i, c := range cs {
			if c.Phasor == 0 {
				continue
			}
			name := ""
			if i == 0 {
				name = label[p]
			}
			share := fmt.Sprintf("%.1f %%", c.Percent)
			if math.IsNaN(c.Percent) {
				share = "cancels"
			}
			t.add(name, c.Diode, string(c.Source), fmt.Sprintf("%s ∠%.0f°", si.Format(cmplx.Abs(c.Phasor), "V", 3), cmplx.Phase(c.Phasor)*180/math.Pi), share)
		}
	}
	return t
}

func writeWaveform(w io.Writer, s *ac.Steady) {
	t, note := waveformTable(s)
	t.write(w)
	fmt.Fprintf(w, "  %s\n", note)
	if len(s.Stress) > 0 {
		stressTable(s).write(w)
	}
}

// stressTable gives every diode's extremes over the period: what its
// ratings, or the breakdown knee, are to be held against.
func stressTable(s *ac.Steady) *table {
	t := &table{title: "Diode extremes over the period (waveform)", header: []string{"diode", "peak forward current", "peak reverse voltage", "mean power"}}
	for _, d := range s.Stress {
		t.add(d.Name, si.Format(d.PeakCurrent, "A", 4), si.Format(d.PeakReverseVoltage, "V", 4), si.Format(d.MeanPower, "W", 4))
	}
	return t
}

func waveformTable(s *ac.Steady) (*table, string) {
	t := &table{title: "Waveform (periodic steady state by " + methodLine(s) + ")",
		header: []string{"order", "amplitude", "relative", "phase"}}
	fund := s.Output[1].Amplitude
	isolated := fund <= s.NoiseFloor
	for _, h := range s.Output {
		rel, ph := "", ""
		if h.Order == 0 {
			t.add("0 (DC shift)", si.Format(h.Amplitude, "V", 4), "", "")
			continue
		}
		rel = waveDBc(20 * math.Log10(h.Amplitude/fund))
		if h.Order == 1 {
			rel = "0 dBc"
		}
		if isolated {
			rel = "—"
		}
		ph = fmt.Sprintf("%.1f°", h.PhaseDeg)
		t.add(strconv.Itoa(h.Order), si.Format(h.Amplitude, "V", 4), rel, ph)
	}
	if isolated {
		return t, fmt.Sprintf("no signal above the solver's floor (%s) reaches this output: it is isolated from the input; %d Newton iterations",
			si.Format(s.NoiseFloor, "V", 2), s.Iterations)
	}
	return t, fmt.Sprintf("THD %.4g %%; %d Newton iterations; %s residual %.2g", s.THDPercent, s.Iterations, residualName(s), s.Residual)
}

func writeComparison(w io.Writer, cs []ac.Comparison, v *ac.Validity) {
	t, note := comparisonTable(cs, v)
	t.write(w)
	if note != "" {
		fmt.Fprintf(w, "  %s\n", note)
	}
	fmt.Fprintln(w)
}

func comparisonTable(cs []ac.Comparison, v *ac.Validity) (*table, string) {
	t := &table{title: "Estimate beside waveform", header: []string{"product", "estimate", "waveform", "difference"}}
	names := map[int]string{0: "DC shift", 1: "fundamental", 2: "2nd harmonic", 3: "3rd harmonic"}
	for _, c := range cs {
		diff := fmt.Sprintf("%+.3f dB", c.DiffDB)
		if !c.Trustable {
			diff = "below the solver's floor"
		}
		t.add(names[c.Order], si.Format(c.Estimate, "V", 4), si.Format(c.Waveform, "V", 4), diff)
	}
	note := ""
	trusted := false
	for _, c := range cs {
		trusted = trusted || c.Trustable
	}
	if !trusted {
		return t, "nothing at this output lies above the solver's floor, so there is nothing to compare"
	}
	if v != nil {
		note = v.Note()
	}
	return t, note
}

func writeLevelSweep(w io.Writer, pts []ac.LevelPoint, e *ac.Estimate, comp float64, ok bool) {
	levelSweepTable(pts).write(w)
	if ok {
		fmt.Fprintf(w, "  1 dB compression at %.2f dBm input (waveform)\n", comp)
	} else {
		fmt.Fprintf(w, "  no 1 dB compression within the sweep (waveform)\n")
	}
	if e != nil {
		if l, compress := e.GainStepDBm(1); !math.IsNaN(l) {
			kind := "compression"
			if !compress {
				kind = "expansion"
			}
			fmt.Fprintf(w, "  1 dB %s at %.2f dBm input (third-order series estimate)\n", kind, l)
		}
	}
	fmt.Fprintln(w)
}

func levelSweepTable(pts []ac.LevelPoint) *table {
	t := &table{title: "Level sweep (waveform)", header: []string{"input", "fundamental", "2nd", "3rd", "DC shift", "THD"}}
	for _, p := range pts {
		o := p.Steady.Output
		floor := "< " + si.Format(p.Steady.NoiseFloor, "V", 2)
		cell := func(h ac.Harmonic, text string) string {
			if h.BelowFloor || o[1].BelowFloor {
				return "below floor"
			}
			return text
		}
		fund, shift := si.Format(o[1].Amplitude, "V", 4), si.Format(o[0].Amplitude, "V", 4)
		if o[1].BelowFloor {
			fund = floor
		}
		if o[0].BelowFloor {
			shift = "below floor"
		}
		thd := fmt.Sprintf("%.3g %%", p.Steady.THDPercent)
		switch {
		case p.Steady.THDBelowPercent > 0:
			thd = fmt.Sprintf("< %.2g %%", p.Steady.THDBelowPercent)
		case math.IsNaN(p.Steady.THDPercent):
			thd = "—"
		}
		t.add(fmt.Sprintf("%.1f dBm", p.LevelDBm), fund,
			cell(o[2], waveDBc(20*math.Log10(o[2].Amplitude/o[1].Amplitude))), cell(o[3], waveDBc(20*math.Log10(o[3].Amplitude/o[1].Amplitude))),
			shift, thd)
	}
	return t
}

func writeFrequencySweep(w io.Writer, rows []frequencyRow) {
	t := &table{title: "Volterra estimate across frequency", header: []string{"frequency", "fundamental", "HD2", "HD3", "DC shift"}}
	two := len(rows) > 0 && rows[0].est.Drive.SecondToneHz != 0
	if two {
		t.header = append(t.header, "IM3", "IIP3")
	}
	for _, r := range rows {
		cells := []string{si.Format(r.f, "Hz", 4), si.Format(cmplx.Abs(r.est.Fundamental), "V", 4), dbc(r.est.HD2dBc()), dbc(r.est.HD3dBc()), si.Format(r.est.DCShift, "V", 4)}
		if two {
			cells = append(cells, dbc(r.est.IM3dBc()), fmt.Sprintf("%.2f dBm", r.est.IIP3dBm()))
		}
		t.add(cells...)
	}
	t.write(w)
	fmt.Fprintln(w)
}

// progress draws a bar with the count, rate and time left on standard
// error when it is a terminal (golang.org/x/term), and nothing otherwise,
// so that logs and pipes stay clean. The bar is schollz/progressbar's.
type progress struct {
	bar *progressbar.ProgressBar
}

func newProgress(w io.Writer, label string, total int) *progress {
	f, ok := w.(*os.File)
	if !ok || !term.IsTerminal(int(f.Fd())) || total <= 1 {
		return &progress{}
	}
	return &progress{bar: progressbar.NewOptions(total,
		progressbar.OptionSetWriter(w),
		progressbar.OptionSetDescription(label),
		progressbar.OptionShowCount(),
		progressbar.OptionSetPredictTime(true),
		progressbar.OptionSetWidth(30),
		progressbar.OptionThrottle(100*time.Millisecond),
		progressbar.OptionClearOnFinish(),
		progressbar.OptionSetTheme(progressbar.Theme{Saucer: "█", SaucerPadding: "·", BarStart: "[", BarEnd: "]"}),
	)}
}

// update shows done steps of total; it may be called from any goroutine
// that holds the caller's lock, as study progress is.
func (p *progress) update(done, total int) {
	if p.bar != nil {
		_ = p.bar.Set(done)
	}
}

// done removes the bar.
func (p *progress) done() {
	if p.bar != nil {
		_ = p.bar.Finish()
	}
}

// writeCautions prints each caution as its own marked line.
func writeCautions(w io.Writer, c []string) {
	if len(c) == 0 {
		return
	}
	fmt.Fprintf(w, "\nCautions (model estimates: the part may be damaged here)\n")
	for _, x := range c {
		fmt.Fprintf(w, "  ! %s\n", x)
	}
}

// sweepCautions returns, for each diode and kind of overstress met in a
// level sweep, the lowest level at which it appears.
func sweepCautions(pts []ac.LevelPoint) []string {
	type key struct {
		diode string
		kind  ac.StressKind
	}
	seen := map[key]bool{}
	var out []string
	for _, p := range pts {
		for _, c := range p.Steady.StressCautions() {
			k := key{c.Diode, c.Kind}
			if seen[k] {
				continue
			}
			seen[k] = true
			out = append(out, fmt.Sprintf("from %.1f dBm: %s", p.LevelDBm, c.Message))
		}
	}
	return out
}

// writeJunctionDrive prints each junction's drive x = |v|/(n V_T) at the
// fundamental: below about 0.1 the junction runs weakly nonlinear and the
// estimate holds; near 1 and above it does not.
func writeJunctionDrive(w io.Writer, s *distortionSetup, e *ac.Estimate) {
	var parts []string
	for k, d := range s.nw.Diodes {
		if k < len(e.Junctions) {
			parts = append(parts, fmt.Sprintf("%s %.3g", d.Name, cmplx.Abs(e.Junctions[k])/d.Device.NVT()))
		}
	}
	if len(parts) > 0 {
		fmt.Fprintf(w, "  junction drive x = |v|/(n V_T) at f1: %s\n", strings.Join(parts, ", "))
	}
}

// origin names where a setting came from in a message: the flag when the
// user gave it, else the file's analysis.distortion section at its
// FILE:LINE:COL.
func origin(c *circuit.Circuit, flag string, fromFlag bool, at circuit.Pos) string {
	if fromFlag {
		return "flag --" + flag + ": "
	}
	return fmt.Sprintf("%s:%d:%d: analysis.distortion.%s: ", c.File, at.Line, at.Col, strings.ReplaceAll(flag, "-", "_"))
}

// levelText writes a level as the user gave it.
func levelText(lv circuit.Level) string {
	if lv.IsPower {
		return fmt.Sprintf("%g dBm", lv.DBm)
	}
	return si.Format(lv.PeakVolts, "V", 4) + " peak"
}
