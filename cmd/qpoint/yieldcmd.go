package main

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"qpoint/ac/plan"
	"qpoint/ac/study"
	"qpoint/ac/yield"
	"qpoint/bias/circuit"
	"qpoint/plots"
	"qpoint/plots/report"
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

// defaultRuns is the run count when neither the flag nor the file gives
// one: enough that a yield near 95 % has a 95 % interval about ±1.4 %
// wide.
const defaultRuns = 1000

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
	f.IntVar(&fl.runs, "runs", 0, fmt.Sprintf("circuits to draw, 1 to %d (default: the file's, else %d)", yield.MaxRuns, defaultRuns))
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

// resolveYield turns the flags and the file's defaults into the yield
// settings. With no target from either, it returns observe-only targets
// when observe is true (the report's spread of the main figures), and an
// error otherwise.
func resolveYield(c *circuit.Circuit, fl *yieldFlags, observe bool) (*yield.Settings, error) {
	path := c.File
	if len(c.Tolerances) == 0 {
		return nil, inputError(fmt.Errorf("%s: the circuit has no tolerances; accepted: a `tolerance:` on a part (e.g. tolerance: 1%%) or a `spread:` on a diode model (e.g. spread: {saturation_current: {log_sigma: 0.3}})", path))
	}
	def := c.Analysis.Yield
	s := &yield.Settings{Runs: defaultRuns, Seed: 1, Workers: fl.workers}
	if def.Runs > 0 {
		s.Runs = def.Runs
	}
	if fl.runs != 0 {
		if fl.runs < 0 || fl.runs > yield.MaxRuns {
			return nil, inputError(fmt.Errorf("flag --runs: %d; accepted: 1 to %d", fl.runs, yield.MaxRuns))
		}
		s.Runs = fl.runs
	}
	if def.SeedSet {
		s.Seed = def.Seed
	}
	if fl.seedSet {
		s.Seed = fl.seed
	}
	if fl.workers < 0 {
		return nil, inputError(fmt.Errorf("flag --workers: %d; accepted: 0 (all cores) or more", fl.workers))
	}
	switch {
	case len(fl.targets) > 0:
		for _, text := range fl.targets {
			t, err := yield.ParseTarget(strings.TrimSpace(text))
			if err != nil {
				return nil, inputError(fmt.Errorf("flag --target: %w", err))
			}
			s.Targets = append(s.Targets, t)
		}
	case len(def.Targets) > 0:
		for i, text := range def.Targets {
			t, err := yield.ParseTarget(text)
			if err != nil {
				pos := def.TargetPos[i]
				return nil, inputError(fmt.Errorf("%s:%d:%d: target of the yield analysis: %w", path, pos.Line, pos.Col, err))
			}
			s.Targets = append(s.Targets, t)
		}
	case observe:
		s.Targets = observeTargets(c)
	default:
		return nil, inputError(errors.New(`flag --target is missing and the file has no analysis.yield targets; e.g. --target "s21>-6.2dB@900MHz" --target "hd3<-50dBc"`))
	}

	// A measure naming a diode or probe must find it.
	var diodes []string
	for _, p := range c.Parts {
		if p.Kind == circuit.Diode {
			diodes = append(diodes, p.Name)
		}
	}
	for _, t := range s.Targets {
		m := t.Measure
		switch {
		case m.Part == "":
		case m.Name == "probe" && !slices.Contains(c.Probes, m.Part):
			return nil, inputError(fmt.Errorf("target %s: `%s` is not a probe of the circuit; accepted: %s", t.Text, m.Part, nameOrNone(c.Probes)))
		case m.Name != "probe" && !slices.Contains(diodes, m.Part):
			return nil, inputError(fmt.Errorf("target %s: `%s` is not a diode of the circuit; accepted: %s", t.Text, m.Part, nameOrNone(diodes)))
		}
	}

	// Temperatures: the range's ends and the circuit's own between them.
	lo, hi, ranged := 0.0, 0.0, false
	if fl.temperatureRange != "" {
		a, b, ok := strings.Cut(fl.temperatureRange, ":")
		const accepted = "LOW:HIGH, e.g. -40C:85C"
		if !ok {
			return nil, inputError(fmt.Errorf("flag --temperature-range: `%s` is not LOW:HIGH; accepted: %s", fl.temperatureRange, accepted))
		}
		var err error
		if lo, err = circuit.ParseBounded(strings.TrimSpace(a), circuit.Temperature); err != nil {
			return nil, inputError(fmt.Errorf("flag --temperature-range: %w", err))
		}
		if hi, err = circuit.ParseBounded(strings.TrimSpace(b), circuit.Temperature); err != nil {
			return nil, inputError(fmt.Errorf("flag --temperature-range: %w", err))
		}
		if !(lo < hi) {
			return nil, inputError(fmt.Errorf("flag --temperature-range: `%s` does not rise; accepted: %s", fl.temperatureRange, accepted))
		}
		ranged = true
	} else if def.TemperatureRangeSet {
		lo, hi, ranged = def.TemperatureRangeK[0], def.TemperatureRangeK[1], true
	}
	if ranged {
		s.TemperaturesK = []float64{lo}
		if lo < c.TemperatureK && c.TemperatureK < hi {
			s.TemperaturesK = append(s.TemperaturesK, c.TemperatureK)
		}
		s.TemperaturesK = append(s.TemperaturesK, hi)
	}

	// The study frequency a measure without @F is read at: the file's
	// distortion frequency, else the middle of its response range.
	a := &s.Analysis
	switch {
	case c.Analysis.Distortion.Set:
		a.FrequenciesHz = []float64{c.Analysis.Distortion.FrequencyHz}
	case c.Analysis.Response.Set:
		a.FrequenciesHz = []float64{math.Sqrt(c.Analysis.Response.FromHz * c.Analysis.Response.ToHz)}
	default:
		a.FrequenciesHz = []float64{1e9}
	}
	needDrive, needPath := false, false
	for _, t := range s.Targets {
		needDrive = needDrive || t.Measure.NeedsDrive()
		needPath = needPath || t.Measure.NeedsNoise() || t.Measure.NeedsDetector()
	}
	def2 := c.Analysis.Distortion
	if fl.level != "" || needDrive || needPath || fl.frequency != "" {
		freq := fl.frequency
		if freq == "" && !def2.Set {
			freq = strconv.FormatFloat(a.FrequenciesHz[0], 'g', -1, 64) + "Hz"
		}
		d, err := distortionDrive(c, &distortionFlags{input: fl.input, output: fl.output, level: fl.level, frequency: freq})
		if err != nil {
			return nil, err
		}
		d.drive.SecondToneHz = 0
		if fl.level == "" && !def2.Set {
			d.drive.EMF = 0 // the path alone: no level was asked for
		}
		a.Drive = d.drive
		a.DistortionHz = []float64{d.drive.FrequencyHz}
	}
	for _, t := range s.Targets {
		if t.Measure.NeedsMixer() && a.Mixer == nil {
			m, err := plan.ResolveMixer(c, plan.MixerRequest{})
			if err != nil {
				return nil, planError(err)
			}
			a.Mixer = &m.Settings
		}
	}
	for _, t := range s.Targets {
		if t.Measure.NeedsDrive() && a.Drive.EMF == 0 {
			return nil, inputError(fmt.Errorf("target %s needs a signal level: give --level (e.g. -30dBm)", t.Text))
		}
	}
	if needPath || fl.videoBandwidth != "" {
		vb := fl.videoBandwidth
		if vb == "" {
			vb = "2MHz"
		}
		vlo, vhi, err := parseBand("video-bandwidth", vb, 1)
		if err != nil {
			return nil, err
		}
		a.Detector = &study.DetectorSettings{VideoFromHz: vlo, VideoToHz: vhi}
	}
	return s, nil
}

