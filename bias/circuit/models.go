package circuit

import (
	"qpoint/bias/diode"

	"go.yaml.in/yaml/v3"
)

// modelKey is one numeric key of a diode model: its quantity, the range it
// must lie in and the Params field it sets.
type modelKey struct {
	key   string
	q     Quantity
	r     rule
	field func(*diode.Params) *float64
}

var (
	idealityRule = rule{func(v float64) bool { return v >= 0.9 && v <= 10 }, "outside 0.9 to 10",
		"an ideality factor from 0.9 to 10 (1 for an ideal junction, about 2 when recombination dominates the current)"}
	gradingRule = rule{func(v float64) bool { return v > 0 && v < 1 }, "outside 0 to 1",
		"a grading coefficient above 0 and below 1 (0.5 for an abrupt junction, 0.33 for a linearly graded one)"}
	gapRule = rule{func(v float64) bool { return v > 0.1 && v < 10 }, "outside 0.1 eV to 10 eV",
		"a band-gap energy above 0.1 eV and below 10 eV (silicon is about 1.1 eV)"}
	breakdownRule = rule{func(v float64) bool { return v > 0 }, "not above zero",
		"the size of the reverse knee as a positive number, e.g. 3.8V for a knee at -3.8 V"}
	anyFinite           = rule{func(float64) bool { return true }, "", ""}
	flickerExponentRule = rule{func(v float64) bool { return v > 0 && v <= 4 }, "outside 0 to 4",
		"a flicker exponent above 0 and at most 4 (1 is usual: the flicker density grows with the current)"}
	// The exponent is raised to T/T0: beyond a few tens even a modest
	// temperature change would carry I_S out of the float64 range.
	exponentRule = rule{func(v float64) bool { return v >= -20 && v <= 20 }, "outside -20 to 20",
		"a temperature exponent from -20 to 20 (about 3 for a pn junction, 2 for a Schottky barrier)"}
)

// modelKeys lists the numeric keys of a diode model in the order the format
// page gives them.
var modelKeys = []modelKey{
	{"saturation_current", Current, positive, func(p *diode.Params) *float64 { return &p.SaturationCurrent }},
	{"ideality", Dimensionless, idealityRule, func(p *diode.Params) *float64 { return &p.Ideality }},
	{"series_resistance", Resistance, nonNegative, func(p *diode.Params) *float64 { return &p.SeriesResistance }},
	{"zero_bias_capacitance", Capacitance, nonNegative, func(p *diode.Params) *float64 { return &p.ZeroBiasCapacitance }},
	{"built_in_potential", Voltage, positive, func(p *diode.Params) *float64 { return &p.BuiltInPotential }},
	{"grading_coefficient", Dimensionless, gradingRule, func(p *diode.Params) *float64 { return &p.Grading }},
	{"transit_time", Time, nonNegative, func(p *diode.Params) *float64 { return &p.TransitTime }},
	{"breakdown_voltage", Voltage, breakdownRule, func(p *diode.Params) *float64 { return &p.BreakdownVoltage }},
	{"breakdown_current", Current, positive, func(p *diode.Params) *float64 { return &p.BreakdownCurrent }},
	{"gap_energy", Energy, gapRule, func(p *diode.Params) *float64 { return &p.GapEnergy }},
	{"saturation_temperature_exponent", Dimensionless, exponentRule, func(p *diode.Params) *float64 { return &p.SaturationExponent }},
	{"measured_at", Temperature, positive, func(p *diode.Params) *float64 { return &p.MeasuredAtK }},
	{"flicker_coefficient", Dimensionless, nonNegative, func(p *diode.Params) *float64 { return &p.FlickerCoefficient }},
	{"flicker_exponent", Dimensionless, flickerExponentRule, func(p *diode.Params) *float64 { return &p.FlickerExponent }},
}

// ratingKeys are the keys of a model's `ratings`.
var ratingKeys = []struct {
	key   string
	q     Quantity
	field func(*diode.Ratings) *float64
}{
	{"max_current", Current, func(r *diode.Ratings) *float64 { return &r.MaxCurrent }},
	{"max_reverse_voltage", Voltage, func(r *diode.Ratings) *float64 { return &r.MaxReverseVoltage }},
	{"max_power", Power, func(r *diode.Ratings) *float64 { return &r.MaxPower }},
}

// defaultBreakdownCurrent is the current at the reverse knee when a model
// gives breakdown_voltage but not breakdown_current.
const defaultBreakdownCurrent = 1e-3

// defaultFlickerExponent is the exponent of the current in the flicker
// noise law when a model gives flicker_coefficient alone.
const defaultFlickerExponent = 1

