package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"qpoint/bias/circuit"
	"qpoint/bias/diode"
	"qpoint/bias/extract"
	"qpoint/bias/measured"
	"qpoint/bias/si"
	"qpoint/plots"
	"qpoint/plots/report"
)

type fitFlags struct {
	iv, cv      []string
	temperature string
	measuredAt  string
	floor       string
	name        string
	asJSON      bool
	plotDir     string
}

func newFitCmd() *cobra.Command {
	var fl fitFlags
	cmd := &cobra.Command{
		Use:   "fit --iv FILE [--cv FILE]",
		Short: "Fit a diode model to measured I–V and C–V points",
		Long: `fit turns measurements into a diode model for the circuit file: the
forward current against voltage gives the saturation current, ideality and
series resistance; reverse points that reach breakdown give the knee;
capacitance against voltage gives the zero-bias capacitance, built-in
potential and grading coefficient; forward points at several temperatures
give the gap energy and the saturation-current temperature exponent.

Each value comes with its standard error and the correlations that matter
(saturation current and ideality are always correlated). A value the data
do not determine is left at its default, and a caution says so. The
result ends with a diode_models block ready to paste into a circuit file.

Files are CSV with a header naming the columns: voltage and current (I–V)
or voltage and capacitance (C–V), optionally temperature, each with its
unit in brackets or parentheses, e.g. "voltage [V], current (mA)" or
"capacitance [pF]". A column without a unit is read in SI base units. The
points of one temperature must be sorted by voltage. --iv may be given
several times, and FILE@TEMPERATURE gives the temperature of a file that
has no temperature column (else --temperature).

Exit status: 0 fitted, 1 the fit failed, 2 bad input or usage.`,
		Example: `  qpoint fit --iv testdata/fit/detector_iv.csv --cv testdata/fit/detector_cv.csv
  qpoint fit --iv cold.csv@-40C --iv room.csv@25C --iv hot.csv@85C
  qpoint fit --iv forward.csv --json > model.json
  qpoint fit --iv forward.csv --plots figures/ --name mixer_quad`,
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) > 0 {
				return inputError(fmt.Errorf("fit takes its files as --iv and --cv, not as arguments (got %q); e.g. qpoint fit --iv forward.csv", args[0]))
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error { return runFit(guardOf(cmd), cmd.OutOrStdout(), &fl) },
	}
	f := cmd.Flags()
	f.StringArrayVar(&fl.iv, "iv", nil, "I–V points (CSV), FILE or FILE@TEMPERATURE; repeat for several files")
	f.StringArrayVar(&fl.cv, "cv", nil, "C–V points (CSV), FILE or FILE@TEMPERATURE")
	f.StringVar(&fl.temperature, "temperature", "27C", "temperature of files without a temperature column")
	f.StringVar(&fl.measuredAt, "measured-at", "", "temperature the fitted values hold at (default: the I–V temperature nearest 27C)")
	f.StringVar(&fl.floor, "current-floor", "", "the meter's absolute current resolution, e.g. 50pA: currents near it weigh less")
	f.StringVar(&fl.name, "name", "", "name of the model in the block (default: the first I–V file's name)")
	f.BoolVar(&fl.asJSON, "json", false, "print one JSON document (SI units) instead of tables")
	f.StringVar(&fl.plotDir, "plots", "", "write figures of data against fit and the residuals (SVG and PNG) into this directory")
	return cmd
}

// fitFile is one measurement file as read, with the place of its points.
type fitFile struct {
	path   string
	table  *measured.Table
	offset int // index of its first point in its set
}

// fitInput is everything read for a fit.
type fitInput struct {
	data     extract.Data
	iv, cv   []fitFile
	settings extract.Settings
	name     string
}

func runFit(g *fileGuard, w io.Writer, fl *fitFlags) error {
	in, err := readFitInput(g, fl)
	if err != nil {
		return err
	}
	r, err := extract.Fit(in.data, in.settings)
	var de *extract.DataError
	switch {
	case errors.As(err, &de):
		return inputError(fmt.Errorf("%s%s", in.place(de.Set, de.Index), de.Msg))
	case err != nil:
		return analysisError(err)
	}
	if fl.plotDir != "" {
		if err := g.writeFigures(fl.plotDir, plots.FitFigures(r)); err != nil {
			return err
		}
	}
	if fl.asJSON {
		return writeJSON(w, fitDocument(in, r))
	}
	writeFit(w, in, r)
	return nil
}