// nameOrNone lists names for a message.
func nameOrNone(names []string) string {
	if len(names) == 0 {
		return "none in this circuit"
	}
	return strings.Join(names, ", ")
}

// observeTargets are the figures the report follows when the file names
// no yield targets: the transmission (or the input impedance of a
// one-port) at the design frequency, and HD3 when the file gives a drive.
func observeTargets(c *circuit.Circuit) []yield.Target {
	var texts []string
	if len(c.Ports) >= 2 {
		texts = append(texts, "s21")
	} else if len(c.Ports) == 1 {
		texts = append(texts, "zin_mag")
	}
	if c.Analysis.Distortion.Set && len(c.Ports) > 0 {
		texts = append(texts, "hd3")
	}
	var ts []yield.Target
	for _, text := range texts {
		m, err := study.ParseMeasure(text)
		if err == nil {
			ts = append(ts, yield.Target{Text: text, Measure: m, Bound: yield.Observe, Limit: math.NaN()})
		}
	}
	return ts
}

func runYield(cmd *cobra.Command, path string, fl *yieldFlags) error {
	c, err := loadCircuit(cmd.ErrOrStderr(), path, fl.sets, "")
	if err != nil {
		return err
	}
	s, err := resolveYield(c, fl, false)
	if err != nil {
		return err
	}
	bar := newProgress(cmd.ErrOrStderr(), "yield", s.Runs)
	s.Progress = bar.update
	r, err := yield.Run(c, *s)
	bar.done()
	if err != nil {
		return analysisError(err)
	}
	if r.Stats.Failed == len(r.Runs) {
		return analysisError(fmt.Errorf("no run could be analysed: %w", r.Runs[0].Err))
	}
	var figs []*plots.Figure
	if fl.plotsDir != "" {
		figs = yieldFigures(r)
	}
	if err := refuseInputs(append([]string{fl.csvPath}, figurePaths(fl.plotsDir, figs)...)...); err != nil {
		return err
	}
	if fl.csvPath != "" {
		if err := writeFileAtomic(fl.csvPath, func(w io.Writer) error { return writeYieldCSV(w, r) }); err != nil {
			return err
		}
	}
	if fl.plotsDir != "" {
		if err := writeFigures(fl.plotsDir, figs); err != nil {
			return err
		}
	}
	out := cmd.OutOrStdout()
	if fl.asJSON {
		return writeJSON(out, yieldDocument(r))
	}
	writeYield(out, r)
	for _, x := range []struct{ what, path string }{{"CSV", fl.csvPath}, {"figures", fl.plotsDir}} {
		if x.path != "" {
			fmt.Fprintf(out, "%s written to %s\n", x.what, x.path)
		}
	}
	return nil
}

