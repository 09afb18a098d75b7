package circuit

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"
)

// Distribution is the law a toleranced value spreads by about its nominal
// value x0.
type Distribution int

const (
	// Uniform: x = x0 + a (2U - 1), U uniform on (0, 1): a band ±a, the
	// usual reading of a part's printed tolerance. Standard deviation
	// a/√3 (JCGM 100:2008, 4.3.7).
	Uniform Distribution = iota
	// Normal: x = x0 + σ z, z standard normal.
	Normal
	// LogNormal: x = x0 exp(s z): ln x is normal with standard deviation
	// s. It suits a saturation current, which spreads by factors rather
	// than by percentages, and never crosses zero.
	LogNormal
)

// String names the distribution as the circuit file writes it.
func (d Distribution) String() string {
	switch d {
	case Uniform:
		return "band"
	case Normal:
		return "sigma"
	case LogNormal:
		return "log_sigma"
	}
	return "unknown"
}

// Tolerance is the spread of one value of the circuit: a part's value
// (`tolerance:` on the part) or one diode's copy of a model key (`spread:`
// on the model, drawn for each diode of that model on its own).
type Tolerance struct {
	// Name is the value as messages and results name it: PART.value, or
	// DIODE.KEY for a model key (D1.saturation_current).
	Name string
	// Part indexes Circuit.Parts: the part, or the diode for a model key.
	Part int
	// Key is "value" or the diode-model key.
	Key      string
	Model    string // the diode's model, for a model key
	Quantity Quantity
	Nominal  float64 // x0, SI base units
	// Distribution and Width: the band a (Uniform) or standard deviation
	// σ (Normal) in the value's units, or s, the standard deviation of
	// ln x (LogNormal).
	Distribution Distribution
	Width        float64
	// Relative is the width as a fraction of the nominal value when the
	// file gave a percentage (so that Width follows a value set from
	// outside the file), else zero.
	Relative float64
	Text     string // the width as written, e.g. "1%" or "0.3"
	// Group indexes Circuit.ToleranceGroups, or is -1 for a value drawn
	// on its own.
	Group int
	Pos   Pos
	r     rule
}

// At returns the value at normal score z: the value whose distribution
// function equals Φ(z), the standard normal distribution function. Drawing
// z standard normal gives the tolerance's distribution; scores correlated
// through a group give correlated values (a Gaussian copula).
func (t *Tolerance) At(z float64) float64 {
	switch t.Distribution {
	case Uniform:
		// 2Φ(z) - 1 = erf(z/√2), uniform on (-1, 1) for normal z.
		return t.Nominal + t.Width*math.Erf(z/math.Sqrt2)
	case Normal:
		return t.Nominal + t.Width*z
	}
	return t.Nominal * math.Exp(t.Width*z)
}

// StdDev returns the standard deviation of the value: a/√3 for a band ±a
// (JCGM 100:2008, 4.3.7), σ for a normal spread, and
// |x0| e^(s²/2) √(e^(s²) - 1) for a log-normal one (the moments of the
// log-normal distribution, e.g. Johnson, Kotz and Balakrishnan,
// "Continuous Univariate Distributions" vol. 1, 2nd ed., 1994, ch. 14).
func (t *Tolerance) StdDev() float64 {
	switch t.Distribution {
	case Uniform:
		return t.Width / math.Sqrt(3)
	case Normal:
		return t.Width
	}
	s2 := t.Width * t.Width
	return math.Abs(t.Nominal) * math.Exp(s2/2) * math.Sqrt(math.Expm1(s2))
}

// Extreme returns the value at the edge of the tolerance in direction
// sign (+1 or -1): the end of a band, or three standard deviations (of x,
// or of ln x) for a normal or log-normal spread, where 0.13 % of the parts
// lie beyond on each side.
func (t *Tolerance) Extreme(sign float64) float64 {
	switch t.Distribution {
	case Uniform:
		return t.Nominal + sign*t.Width
	case Normal:
		return t.Nominal + sign*ExtremeScore*t.Width
	}
	return t.Nominal * math.Exp(sign*ExtremeScore*t.Width)
}

