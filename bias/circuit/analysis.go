package circuit

import (
	"strings"

	"go.yaml.in/yaml/v3"
)

var (
	analysisKeys   = []string{"response", "distortion", "study", "yield", "pulse", "mixer"}
	responseKeys   = []string{"from", "to", "per_decade", "points"}
	distortionKeys = []string{"input", "output", "frequency", "level", "second_tone"}
	studyKeys      = []string{"vary", "from", "to", "steps", "log"}
	pulseKeys      = []string{"input", "output", "carrier", "level", "width", "rise", "fall", "period", "pulses"}
)

// maxPoints bounds point and step counts, so that a slip of the keyboard
// cannot ask for an analysis that exhausts memory.
const maxPoints = 1_000_000

// analysis reads the optional analysis defaults.
func (l *loader) analysis(n *yaml.Node) {
	if n.Kind == yaml.ScalarNode && n.ShortTag() == "!!null" {
		return
	}
	f := l.fields(n, "`analysis`", analysisKeys, nil)
	if e, ok := f["response"]; ok {
		l.response(e.val)
	}
	if e, ok := f["distortion"]; ok {
		l.distortion(e.val)
	}
	if e, ok := f["study"]; ok {
		l.study(e.val)
	}
	if e, ok := f["yield"]; ok {
		l.yieldDefaults(e.val)
	}
	if e, ok := f["pulse"]; ok {
		l.pulse(e.val)
	}
	if e, ok := f["mixer"]; ok {
		l.mixer(e.val) // mixer.go
	}
}

// response reads {from, to, per_decade | points}.
func (l *loader) response(n *yaml.Node) {
	r := &l.c.Analysis.Response
	r.Pos = Pos{n.Line, n.Column}
	const what = "the response analysis"
	f := l.fields(n, what, responseKeys, nil)
	if n.Kind != yaml.MappingNode {
		return
	}
	ok := true
	from, hasFrom := f["from"]
	to, hasTo := f["to"]
	per, hasPer := f["per_decade"]
	pts, hasPts := f["points"]
	if !hasFrom || !hasTo {
		if misspelt(n, "from", responseKeys) == "" && misspelt(n, "to", responseKeys) == "" {
			l.errorf(n, "%s needs both `from` and `to`; accepted: e.g. {from: 10MHz, to: 6GHz, per_decade: 40}", what)
		}
		ok = false
	}
	if hasPer {
		v, good := l.count(per.val, "`per_decade` of "+what, 1, maxPoints)
		r.PerDecade, ok = v, ok && good
	}
	if hasPts {
		v, good := l.count(pts.val, "`points` of "+what, 2, maxPoints)
		r.Points, ok = v, ok && good
	}
	switch {
	case hasPer && hasPts:
		l.errorf(pts.key, "%s gives both `per_decade` and `points`; accepted: one of them (per_decade for a logarithmic sweep, points for a linear one)", what)
		ok = false
	case !hasPer && !hasPts:
		if misspelt(n, "per_decade", responseKeys) == "" && misspelt(n, "points", responseKeys) == "" {
			l.errorf(n, "%s needs `per_decade` or `points`; accepted: per_decade for a logarithmic sweep, points for a linear one", what)
		}
		ok = false
	}
	// A logarithmic sweep cannot start at 0 Hz; a linear one may.
	lowest := positive
	if !hasPer {
		lowest = nonNegative
	}
	if hasFrom {
		v, good := l.value(from.val, Frequency, "`from` of "+what, lowest)
		r.FromHz, ok = v, ok && good
	}
	if hasTo {
		v, good := l.value(to.val, Frequency, "`to` of "+what, positive)
		r.ToHz, ok = v, ok && good
	}
	if ok && r.FromHz >= r.ToHz {
		l.errorf(to.val, "`to` of %s (%s) is not above `from` (%s); accepted: from below to", what, to.val.Value, from.val.Value)
		ok = false
	}
	r.Set = ok
}

