package circuit

import (
	"bytes"
	"fmt"
	"slices"
	"strings"
	"unicode/utf8"

	"go.yaml.in/yaml/v3"
)

// ModelKey is a numeric key of a diode model, the KEY of a `MODEL.KEY`
// target, and the quantity it holds.
type ModelKey struct {
	Name     string
	Quantity Quantity
}

// ModelKeys lists the numeric keys of a diode model in the order the
// format page gives them.
func ModelKeys() []ModelKey {
	out := make([]ModelKey, len(modelKeys))
	for i, mk := range modelKeys {
		out[i] = ModelKey{mk.key, mk.q}
	}
	return out
}

// Edit sets one value of a circuit file. Target is `temperature`,
// `PART.value` or `MODEL.KEY` (the grammar of WithOverride), or
// `analysis.distortion.KEY` for a key of the distortion defaults (input,
// output, frequency, level, second_tone). Text is the value as it is to be
// written, e.g. `100k` or `-20dBm`.
type Edit struct {
	Target, Text string
}

// Rewrite returns the circuit file src (named file in messages) with the
// edits applied to its text, so that everything else in it — comments,
// layout, the order of keys, the way other values are written — stays as
// it was. A value the file writes is replaced where it stands; a model
// key, the temperature or a distortion default the file leaves out is
// added to its mapping (in the mapping's own style, block or flow), and a
// missing `analysis.distortion` block is added whole.
//
// The result is read back with Parse, and Rewrite fails unless it loads
// and every edited target reads back as its edit's text reads: the text it
// returns is one the loader takes, with the values asked for.
func Rewrite(file string, src []byte, edits []Edit) ([]byte, error) {
	doc, err := decodeOne(src)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", file, err)
	}
	root := doc
	if doc.Kind == yaml.DocumentNode && len(doc.Content) > 0 {
		root = doc.Content[0]
	}
	if root.Kind != yaml.MappingNode {
		return nil, fmt.Errorf("%s: the top level is not a mapping", file)
	}
	rw := &rewriter{src: src}
	var distortion []kv
	for _, e := range lastEdits(edits) {
		if strings.ContainsAny(e.Text, "\n\r") || e.Text == "" {
			return nil, fmt.Errorf("%s: the value for %s is %q; accepted: one line of text", file, e.Target, e.Text)
		}
		switch target := e.Target; {
		case target == "temperature":
			rw.set(root, "temperature", e.Text, "name")
		case strings.HasPrefix(target, "analysis.distortion."):
			key := strings.TrimPrefix(target, "analysis.distortion.")
			if !contains(distortionKeys, key) {
				return nil, fmt.Errorf("%s: %s is not a distortion default; accepted: analysis.distortion.%s", file, target, strings.Join(distortionKeys, ", analysis.distortion."))
			}
			distortion = append(distortion, kv{key, e.Text})
		default:
			dot := strings.LastIndexByte(target, '.')
			if dot <= 0 {
				return nil, fmt.Errorf("%s: `%s` is not a target; accepted: temperature, PART.value, MODEL.KEY or analysis.distortion.KEY", file, target)
			}
			owner, key := target[:dot], target[dot+1:]
			if part := findPart(root, owner); part != nil && key == "value" {
				rw.set(part, "value", e.Text)
				continue
			}
			model := mappingAt(root, "diode_models", owner)
			if model == nil || findModelKey(key) == nil {
				return nil, fmt.Errorf("%s: `%s` names no part value or diode-model key in the file", file, target)
			}
			rw.set(model, key, e.Text)
		}
		if rw.err != nil {
			return nil, fmt.Errorf("%s: %w", file, rw.err)
		}
	}
	if len(distortion) > 0 {
		rw.setSection(root, distortion)
	}
	if rw.err != nil {
		return nil, fmt.Errorf("%s: %w", file, rw.err)
	}
	out := rw.apply()
	if err := checkRewrite(file, out, edits); err != nil {
		return nil, err
	}
	return out, nil
}

