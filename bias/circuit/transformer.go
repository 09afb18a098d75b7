package circuit

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"
)

// Transformer is a transformer of the circuit file: magnetically coupled
// windings. The circuit holds each winding as an inductor among Parts,
// named after the transformer (`T1.primary`, `T1.secondary`, or
// `T1.secondary_1` and `T1.secondary_2` for the two halves of a
// centre-tapped secondary), and the coupling between windings as
// Couplings, so that every analysis that stamps inductors stamps the
// windings (a short at DC) and the small-signal network adds their mutual
// inductances.
//
// Given as inductances [L1, L2] and a coupling k, the mutual inductance
// is M = k sqrt(L1 L2); given as a turns ratio N (secondary turns per
// primary turn) and a magnetising inductance L_m, the windings are
// L1 = L_m and L2 = N² L_m with k = 1 (unless a coupling is given): an
// ideal transformer in parallel with L_m, which shows a load R across
// the secondary as R/N² at the primary. A centre tap splits the
// secondary into two equal halves of L2/4 each, perfectly coupled to
// each other and coupled to the primary by k, so that the whole
// secondary is the winding it would be without the tap. Dots are at the
// first terminal of each winding.
type Transformer struct {
	Name     string
	Windings []string // the windings' part names, primary first
	// Coupling is the primary-secondary coupling k.
	Coupling float64
	// TurnsRatio is N when the file gave turns_ratio, else zero.
	TurnsRatio float64
	Pos        Pos
}

// Coupling is the magnetic coupling between two windings, the inductors
// named A and B: mutual inductance M = K sqrt(L_A L_B), dots at each
// winding's first terminal, so that a current entering A's first
// terminal raises B's first terminal by jωM times it.
type Coupling struct {
	Transformer string
	A, B        string
	K           float64
}

// TransformerType is the part type of a transformer in the circuit file.
const TransformerType = "transformer"

var transformerKeys = []string{"type", "name", "primary", "secondary", "centre_tap", "inductances", "coupling", "turns_ratio", "magnetising_inductance"}

// maxTurnsRatio bounds a turns ratio either way: 1/1000 to 1000.
const maxTurnsRatio = 1000

// isTransformer reports whether part n is written as a transformer.
func isTransformer(n *yaml.Node) bool {
	if n.Kind != yaml.MappingNode {
		return false
	}
	t := lookup(n, "type")
	return t != nil && t.Kind == yaml.ScalarNode && t.Value == TransformerType
}