// ExtremeScore is how many standard deviations a worst-case corner puts a
// normal or log-normal value from its nominal.
const ExtremeScore = 3

// Accepts reports whether x is a value the part or model key accepts (a
// resistance above zero, an ideality from 0.9 to 10, ...), within the
// magnitudes the file accepts. A draw outside is redrawn.
func (t *Tolerance) Accepts(x float64) bool {
	return !math.IsNaN(x) && !math.IsInf(x, 0) && (t.r.ok == nil || t.r.ok(x)) && outOfSpan(x, t.Quantity) == ""
}

// ToleranceGroup ties values whose spreads are shared: parts from one
// reel, diodes from one lot. Its members' normal scores have correlation
// Correlation: z_i = √ρ z_g + √(1-ρ) e_i with z_g, e_i independent
// standard normal; at ρ = 1 they share one draw.
type ToleranceGroup struct {
	Name        string
	Members     []int // indices into Circuit.Tolerances
	Correlation float64
	Pos         Pos
}

// toleranceSpec is a spread as written, before the value it applies to is
// known (a model's spread applies to each diode of the model).
type toleranceSpec struct {
	key          string
	distribution Distribution
	width        float64 // relative when relative, else absolute (log_sigma: s)
	relative     bool
	text         string
	node         *yaml.Node // the width's node, for messages
	pos          Pos
}

// toleranceState is what the loader keeps of the tolerances while it
// reads the file.
type toleranceState struct {
	parts  map[string]toleranceSpec   // part name -> its tolerance
	models map[string][]toleranceSpec // model name -> its spreads, in key order
}

func (l *loader) tol() *toleranceState {
	if l.tolerances == nil {
		l.tolerances = &toleranceState{parts: map[string]toleranceSpec{}, models: map[string][]toleranceSpec{}}
	}
	return l.tolerances
}

const toleranceAccepted = "a band such as 1% (uniform ±1 %), or a mapping with one of band: 1%, sigma: 3% (normal, standard deviation) or log_sigma: 0.3 (log-normal, standard deviation of ln x); " +
	"an absolute band or sigma carries the value's unit, e.g. sigma: 20mV"

// partTolerance reads a part's `tolerance`.
func (l *loader) partTolerance(n *yaml.Node, p *Part, label string) {
	spec, ok := l.toleranceSpec(n, "`tolerance` of "+label, kindSpecs[p.Kind].q)
	if !ok || p.Name == "" {
		return
	}
	spec.key = "value"
	l.tol().parts[p.Name] = spec
}

// modelSpread reads a model's `spread`, a mapping from model key to
// tolerance.
func (l *loader) modelSpread(n *yaml.Node, model, what string) {
	var keys []string
	for _, mk := range modelKeys {
		keys = append(keys, mk.key)
	}
	f := l.fields(n, "`spread` of "+what, keys, nil)
	for _, mk := range modelKeys {
		e, ok := f[mk.key]
		if !ok {
			continue
		}
		spec, ok := l.toleranceSpec(e.val, fmt.Sprintf("the spread of %s of %s", mk.key, what), mk.q)
		if !ok {
			continue
		}
		spec.key = mk.key
		l.tol().models[model] = append(l.tol().models[model], spec)
	}
}