// distortion reads {input, output, frequency, level, second_tone}.
func (l *loader) distortion(n *yaml.Node) {
	d := &l.c.Analysis.Distortion
	d.Pos = Pos{n.Line, n.Column}
	const what = "the distortion analysis"
	f := l.fields(n, what, distortionKeys, nil)
	if n.Kind != yaml.MappingNode {
		return
	}
	ok := true
	for _, key := range []string{"input", "output", "frequency", "level"} {
		if _, has := f[key]; !has {
			l.missing(n, key, distortionKeys, "%s has no `%s`; accepted: e.g. {input: rf, output: video, frequency: 2.45GHz, level: -30dBm}", what, key)
			ok = false
		}
	}
	if e, has := f["input"]; has {
		if name, good := l.text(e.val, "`input` of "+what, "a port name"); good {
			d.Input = name
			if _, isPort := l.portAt[name]; !isPort {
				l.errorf(e.val, "`input` of %s is `%s`, which is not a port%s; accepted: a port name: %s",
					what, name, didYouMean(name, l.portNames()), nameList(l.portNames(), 12))
				ok = false
			}
		} else {
			ok = false
		}
	}
	if e, has := f["output"]; has {
		if name, good := l.text(e.val, "`output` of "+what, "a port or node name"); good {
			d.Output = name
			// A port of the same name as a node wins: ports are what
			// distortion is usually measured into.
			if _, isPort := l.portAt[name]; isPort {
				d.OutputIsPort = true
			} else if name == Ground {
				l.errorf(e.val, "`output` of %s is the reference node; accepted: a port or a node other than gnd", what)
				ok = false
			} else if _, isNode := l.nodeAt[name]; !isNode {
				if l.partsComplete && l.portsComplete {
					all := append(l.portNames(), l.c.Nodes...)
					l.errorf(e.val, "`output` of %s is `%s`, which is neither a port nor a node%s; accepted: a port or node: %s",
						what, name, didYouMean(name, all), nameList(all, 12))
				}
				ok = false
			}
		} else {
			ok = false
		}
	}
	if e, has := f["frequency"]; has {
		v, good := l.value(e.val, Frequency, "`frequency` of "+what, positive)
		d.FrequencyHz, ok = v, ok && good
	}
	if e, has := f["level"]; has {
		if s, good := l.scalarText(e.val, "`level` of "+what, levelAccepted); good {
			lv, err := ParseLevel(s)
			if err != nil {
				l.wrapf(e.val, err, "`level` of %s", what)
				ok = false
			} else {
				d.Level = lv
			}
		} else {
			ok = false
		}
	}
	if e, has := f["second_tone"]; has {
		v, good := l.value(e.val, Frequency, "`second_tone` of "+what, positive)
		if good && v == d.FrequencyHz {
			l.errorf(e.val, "`second_tone` of %s equals its `frequency`; accepted: a second frequency near but not at the first, e.g. 1 MHz away", what)
			good = false
		}
		d.SecondToneHz, ok = v, ok && good
	}
	d.Set = ok
}

func (l *loader) portNames() []string {
	names := make([]string, 0, len(l.c.Ports))
	for _, p := range l.c.Ports {
		names = append(names, p.Name)
	}
	return names
}

// study reads {vary, from, to, steps, log}. The quantity of from and to
// follows from what is varied.
func (l *loader) study(n *yaml.Node) {
	s := &l.c.Analysis.Study
	s.Pos = Pos{n.Line, n.Column}
	const what = "the study"
	f := l.fields(n, what, studyKeys, nil)
	if n.Kind != yaml.MappingNode {
		return
	}
	ok := true
	for _, key := range []string{"vary", "from", "to", "steps"} {
		if _, has := f[key]; !has {
			l.missing(n, key, studyKeys, "%s has no `%s`; accepted: e.g. {vary: Vcc.value, from: 0V, to: 3.3V, steps: 33}", what, key)
			ok = false
		}
	}
	q, r, known := Dimensionless, anyFinite, false
	if e, has := f["vary"]; has {
		if v, good := l.text(e.val, "`vary` of "+what, varyAccepted); good {
			s.Vary = v
			q, r, known = l.varied(e.val, v)
		}
	}
	ok = ok && known
	if e, has := f["steps"]; has {
		v, good := l.count(e.val, "`steps` of "+what, 1, maxPoints)
		s.Steps, ok = v, ok && good
	}
	if e, has := f["log"]; has {
		v, good := l.flag(e.val, "`log` of "+what)
		s.Log, ok = v, ok && good
	}
	from, hasFrom := f["from"]
	to, hasTo := f["to"]
	if !known || !hasFrom || !hasTo {
		s.Set = false
		return
	}
	label := "`from` of " + what + " (" + s.Vary + ")"
	from1, goodFrom := l.value(from.val, q, label, r)
	label = "`to` of " + what + " (" + s.Vary + ")"
	to1, goodTo := l.value(to.val, q, label, r)
	s.From, s.To = from1, to1
	ok = ok && goodFrom && goodTo
	switch {
	case !goodFrom || !goodTo:
	case from1 == to1:
		l.errorf(to.val, "`to` of %s equals `from`; accepted: two different values", what)
		ok = false
	case s.Log && !(from1*to1 > 0):
		// A logarithmic study steps by a constant ratio, which cannot
		// cross or reach zero.
		l.errorf(from.val, "a logarithmic study needs `from` and `to` of the same sign and not zero; accepted: e.g. from: 1k, to: 100k with log: true, or log: false")
		ok = false
	}
	s.Set = ok
}

