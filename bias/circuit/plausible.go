package circuit

import (
	"fmt"
	"math"
	"strings"

	"qpoint/bias/si"
)

// written is a value as the file wrote it, kept for the plausibility
// rules.
type written struct {
	pos   Pos
	owner string // part or model name
	key   string // "value" or the model key
	kind  Kind   // for a part's value
	model bool
	text  string
	v     float64
}

// The plausibility rules (common practice: the sizes of parts and diode
// values that RF and analog circuits use), listed in the README:
//
//   - a capacitor of 1 mF or more, or an inductor of 1 H or more, in a
//     circuit whose analyses run at 1 MHz or above: no part that size
//     works there; the likely meaning is the same number with the prefix
//     (p, n or µ) that gives the reactance nearest 50 Ω at the circuit's
//     centre frequency;
//   - a resistor below 1 Ω written with the milli prefix `m`: a slip for
//     mega `M` is likelier than a milliohm bias or load resistor;
//   - a zero-bias junction capacitance of 10 nF or more (the largest
//     rectifier junctions are a few nF; detector, mixer and PIN diodes
//     are below 10 pF): likely pF;
//   - a saturation current of 10 mA or more (large power junctions stay
//     below a few µA): likely the same number in µA or nA;
//   - a transit time of 1 ms or more (PIN diodes' carrier lifetimes reach
//     tens of µs): likely µs or ns.
const (
	bigCapacitance      = 1e-3
	bigInductance       = 1
	rfFrequency         = 1e6
	bigJunction         = 10e-9
	bigSaturation       = 10e-3
	longTransit         = 1e-3
	milliResistanceSlip = 1
)

// frequencyRange returns the lowest and highest frequency the file's
// analyses name, or zeros when they name none.
func (c *Circuit) frequencyRange() (lo, hi float64) {
	lo, hi = math.Inf(1), 0
	add := func(f float64) {
		if f > 0 {
			lo, hi = math.Min(lo, f), math.Max(hi, f)
		}
	}
	if r := c.Analysis.Response; r.Set {
		add(r.FromHz)
		add(r.ToHz)
	}
	if d := c.Analysis.Distortion; d.Set {
		add(d.FrequencyHz)
		add(d.SecondToneHz)
	}
	if hi == 0 {
		return 0, 0
	}
	return lo, hi
}

// mantissa returns the number a value was written with, before its
// prefix and unit: `10pF` -> 10, `0.15` -> 0.15.
func mantissa(text string) (float64, bool) {
	d, _, problem := splitNumber(text)
	if problem != "" {
		return 0, false
	}
	v, problem := d.value(0)
	return v, problem == ""
}

// plausibility applies the rules to the values the file wrote, and
// returns a Warning of kind Implausible for each value that breaks one.
func plausibility(c *Circuit, values []written) []Warning {
	var out []Warning
	lo, hi := c.frequencyRange()
	centre := math.Sqrt(lo * hi)
	add := func(w written, format string, args ...any) {
		out = append(out, Warning{File: c.File, Line: w.pos.Line, Col: w.pos.Col, Kind: Implausible, Message: fmt.Sprintf(format, args...)})
	}
	for _, w := range values {
		m, ok := mantissa(w.text)
		if !ok {
			continue
		}
		switch {
		case !w.model && w.kind == Capacitor && w.v >= bigCapacitance && lo >= rfFrequency:
			x := 1 / (2 * math.Pi * lo * w.v)
			add(w, "%s is %s, which at %s (the lowest frequency the file analyses) is a reactance of %s: no capacitor that size works there; did you mean %s?",
				w.owner, si.Format(w.v, "F", 4), si.Format(lo, "Hz", 4), si.Format(x, "Ω", 3), nearestFifty(m, "F", func(v float64) float64 { return 1 / (2 * math.Pi * centre * v) }))
		case !w.model && w.kind == Inductor && w.v >= bigInductance && lo >= rfFrequency:
			x := 2 * math.Pi * lo * w.v
			add(w, "%s is %s, which at %s (the lowest frequency the file analyses) is a reactance of %s: no inductor that size works there; did you mean %s?",
				w.owner, si.Format(w.v, "H", 4), si.Format(lo, "Hz", 4), si.Format(x, "Ω", 3), nearestFifty(m, "H", func(v float64) float64 { return 2 * math.Pi * centre * v }))
		case !w.model && w.kind == Resistor && w.v < milliResistanceSlip && strings.Contains(w.text, "m") && !strings.Contains(w.text, "mohm") && !strings.Contains(w.text, "mΩ"):
			add(w, "%s is `%s`, %s: the prefix m is milli; did you mean %sM (%s, mega)?",
				w.owner, w.text, si.Format(w.v, "Ω", 4), trimNumber(m), si.Format(m*1e6, "Ω", 4))
		case w.model && w.key == "zero_bias_capacitance" && w.v >= bigJunction:
			add(w, "zero_bias_capacitance of model %s is %s: junctions of detector, mixer and PIN diodes are below 10 pF and the largest rectifiers a few nF; did you mean %s?",
				w.owner, si.Format(w.v, "F", 4), si.Format(m*1e-12, "F", 4))
		case w.model && w.key == "saturation_current" && w.v >= bigSaturation:
			add(w, "saturation_current of model %s is %s: even large power junctions stay below a few µA; did you mean %s or %s?",
				w.owner, si.Format(w.v, "A", 4), si.Format(m*1e-6, "A", 4), si.Format(m*1e-9, "A", 4))
		case w.model && w.key == "transit_time" && w.v >= longTransit:
			add(w, "transit_time of model %s is %s: carrier lifetimes reach tens of µs in PIN diodes and are far shorter in others; did you mean %s or %s?",
				w.owner, si.Format(w.v, "s", 4), si.Format(m*1e-6, "s", 4), si.Format(m*1e-9, "s", 4))
		}
	}
	return out
}

// nearestFifty returns, for a number m written without a sensible prefix,
// the value among m pico, nano and micro (unit u) whose reactance, by x,
// lies nearest 50 Ω on a logarithmic scale.
func nearestFifty(m float64, unit string, x func(float64) float64) string {
	best, bestD := 0.0, math.Inf(1)
	for _, p := range []float64{1e-12, 1e-9, 1e-6} {
		v := m * p
		if d := math.Abs(math.Log(x(v) / 50)); d < bestD {
			best, bestD = v, d
		}
	}
	return si.Format(best, unit, 4)
}

// trimNumber prints m as written, without trailing zeros.
func trimNumber(m float64) string {
	return strings.TrimSuffix(strings.TrimRight(fmt.Sprintf("%.6f", m), "0"), ".")
}