// toleranceSpec reads a tolerance: a bare band, or {band | sigma |
// log_sigma: WIDTH}.
func (l *loader) toleranceSpec(n *yaml.Node, what string, q Quantity) (toleranceSpec, bool) {
	spec := toleranceSpec{pos: Pos{n.Line, n.Column}}
	widthNode := n
	switch n.Kind {
	case yaml.ScalarNode:
		spec.distribution = Uniform
	case yaml.MappingNode:
		keys := []string{"band", "sigma", "log_sigma"}
		f := l.fields(n, what, keys, nil)
		found := 0
		for i, k := range keys {
			if e, ok := f[k]; ok {
				found++
				spec.distribution = Distribution(i)
				widthNode = e.val
			}
		}
		if found != 1 {
			if found > 1 || !hasUnknownKey(n, keys) {
				l.errorf(n, "%s gives %d of band, sigma and log_sigma; accepted: exactly one, e.g. {sigma: 3%%}", what, found)
			}
			return spec, false
		}
	default:
		l.errorf(n, "%s is %s; accepted: %s", what, kindName(n), toleranceAccepted)
		return spec, false
	}
	s, ok := l.text(widthNode, what, toleranceAccepted)
	if !ok {
		return spec, false
	}
	spec.text, spec.node = s, widthNode
	if spec.distribution == LogNormal {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil || strings.ContainsAny(s, "xXnNiI_") {
			l.errorf(widthNode, "%s is `%s`; accepted: log_sigma as a plain number, the standard deviation of ln x, e.g. 0.3 (a factor e^0.3 = 1.35 at one standard deviation)", what, s)
			return spec, false
		}
		if !(v > 0 && v <= maxLogSigma) {
			l.errorf(widthNode, "%s is `%s`; accepted: a log_sigma above 0 and at most %g", what, s, float64(maxLogSigma))
			return spec, false
		}
		spec.width = v
		return spec, true
	}
	if num, found := strings.CutSuffix(s, "%"); found {
		v, err := strconv.ParseFloat(strings.TrimSpace(num), 64)
		if err != nil || strings.ContainsAny(num, "xXnNiI_") {
			l.errorf(widthNode, "%s is `%s`, which is not a percentage; accepted: %s", what, s, toleranceAccepted)
			return spec, false
		}
		if !(v > 0 && v <= 1000) {
			l.errorf(widthNode, "%s is `%s`; accepted: a percentage above 0 %%, e.g. 1%%", what, s)
			return spec, false
		}
		spec.width, spec.relative = v/100, true
		return spec, true
	}
	v, err := ParseValue(s, q)
	if err != nil {
		l.wrapf(widthNode, err, "%s (or write a percentage, e.g. 5%%)", what)
		return spec, false
	}
	if q != Dimensionless && !hasUnit(s, q) {
		l.errorf(widthNode, "%s is `%s`, a bare number, which could be relative or absolute; accepted: a percentage such as %s%%, or an absolute %s with its unit, e.g. %s%s",
			what, s, s, q, s, quantities[q].units[0])
		return spec, false
	}
	if !(v > 0) {
		l.errorf(widthNode, "%s is `%s`; accepted: a width above zero", what, s)
		return spec, false
	}
	spec.width = v
	return spec, true
}

// hasUnknownKey reports whether mapping n has a key outside accepted,
// which fields has reported already.
func hasUnknownKey(n *yaml.Node, accepted []string) bool {
	for i := 0; i+1 < len(n.Content); i += 2 {
		if !contains(accepted, n.Content[i].Value) {
			return true
		}
	}
	return false
}

// maxLogSigma bounds a log-normal spread: s = 2 is a factor 7.4 at one
// standard deviation, wider than the lot-to-lot spread of any junction.
const maxLogSigma = 2

// hasUnit reports whether the value text s ends with a unit of q.
func hasUnit(s string, q Quantity) bool {
	for _, u := range quantities[q].units {
		if strings.HasSuffix(s, u) {
			return true
		}
	}
	return false
}

// normalReach is how many standard deviations of a normal spread must
// stay inside the values the field accepts: beyond 3.5 lie 2.3e-4 of the
// draws on each side, which the runs redraw (Tolerance.Accepts).
const normalReach = 3.5

// resolveTolerances builds Circuit.Tolerances from the parts' tolerances
// and each diode's copy of its model's spreads, in part order, then reads
// `tolerance_groups`.
func (l *loader) resolveTolerances(groups *entry) {
	st := l.tolerances
	for pi, p := range l.c.Parts {
		if st == nil {
			break
		}
		if p.Kind == Diode {
			m, ok := l.c.Models[p.Model]
			if !ok {
				continue
			}
			for _, spec := range st.models[p.Model] {
				mk := findModelKey(spec.key)
				nominal := *mk.field(&m.Params)
				label := fmt.Sprintf("the spread of %s of diode model `%s` (for diode %s)", spec.key, p.Model, p.Name)
				l.addTolerance(spec, Tolerance{Name: p.Name + "." + spec.key, Part: pi, Key: spec.key, Model: p.Model,
					Quantity: mk.q, Nominal: nominal, r: mk.r}, label)
			}
			continue
		}
		spec, ok := st.parts[p.Name]
		if !ok {
			continue
		}
		ks := kindSpecs[p.Kind]
		l.addTolerance(spec, Tolerance{Name: p.Name + ".value", Part: pi, Key: "value", Quantity: ks.q, Nominal: p.Value, r: ks.r},
			fmt.Sprintf("`tolerance` of %s `%s`", p.Kind, p.Name))
	}
	if groups != nil {
		l.toleranceGroups(groups)
	}
}