// yieldFigures draws a histogram of each target's worst reading.
func yieldFigures(r *yield.Result) []*plots.Figure {
	var figs []*plots.Figure
	for t := range r.Targets {
		figs = append(figs, plots.YieldHistogram(r, t))
	}
	return figs
}

// temperatureList prints the temperatures in degrees Celsius.
func temperatureList(ks []float64) string {
	var parts []string
	for _, k := range ks {
		parts = append(parts, fmt.Sprintf("%.2f °C", report.Celsius(k)))
	}
	return strings.Join(parts, ", ")
}

// percentOf prints a fraction as a percentage with enough digits for a
// yield near 100 %.
func percentOf(f float64) string {
	if math.IsNaN(f) {
		return "—"
	}
	if math.Abs(f) < 5e-5 {
		f = 0 // no "-0.00 %" for a share that differences leave a hair below zero
	}
	return strconv.FormatFloat(100*f, 'f', 2, 64) + " %"
}

func writeYield(w io.Writer, r *yield.Result) {
	c := r.Circuit
	fmt.Fprintf(w, "%s\n", c.Name)
	fmt.Fprintf(w, "  file         %s\n", c.File)
	writeOverrides(w, c)
	fmt.Fprintf(w, "  runs         %d, seed %d, %d workers, in %s\n", len(r.Runs), r.Settings.Seed, r.Stats.Workers, r.Stats.Runtime.Round(1e6))
	fmt.Fprintf(w, "  temperatures %s\n", temperatureList(r.TemperaturesK))
	fmt.Fprintf(w, "  tolerances   %d values, %d groups; %d analyses, %d Newton iterations\n",
		len(c.Tolerances), len(c.ToleranceGroups), r.Stats.Evaluations, r.Stats.NewtonIterations)
	limited := false
	for _, t := range r.Settings.Targets {
		limited = limited || t.Bound != yield.Observe
	}
	if limited {
		fmt.Fprintf(w, "\nYield %s: %d of %d runs meet every target (95 %% interval %s to %s, Wilson score)\n",
			percentOf(r.Yield), r.Passed, len(r.Runs), percentOf(r.Interval[0]), percentOf(r.Interval[1]))
	}
	yieldTargetTable(r).write(w)
	yieldShareTable(r).write(w)
	if len(r.Corners) > 0 {
		yieldCornerTable(r).write(w)
	}
	if len(r.Cautions) > 0 {
		fmt.Fprintln(w)
		for _, x := range r.Cautions {
			fmt.Fprintf(w, "  ! %s\n", x.Message)
		}
	}
	fmt.Fprintln(w)
}