func readFitInput(g *fileGuard, fl *fitFlags) (*fitInput, error) {
	if len(fl.iv) == 0 {
		return nil, inputError(fmt.Errorf("fit needs I–V points: --iv FILE (a CSV with voltage and current columns); e.g. qpoint fit --iv testdata/fit/detector_iv.csv"))
	}
	in := &fitInput{}
	tk, err := circuit.ParseBounded(fl.temperature, circuit.Temperature)
	if err != nil {
		return nil, inputError(fmt.Errorf("flag --temperature: %w", err))
	}
	in.settings.TemperatureK = tk
	if fl.measuredAt != "" {
		t0, err := circuit.ParseBounded(fl.measuredAt, circuit.Temperature)
		if err != nil {
			return nil, inputError(fmt.Errorf("flag --measured-at: %w", err))
		}
		in.settings.MeasuredAtK = t0
	}
	if fl.floor != "" {
		floor, err := circuit.ParseBounded(fl.floor, circuit.Current)
		if err != nil || !(floor >= 0) {
			if err == nil {
				err = fmt.Errorf("%s; accepted: a current of zero or more, e.g. 50pA", fl.floor)
			}
			return nil, inputError(fmt.Errorf("flag --current-floor: %w", err))
		}
		in.settings.CurrentFloor = floor
	}
	for _, spec := range fl.iv {
		f, err := g.readMeasurementFile("--iv", spec, measured.CurrentVoltage, len(in.data.Current))
		if err != nil {
			return nil, err
		}
		in.iv = append(in.iv, *f)
		in.data.Current = append(in.data.Current, f.table.Points...)
	}
	for _, spec := range fl.cv {
		f, err := g.readMeasurementFile("--cv", spec, measured.CapacitanceVoltage, len(in.data.Capacitance))
		if err != nil {
			return nil, err
		}
		in.cv = append(in.cv, *f)
		in.data.Capacitance = append(in.data.Capacitance, f.table.Points...)
	}
	in.name = fl.name
	if in.name == "" {
		in.name = modelName(in.iv[0].path)
	}
	if err := checkModelName(in.name); err != nil {
		return nil, err
	}
	return in, nil
}

// readMeasurementFile reads FILE or FILE@TEMPERATURE and checks that it
// holds the kind of points its flag asks for.
func (g *fileGuard) readMeasurementFile(flag, spec string, kind measured.Kind, offset int) (*fitFile, error) {
	path, tempK := spec, 0.0
	if _, err := os.Stat(spec); err != nil {
		if at := strings.LastIndexByte(spec, '@'); at > 0 {
			t, perr := circuit.ParseBounded(spec[at+1:], circuit.Temperature)
			if perr != nil {
				return nil, inputError(fmt.Errorf("flag %s %s: after @ %w", flag, spec, perr))
			}
			path, tempK = spec[:at], t
		}
	}
	g.read(path)
	fh, err := os.Open(path)
	if err != nil {
		return nil, inputError(fmt.Errorf("flag %s: cannot read the measurement file: %w", flag, err))
	}
	defer fh.Close()
	t, err := measured.Read(fh)
	var pe *measured.ParseError
	switch {
	case errors.As(err, &pe):
		return nil, inputError(fmt.Errorf("%s:%d:%d: %s", path, pe.Line, pe.Column, pe.Msg))
	case err != nil:
		return nil, inputError(fmt.Errorf("%s: %w", path, err))
	}
	if t.Kind != kind {
		other := map[measured.Kind]string{measured.CurrentVoltage: "--iv", measured.CapacitanceVoltage: "--cv"}[t.Kind]
		return nil, inputError(fmt.Errorf("%s:%d:1: an %s file given as %s; accepted: I–V files (voltage, current) with --iv and C–V files (voltage, capacitance) with --cv; give it as %s",
			path, t.HeaderLine, t.Kind, flag, other))
	}
	if tempK > 0 {
		if t.HasTemperature {
			return nil, inputError(fmt.Errorf("flag %s %s: the file has a temperature column, so @%s cannot apply; accepted: FILE@TEMPERATURE only for a file without one", flag, spec, spec[strings.LastIndexByte(spec, '@')+1:]))
		}
		for i := range t.Points {
			t.Points[i].TemperatureK = tempK
		}
	}
	return &fitFile{path: path, table: t, offset: offset}, nil
}