// addTolerance checks a spread against the value it applies to and adds
// it. A spread is refused when the values it reaches often enough to
// matter leave the field's accepted range: a band whose ends do, a normal
// spread within 3.5 σ, a log-normal one within 3.5 s.
func (l *loader) addTolerance(spec toleranceSpec, t Tolerance, label string) {
	t.Distribution, t.Text, t.Group, t.Pos = spec.distribution, spec.text, -1, spec.pos
	t.Width = spec.width
	if spec.relative {
		if t.Nominal == 0 {
			l.errorf(spec.node, "%s is relative (%s), but the value is zero, so it would never move; accepted: an absolute width with the value's unit, e.g. {sigma: 10m%s}",
				label, spec.text, quantities[t.Quantity].units[0])
			return
		}
		t.Width = spec.width * math.Abs(t.Nominal)
		t.Relative = spec.width
	}
	if t.Distribution == LogNormal && t.Nominal == 0 {
		l.errorf(spec.node, "%s is log-normal, but the value is zero, which a log-normal spread never leaves; accepted: band or sigma", label)
		return
	}
	reach := 1.0
	if t.Distribution != Uniform {
		reach = normalReach
	}
	for _, sign := range []float64{-1, 1} {
		var x float64
		switch t.Distribution {
		case Uniform:
			x = t.Nominal + sign*t.Width
		case Normal:
			x = t.Nominal + sign*reach*t.Width
		default:
			x = t.Nominal * math.Exp(sign*reach*t.Width)
		}
		if t.Accepts(x) {
			continue
		}
		where := "the band's end"
		advice := "a narrower band"
		switch t.Distribution {
		case Normal:
			where = fmt.Sprintf("%g standard deviations out", reach)
			advice = "a smaller sigma"
			if t.r.ok != nil && !t.r.ok(0) && t.Nominal > 0 && t.Quantity != Dimensionless {
				advice += fmt.Sprintf(" (up to %.3g%% for this value), or log_sigma for a wide spread of a value that must stay positive", 100/reach)
			}
		case LogNormal:
			where = fmt.Sprintf("%g standard deviations of ln x out", reach)
			advice = "a smaller log_sigma"
		}
		bad := "outside what the field accepts"
		if t.r.ok != nil && !t.r.ok(x) {
			bad = t.r.bad
		} else if p := outOfSpan(x, t.Quantity); p != "" {
			bad = p
		}
		unit := t.Quantity.Unit()
		if unit != "" {
			unit = " " + unit
		}
		l.errorf(spec.node, "%s reaches %.4g%s at %s, which is %s; accepted: %s",
			label, x, unit, where, bad, advice)
		return
	}
	l.c.Tolerances = append(l.c.Tolerances, t)
}

var groupKeys = []string{"name", "members", "correlation"}