// lastEdits returns edits with only the last edit of each target kept,
// in the order the targets were first edited.
func lastEdits(edits []Edit) []Edit {
	at := map[string]int{}
	var out []Edit
	for _, e := range edits {
		if i, ok := at[e.Target]; ok {
			out[i] = e
			continue
		}
		at[e.Target] = len(out)
		out = append(out, e)
	}
	return out
}

// kv is a key and the text of its value.
type kv struct{ key, text string }

// splice replaces src[from:to] with text.
type splice struct {
	from, to int
	text     string
	order    int // keeps insertions at one place in the order they were made
}

// rewriter collects the splices of a rewrite.
type rewriter struct {
	src     []byte
	splices []splice
	err     error
}

// set writes key: text into mapping m: the value where it stands, or a
// new entry, placed after the entry of the key after when m has it.
func (rw *rewriter) set(m *yaml.Node, key, text string, after ...string) {
	if rw.err != nil {
		return
	}
	for i := 0; i+1 < len(m.Content); i += 2 {
		if m.Content[i].Value != key {
			continue
		}
		v := m.Content[i+1]
		from, to, err := rw.scalarSpan(v)
		if err != nil {
			rw.err = fmt.Errorf("line %d: %w", v.Line, err)
			return
		}
		rw.add(from, to, scalarText(text))
		return
	}
	before := 0
	for i := 0; i+3 < len(m.Content) && len(after) > 0; i += 2 {
		if m.Content[i].Value == after[0] {
			before = i + 2
		}
	}
	rw.insertBefore(m, before, []kv{{key, text}})
}

// insert adds entries to mapping m: after the opening brace of a flow
// mapping, or as lines before the first key of a block mapping, indented
// as that key is.
func (rw *rewriter) insert(m *yaml.Node, entries []kv) { rw.insertBefore(m, 0, entries) }

// insertBefore is insert placing the lines of a block mapping before its
// key m.Content[before].
func (rw *rewriter) insertBefore(m *yaml.Node, before int, entries []kv) {
	if m.Kind != yaml.MappingNode {
		rw.err = fmt.Errorf("line %d: not a mapping", m.Line)
		return
	}
	if m.Style&yaml.FlowStyle != 0 {
		at, ok := rw.offset(m.Line, m.Column)
		if !ok || at >= len(rw.src) || rw.src[at] != '{' {
			rw.err = fmt.Errorf("line %d: cannot find the mapping's opening brace", m.Line)
			return
		}
		var b strings.Builder
		for _, e := range entries {
			fmt.Fprintf(&b, "%s: %s, ", e.key, scalarText(e.text))
		}
		text := b.String()
		if len(m.Content) == 0 {
			text = strings.TrimSuffix(text, ", ")
		}
		rw.add(at+1, at+1, text)
		return
	}
	if len(m.Content) == 0 {
		rw.err = fmt.Errorf("line %d: an empty block mapping", m.Line)
		return
	}
	first := m.Content[before]
	at, ok := rw.offset(first.Line, 1)
	if !ok {
		rw.err = fmt.Errorf("line %d: cannot find the line", first.Line)
		return
	}
	lineStart := at
	keyAt, _ := rw.offset(first.Line, first.Column)
	if strings.TrimLeft(string(rw.src[lineStart:keyAt]), " ") != "" {
		// The first key shares its line with something before it (a
		// sequence dash): no room for a line of its own.
		rw.err = fmt.Errorf("line %d: a block mapping that does not start its own line", first.Line)
		return
	}
	indent := strings.Repeat(" ", first.Column-1)
	var b strings.Builder
	for _, e := range entries {
		fmt.Fprintf(&b, "%s%s: %s\n", indent, e.key, scalarText(e.text))
	}
	rw.add(lineStart, lineStart, b.String())
}

