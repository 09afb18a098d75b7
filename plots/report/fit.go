package report

import (
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"qpoint/bias/circuit"
	"qpoint/bias/diode"
	"qpoint/bias/extract"
	"qpoint/bias/measured"
	"qpoint/bias/si"
)

// FitFile is one measurement file as read, with the place of its points.
type FitFile struct {
	Path   string
	Table  *measured.Table
	Offset int // index of its first point in its set
}

// FitInput is everything read for a fit.
type FitInput struct {
	Data     extract.Data
	IV, CV   []FitFile
	Settings extract.Settings
	Name     string
}

// Add puts a measurement file's points into the fit's data, after the
// points of the files of its kind added before it.
func (in *FitInput) Add(path string, t *measured.Table) {
	if t.Kind == measured.CapacitanceVoltage {
		in.CV = append(in.CV, FitFile{Path: path, Table: t, Offset: len(in.Data.Capacitance)})
		in.Data.Capacitance = append(in.Data.Capacitance, t.Points...)
		return
	}
	in.IV = append(in.IV, FitFile{Path: path, Table: t, Offset: len(in.Data.Current)})
	in.Data.Current = append(in.Data.Current, t.Points...)
}

// ModelName makes a model name from a file name: its stem in lower case,
// other characters than letters and digits turned into underscores, and
// fitted_ before a name that would not do as one (empty, starting with a
// digit, or the ground node's).
func ModelName(path string) string {
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

// CheckModelName fails when name cannot head the diode_models block
// WriteModelBlock writes: a YAML key that needs no quotes, of 1 to 100
// letters, digits, - and _, other than the ground node's name.
func CheckModelName(name string) error {
	for _, r := range name {
		if !(r == '_' || r == '-' || (r >= 'a' && r <= 'z') || (r >= 'A' && r <= 'Z') || (r >= '0' && r <= '9')) {
			return fmt.Errorf("accepted: letters, digits, - and _ (a YAML key that needs no quotes)")
		}
	}
	if name == "" || len(name) > 100 || name == circuit.Ground {
		return fmt.Errorf("accepted: a name of 1 to 100 letters, digits, - and _, other than %s", circuit.Ground)
	}
	return nil
}

// Locate returns the file and line of point index of a set, or the
// set's only file and line 0, or "".
func (in *FitInput) Locate(set measured.Kind, index int) (string, int) {
	files := in.IV
	if set == measured.CapacitanceVoltage {
		files = in.CV
	}
	for _, f := range files {
		if index >= f.Offset && index < f.Offset+len(f.Table.Points) {
			return f.Path, f.Table.Points[index-f.Offset].Line
		}
	}
	if len(files) == 1 {
		return files[0].Path, 0
	}
	return "", 0
}

// Place returns "FILE:LINE:1: " for a point of a set, "FILE: " for the
// set's only file, or "".
func (in *FitInput) Place(set measured.Kind, index int) string {
	switch file, line := in.Locate(set, index); {
	case line > 0:
		return fmt.Sprintf("%s:%d:1: ", file, line)
	case file != "":
		return file + ": "
	}
	return ""
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

// WriteFit writes the fit as text: the files, the fitted values with
// their standard errors, correlations, cautions and the model block.
func WriteFit(w io.Writer, in *FitInput, r *extract.Result) {
	fmt.Fprintf(w, "Diode model fitted to %s\n", pointSummary(r))
	for _, f := range in.IV {
		fmt.Fprintf(w, "  I–V  %s  (%s%s)\n", f.Path, Plural(len(f.Table.Points), "point"), fileTemperatures(f, in.Settings))
	}
	for _, f := range in.CV {
		fmt.Fprintf(w, "  C–V  %s  (%s%s)\n", f.Path, Plural(len(f.Table.Points), "point"), fileTemperatures(f, in.Settings))
	}

	t := &Table{Caption: "Fitted values", Header: []string{"value", "fitted", "standard error", "status"}}
	format := func(x float64, v extract.Value, digits int) string {
		if v.Unit == "" {
			return strconv.FormatFloat(x, 'g', digits, 64)
		}
		return si.Format(x, tableUnit(v), digits)
	}
	for _, v := range r.Values {
		val := format(v.Value, v, 5)
		if v.Key == "measured_at" {
			val = fmt.Sprintf("%.2f °C", Celsius(v.Value))
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
		c := &Table{Caption: "Correlations of the fitted values", Header: []string{"values", "coefficient"}}
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

	res := &Table{Caption: "Residuals, rms of ln(model/measured)", Header: []string{"points", "count", "rms"}}
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

	cautions := FitCautions(in, r)
	if len(cautions) > 0 {
		fmt.Fprintf(w, "\nCautions\n")
		for _, c := range cautions {
			fmt.Fprintf(w, "  ! %s\n", c.Text())
		}
	}
	fmt.Fprintf(w, "\nModel block for the circuit file (values left at their defaults are comments):\n\n")
	WriteModelBlock(w, in.Name, r)
	fmt.Fprintln(w)
}

func pointSummary(r *extract.Result) string {
	parts := []string{Plural(len(r.Forward), "forward point")}
	if len(r.Breakdown) > 0 {
		parts = append(parts, Plural(len(r.Breakdown), "point")+" in breakdown")
	}
	if len(r.Capacitance) > 0 {
		parts = append(parts, Plural(len(r.Capacitance), "C–V point"))
	}
	return strings.Join(parts, ", ")
}

// fileTemperatures says at which temperatures a file's points are.
func fileTemperatures(f FitFile, s extract.Settings) string {
	seen := map[float64]bool{}
	var ts []string
	for _, p := range f.Table.Points {
		t := p.TemperatureK
		if t == 0 {
			t = s.TemperatureK
		}
		if !seen[t] {
			seen[t] = true
			ts = append(ts, fmt.Sprintf("%.4g °C", Celsius(t)))
		}
	}
	if len(ts) > 4 {
		return fmt.Sprintf(" at %d temperatures", len(ts))
	}
	return " at " + strings.Join(ts, ", ")
}

// FitCaution is a caution of the file reader or of the fit, placed.
type FitCaution struct {
	Kind, Value, File string
	Line              int
	Message           string
}

// Text is the caution as printed: placed at its file and line when it has
// them.
func (c FitCaution) Text() string {
	if c.File != "" && c.Line > 0 {
		return fmt.Sprintf("%s:%d: %s", c.File, c.Line, strings.TrimPrefix(c.Message, fmt.Sprintf("line %d: ", c.Line)))
	}
	if c.File != "" {
		return c.File + ": " + c.Message
	}
	return c.Message
}

// FitCautions collects the files' and the fit's cautions.
func FitCautions(in *FitInput, r *extract.Result) []FitCaution {
	var out []FitCaution
	for _, fs := range [][]FitFile{in.IV, in.CV} {
		for _, f := range fs {
			for _, c := range f.Table.Cautions {
				out = append(out, FitCaution{Kind: c.Kind.String(), File: f.Path, Line: c.Line, Message: c.Message})
			}
		}
	}
	for _, c := range r.Cautions {
		fc := FitCaution{Kind: c.Kind.String(), Value: c.Key, Message: c.Message}
		if c.Index >= 0 {
			fc.File, fc.Line = in.Locate(c.Set, c.Index)
		}
		out = append(out, fc)
	}
	return out
}

// WriteModelBlock prints the fitted model as a diode_models entry that the
// circuit file reads back to the digits the standard errors justify.
func WriteModelBlock(w io.Writer, name string, r *extract.Result) {
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