// locate returns the file and line of point index of a set, or the
// set's only file and line 0, or "".
func (in *fitInput) locate(set measured.Kind, index int) (string, int) {
	files := in.iv
	if set == measured.CapacitanceVoltage {
		files = in.cv
	}
	for _, f := range files {
		if index >= f.offset && index < f.offset+len(f.table.Points) {
			return f.path, f.table.Points[index-f.offset].Line
		}
	}
	if len(files) == 1 {
		return files[0].path, 0
	}
	return "", 0
}

// place returns "FILE:LINE:1: " for a point of a set, "FILE: " for the
// set's only file, or "".
func (in *fitInput) place(set measured.Kind, index int) string {
	switch file, line := in.locate(set, index); {
	case line > 0:
		return fmt.Sprintf("%s:%d:1: ", file, line)
	case file != "":
		return file + ": "
	}
	return ""
}

// modelName makes a model name from a file name: its stem in lower case,
// other characters than letters and digits turned into underscores.
func modelName(path string) string {
	stem := strings.TrimSuffix(filepath.Base(path), filepath.Ext(path))
	var b strings.Builder
	for _, r := range strings.ToLower(stem) {
		if (r >= 'a' && r <= 'z') || (r >= '0' && r <= '9') {
			b.WriteRune(r)
		} else {
			b.WriteByte('_')
		}
	}
	name := strings.Trim(b.String(), "_")
	if name == "" || (name[0] >= '0' && name[0] <= '9') || name == circuit.Ground {
		name = "fitted_" + name
	}
	return strings.TrimSuffix(name, "_")
}

func checkModelName(name string) error {
	for _, r := range name {
		if !(r == '_' || r == '-' || (r >= 'a' && r <= 'z') || (r >= 'A' && r <= 'Z') || (r >= '0' && r <= '9')) {
			return inputError(fmt.Errorf("flag --name %q: accepted: letters, digits, - and _ (a YAML key that needs no quotes)", name))
		}
	}
	if name == "" || len(name) > 100 || name == circuit.Ground {
		return inputError(fmt.Errorf("flag --name %q: accepted: a name of 1 to 100 letters, digits, - and _, other than %s", name, circuit.Ground))
	}
	return nil
}

// valueLabels are the table's words for the model keys.
var valueLabels = map[string]string{
	"saturation_current": "saturation current", "ideality": "ideality", "series_resistance": "series resistance",
	"zero_bias_capacitance": "zero-bias capacitance", "built_in_potential": "built-in potential",
	"grading_coefficient": "grading coefficient", "breakdown_voltage": "breakdown voltage",
	"breakdown_current": "breakdown current", "gap_energy": "gap energy",
	"saturation_temperature_exponent": "temperature exponent", "measured_at": "measured at",
}

// tableUnit is the unit tables print a value in.
func tableUnit(v extract.Value) string {
	if v.Unit == "ohm" {
		return "Ω"
	}
	return v.Unit
}