// setSection writes the distortion defaults: into analysis.distortion
// where the file has one, else as a new `distortion` entry of `analysis`,
// else as a new `analysis` block at the end of the file.
func (rw *rewriter) setSection(root *yaml.Node, entries []kv) {
	if d := mappingAt(root, "analysis", "distortion"); d != nil {
		for _, e := range entries {
			rw.set(d, e.key, e.text)
		}
		return
	}
	var b strings.Builder
	b.WriteString("{")
	for i, e := range entries {
		if i > 0 {
			b.WriteString(", ")
		}
		fmt.Fprintf(&b, "%s: %s", e.key, scalarText(e.text))
	}
	b.WriteString("}")
	if a := mappingAt(root, "analysis"); a != nil {
		rw.insert(a, []kv{{"distortion", b.String()}})
		return
	}
	if mappingValue(root, "analysis") != nil {
		rw.err = fmt.Errorf("`analysis` is not a mapping")
		return
	}
	text := "\nanalysis:\n  distortion: " + b.String() + "\n"
	if len(rw.src) > 0 && rw.src[len(rw.src)-1] != '\n' {
		text = "\n" + text
	}
	rw.add(len(rw.src), len(rw.src), text)
}

func (rw *rewriter) add(from, to int, text string) {
	rw.splices = append(rw.splices, splice{from, to, text, len(rw.splices)})
}

// apply returns the source with every splice made.
func (rw *rewriter) apply() []byte {
	ss := slices.Clone(rw.splices)
	slices.SortStableFunc(ss, func(a, b splice) int {
		if a.from != b.from {
			return a.from - b.from
		}
		return a.order - b.order
	})
	var out bytes.Buffer
	at := 0
	for _, s := range ss {
		out.Write(rw.src[at:s.from])
		out.WriteString(s.text)
		at = s.to
	}
	out.Write(rw.src[at:])
	return out.Bytes()
}

// offset returns the byte offset of line and column (1-based, the column
// counted in characters as the YAML reader counts them).
func (rw *rewriter) offset(line, col int) (int, bool) {
	at := 0
	for l := 1; l < line; l++ {
		i := bytes.IndexByte(rw.src[at:], '\n')
		if i < 0 {
			return 0, false
		}
		at += i + 1
	}
	for c := 1; c < col; c++ {
		if at >= len(rw.src) || rw.src[at] == '\n' {
			return 0, false
		}
		_, size := utf8.DecodeRune(rw.src[at:])
		at += size
	}
	return at, true
}

// scalarSpan returns the byte span of the scalar v as the file writes it:
// a plain scalar on one line, or a single- or double-quoted one.
func (rw *rewriter) scalarSpan(v *yaml.Node) (int, int, error) {
	if v.Kind != yaml.ScalarNode {
		return 0, 0, fmt.Errorf("the value is not a scalar")
	}
	from, ok := rw.offset(v.Line, v.Column)
	if !ok {
		return 0, 0, fmt.Errorf("cannot find the value")
	}
	src := rw.src
	switch {
	case v.Style&yaml.DoubleQuotedStyle != 0:
		for i := from + 1; i < len(src) && src[i] != '\n'; i++ {
			switch src[i] {
			case '\\':
				i++
			case '"':
				return from, i + 1, nil
			}
		}
	case v.Style&yaml.SingleQuotedStyle != 0:
		for i := from + 1; i < len(src) && src[i] != '\n'; i++ {
			if src[i] == '\'' {
				if i+1 < len(src) && src[i+1] == '\'' {
					i++
					continue
				}
				return from, i + 1, nil
			}
		}
	case v.Style&(yaml.LiteralStyle|yaml.FoldedStyle) == 0:
		if bytes.HasPrefix(src[from:], []byte(v.Value)) && !bytes.ContainsAny([]byte(v.Value), "\n") {
			return from, from + len(v.Value), nil
		}
	}
	return 0, 0, fmt.Errorf("the value `%s` is not written on one line", v.Value)
}