// toleranceGroups reads `tolerance_groups`: a list of {name, members,
// correlation}.
func (l *loader) toleranceGroups(e *entry) {
	const accepted = "a list of groups, each such as {name: one_lot, members: [D1.saturation_current, D2.saturation_current]}"
	items, ok := l.sequence(e.val, "`tolerance_groups`", accepted)
	if !ok {
		return
	}
	names := map[string]int{}
	inGroup := map[int]string{}
	for gi, item := range items {
		what := fmt.Sprintf("tolerance group #%d", gi+1)
		f := l.fields(item, what, groupKeys, nil)
		if item.Kind != yaml.MappingNode {
			continue
		}
		g := ToleranceGroup{Correlation: 1, Pos: Pos{item.Line, item.Column}}
		if ne, ok := f["name"]; ok {
			if name, ok := l.text(ne.val, "the name of "+what, "a name unique among tolerance groups"); ok {
				if first, dup := names[name]; dup {
					l.errorf(ne.val, "tolerance group `%s` is already defined at line %d; accepted: names unique among tolerance groups", name, first)
				}
				names[name] = ne.val.Line
				g.Name = name
				what = fmt.Sprintf("tolerance group `%s`", name)
			}
		} else {
			l.missing(item, "name", groupKeys, "%s has no `name`; accepted: name: followed by a name such as one_lot", what)
		}
		if ce, ok := f["correlation"]; ok {
			s, good := l.text(ce.val, "`correlation` of "+what, "a number above 0 and at most 1")
			v, err := strconv.ParseFloat(s, 64)
			if good && (err != nil || !(v > 0 && v <= 1) || strings.ContainsAny(s, "xXnNiI_")) {
				l.errorf(ce.val, "`correlation` of %s is `%s`; accepted: a number above 0 and at most 1 (1: the members share one draw)", what, s)
			} else if good {
				g.Correlation = v
			}
		}
		me, ok := f["members"]
		if !ok {
			l.missing(item, "members", groupKeys, "%s has no `members`; accepted: members: [PART.value, DIODE.KEY, ...], two or more toleranced values", what)
			continue
		}
		list, ok := l.sequence(me.val, "`members` of "+what, "a list of toleranced values, e.g. [D1.saturation_current, D2.saturation_current]")
		if !ok {
			continue
		}
		seen := map[int]bool{}
		var members []int
		for _, mn := range list {
			name, ok := l.text(mn, "a member of "+what, "a toleranced value: PART.value or DIODE.KEY")
			if !ok {
				continue
			}
			k := l.findTolerance(mn, name)
			if k < 0 {
				continue
			}
			if seen[k] {
				l.errorf(mn, "`%s` is listed twice in %s; accepted: each member once", name, what)
				continue
			}
			if other, taken := inGroup[k]; taken {
				l.errorf(mn, "`%s` is already a member of tolerance group `%s`; accepted: each value in one group at most", name, other)
				continue
			}
			seen[k] = true
			members = append(members, k)
		}
		if len(list) < 2 {
			l.errorf(me.val, "%s lists %d member; accepted: two or more toleranced values that share their spread", what, len(list))
			continue
		}
		for _, k := range members {
			inGroup[k] = g.Name
		}
		g.Members = members
		idx := len(l.c.ToleranceGroups)
		for _, k := range g.Members {
			l.c.Tolerances[k].Group = idx
		}
		l.c.ToleranceGroups = append(l.c.ToleranceGroups, g)
	}
}

// findTolerance returns the index of the toleranced value name, or -1
// after recording why there is none.
func (l *loader) findTolerance(n *yaml.Node, name string) int {
	for k := range l.c.Tolerances {
		if l.c.Tolerances[k].Name == name {
			return k
		}
	}
	var all []string
	for _, t := range l.c.Tolerances {
		all = append(all, t.Name)
	}
	accepted := "a toleranced value: " + nameList(all, 12)
	owner, key, ok := strings.Cut(name, ".")
	if dot := strings.LastIndexByte(name, '.'); dot > 0 {
		owner, key, ok = name[:dot], name[dot+1:], true
	}
	_, isModel := l.modelAt[owner]
	_, isPart := l.partAt[owner]
	isDiode := l.partKind[owner] == Diode && isPart
	switch {
	case !ok || owner == "" || key == "":
		l.errorf(n, "`%s` is not PART.value or DIODE.KEY; accepted: %s", name, accepted)
	case isModel && !isDiode:
		l.errorf(n, "`%s` names diode model `%s`; a group ties diodes, each with its own draw of the model's spread: name them, e.g. %s; accepted: %s",
			name, owner, l.diodesOf(owner, key), accepted)
	case !isPart:
		l.errorf(n, "`%s` names `%s`, which is not a part%s; accepted: %s", name, owner, didYouMean(name, all), accepted)
	case l.distributedName(owner) != "":
		l.errorf(n, "`%s` names %s `%s`, which has no tolerance; accepted: %s", name, l.distributedName(owner), owner, accepted)
	case isDiode && key == "value":
		l.errorf(n, "`%s`: a diode has no value; accepted: a key of its model's spread, e.g. %s.saturation_current, or %s", name, owner, accepted)
	case !isDiode && key != "value":
		l.errorf(n, "`%s`: a %s has only `value`; accepted: %s", name, l.partKind[owner], accepted)
	case isDiode:
		l.errorf(n, "`%s`: diode %s's model has no spread of %s; accepted: a key under the model's `spread`, or %s", name, owner, key, accepted)
	default:
		l.errorf(n, "`%s` has no tolerance; accepted: give part %s a `tolerance` first, or %s", name, owner, accepted)
	}
	return -1
}