func yieldTargetTable(r *yield.Result) *table {
	t := &table{title: "Targets (each run's worst reading over the temperatures)",
		header: []string{"target", "nominal", "mean", "std dev", "first-order std dev", "0.1 %", "99.9 %", "runs meeting it"}}
	lo, hi := slices.Index(yield.QuantileLevels, 0.001), slices.Index(yield.QuantileLevels, 0.999)
	for _, ts := range r.Targets {
		u := ts.Target.Measure.Unit
		pass := percentOf(ts.PassFraction)
		if ts.Target.Bound == yield.Observe {
			pass = "(no limit)"
		}
		t.add(ts.Target.Text, report.FormatMeasure(ts.Nominal, u), report.FormatMeasure(ts.Mean, u), formatSpread(ts.Std, u),
			formatSpread(ts.LinearStd, u), report.FormatMeasure(ts.Quantiles[lo], u), report.FormatMeasure(ts.Quantiles[hi], u), pass)
	}
	return t
}

// formatSpread prints a standard deviation: dB figures with three
// decimals, the rest with SI prefixes.
func formatSpread(v float64, unit string) string {
	if math.IsNaN(v) {
		return "—"
	}
	switch unit {
	case "dB", "dBc", "dBm":
		return strconv.FormatFloat(v, 'f', 3, 64) + " " + unit
	}
	return report.FormatMeasure(v, unit)
}

// yieldShareTable ranks the values by their largest share of any
// target's variance.
func yieldShareTable(r *yield.Result) *table {
	t := &table{title: "Which value to tighten: share of each target's variance (first order, central differences)",
		header: []string{"value", "spread"}}
	for _, ts := range r.Targets {
		t.header = append(t.header, ts.Target.Text)
	}
	c := r.Circuit
	nv := len(c.Tolerances)
	best := make([]float64, nv)
	for k := range best {
		best[k] = math.Inf(-1)
		for ti := range r.Targets {
			if s := r.Sensitivities[ti*nv+k].Share; s > best[k] {
				best[k] = s
			}
		}
	}
	order := make([]int, nv)
	for k := range order {
		order[k] = k
	}
	slices.SortStableFunc(order, func(a, b int) int {
		switch {
		case best[a] > best[b]:
			return -1
		case best[a] < best[b]:
			return 1
		}
		return 0
	})
	for _, k := range order {
		tol := &c.Tolerances[k]
		row := []string{tol.Name, spreadText(tol)}
		for ti := range r.Targets {
			row = append(row, percentOf(r.Sensitivities[ti*nv+k].Share))
		}
		t.add(row...)
	}
	for gi, g := range c.ToleranceGroups {
		row := []string{"group " + g.Name, fmt.Sprintf("ρ = %g", g.Correlation)}
		for ti := range r.Targets {
			row = append(row, percentOf(r.Groups[ti*len(c.ToleranceGroups)+gi].Share))
		}
		t.add(row...)
	}
	return t
}

// spreadText says how a value spreads, as the file wrote it.
func spreadText(t *circuit.Tolerance) string {
	switch t.Distribution {
	case circuit.Uniform:
		return "±" + t.Text + " band"
	case circuit.Normal:
		return "σ " + t.Text
	}
	return "σ(ln) " + t.Text
}

func yieldCornerTable(r *yield.Result) *table {
	t := &table{title: "Worst-case corners (each value at its band's end or 3 σ, the way that worsens the target)",
		header: []string{"target", "limit", "nominal", "corner", "worst run", "corner meets it"}}
	for _, cn := range r.Corners {
		ts := r.Targets[cn.Target]
		u := ts.Target.Measure.Unit
		worst := ts.Min
		if ts.Target.Bound == yield.AtMost {
			worst = ts.Max
		}
		verdict := "yes"
		if !cn.Passes {
			verdict = "no"
		}
		if cn.Err != nil {
			verdict = "not solved"
		}
		t.add(ts.Target.Text, report.FormatMeasure(ts.Target.Limit, u), report.FormatMeasure(ts.Nominal, u), report.FormatMeasure(cn.Reading, u), report.FormatMeasure(worst, u), verdict)
	}
	return t
}

