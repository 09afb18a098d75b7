package circuit

import (
	"fmt"
	"strings"
)

// VaryKind says what a study varies.
type VaryKind int

const (
	VaryTemperature VaryKind = iota // the circuit temperature
	VaryPart                        // a part's value
	VaryModel                       // a diode model's parameter
)

// Vary is a resolved study target: `temperature`, `PART.value` or
// `MODEL.KEY`.
type Vary struct {
	Text     string
	Kind     VaryKind
	Part     int    // index into Circuit.Parts, for VaryPart
	Model    string // model name, for VaryModel
	Key      string // model key, for VaryModel
	Quantity Quantity
	r        rule
}

// ResolveVary checks a study target against the circuit. Its error says
// what is accepted, with a near-miss suggestion, but names no place: the
// caller knows whether it came from a flag or the file.
func (c *Circuit) ResolveVary(v string) (*Vary, error) {
	if v == "temperature" {
		return &Vary{Text: v, Kind: VaryTemperature, Quantity: Temperature, r: positive}, nil
	}
	dot := strings.LastIndexByte(v, '.')
	if dot <= 0 || dot == len(v)-1 {
		return nil, fmt.Errorf("`%s` is not a study target; accepted: %s", v, varyAccepted)
	}
	owner, key := v[:dot], v[dot+1:]
	for i, p := range c.Parts {
		if p.Name != owner {
			continue
		}
		if p.Kind == Diode {
			return nil, fmt.Errorf("`%s` names diode `%s`, which has no value; accepted: a value of its model, e.g. %s.saturation_current", v, owner, p.Model)
		}
		if key != "value" {
			return nil, fmt.Errorf("`%s`: a %s has only `value`; accepted: %s.value", v, p.Kind, owner)
		}
		spec := kindSpecs[p.Kind]
		return &Vary{Text: v, Kind: VaryPart, Part: i, Quantity: spec.q, r: spec.r}, nil
	}
	if _, ok := c.Models[owner]; ok {
		mk := findModelKey(key)
		if mk == nil {
			names := modelKeyNames()
			names = names[:len(names)-1]
			return nil, fmt.Errorf("`%s`: `%s` is not a numeric key of a diode model%s; accepted: %s", v, key, didYouMean(key, names), strings.Join(names, ", "))
		}
		return &Vary{Text: v, Kind: VaryModel, Model: owner, Key: key, Quantity: mk.q, r: mk.r}, nil
	}
	for _, d := range c.Distributed {
		if d.Name == owner {
			return nil, fmt.Errorf("`%s` names %s `%s`, whose values a study does not vary; accepted: %s", v, d.Type, owner, varyAccepted)
		}
	}
	var all []string
	for _, p := range c.Parts {
		if p.Kind != Diode {
			all = append(all, p.Name)
		}
	}
	all = append(all, c.ModelOrder...)
	return nil, fmt.Errorf("`%s` names `%s`, which is neither a part nor a diode model%s; accepted: %s", v, owner, didYouMean(owner, all), varyAccepted)
}

// Check returns an error when value lies outside what the target accepts.
func (v *Vary) Check(value float64) error {
	if v.r.ok == nil || v.r.ok(value) {
		return nil
	}
	want := v.r.want
	if strings.Contains(want, "%s") {
		want = fmt.Sprintf(want, v.Quantity)
	}
	return fmt.Errorf("%s = %g is %s; accepted: %s", v.Text, value, v.r.bad, want)
}

// Apply returns a copy of c with the target set to value, and the
// temperature to solve at (c's own unless the target is temperature). The
// copy shares nothing that Apply changes with c, so copies can be solved
// concurrently.
func (v *Vary) Apply(c *Circuit, value float64) (*Circuit, float64) {
	out := new(Variant)
	temp := v.ApplyTo(out, c, value)
	return &out.Circuit, temp
}

// Variant is a copy of a circuit with a study target applied (see
// Vary.ApplyTo), with the storage for the parts or models the target
// changes, so that applying the next value reuses it.
type Variant struct {
	Circuit Circuit
	parts   []Part
	models  map[string]*Model
	model   Model
}

// ApplyTo is Apply writing the copy into dst.Circuit, in the storage an
// earlier ApplyTo into dst left, so that a study applying one value after
// another allocates nothing. It returns the temperature to solve at. What
// dst held is overwritten; dst must not be c's own Variant, since the copy
// shares nothing that ApplyTo changes with c.
func (v *Vary) ApplyTo(dst *Variant, c *Circuit, value float64) float64 {
	dst.Circuit = *c
	out := &dst.Circuit
	temp := c.TemperatureK
	switch v.Kind {
	case VaryTemperature:
		temp = value
		out.TemperatureK = value
	case VaryPart:
		dst.parts = append(dst.parts[:0], c.Parts...)
		out.Parts = dst.parts
		out.Parts[v.Part].Value = value
	case VaryModel:
		if dst.models == nil {
			dst.models = make(map[string]*Model, len(c.Models))
		}
		clear(dst.models)
		for k, m := range c.Models {
			dst.models[k] = m
		}
		dst.model = *c.Models[v.Model]
		*ModelParam(&dst.model.Params, v.Key) = value
		dst.models[v.Model] = &dst.model
		out.Models = dst.models
	}
	return temp
}

// Value returns the target's value in c.
func (v *Vary) Value(c *Circuit) float64 {
	switch v.Kind {
	case VaryPart:
		return c.Parts[v.Part].Value
	case VaryModel:
		m := *c.Models[v.Model]
		return *ModelParam(&m.Params, v.Key)
	}
	return c.TemperatureK
}