// diodesOf lists the diodes of model m as DIODE.KEY, for a message.
func (l *loader) diodesOf(m, key string) string {
	var names []string
	for _, p := range l.c.Parts {
		if p.Kind == Diode && p.Model == m {
			names = append(names, p.Name+"."+key)
		}
	}
	if len(names) == 0 {
		return "D1." + key
	}
	return plainList(names, 4)
}

// rebaseTolerances sets each tolerance's nominal value to the value the
// circuit now holds (after an Override), and a relative width to the same
// fraction of it. The tolerances are copied: c shares them with the
// circuit it was copied from.
func (c *Circuit) rebaseTolerances() {
	if len(c.Tolerances) == 0 {
		return
	}
	c.Tolerances = slices.Clone(c.Tolerances)
	for k := range c.Tolerances {
		t := &c.Tolerances[k]
		if t.Key == "value" {
			t.Nominal = c.Parts[t.Part].Value
		} else {
			p := c.Models[t.Model].Params
			t.Nominal = *ModelParam(&p, t.Key)
		}
		if t.Relative > 0 {
			t.Width = t.Relative * math.Abs(t.Nominal)
		}
	}
}

// ToleranceNames returns the names of the toleranced values, in order.
func (c *Circuit) ToleranceNames() []string {
	names := make([]string, len(c.Tolerances))
	for k := range c.Tolerances {
		names[k] = c.Tolerances[k].Name
	}
	return names
}

// Instance is a copy of a circuit with its toleranced values set (see
// Circuit.Instance), with storage that the next Instance call into it
// reuses.
type Instance struct {
	Circuit Circuit
	parts   []Part
	models  map[string]*Model
	own     []Model
	ownName map[int]string // diode part index -> its own model's name
	names   []string       // the own models' names
	of      *Circuit       // the circuit ownName was worked out for
}

// Instance writes into dst a copy of c whose toleranced values are
// values[k] for c.Tolerances[k]. A diode whose model has a spread gets a
// model of its own, named MODEL@DIODE, so that each diode of a model
// takes its own draw. The copy shares nothing that Instance changes with
// c, so copies can be solved concurrently; dst's earlier copy is
// overwritten.
func (c *Circuit) Instance(dst *Instance, values []float64) {
	dst.Circuit = *c
	out := &dst.Circuit
	dst.parts = append(dst.parts[:0], c.Parts...)
	out.Parts = dst.parts
	if dst.models == nil {
		dst.models = make(map[string]*Model, len(c.Models)+1)
		dst.ownName = map[int]string{}
	}
	clear(dst.models)
	for k, m := range c.Models {
		dst.models[k] = m
	}
	// The diodes with a spread, each with a model of its own, in part
	// order; their names are worked out once per circuit.
	if dst.of != c {
		dst.of = c
		clear(dst.ownName)
		dst.names = dst.names[:0]
		for k := range c.Tolerances {
			if t := &c.Tolerances[k]; t.Key != "value" {
				dst.ownName[t.Part] = ""
			}
		}
		taken := func(name string) bool { _, ok := c.Models[name]; return ok }
		for pi, p := range c.Parts {
			if _, ok := dst.ownName[pi]; !ok {
				continue
			}
			name := p.Model + "@" + p.Name
			for taken(name) || slices.Contains(dst.names, name) {
				name += "@"
			}
			dst.ownName[pi] = name
			dst.names = append(dst.names, name)
		}
	}
	dst.own = dst.own[:0]
	for pi, p := range c.Parts {
		if _, ok := dst.ownName[pi]; ok {
			dst.own = append(dst.own, *c.Models[p.Model])
		}
	}
	i := 0
	for pi := range c.Parts {
		name, ok := dst.ownName[pi]
		if !ok {
			continue
		}
		m := &dst.own[i]
		i++
		m.Name = name
		dst.models[name] = m
		out.Parts[pi].Model = name
	}
	for k := range c.Tolerances {
		t := &c.Tolerances[k]
		if t.Key == "value" {
			out.Parts[t.Part].Value = values[k]
			continue
		}
		*ModelParam(&dst.models[dst.ownName[t.Part]].Params, t.Key) = values[k]
	}
	out.Models = dst.models
}