func writeFit(w io.Writer, in *fitInput, r *extract.Result) {
	fmt.Fprintf(w, "Diode model fitted to %s\n", pointSummary(r))
	for _, f := range in.iv {
		fmt.Fprintf(w, "  I–V  %s  (%s%s)\n", f.path, report.Plural(len(f.table.Points), "point"), fileTemperatures(f, in.settings))
	}
	for _, f := range in.cv {
		fmt.Fprintf(w, "  C–V  %s  (%s%s)\n", f.path, report.Plural(len(f.table.Points), "point"), fileTemperatures(f, in.settings))
	}

	t := &report.Table{Caption: "Fitted values", Header: []string{"value", "fitted", "standard error", "status"}}
	format := func(x float64, v extract.Value, digits int) string {
		if v.Unit == "" {
			return strconv.FormatFloat(x, 'g', digits, 64)
		}
		return si.Format(x, tableUnit(v), digits)
	}
	for _, v := range r.Values {
		val := format(v.Value, v, 5)
		if v.Key == "measured_at" {
			val = fmt.Sprintf("%.2f °C", report.Celsius(v.Value))
		}
		if v.Status == extract.Default && (v.Key == "breakdown_voltage" || v.Key == "breakdown_current") {
			val = "none"
		}
		errText := ""
		if v.Status == extract.Fitted {
			errText = "± " + format(v.Error, v, 2)
			if v.Value != 0 {
				errText += fmt.Sprintf(" (%.2g %%)", 100*math.Abs(v.Error/v.Value))
			}
		}
		t.Add(valueLabels[v.Key], val, errText, v.Status.String())
	}
	t.WriteText(w)

	if len(r.Correlations) > 0 {
		c := &report.Table{Caption: "Correlations of the fitted values", Header: []string{"values", "coefficient"}}
		for _, x := range r.Correlations {
			if math.Abs(x.Coefficient) < 0.5 {
				continue
			}
			c.Add(valueLabels[x.A]+" with "+valueLabels[x.B], fmt.Sprintf("%+.3f", x.Coefficient))
		}
		if len(c.Rows) > 0 {
			c.WriteText(w)
			fmt.Fprintln(w, "  (pairs above 0.5 in size; --json lists all)")
		}
	}

	res := &report.Table{Caption: "Residuals, rms of ln(model/measured)", Header: []string{"points", "count", "rms"}}
	for _, s := range []struct {
		name string
		n    int
		rms  float64
	}{{"forward I–V", len(r.Forward), r.Residuals.Forward}, {"breakdown", len(r.Breakdown), r.Residuals.Breakdown},
		{"C–V", len(r.Capacitance), r.Residuals.Capacitance}} {
		if s.n > 0 {
			res.Add(s.name, strconv.Itoa(s.n), fmt.Sprintf("%.3g %%", 100*s.rms))
		}
	}
	res.WriteText(w)

	cautions := fitCautions(in, r)
	if len(cautions) > 0 {
		fmt.Fprintf(w, "\nCautions\n")
		for _, c := range cautions {
			fmt.Fprintf(w, "  ! %s\n", c.text())
		}
	}
	fmt.Fprintf(w, "\nModel block for the circuit file (values left at their defaults are comments):\n\n")
	writeModelBlock(w, in.name, r)
	fmt.Fprintln(w)
}

func pointSummary(r *extract.Result) string {
	parts := []string{report.Plural(len(r.Forward), "forward point")}
	if len(r.Breakdown) > 0 {
		parts = append(parts, report.Plural(len(r.Breakdown), "point")+" in breakdown")
	}
	if len(r.Capacitance) > 0 {
		parts = append(parts, report.Plural(len(r.Capacitance), "C–V point"))
	}
	return strings.Join(parts, ", ")
}

// fileTemperatures says at which temperatures a file's points are.
func fileTemperatures(f fitFile, s extract.Settings) string {
	seen := map[float64]bool{}
	var ts []string
	for _, p := range f.table.Points {
		t := p.TemperatureK
		if t == 0 {
			t = s.TemperatureK
		}
		if !seen[t] {
			seen[t] = true
			ts = append(ts, fmt.Sprintf("%.4g °C", report.Celsius(t)))
		}
	}
	if len(ts) > 4 {
		return fmt.Sprintf(" at %d temperatures", len(ts))
	}
	return " at " + strings.Join(ts, ", ")
}

// fitCaution is a caution of the file reader or of the fit, placed.
type fitCaution struct {
	Kind, Value, File string
	Line              int
	Message           string
}

func (c fitCaution) text() string {
	if c.File != "" && c.Line > 0 {
		return fmt.Sprintf("%s:%d: %s", c.File, c.Line, strings.TrimPrefix(c.Message, fmt.Sprintf("line %d: ", c.Line)))
	}
	if c.File != "" {
		return c.File + ": " + c.Message
	}
	return c.Message
}

// fitCautions collects the files' and the fit's cautions.
func fitCautions(in *fitInput, r *extract.Result) []fitCaution {
	var out []fitCaution
	for _, fs := range [][]fitFile{in.iv, in.cv} {
		for _, f := range fs {
			for _, c := range f.table.Cautions {
				out = append(out, fitCaution{Kind: c.Kind.String(), File: f.path, Line: c.Line, Message: c.Message})
			}
		}
	}
	for _, c := range r.Cautions {
		fc := fitCaution{Kind: c.Kind.String(), Value: c.Key, Message: c.Message}
		if c.Index >= 0 {
			fc.File, fc.Line = in.locate(c.Set, c.Index)
		}
		out = append(out, fc)
	}
	return out
}

