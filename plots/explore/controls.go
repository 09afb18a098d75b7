package explore

import (
	"math"
	"strconv"
	"strings"

	"qpoint/ac/plan"
	"qpoint/bias/circuit"
	"qpoint/bias/diode"
)

// Control is one value the page offers a slider and a typed box for: a
// source or part value, a diode-model key, the temperature, or the
// drive's level or frequency. Its Name is what a Request's Values are
// keyed by: the target grammar of circuit.WithOverride (`Rbias.value`,
// `MODEL.KEY`, `temperature`), or DriveLevel and DriveFrequency.
type Control struct {
	Name  string `json:"name"`
	Group string `json:"group"`
	Label string `json:"label"`
	// Unit is the unit the page shows beside the slider ("Ω", "°C",
	// "dBm"); Suffix is what the text a slider writes ends with (the
	// circuit file's unit for temperatures and levels, else nothing: a
	// number with an SI prefix reads in the field's own unit).
	Unit   string `json:"unit"`
	Suffix string `json:"suffix"`
	// Value is the starting value in the page's units (°C for a
	// temperature, dBm for a level, SI otherwise) and Text the same as
	// the circuit file writes it; FileValue is the file's own.
	Value     float64 `json:"value"`
	Text      string  `json:"text"`
	FileValue float64 `json:"fileValue"`
	// Min and Max bound the slider (not the typed box) in the page's
	// units, on a logarithmic scale when Log; both ends are values the
	// circuit file accepts.
	Min float64 `json:"min"`
	Max float64 `json:"max"`
	Log bool    `json:"log"`
	// Digits is how many significant digits a slider's text keeps;
	// Decimals, when positive, a fixed count of decimals instead (°C, dBm).
	Digits   int `json:"digits"`
	Decimals int `json:"decimals"`
	// Plain writes the number without an SI prefix (an ideality of 1.05,
	// a gap energy of 0.69 eV), where it lies between 1e-3 and 1e5.
	Plain bool `json:"plain"`
}

// The names of the drive's controls.
const (
	DriveLevel     = "drive.level"
	DriveFrequency = "drive.frequency"
)

// span is how far a logarithmic slider reaches either side of its
// starting value: two decades.
const span = 100

// controls lists the controls of circuit c (the file as loaded) started
// at values (c with the command line's --set values), in the page's
// order: sources, other parts, the diode models' keys, the temperature,
// the drive.
func controls(c, values *circuit.Circuit, drive *plan.Drive, bandHz [2]float64) []Control {
	var srcs, parts []Control
	for i, p := range c.Parts {
		if p.Kind == circuit.Diode {
			continue
		}
		name := p.Name + ".value"
		v, _ := c.ResolveVary(name)
		ctl := Control{Name: name, Label: p.Name, Unit: unitOf(v.Quantity), FileValue: p.Value, Value: values.Parts[i].Value, Digits: 4}
		switch p.Kind {
		case circuit.VoltageSource:
			ctl.Group = "Sources"
			ctl.Min, ctl.Max = linearAround(ctl.Value, 2)
		case circuit.CurrentSource:
			ctl.Group = "Sources"
			if ctl.Value > 0 {
				ctl.Min, ctl.Max, ctl.Log = ctl.Value/span, ctl.Value*span, true
			} else {
				ctl.Min, ctl.Max = linearAround(ctl.Value, 2)
			}
		default:
			ctl.Group = "Parts"
			ctl.Min, ctl.Max, ctl.Log = ctl.Value/span, ctl.Value*span, ctl.Value > 0
			if ctl.Value <= 0 {
				ctl.Min, ctl.Max = 0, 1
			}
		}
		ctl.Text = ctl.text(ctl.Value)
		ctl.clamp(c)
		if p.Kind == circuit.VoltageSource || p.Kind == circuit.CurrentSource {
			srcs = append(srcs, ctl)
		} else {
			parts = append(parts, ctl)
		}
	}
	out := append(srcs, parts...)
	for _, name := range c.ModelOrder {
		m, mv := c.Models[name], values.Models[name]
		for _, k := range circuit.ModelKeys() {
			fileValue := *circuit.ModelParam(&m.Params, k.Name)
			value := *circuit.ModelParam(&mv.Params, k.Name)
			if value == 0 && fileValue == 0 {
				continue // a law the model leaves out (no R_S, no knee, no flicker noise)
			}
			ctl := Control{Name: name + "." + k.Name, Group: "Diode model " + name, Label: strings.ReplaceAll(k.Name, "_", " "),
				Unit: unitOf(k.Quantity), FileValue: fileValue, Value: value, Digits: 4,
				Plain: k.Quantity == circuit.Dimensionless || k.Quantity == circuit.Energy}
			switch {
			case k.Quantity == circuit.Temperature:
				ctl.temperature()
			case logKey(k.Name):
				ctl.Min, ctl.Max, ctl.Log = value/span, value*span, true
			default:
				lo, hi := linearKey(k.Name, value)
				ctl.Min, ctl.Max = lo, hi
			}
			if ctl.Text == "" {
				ctl.Text = ctl.text(ctl.Value)
			}
			ctl.clamp(c)
			out = append(out, ctl)
		}
	}
	t := Control{Name: "temperature", Group: "Conditions", Label: "temperature", FileValue: c.TemperatureK, Value: values.TemperatureK}
	t.temperature()
	t.clamp(c)
	out = append(out, t)
	if drive != nil {
		out = append(out, Control{Name: DriveLevel, Group: "Drive", Label: "level at " + drive.InputName, Unit: "dBm", Suffix: "dBm",
			Value: drive.LevelDBm, FileValue: drive.LevelDBm, Text: strconv.FormatFloat(drive.LevelDBm, 'f', 1, 64) + "dBm",
			Min: math.Max(circuit.MinLevelDBm, math.Min(-80, drive.LevelDBm-40)), Max: math.Min(circuit.MaxLevelDBm, math.Max(20, drive.LevelDBm+20)), Decimals: 1})
		f := drive.FrequencyHz
		out = append(out, Control{Name: DriveFrequency, Group: "Drive", Label: "frequency", Unit: "Hz",
			Value: f, FileValue: f, Text: valueText(f, 4), Digits: 4, Log: true,
			Min: math.Max(1e-3, math.Min(bandHz[0], f/10)), Max: math.Min(1e12, math.Max(bandHz[1], f*10))})
	}
	return out
}