// scalarText writes text as a YAML scalar: plain where YAML reads it back
// as the same string, else double-quoted. A flow mapping written by
// setSection passes through unchanged.
func scalarText(text string) string {
	if strings.HasPrefix(text, "{") && strings.HasSuffix(text, "}") {
		return text
	}
	var probe struct {
		V string `yaml:"v"`
	}
	if err := yaml.Unmarshal([]byte("v: "+text), &probe); err == nil && probe.V == text && !strings.ContainsAny(text, "{}[],#&*!|>'\"%@`") {
		return text
	}
	var b strings.Builder
	b.WriteByte('"')
	for _, r := range text {
		switch {
		case r == '"' || r == '\\':
			b.WriteByte('\\')
			b.WriteRune(r)
		case r < 0x20:
			fmt.Fprintf(&b, "\\x%02x", r)
		default:
			b.WriteRune(r)
		}
	}
	b.WriteByte('"')
	return b.String()
}

// mappingValue returns the value of key in mapping m, or nil.
func mappingValue(m *yaml.Node, key string) *yaml.Node {
	if m == nil || m.Kind != yaml.MappingNode {
		return nil
	}
	for i := 0; i+1 < len(m.Content); i += 2 {
		if m.Content[i].Value == key {
			return m.Content[i+1]
		}
	}
	return nil
}

// mappingAt follows keys down from m and returns the mapping found there,
// or nil.
func mappingAt(m *yaml.Node, keys ...string) *yaml.Node {
	for _, k := range keys {
		m = mappingValue(m, k)
	}
	if m == nil || m.Kind != yaml.MappingNode {
		return nil
	}
	return m
}

// findPart returns the mapping of the part named name in `parts`, or nil.
func findPart(root *yaml.Node, name string) *yaml.Node {
	parts := mappingValue(root, "parts")
	if parts == nil || parts.Kind != yaml.SequenceNode {
		return nil
	}
	for _, p := range parts.Content {
		if n := mappingValue(p, "name"); n != nil && n.Value == name && p.Kind == yaml.MappingNode {
			return p
		}
	}
	return nil
}

// checkRewrite loads the rewritten file and checks that every edited
// target reads as its edit's text (the last edit of a target wins).
func checkRewrite(file string, out []byte, edits []Edit) error {
	c, err := Parse(file, out)
	if err != nil {
		return fmt.Errorf("the rewritten file does not load: %w", err)
	}
	last := map[string]string{}
	for _, e := range edits {
		last[e.Target] = e.Text
	}
	for target, text := range last {
		var want, got float64
		switch {
		case target == "analysis.distortion.level":
			lv, err := ParseLevel(text)
			if err != nil {
				return fmt.Errorf("%s: %w", target, err)
			}
			d := c.Analysis.Distortion.Level
			if lv != d {
				return fmt.Errorf("%s: the rewritten file reads %+v, not %s", target, d, text)
			}
			continue
		case target == "analysis.distortion.frequency", target == "analysis.distortion.second_tone":
			if want, err = ParseValue(text, Frequency); err != nil {
				return fmt.Errorf("%s: %w", target, err)
			}
			got = c.Analysis.Distortion.FrequencyHz
			if strings.HasSuffix(target, "second_tone") {
				got = c.Analysis.Distortion.SecondToneHz
			}
		case strings.HasPrefix(target, "analysis.distortion."):
			d := c.Analysis.Distortion
			if got := map[string]string{"input": d.Input, "output": d.Output}[strings.TrimPrefix(target, "analysis.distortion.")]; got != text {
				return fmt.Errorf("%s: the rewritten file reads %q, not %q", target, got, text)
			}
			continue
		default:
			v, err := c.ResolveVary(target)
			if err != nil {
				return fmt.Errorf("%s: %w", target, err)
			}
			if want, err = ParseValue(text, v.Quantity); err != nil {
				return fmt.Errorf("%s: %w", target, err)
			}
			got = v.Value(c)
		}
		if got != want {
			return fmt.Errorf("%s: the rewritten file reads %g, not %s", target, got, text)
		}
	}
	return nil
}
