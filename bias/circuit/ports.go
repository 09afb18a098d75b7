package circuit

import (
	"fmt"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"
)

var portKeys = []string{"name", "node", "return", "impedance", "coupling", "noise_temperature"}

// ports reads the `ports` list.
func (l *loader) ports(n *yaml.Node) {
	const accepted = "a list of ports, each a mapping such as {name: rf, node: rf, impedance: 50}"
	if n.Kind == yaml.ScalarNode && n.ShortTag() == "!!null" {
		return
	}
	items, ok := l.sequence(n, "`ports`", accepted)
	if !ok {
		return
	}
	for i, item := range items {
		if p, ok := l.port(i, item); ok {
			l.c.Ports = append(l.c.Ports, p)
		} else {
			l.portsComplete = false
		}
	}
}

// port reads one port; ok is false when it could not be read whole.
func (l *loader) port(i int, n *yaml.Node) (p Port, ok bool) {
	p = Port{Return: Ground, Pos: Pos{n.Line, n.Column}}
	label := fmt.Sprintf("port #%d", i+1)
	if nn := lookup(n, "name"); nn != nil {
		if name, good := l.text(nn, "the name of "+label, "a name unique among ports, e.g. rf"); good {
			label = fmt.Sprintf("port `%s`", name)
			p.Name = name
		}
	}
	f := l.fields(n, label, portKeys, nil)
	if n.Kind != yaml.MappingNode {
		return p, false
	}
	ok = true
	if e, has := f["name"]; !has {
		l.missing(n, "name", portKeys, "%s has no `name`; accepted: name: followed by a name unique among ports", label)
		ok = false
	} else if p.Name == "" {
		ok = false
	} else if first, dup := l.portAt[p.Name]; dup {
		l.errorf(e.val, "port name `%s` is already used at line %d; accepted: names unique among ports", p.Name, first.Line)
	} else {
		l.portAt[p.Name] = Pos{e.val.Line, e.val.Column}
		if p.Name == Ground {
			l.errorf(e.val, "a port may not be called `%s`, the reference node's name; accepted: any other name", Ground)
		}
	}

	if e, has := f["node"]; has {
		if name, good := l.portNode(e.val, "`node` of "+label, false); good {
			p.Node = name
		} else {
			ok = false
		}
	} else {
		l.missing(n, "node", portKeys, "%s has no `node`; accepted: node: followed by the node the port connects to", label)
		ok = false
	}
	if e, has := f["return"]; has {
		if name, good := l.portNode(e.val, "`return` of "+label, true); good {
			p.Return = name
			if name == p.Node {
				l.errorf(e.val, "`return` of %s is its `node` `%s`; accepted: a node other than `node`, or no `return` for gnd", label, name)
			}
		} else {
			ok = false
		}
	}
	if e, has := f["impedance"]; has {
		what := "impedance of " + label
		if v, good := l.value(e.val, Resistance, what, positive); good {
			p.Impedance = v
		}
	} else {
		l.missing(n, "impedance", portKeys, "%s has no `impedance`; accepted: impedance: the reference impedance in ohms, e.g. 50", label)
	}
	if e, has := f["coupling"]; has {
		if s, good := l.text(e.val, "`coupling` of "+label, "ac or dc"); good {
			switch s {
			case "ac":
				p.ACCoupled = true
			case "dc":
			default:
				l.errorf(e.val, "`coupling` of %s is `%s`; accepted: ac (kept out of the DC solve) or dc (the default)", label, s)
			}
		}
	}
	if e, has := f["noise_temperature"]; has {
		if t, good := l.noiseTemperature(e.val, "noise_temperature of "+label); good {
			p.NoiseTemperatureK, p.NoiseTemperatureSet = t, true
		}
	}
	if ok && p.Return == Ground {
		l.touchesGround = true
	}
	return p, ok
}

// noiseTemperature reads a port's noise temperature: a temperature written
// as anywhere in the file, or 0K for a noiseless termination. A physical
// temperature must lie above absolute zero; a noise temperature may be
// zero.
func (l *loader) noiseTemperature(n *yaml.Node, what string) (float64, bool) {
	if n.Kind == yaml.ScalarNode {
		if k, ok := strings.CutSuffix(n.Value, "K"); ok {
			if v, err := strconv.ParseFloat(k, 64); err == nil && v == 0 && strings.Trim(k, "+-0.") == "" {
				return 0, true
			}
		}
	}
	return l.quantity(n, Temperature, what)
}

// portNode reads a node a port connects to. It must be a node of some part;
// gnd is allowed only for a return.
func (l *loader) portNode(n *yaml.Node, what string, groundOK bool) (string, bool) {
	name, ok := l.text(n, what, "a node used by a part")
	if !ok {
		return "", false
	}
	if name == Ground {
		if groundOK {
			return name, true
		}
		l.errorf(n, "%s is `%s`, the reference node; accepted: the port's live node, with `return` for the other side", what, Ground)
		return "", false
	}
	return name, l.knownNode(n, name, what)
}

// knownNode checks that name is a node of some part. When a part could not
// be read, an unknown node may belong to it, so nothing is reported.
func (l *loader) knownNode(n *yaml.Node, name, what string) bool {
	if _, ok := l.nodeAt[name]; ok {
		return true
	}
	if l.partsComplete {
		l.errorf(n, "%s is `%s`, which no part connects to%s; accepted: a node of the parts: %s",
			what, name, didYouMean(name, l.c.Nodes), nameList(l.c.Nodes, 12))
	}
	return false
}

// probes reads the `probes` list of node names.
func (l *loader) probes(n *yaml.Node) {
	if n.Kind == yaml.ScalarNode && n.ShortTag() == "!!null" {
		return
	}
	items, ok := l.sequence(n, "`probes`", "a list of node names, e.g. [anode, vout]")
	if !ok {
		return
	}
	seen := map[string]int{}
	for i, item := range items {
		what := fmt.Sprintf("probe #%d", i+1)
		name, ok := l.text(item, what, "a node name")
		if !ok {
			continue
		}
		if first, dup := seen[name]; dup {
			l.errorf(item, "probe `%s` is listed twice, first at line %d; accepted: each node once", name, first)
			continue
		}
		seen[name] = item.Line
		if name == Ground {
			l.errorf(item, "probe `%s` is the reference node, always at zero; accepted: any other node", name)
			continue
		}
		if l.knownNode(item, name, what) {
			l.c.Probes = append(l.c.Probes, name)
		}
	}
}
