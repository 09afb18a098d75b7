package circuit

import (
	"fmt"
	"sort"
	"strings"

	"go.yaml.in/yaml/v3"
)

var kindNames = []string{"resistor", "capacitor", "inductor", "voltage_source", "current_source", "diode"}

// kindSpec says how a part of one kind is written: its terminal keys and
// what its value is.
type kindSpec struct {
	terminals []string // key names, or just "between" for a two-item list
	q         Quantity
	r         rule
	hasValue  bool
}

var kindSpecs = map[Kind]kindSpec{
	Resistor:      {[]string{"between"}, Resistance, positive, true},
	Capacitor:     {[]string{"between"}, Capacitance, positive, true},
	Inductor:      {[]string{"between"}, Inductance, positive, true},
	VoltageSource: {[]string{"plus", "minus"}, Voltage, anyFinite, true},
	CurrentSource: {[]string{"from", "to"}, Current, anyFinite, true},
	Diode:         {[]string{"anode", "cathode"}, Dimensionless, anyFinite, false},
}

// keys returns the keys a part of kind k takes, sorted for messages.
func (s kindSpec) keys() []string {
	keys := append([]string{"type", "name"}, s.terminals...)
	if s.hasValue {
		keys = append(keys, "value", "tolerance")
	} else {
		keys = append(keys, "model")
	}
	sort.Strings(keys)
	return keys
}

// allPartKeys returns every key some kind of part takes.
func allPartKeys() []string {
	var all []string
	for i := range kindNames {
		for _, k := range kindSpecs[Kind(i)].keys() {
			if !contains(all, k) {
				all = append(all, k)
			}
		}
	}
	return all
}

func parseKind(s string) (Kind, bool) {
	for i, name := range kindNames {
		if s == name {
			return Kind(i), true
		}
	}
	return 0, false
}

// terminalHint explains a terminal key that belongs to another kind of part.
func terminalHint(k Kind) func(key string) string {
	return func(key string) string {
		if key == "value" && k == Diode {
			return " (a diode takes its values from its `model`)"
		}
		var owners []string
		for i, name := range kindNames {
			if Kind(i) != k && contains(kindSpecs[Kind(i)].keys(), key) {
				owners = append(owners, name)
			}
		}
		if len(owners) == 0 {
			return ""
		}
		return fmt.Sprintf(" (`%s` belongs to %s)", key, strings.Join(owners, ", "))
	}
}

// parts reads the `parts` list.
func (l *loader) parts(n *yaml.Node) {
	const accepted = "a list of parts, each a mapping such as {type: resistor, name: R1, between: [a, gnd], value: 1k}"
	items, ok := l.sequence(n, "`parts`", accepted)
	if !ok {
		l.partsComplete = false
		return
	}
	if len(items) == 0 {
		l.errorf(n, "`parts` is an empty list; accepted: %s", accepted)
		l.partsComplete = false
		return
	}
	for i, item := range items {
		if isTransformer(item) {
			if !l.transformer(i, item) { // transformer.go
				l.partsComplete = false
			}
			continue
		}
		if l.distributedPart(i, item) {
			continue
		}
		p, complete := l.part(i, item)
		if complete {
			l.c.Parts = append(l.c.Parts, p)
		} else {
			l.partsComplete = false
		}
	}
}

// part reads one part. complete reports whether its kind and terminals are
// known, which the topology checks need.
func (l *loader) part(i int, n *yaml.Node) (p Part, complete bool) {
	p.Pos = Pos{n.Line, n.Column}
	if n.Kind != yaml.MappingNode {
		l.errorf(n, "part #%d is %s, not a mapping; accepted: a mapping such as {type: resistor, name: R1, between: [a, gnd], value: 1k}", i+1, kindName(n))
		return p, false
	}
	label := fmt.Sprintf("part #%d", i+1)

	nameOK := false
	nn := lookup(n, "name")
	if nn != nil {
		if name, ok := l.text(nn, "the name of "+label, "a name unique among parts, e.g. Rbias"); ok {
			p.Name, nameOK = name, true
			l.partName(nn, name)
			label = fmt.Sprintf("part `%s`", name)
		}
	}

	tn := lookup(n, "type")
	if tn == nil {
		// Without a type the keys cannot be checked, so a misspelt type
		// key is pointed out here.
		hint := ""
		if k := misspelt(n, "type", allPartKeys()); k != "" {
			hint = fmt.Sprintf(" (is `%s` meant to be `type`?)", k)
		}
		l.errorf(n, "%s has no `type`%s; accepted: type: followed by one of %s", label, hint, strings.Join(partTypeNames(), ", "))
		return p, false
	}
	typ, ok := l.text(tn, "the type of "+label, "one of "+strings.Join(partTypeNames(), ", "))
	if !ok {
		return p, false
	}
	kind, ok := parseKind(typ)
	if !ok {
		l.errorf(tn, "unknown part type `%s`%s; accepted: %s", typ, didYouMean(typ, partTypeNames()), strings.Join(partTypeNames(), ", "))
		return p, false
	}
	p.Kind = kind
	if nameOK {
		l.partKind[p.Name] = kind
		label = fmt.Sprintf("%s `%s`", kind, p.Name)
	} else {
		label = fmt.Sprintf("%s #%d", kind, i+1)
	}

	spec := kindSpecs[kind]
	keys := spec.keys()
	f := l.fields(n, label, keys, terminalHint(kind))
	if nn == nil {
		l.missing(n, "name", keys, "%s has no `name`; accepted: a name unique among parts, e.g. name: Rbias", label)
	}
	complete = l.terminals(n, f, kind, label, &p)

	if spec.hasValue {
		if e, ok := f["value"]; ok {
			what := "value of " + label
			if v, ok := l.value(e.val, spec.q, what, spec.r); ok {
				p.Value = v
				l.written = append(l.written, written{pos: Pos{e.val.Line, e.val.Column}, owner: p.Name, key: "value", kind: kind, text: e.val.Value, v: v})
			}
		} else {
			l.missing(n, "value", keys, "%s has no `value`; accepted: value: %s", label, spec.q.Accepted())
		}
		if e, ok := f["tolerance"]; ok {
			l.partTolerance(e.val, &p, label)
		}
	} else {
		l.diodeModel(n, f, keys, label, &p)
	}
	return p, complete
}