// text writes v as the control's slider does.
func (ctl *Control) text(v float64) string {
	switch {
	case ctl.Decimals > 0:
		return strconv.FormatFloat(v, 'f', ctl.Decimals, 64) + ctl.Suffix
	case ctl.Plain && math.Abs(v) >= 1e-3 && math.Abs(v) < 1e5:
		r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', ctl.Digits, 64), 64)
		return strconv.FormatFloat(r, 'f', -1, 64) + ctl.Suffix
	}
	return valueText(v, ctl.Digits) + ctl.Suffix
}

// temperature makes ctl a temperature in degrees Celsius, the kelvin in
// ctl.Value converted, on a linear slider from -60 °C to 160 °C (wider
// where the value lies outside).
func (ctl *Control) temperature() {
	ctl.Value -= diode.ZeroCelsius
	ctl.FileValue -= diode.ZeroCelsius
	ctl.Unit, ctl.Suffix, ctl.Decimals = "°C", "C", 2
	ctl.Min, ctl.Max = math.Min(-60, ctl.Value-20), math.Max(160, ctl.Value+20)
	ctl.Text = strconv.FormatFloat(ctl.Value, 'f', 2, 64) + "C"
}

// clamp pulls each end of the slider towards the value until the circuit
// file accepts it as the control's value, so that no slider position is
// refused; the value itself is accepted already.
func (ctl *Control) clamp(c *circuit.Circuit) {
	accept := func(x float64) bool {
		text := strconv.FormatFloat(x, 'g', -1, 64)
		if ctl.Suffix == "C" {
			text += "C"
		}
		_, err := c.WithOverride(ctl.Name + "=" + text)
		return err == nil
	}
	for _, end := range []*float64{&ctl.Min, &ctl.Max} {
		for i := 0; i < 60 && !accept(*end); i++ {
			if ctl.Log && *end > 0 && ctl.Value > 0 {
				*end = math.Sqrt(*end * ctl.Value)
			} else {
				*end = (*end + ctl.Value) / 2
			}
		}
	}
	ctl.Min, ctl.Max = math.Min(ctl.Min, ctl.Value), math.Max(ctl.Max, ctl.Value)
}

// linearAround is a linear range through zero and factor times v.
func linearAround(v, factor float64) (float64, float64) {
	if v == 0 {
		return -1, 1
	}
	return math.Min(0, factor*v), math.Max(0, factor*v)
}

// logKey reports whether a model key spans decades (currents, resistances,
// capacitances, times, the flicker coefficient).
func logKey(key string) bool {
	switch key {
	case "saturation_current", "series_resistance", "zero_bias_capacitance", "transit_time", "breakdown_current", "flicker_coefficient":
		return true
	}
	return false
}

// linearKey is the slider range of a model key on a linear scale: the
// range its values take in practice, widened to hold v (common practice
// for junction diodes).
func linearKey(key string, v float64) (float64, float64) {
	lo, hi := 0.5*v, 2*v
	switch key {
	case "ideality":
		lo, hi = 1, 2.5
	case "built_in_potential":
		lo, hi = 0.1, 1.2
	case "grading_coefficient":
		lo, hi = 0.2, 0.8
	case "breakdown_voltage":
		lo, hi = v/4, 4*v
	case "gap_energy":
		lo, hi = 0.5, 1.5
	case "saturation_temperature_exponent":
		lo, hi = 0, 5
	case "flicker_exponent":
		lo, hi = 0.5, 2
	}
	return math.Min(lo, v), math.Max(hi, v)
}

// unitOf is the unit the page shows for a quantity.
func unitOf(q circuit.Quantity) string {
	switch q {
	case circuit.Resistance:
		return "Ω"
	case circuit.Temperature:
		return "°C"
	}
	return q.Unit()
}

// prefixes are the SI prefixes valueText writes, every one a prefix the
// circuit file reads (u for micro, as keyboards have it).
var prefixes = []struct {
	exp    int
	symbol string
}{{-15, "f"}, {-12, "p"}, {-9, "n"}, {-6, "u"}, {-3, "m"}, {0, ""}, {3, "k"}, {6, "M"}, {9, "G"}, {12, "T"}}

// valueText writes v with digits significant digits and an SI prefix, as
// the circuit file reads it: 220k, 2.2p, 1.05, -3.3.
func valueText(v float64, digits int) string {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return "0"
	}
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', digits, 64), 64)
	e3 := int(math.Floor(math.Log10(math.Abs(r))/3)) * 3
	e3 = max(prefixes[0].exp, min(prefixes[len(prefixes)-1].exp, e3))
	sym := ""
	for _, p := range prefixes {
		if p.exp == e3 {
			sym = p.symbol
		}
	}
	m := r / math.Pow10(e3)
	text := strconv.FormatFloat(m, 'f', -1, 64)
	if p, err := strconv.ParseFloat(strconv.FormatFloat(m, 'g', digits, 64), 64); err == nil {
		text = strconv.FormatFloat(p, 'f', -1, 64)
	}
	return text + sym
}