// writeYieldCSV writes one row per run: the drawn values, each target's
// reading at each temperature and its worst, and whether the run passed.
func writeYieldCSV(w io.Writer, r *yield.Result) error {
	cw := csv.NewWriter(w)
	c := r.Circuit
	header := []string{"run"}
	for _, t := range c.Tolerances {
		header = append(header, t.Name+"_"+report.UnitOrNumber(t.Quantity.Unit()))
	}
	multi := len(r.TemperaturesK) > 1
	for _, ts := range r.Targets {
		u := report.UnitOrNumber(ts.Target.Measure.Unit)
		if multi {
			for _, k := range r.TemperaturesK {
				header = append(header, fmt.Sprintf("%s_%s@%gK", ts.Target.Text, u, k))
			}
		}
		header = append(header, ts.Target.Text+"_"+u)
	}
	header = append(header, "passed", "error")
	if err := cw.Write(header); err != nil {
		return err
	}
	g := func(v float64) string {
		if math.IsNaN(v) {
			return ""
		}
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	nk := len(r.TemperaturesK)
	for i := range r.Runs {
		run := &r.Runs[i]
		row := []string{strconv.Itoa(run.Index)}
		for _, v := range run.Values {
			row = append(row, g(v))
		}
		for t := range r.Targets {
			if multi {
				for k := 0; k < nk; k++ {
					row = append(row, g(run.Readings[t*nk+k]))
				}
			}
			row = append(row, g(run.Worst[t]))
		}
		e := ""
		if run.Err != nil {
			e = run.Err.Error()
		}
		row = append(row, strconv.FormatBool(run.Passed), e)
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// yieldSection is the report's yield analysis of the file's tolerances,
// with the file's analysis.yield targets, or the spread of the main
// figures when it gives none.
func yieldSection(c *circuit.Circuit, temperature string) (report.Section, []report.Card, error) {
	sec := report.Section{ID: "yield", Title: "Tolerances and yield"}
	s, err := resolveYield(c, &yieldFlags{}, true)
	if err == nil && temperature != "" && len(s.TemperaturesK) == 0 {
		// The report's --temperature, as the bias above was solved at.
		var t float64
		if t, err = circuit.ParseBounded(temperature, circuit.Temperature); err == nil {
			s.TemperaturesK = []float64{t}
		}
	}
	if err == nil && len(s.Targets) == 0 {
		err = errors.New("the circuit has no port or target to follow; give analysis.yield targets")
	}
	if err != nil {
		sec.Intro = "The yield analysis could not be set up: " + err.Error()
		return sec, nil, nil
	}
	r, err := yield.Run(c, *s)
	if err != nil {
		return sec, nil, analysisError(err)
	}
	sec.Intro = fmt.Sprintf("%d circuits drawn over the file's %d toleranced values (seed %d) and analysed at %s.",
		len(r.Runs), len(c.Tolerances), r.Settings.Seed, temperatureList(r.TemperaturesK))
	var cards []report.Card
	if len(r.Corners) > 0 {
		sec.Intro += fmt.Sprintf(" %d of them meet every target: a yield of %s, 95 %% interval %s to %s (Wilson score).",
			r.Passed, percentOf(r.Yield), percentOf(r.Interval[0]), percentOf(r.Interval[1]))
		cards = append(cards, report.Card{Label: "yield", Value: percentOf(r.Yield),
			Detail: fmt.Sprintf("%d of %d drawn circuits meet every target; 95 %% interval %s to %s", r.Passed, len(r.Runs), percentOf(r.Interval[0]), percentOf(r.Interval[1]))})
	} else {
		sec.Intro += " The file gives no yield targets (analysis.yield), so this shows how the main figures spread."
	}
	for _, t := range []*table{yieldTargetTable(r), yieldShareTable(r)} {
		sec.Blocks = append(sec.Blocks, report.Block{Table: t.report()})
	}
	if len(r.Corners) > 0 {
		sec.Blocks = append(sec.Blocks, report.Block{Table: yieldCornerTable(r).report()})
	}
	for _, f := range yieldFigures(r) {
		fig, err := svgOf(f)
		if err != nil {
			return sec, nil, analysisError(err)
		}
		sec.Blocks = append(sec.Blocks, report.Block{Figure: fig})
	}
	for _, x := range r.Cautions {
		sec.Blocks = append(sec.Blocks, report.Block{Note: x.Message})
	}
	return sec, cards, nil
}