// ModelParam returns the field of p that the numeric diode-model key sets
// (saturation_current, ideality, ..., measured_at), or nil when key is not
// one. It lets a study vary a model value named as MODEL.key.
func ModelParam(p *diode.Params, key string) *float64 {
	if mk := findModelKey(key); mk != nil {
		return mk.field(p)
	}
	return nil
}

func findModelKey(key string) *modelKey {
	for i := range modelKeys {
		if modelKeys[i].key == key {
			return &modelKeys[i]
		}
	}
	return nil
}

func modelKeyNames() []string {
	names := make([]string, 0, len(modelKeys)+1)
	for _, mk := range modelKeys {
		names = append(names, mk.key)
	}
	return append(names, "ratings")
}

// models reads `diode_models`, a mapping from model name to model.
func (l *loader) models(n *yaml.Node) {
	if n.Kind == yaml.ScalarNode && n.ShortTag() == "!!null" {
		return // an empty section: no models
	}
	if n.Kind != yaml.MappingNode {
		l.errorf(n, "`diode_models` is %s, not a mapping; accepted: model names each followed by a mapping of its values", kindName(n))
		return
	}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		name, ok := l.text(k, "a diode model name", "a name such as detector_low_barrier")
		if !ok {
			continue
		}
		if first, dup := l.modelAt[name]; dup {
			l.errorf(k, "diode model `%s` is defined twice, first at line %d; accepted: names unique among diode models", name, first.Line)
			continue
		}
		l.modelAt[name] = Pos{k.Line, k.Column}
		if name == Ground {
			l.errorf(k, "a diode model may not be called `%s`, the reference node's name; accepted: any other name", Ground)
			continue
		}
		m := &Model{Name: name, Pos: Pos{k.Line, k.Column}, Params: l.model(v, name)}
		l.c.Models[name] = m
		l.c.ModelOrder = append(l.c.ModelOrder, name)
	}
}

// model reads one model's values over the defaults.
func (l *loader) model(n *yaml.Node, name string) diode.Params {
	p := diode.Defaults()
	what := "diode model `" + name + "`"
	f := l.fields(n, what, append(modelKeyNames(), "spread"), nil)
	if n.Kind != yaml.MappingNode {
		return p
	}
	for _, mk := range modelKeys {
		e, ok := f[mk.key]
		if !ok {
			continue
		}
		label := mk.key + " of " + what
		if v, ok := l.value(e.val, mk.q, label, mk.r); ok {
			*mk.field(&p) = v
			l.written = append(l.written, written{pos: Pos{e.val.Line, e.val.Column}, owner: name, key: mk.key, model: true, text: e.val.Value, v: v})
		}
	}
	if _, ok := f["saturation_current"]; !ok {
		l.missing(n, "saturation_current", modelKeyNames(), "%s has no `saturation_current`; accepted: a current above zero, e.g. saturation_current: 3uA", what)
	}
	_, knee := f["breakdown_voltage"]
	if e, ok := f["breakdown_current"]; ok && !knee {
		l.errorf(e.key, "%s gives `breakdown_current` without `breakdown_voltage`; accepted: both, or breakdown_voltage alone (the knee current is then 1mA)", what)
	}
	if knee && p.BreakdownCurrent == 0 {
		p.BreakdownCurrent = defaultBreakdownCurrent
	}
	_, flicker := f["flicker_coefficient"]
	if e, ok := f["flicker_exponent"]; ok && !flicker {
		l.errorf(e.key, "%s gives `flicker_exponent` without `flicker_coefficient`; accepted: both, or flicker_coefficient alone (the exponent is then 1)", what)
	}
	if flicker && p.FlickerExponent == 0 {
		p.FlickerExponent = defaultFlickerExponent
	}
	if e, ok := f["ratings"]; ok {
		p.Ratings = l.ratings(e.val, what)
	}
	if e, ok := f["spread"]; ok {
		l.modelSpread(e.val, name, what)
	}
	return p
}

// ratings reads a model's absolute limits.
func (l *loader) ratings(n *yaml.Node, what string) diode.Ratings {
	var r diode.Ratings
	names := make([]string, len(ratingKeys))
	for i, rk := range ratingKeys {
		names[i] = rk.key
	}
	f := l.fields(n, "the ratings of "+what, names, nil)
	for _, rk := range ratingKeys {
		e, ok := f[rk.key]
		if !ok {
			continue
		}
		label := rk.key + " of " + what
		if v, ok := l.value(e.val, rk.q, label, positive); ok {
			*rk.field(&r) = v
		}
	}
	return r
}