const varyAccepted = "temperature, PART.value for a resistor, capacitor, inductor or source, or MODEL.KEY for a numeric key of a diode model, e.g. Vcc.value or detector.saturation_current"

// varied resolves a study's `vary` and returns the quantity and range of the
// value it names.
func (l *loader) varied(n *yaml.Node, v string) (Quantity, rule, bool) {
	if v == "temperature" {
		return Temperature, positive, true
	}
	dot := strings.LastIndexByte(v, '.')
	if dot <= 0 || dot == len(v)-1 {
		l.errorf(n, "`vary` of the study is `%s`; accepted: %s", v, varyAccepted)
		return 0, rule{}, false
	}
	owner, key := v[:dot], v[dot+1:]
	if kind, isPart := l.partKind[owner]; isPart {
		if kind == Diode {
			l.errorf(n, "`vary` of the study names diode `%s`, which has no value; accepted: a value of its model, e.g. %s.saturation_current", owner, l.c.partModel(owner))
			return 0, rule{}, false
		}
		if key != "value" {
			l.errorf(n, "`vary` of the study is `%s`, but a %s has only `value`; accepted: %s.value", v, kind, owner)
			return 0, rule{}, false
		}
		spec := kindSpecs[kind]
		return spec.q, spec.r, true
	}
	if _, isModel := l.modelAt[owner]; isModel {
		mk := findModelKey(key)
		if mk == nil {
			names := modelKeyNames()
			names = names[:len(names)-1] // ratings are limits, not model values
			l.errorf(n, "`vary` of the study is `%s`, but `%s` is not a numeric key of a diode model%s; accepted: %s",
				v, key, didYouMean(key, names), strings.Join(names, ", "))
			return 0, rule{}, false
		}
		return mk.q, mk.r, true
	}
	if typ := l.distributedName(owner); typ != "" {
		l.errorf(n, "`vary` of the study names %s `%s`, whose values a study does not vary; accepted: %s", typ, owner, varyAccepted)
		return 0, rule{}, false
	}
	if _, named := l.partAt[owner]; named {
		return 0, rule{}, false // the part could not be read; its error says why
	}
	all := append(l.partNamesWithValue(), l.c.ModelOrder...)
	l.errorf(n, "`vary` of the study names `%s`, which is neither a part nor a diode model%s; accepted: %s",
		owner, didYouMean(owner, all), varyAccepted)
	return 0, rule{}, false
}

func (l *loader) partNamesWithValue() []string {
	var names []string
	for _, p := range l.c.Parts {
		if p.Kind != Diode {
			names = append(names, p.Name)
		}
	}
	return names
}

// partModel returns the model name of the named diode, or MODEL.
func (c *Circuit) partModel(name string) string {
	for _, p := range c.Parts {
		if p.Name == name && p.Model != "" {
			return p.Model
		}
	}
	return "MODEL"
}