// transformer reads transformer #i into its windings (Parts), their
// couplings and the Transformer record. It reports whether its windings'
// terminals are all known, which the topology checks need.
func (l *loader) transformer(i int, n *yaml.Node) bool {
	label := fmt.Sprintf("transformer #%d", i+1)
	tr := Transformer{Pos: Pos{n.Line, n.Column}}
	nn := lookup(n, "name")
	if nn != nil {
		if name, ok := l.text(nn, "the name of "+label, "a name unique among parts, e.g. T1"); ok {
			tr.Name = name
			l.partName(nn, name)
			label = fmt.Sprintf("transformer `%s`", name)
		}
	}
	f := l.fields(n, label, transformerKeys, nil)
	if nn == nil {
		l.missing(n, "name", transformerKeys, "%s has no `name`; accepted: a name unique among parts, e.g. name: T1", label)
	}
	complete := true
	pair := func(key string) ([2]string, bool) {
		const accepted = "two node names, e.g. [lo, gnd]"
		e, ok := f[key]
		if !ok {
			l.missing(n, key, transformerKeys, "%s has no `%s`; accepted: %s: [NODE, NODE], %s", label, key, key, accepted)
			return [2]string{}, false
		}
		items, ok := l.sequence(e.val, fmt.Sprintf("`%s` of %s", key, label), accepted)
		if !ok {
			return [2]string{}, false
		}
		if len(items) != 2 {
			l.errorf(e.val, "`%s` of %s lists %d nodes; accepted: %s", key, label, len(items), accepted)
			return [2]string{}, false
		}
		var out [2]string
		good := true
		for j, it := range items {
			name, ok := l.text(it, fmt.Sprintf("a terminal of the %s winding of %s", key, label), "a node name, such as gnd or lo")
			if !ok {
				good = false
				continue
			}
			out[j] = name
			l.sawNode(it, name)
		}
		if good && out[0] == out[1] {
			l.errorf(items[1], "both terminals of the %s winding of %s are on node `%s`; accepted: two different nodes", key, label, out[0])
		}
		return out, good
	}
	primary, ok := pair("primary")
	complete = complete && ok
	secondary, ok := pair("secondary")
	complete = complete && ok
	tap := ""
	if e, has := f["centre_tap"]; has {
		if name, ok := l.text(e.val, "`centre_tap` of "+label, "a node name, the secondary's middle"); ok {
			tap = name
			l.sawNode(e.val, name)
			if name == secondary[0] || name == secondary[1] {
				l.errorf(e.val, "`centre_tap` of %s is node `%s`, an end of the secondary; accepted: a node of its own between the secondary's ends", label, name)
				complete = false
			}
		} else {
			complete = false
		}
	}

	// The values: inductances with a coupling, or a turns ratio with a
	// magnetising inductance.
	var l1, l2 float64
	k := 1.0
	_, hasInd := f["inductances"]
	_, hasRatio := f["turns_ratio"]
	_, hasMag := f["magnetising_inductance"]
	const forms = "either inductances: [L1, L2] with coupling: k, or turns_ratio: N with magnetising_inductance: L"
	valuesOK := true
	switch {
	case hasInd && (hasRatio || hasMag):
		key := "turns_ratio"
		if !hasRatio {
			key = "magnetising_inductance"
		}
		l.errorf(f[key].key, "%s gives both `inductances` and `%s`; accepted: %s", label, key, forms)
		valuesOK = false
	case hasInd:
		e := f["inductances"]
		const accepted = "two inductances, the primary's and the secondary's, e.g. [100nH, 400nH]"
		items, ok := l.sequence(e.val, "`inductances` of "+label, accepted)
		if ok && len(items) != 2 {
			l.errorf(e.val, "`inductances` of %s lists %d values; accepted: %s", label, len(items), accepted)
			ok = false
		}
		if ok {
			var good1, good2 bool
			l1, good1 = l.value(items[0], Inductance, "the primary inductance of "+label, positive)
			l2, good2 = l.value(items[1], Inductance, "the secondary inductance of "+label, positive)
			ok = good1 && good2
		}
		valuesOK = ok
		if _, has := f["coupling"]; !has {
			l.missing(n, "coupling", transformerKeys, "%s gives `inductances` but no `coupling`; accepted: coupling: k, above 0 and at most 1, e.g. 0.98 or 98%%", label)
			valuesOK = false
		}
	case hasRatio || hasMag:
		if !hasRatio || !hasMag {
			want := "turns_ratio"
			if !hasMag {
				want = "magnetising_inductance"
			}
			l.missing(n, want, transformerKeys, "%s has no `%s`; accepted: %s", label, want, forms)
			valuesOK = false
			break
		}
		nr, good := l.value(f["turns_ratio"].val, Dimensionless, "`turns_ratio` of "+label, positive)
		if good && (nr > maxTurnsRatio || nr < 1.0/maxTurnsRatio) {
			l.errorf(f["turns_ratio"].val, "`turns_ratio` of %s is `%s`; accepted: 0.001 to 1000 secondary turns per primary turn", label, f["turns_ratio"].val.Value)
			good = false
		}
		lm, goodM := l.value(f["magnetising_inductance"].val, Inductance, "`magnetising_inductance` of "+label, positive)
		valuesOK = good && goodM
		tr.TurnsRatio = nr
		l1, l2 = lm, nr*nr*lm
		if valuesOK && outOfSpan(l2, Inductance) != "" {
			l.errorf(f["turns_ratio"].val, "%s: the secondary's inductance N² L_m is %.4g H; accepted: %s", label, l2, spans[Inductance].words)
			valuesOK = false
		}
	default:
		l.errorf(n, "%s has neither `inductances` nor `turns_ratio`; accepted: %s", label, forms)
		valuesOK = false
	}
	if e, has := f["coupling"]; has {
		v, ok := l.couplingValue(e.val, label)
		k, valuesOK = v, valuesOK && ok
	}
	tr.Coupling = k
	if tr.Name == "" || !valuesOK {
		// Without its windings the topology would be judged wrongly:
		// the error already says what is wrong.
		return false
	}

	// The windings, as inductors named after the transformer.
	winding := func(suffix string, nodes [2]string, value float64) string {
		name := tr.Name + "." + suffix
		if first, dup := l.partAt[name]; dup {
			l.errorf(nn, "%s's winding is named `%s`, a name already used at line %d; accepted: names unique among parts", label, name, first.Line)
		}
		l.partAt[name] = tr.Pos
		l.partKind[name] = Inductor
		l.c.Parts = append(l.c.Parts, Part{Kind: Inductor, Name: name, Nodes: nodes, Value: value, Pos: tr.Pos})
		tr.Windings = append(tr.Windings, name)
		return name
	}
	if !complete {
		return false
	}
	p := winding("primary", primary, l1)
	if tap == "" {
		s := winding("secondary", secondary, l2)
		l.c.Couplings = append(l.c.Couplings, Coupling{Transformer: tr.Name, A: p, B: s, K: k})
	} else {
		s1 := winding("secondary_1", [2]string{secondary[0], tap}, l2/4)
		s2 := winding("secondary_2", [2]string{tap, secondary[1]}, l2/4)
		l.c.Couplings = append(l.c.Couplings,
			Coupling{Transformer: tr.Name, A: p, B: s1, K: k},
			Coupling{Transformer: tr.Name, A: p, B: s2, K: k},
			Coupling{Transformer: tr.Name, A: s1, B: s2, K: 1})
	}
	l.c.Transformers = append(l.c.Transformers, tr)
	return true
}

// couplingValue reads a coupling coefficient: a number, or a percentage,
// above 0 and at most 1.
func (l *loader) couplingValue(n *yaml.Node, label string) (float64, bool) {
	const accepted = "a coupling coefficient above 0 and at most 1, e.g. 0.98 or 98%"
	s, ok := l.scalarText(n, "`coupling` of "+label, accepted)
	if !ok {
		return 0, false
	}
	scale := 1.0
	if num, pct := strings.CutSuffix(strings.TrimSpace(s), "%"); pct {
		s, scale = num, 0.01
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		l.errorf(n, "`coupling` of %s is `%s`, which is not a number; accepted: %s", label, n.Value, accepted)
		return 0, false
	}
	v *= scale
	if !(v > 0 && v <= 1) {
		l.errorf(n, "`coupling` of %s is `%s`, which is outside 0 < k ≤ 1; accepted: %s", label, n.Value, accepted)
		return 0, false
	}
	return v, true
}

// MutualInductance returns M = K sqrt(L_A L_B) for the windings' values
// la and lb.
func (c Coupling) MutualInductance(la, lb float64) float64 {
	return c.K * math.Sqrt(la*lb)
}