// writeModelBlock prints the fitted model as a diode_models entry that the
// circuit file reads back to the digits the standard errors justify.
func writeModelBlock(w io.Writer, name string, r *extract.Result) {
	fmt.Fprintf(w, "diode_models:\n  %s:\n", name)
	type line struct{ text, comment string }
	var lines []line
	reason := map[string]string{}
	for _, c := range r.Cautions {
		if c.Kind == extract.NotDetermined && c.Key != "" {
			if _, ok := reason[c.Key]; !ok {
				reason[c.Key] = c.Message
			}
		}
	}
	for _, v := range r.Values {
		switch {
		case v.Key == "measured_at":
			lines = append(lines, line{"measured_at: " + yamlCelsius(v.Value), "T0, where these values hold"})
		case v.Status == extract.Fitted:
			lines = append(lines, line{v.Key + ": " + yamlValue(v.Value, digitsFor(v.Value, v.Error), v.Unit), "± " + yamlValue(v.Error, 2, v.Unit)})
		case v.Status == extract.Chosen:
			lines = append(lines, line{v.Key + ": " + yamlValue(v.Value, 6, v.Unit), "the current at which the knee voltage is fitted"})
		case v.Key == "breakdown_current":
			// Follows breakdown_voltage: no knee, nothing to say twice.
		case v.Key == "breakdown_voltage":
			lines = append(lines, line{"# breakdown_voltage: none", "no knee: " + shortReason(reason[v.Key])})
		default:
			lines = append(lines, line{"# " + v.Key + ": " + yamlValue(v.Value, 6, v.Unit), "default: " + shortReason(reason[v.Key])})
		}
	}
	width := 0
	for _, l := range lines {
		width = max(width, len(l.text))
	}
	for _, l := range lines {
		fmt.Fprintf(w, "    %-*s  # %s\n", width, l.text, l.comment)
	}
}

// shortReason is the first clause of a caution, for a block comment.
func shortReason(msg string) string {
	if msg == "" {
		return "not determined by the data"
	}
	if i := strings.IndexAny(msg, ":;("); i > 0 {
		msg = msg[:i]
	}
	return strings.TrimSpace(msg)
}

// digitsFor returns how many significant digits of v keep its rounding
// below a twentieth of its standard error err: three at least, seven at
// most.
func digitsFor(v, err float64) int {
	digits := 7
	if err > 0 && v != 0 {
		digits = int(math.Ceil(math.Log10(math.Abs(v)/err))) + 2
	}
	return min(max(digits, 3), 7)
}

// yamlValue writes v to the given significant digits with an SI prefix
// and unit, as the circuit file reads it: "3.0183uA", "0.18pF", "21.6".
func yamlValue(v float64, digits int, unit string) string {
	if unit == "ohm" {
		unit = ""
	}
	if v == 0 {
		return "0"
	}
	type prefix struct {
		exp    int
		symbol string
	}
	prefixes := []prefix{{-15, "f"}, {-12, "p"}, {-9, "n"}, {-6, "u"}, {-3, "m"}, {0, ""}, {3, "k"}, {6, "M"}, {9, "G"}}
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', digits, 64), 64)
	e := int(math.Floor(math.Log10(math.Abs(r))))
	p := prefix{0, ""}
	if unit != "" && unit != "eV" {
		for _, c := range prefixes {
			if c.exp <= e {
				p = c
			}
		}
		if e < prefixes[0].exp {
			p = prefixes[0]
		}
	}
	m := r / math.Pow10(p.exp)
	decimals := max(digits-1-(e-p.exp), 0)
	s := strconv.FormatFloat(m, 'f', decimals, 64)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	return s + p.symbol + unit
}

// yamlCelsius writes a temperature in degrees Celsius, e.g. 27C.
func yamlCelsius(k float64) string {
	s := strconv.FormatFloat(k-diode.ZeroCelsius, 'f', 3, 64)
	return strings.TrimRight(strings.TrimRight(s, "0"), ".") + "C"
}