// Yield holds the file's defaults for a yield analysis.
type YieldDefaults struct {
	Set bool
	// Targets are the targets as written (MEASURE>VALUE@F), each with
	// its place: the loader cannot read measures, which belong to the
	// analyses, so the command reads them and names the place.
	Targets   []string
	TargetPos []Pos
	Runs      int    // zero: not given
	Seed      uint64 // when SeedSet
	SeedSet   bool
	// TemperatureRangeK is the operating range [low, high] in kelvin,
	// when TemperatureRangeSet.
	TemperatureRangeK   [2]float64
	TemperatureRangeSet bool
	Pos                 Pos
}

var yieldKeys = []string{"targets", "runs", "seed", "temperature_range"}

// yieldDefaults reads {targets, runs, seed, temperature_range}.
func (l *loader) yieldDefaults(n *yaml.Node) {
	y := &l.c.Analysis.Yield
	y.Pos = Pos{n.Line, n.Column}
	const what = "the yield analysis"
	f := l.fields(n, what, yieldKeys, nil)
	if n.Kind != yaml.MappingNode {
		return
	}
	ok := true
	if e, has := f["targets"]; has {
		items, good := l.sequence(e.val, "`targets` of "+what, "a list of targets such as [\"s21>-6.2dB@900MHz\", \"hd3<-50dBc\"]")
		for _, it := range items {
			s, g := l.text(it, "a target of "+what, "MEASURE>VALUE or MEASURE<VALUE, e.g. s21>-6.2dB@900MHz")
			if g {
				y.Targets = append(y.Targets, s)
				y.TargetPos = append(y.TargetPos, Pos{it.Line, it.Column})
			}
			good = good && g
		}
		ok = ok && good
	}
	if e, has := f["runs"]; has {
		v, good := l.count(e.val, "`runs` of "+what, 1, maxPoints)
		y.Runs, ok = v, ok && good
	}
	if e, has := f["seed"]; has {
		s, good := l.text(e.val, "`seed` of "+what, "a whole number from 0 to 18446744073709551615")
		if good {
			v, err := strconv.ParseUint(s, 10, 64)
			if err != nil {
				l.errorf(e.val, "`seed` of %s is `%s`; accepted: a whole number from 0 to 18446744073709551615", what, s)
				good = false
			}
			y.Seed, y.SeedSet = v, good
		}
		ok = ok && good
	}
	if e, has := f["temperature_range"]; has {
		const accepted = "two temperatures, the lowest and highest the circuit must work at, e.g. [-40C, 85C]"
		items, good := l.sequence(e.val, "`temperature_range` of "+what, accepted)
		if good && len(items) != 2 {
			l.errorf(e.val, "`temperature_range` of %s lists %d temperatures; accepted: %s", what, len(items), accepted)
			good = false
		}
		if good {
			lo, g1 := l.value(items[0], Temperature, "the low end of `temperature_range`", positive)
			hi, g2 := l.value(items[1], Temperature, "the high end of `temperature_range`", positive)
			good = g1 && g2
			if good && !(lo < hi) {
				l.errorf(items[1], "`temperature_range` of %s does not rise; accepted: %s", what, accepted)
				good = false
			}
			y.TemperatureRangeK, y.TemperatureRangeSet = [2]float64{lo, hi}, good
		}
		ok = ok && good
	}
	y.Set = ok
}