// pulse reads {input, output, carrier, level, width, rise, fall, period,
// pulses}: carrier, level and width are needed, the rest optional.
func (l *loader) pulse(n *yaml.Node) {
	d := &l.c.Analysis.Pulse
	d.Pos = Pos{n.Line, n.Column}
	const what = "the pulse analysis"
	f := l.fields(n, what, pulseKeys, nil)
	if n.Kind != yaml.MappingNode {
		return
	}
	ok := true
	for _, key := range []string{"carrier", "level", "width"} {
		if _, has := f[key]; !has {
			l.missing(n, key, pulseKeys, "%s has no `%s`; accepted: e.g. {input: rf, output: out, carrier: 3GHz, level: 40dBm, width: 1us, rise: 10ns, fall: 10ns, period: 10us}", what, key)
			ok = false
		}
	}
	if e, has := f["input"]; has {
		if name, good := l.text(e.val, "`input` of "+what, "a port name"); good {
			d.Input = name
			if _, isPort := l.portAt[name]; !isPort {
				l.errorf(e.val, "`input` of %s is `%s`, which is not a port%s; accepted: a port name: %s",
					what, name, didYouMean(name, l.portNames()), nameList(l.portNames(), 12))
				ok = false
			}
		} else {
			ok = false
		}
	}
	if e, has := f["output"]; has {
		if name, good := l.text(e.val, "`output` of "+what, "a port or node name"); good {
			d.Output = name
			if _, isPort := l.portAt[name]; isPort {
				d.OutputIsPort = true
			} else if _, isNode := l.nodeAt[name]; !isNode || name == Ground {
				if l.partsComplete && l.portsComplete {
					all := append(l.portNames(), l.c.Nodes...)
					l.errorf(e.val, "`output` of %s is `%s`, which is neither a port nor a node%s; accepted: a port or a node other than gnd: %s",
						what, name, didYouMean(name, all), nameList(all, 12))
				}
				ok = false
			}
		} else {
			ok = false
		}
	}
	if e, has := f["carrier"]; has {
		v, good := l.value(e.val, Frequency, "`carrier` of "+what, positive)
		d.CarrierHz, ok = v, ok && good
	}
	if e, has := f["level"]; has {
		if s, good := l.scalarText(e.val, "`level` of "+what, levelAccepted); good {
			lv, err := ParseLevel(s)
			if err != nil {
				l.wrapf(e.val, err, "`level` of %s", what)
				ok = false
			} else {
				d.Level = lv
			}
		} else {
			ok = false
		}
	}
	times := map[string]*float64{"width": &d.Width, "rise": &d.Rise, "fall": &d.Fall, "period": &d.Period}
	for _, key := range []string{"width", "rise", "fall", "period"} {
		if e, has := f[key]; has {
			r := nonNegative
			if key == "width" || key == "period" {
				r = positive
			}
			v, good := l.value(e.val, Time, "`"+key+"` of "+what, r)
			*times[key], ok = v, ok && good
		}
	}
	if e, has := f["pulses"]; has {
		v, good := l.count(e.val, "`pulses` of "+what, 1, 1000)
		d.Pulses, ok = v, ok && good
		if good && v > 1 && d.Period == 0 {
			l.errorf(e.key, "%s asks for %d pulses without a `period`; accepted: a period with several pulses, e.g. {period: 10us, pulses: 3}", what, v)
			ok = false
		}
	}
	// The relations a pulse needs; the command checks them again with
	// its flags.
	if ok {
		at := func(key string) *yaml.Node { return f[key].val }
		switch {
		case d.Width < 1/d.CarrierHz:
			l.errorf(at("width"), "`width` of %s (%s) is shorter than one period of the carrier; accepted: a width of at least one carrier period", what, f["width"].val.Value)
			ok = false
		case d.Rise > d.Width:
			l.errorf(at("rise"), "`rise` of %s (%s) is longer than the width (%s); accepted: a rise no longer than the width", what, f["rise"].val.Value, f["width"].val.Value)
			ok = false
		case d.Fall > d.Width:
			l.errorf(at("fall"), "`fall` of %s (%s) is longer than the width (%s); accepted: a fall no longer than the width", what, f["fall"].val.Value, f["width"].val.Value)
			ok = false
		case d.Period != 0 && d.Period < d.Width:
			l.errorf(at("period"), "`period` of %s (%s) is shorter than the width (%s); accepted: a period longer than the pulse", what, f["period"].val.Value, f["width"].val.Value)
			ok = false
		}
	}
	d.Set = ok
}