// partName records a part's name, refusing duplicates and gnd.
func (l *loader) partName(n *yaml.Node, name string) {
	if first, dup := l.partAt[name]; dup {
		l.errorf(n, "part name `%s` is already used at line %d; accepted: names unique among parts", name, first.Line)
		return
	}
	l.partAt[name] = Pos{n.Line, n.Column}
	if name == Ground {
		l.errorf(n, "a part may not be called `%s`, the reference node's name; accepted: any other name", Ground)
	}
}

// terminals reads the part's two nodes into p.Nodes.
func (l *loader) terminals(n *yaml.Node, f map[string]entry, kind Kind, label string, p *Part) bool {
	spec := kindSpecs[kind]
	var nodes [2]*yaml.Node
	if spec.terminals[0] == "between" {
		const accepted = "between: [NODE, NODE], two node names"
		e, ok := f["between"]
		if !ok {
			l.missing(n, "between", spec.keys(), "%s has no `between`; accepted: %s", label, accepted)
			return false
		}
		items, ok := l.sequence(e.val, "`between` of "+label, accepted)
		if !ok {
			return false
		}
		if len(items) != 2 {
			l.errorf(e.val, "`between` of %s lists %d nodes; accepted: %s", label, len(items), accepted)
			return false
		}
		nodes[0], nodes[1] = items[0], items[1]
	} else {
		for j, key := range spec.terminals {
			e, ok := f[key]
			if !ok {
				l.missing(n, key, spec.keys(), "%s has no `%s`; accepted: %s: followed by a node name", label, key, key)
				continue
			}
			nodes[j] = e.val
		}
		if nodes[0] == nil || nodes[1] == nil {
			return false
		}
	}
	ok := true
	for j, nn := range nodes {
		name, good := l.text(nn, fmt.Sprintf("a terminal of %s", label), "a node name, such as gnd or out")
		if !good {
			ok = false
			continue
		}
		p.Nodes[j] = name
		l.sawNode(nn, name)
	}
	if ok && p.Nodes[0] == p.Nodes[1] {
		l.errorf(nodes[1], "both terminals of %s are on node `%s`; accepted: two different nodes", label, p.Nodes[0])
	}
	return ok
}

// sawNode records where a node first appears.
func (l *loader) sawNode(n *yaml.Node, name string) {
	if name == Ground {
		l.touchesGround = true
		return
	}
	pos := Pos{n.Line, n.Column}
	if first, ok := l.nodeAt[name]; !ok || before(pos, first) {
		l.nodeAt[name] = pos
	}
}

func before(a, b Pos) bool {
	return a.Line < b.Line || a.Line == b.Line && a.Col < b.Col
}

// collectNodes fills Circuit.Nodes in order of first appearance.
func (l *loader) collectNodes() {
	l.c.Nodes = make([]string, 0, len(l.nodeAt))
	for name := range l.nodeAt {
		l.c.Nodes = append(l.c.Nodes, name)
	}
	sort.Slice(l.c.Nodes, func(i, j int) bool {
		return before(l.nodeAt[l.c.Nodes[i]], l.nodeAt[l.c.Nodes[j]])
	})
}

// diodeModel reads a diode's `model` and checks that it is defined.
func (l *loader) diodeModel(n *yaml.Node, f map[string]entry, keys []string, label string, p *Part) {
	e, ok := f["model"]
	if !ok {
		l.missing(n, "model", keys, "%s has no `model`; accepted: model: followed by the name of one of the diode_models", label)
		return
	}
	name, ok := l.text(e.val, "the model of "+label, "the name of one of the diode_models")
	if !ok {
		return
	}
	p.Model = name
	if _, ok := l.modelAt[name]; ok {
		return
	}
	if len(l.modelAt) == 0 {
		l.errorf(e.val, "%s uses diode model `%s`, but the file defines no diode_models; accepted: a model defined under diode_models", label, name)
		return
	}
	l.errorf(e.val, "%s uses diode model `%s`, which is not defined%s; accepted: %s", label, name, didYouMean(name, l.c.ModelOrder), nameList(l.c.ModelOrder, 12))
}
