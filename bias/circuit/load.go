package circuit

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"unicode/utf8"

	"go.yaml.in/yaml/v3"
)

// MaxFileSize is the largest circuit file accepted, in bytes. A hand-written
// circuit is a few kilobytes; the cap keeps a wrong path (a log, a binary)
// from being read in full.
const MaxFileSize = 1 << 20

// defaultTemperatureK is 27 °C, the temperature the circuit runs at and the
// diode values hold at unless the file says otherwise.
const defaultTemperatureK = 27 + zeroCelsiusK

var topKeys = []string{"name", "temperature", "diode_models", "parts", "ports", "probes", "analysis", "tolerance_groups"}

// Load reads and checks the circuit file at path. Problems in the file come
// back as an ErrorList naming file, line and column of each; a file that
// cannot be read gives the operating system's error, wrapped.
func Load(path string) (*Circuit, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("circuit file: %w", err)
	}
	defer f.Close()
	// Check the size before reading so a huge file is never read whole.
	if st, err := f.Stat(); err == nil && st.Mode().IsRegular() && st.Size() > MaxFileSize {
		return nil, ErrorList{tooLarge(path, st.Size())}
	}
	data, err := io.ReadAll(io.LimitReader(f, MaxFileSize+1))
	if err != nil {
		return nil, fmt.Errorf("circuit file: %w", err)
	}
	return Parse(path, data)
}

// Parse checks the circuit file contents data; file names it in messages.
// It returns the circuit, or an ErrorList with every problem found (up to
// MaxErrors) in file order.
func Parse(file string, data []byte) (*Circuit, error) {
	l := &loader{file: file}
	root := l.document(data)
	if root == nil {
		return nil, finish(l.errs)
	}
	c := l.circuit(root)
	if err := finish(l.errs); err != nil {
		return nil, err
	}
	c.Warnings = append(c.Warnings, plausibility(c, l.written)...)
	sort.SliceStable(c.Warnings, func(i, j int) bool {
		a, b := c.Warnings[i], c.Warnings[j]
		return a.Line < b.Line || a.Line == b.Line && a.Col < b.Col
	})
	return c, nil
}

func tooLarge(file string, size int64) *Error {
	return &Error{File: file, Line: 1, Col: 1,
		Msg: fmt.Sprintf("the file is %d bytes, too large for a circuit file; accepted: up to %d bytes (1 MiB)", size, MaxFileSize)}
}

// loader holds the state of one Parse: the problems found so far and the
// names seen, so that later sections can check references to earlier ones.
type loader struct {
	file string
	errs []*Error
	c    *Circuit
	// written keeps the part and model values as the file wrote them,
	// for the plausibility cautions.
	written []written

	// nodeAt is the first place each node other than gnd appears in parts.
	nodeAt map[string]Pos
	// touchesGround tells whether some part or port connects to gnd. A
	// port counts: a two-port of series parts between ports returned to
	// gnd is a whole circuit.
	touchesGround bool
	// partsComplete is false when some part could not be read far enough
	// to know its kind and both terminals; topology and node references
	// are then not checked, as they would report the damage again.
	partsComplete bool
	portsComplete bool

	partAt   map[string]Pos  // part name -> where it is named
	partKind map[string]Kind // part name -> kind, for parts whose type is known
	modelAt  map[string]Pos  // diode model name -> where it is named
	portAt   map[string]Pos  // port name -> where it is named

	tolerances *toleranceState // spreads read so far (tolerance.go)
	// distributed is what the lines and blocks read so far need
	// (distributed.go).
	distributed *distributedState
}

// errorf records a problem at node n.
func (l *loader) errorf(n *yaml.Node, format string, args ...any) {
	l.errs = append(l.errs, &Error{File: l.file, Line: n.Line, Col: n.Column, Msg: fmt.Sprintf(format, args...)})
}

// wrapf records a problem at node n caused by err.
func (l *loader) wrapf(n *yaml.Node, err error, format string, args ...any) {
	l.errs = append(l.errs, &Error{File: l.file, Line: n.Line, Col: n.Column,
		Msg: fmt.Sprintf(format, args...) + ": " + err.Error(), Err: err})
}

func (l *loader) errorAt(line, col int, format string, args ...any) {
	l.errs = append(l.errs, &Error{File: l.file, Line: line, Col: col, Msg: fmt.Sprintf(format, args...)})
}

// yamlLine picks the line number out of the YAML reader's messages.
var yamlLine = regexp.MustCompile(`^yaml: line (\d+): (.*)$`)

// document checks the raw bytes and the YAML layer and returns the
// top-level mapping, or nil after recording why there is none.
func (l *loader) document(data []byte) *yaml.Node {
	if len(data) > MaxFileSize {
		l.errs = append(l.errs, tooLarge(l.file, int64(len(data))))
		return nil
	}
	if len(bytes.TrimSpace(data)) == 0 {
		l.errorAt(1, 1, "the file is empty; accepted: a YAML mapping with at least `parts`")
		return nil
	}
	if !utf8.Valid(data) {
		line, col := firstInvalidUTF8(data)
		l.errorAt(line, col, "the file is not valid UTF-8 text; accepted: UTF-8 text (save the file as UTF-8)")
		return nil
	}
	if line, col, r, found := firstControl(data); found {
		l.errorAt(line, col, "the file holds the control character U+%04X here; accepted: printable text, tabs and line breaks", r)
		return nil
	}
	doc, err := decodeOne(data)
	if err != nil {
		var second *secondDocument
		switch {
		case errors.As(err, &second):
			l.errorAt(second.line, second.col, "a second YAML document starts here; accepted: one document per circuit file")
		case errors.Is(err, io.EOF):
			l.errorAt(1, 1, "the file holds only comments; accepted: a YAML mapping with at least `parts`")
		default:
			l.yamlError(err)
		}
		return nil
	}
	if l.rejectAnchors(doc) || l.rejectLong(doc) {
		return nil
	}
	root := doc
	if doc.Kind == yaml.DocumentNode {
		if len(doc.Content) == 0 {
			l.errorAt(1, 1, "the file holds no YAML content; accepted: a YAML mapping with at least `parts`")
			return nil
		}
		root = doc.Content[0]
	}
	if root.Kind != yaml.MappingNode {
		l.errorf(root, "the top level is %s, not a mapping; accepted: keys such as `parts:` and `diode_models:` at the start of lines", kindName(root))
		return nil
	}
	return root
}

// yamlError records a syntax error from the YAML reader at the line it
// names, or at the start of the file when it names none.
func (l *loader) yamlError(err error) {
	msg := err.Error()
	line := 1
	if m := yamlLine.FindStringSubmatch(msg); m != nil {
		if n, convErr := strconv.Atoi(m[1]); convErr == nil && n > 0 {
			line = n
		}
		msg = m[2]
	} else {
		msg = strings.TrimPrefix(msg, "yaml: ")
	}
	l.errs = append(l.errs, &Error{File: l.file, Line: line, Col: 1, Err: err,
		Msg: "not valid YAML: " + msg + "; check the indentation, colons and quotes on this line and the one before"})
}

// secondDocument reports that the input holds more than one YAML document.
type secondDocument struct{ line, col int }

func (e *secondDocument) Error() string { return "more than one YAML document" }

// decodeOne reads exactly one YAML document into a node tree. The YAML
// reader is guarded: a panic inside it becomes an error, as the loader must
// answer every input with a message.
func decodeOne(data []byte) (doc *yaml.Node, err error) {
	defer func() {
		if r := recover(); r != nil {
			doc, err = nil, fmt.Errorf("yaml: the YAML reader failed: %v", r)
		}
	}()
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var first yaml.Node
	if err := dec.Decode(&first); err != nil {
		return nil, err
	}
	var next yaml.Node
	switch err := dec.Decode(&next); {
	case errors.Is(err, io.EOF):
		return &first, nil
	case err != nil:
		return nil, err
	}
	line, col := next.Line, next.Column
	if len(next.Content) > 0 {
		line, col = next.Content[0].Line, next.Content[0].Column
	}
	return nil, &secondDocument{line, col}
}

// rejectAnchors reports every anchor and alias. They would let one entry
// stand for another, so a message could no longer point at the place where
// a value is written.
func (l *loader) rejectAnchors(n *yaml.Node) bool {
	found := false
	var walk func(*yaml.Node)
	walk = func(n *yaml.Node) {
		switch {
		case n.Kind == yaml.AliasNode:
			l.errorf(n, "alias `*%s`: anchors and aliases are not accepted; accepted: each value written out where it is used", n.Value)
			found = true
			return
		case n.Anchor != "":
			l.errorf(n, "anchor `&%s`: anchors and aliases are not accepted; accepted: each value written out where it is used", n.Anchor)
			found = true
		}
		for _, c := range n.Content {
			walk(c)
		}
	}
	walk(n)
	return found
}

// MaxScalarLength is the most characters one key, name or value may have.
// The loader quotes what it reads in its messages; the bound keeps a
// runaway value (a pasted data column, a missing quote) from filling the
// terminal, and keeps the cost of reading a number linear.
const MaxScalarLength = 1000

// rejectLong reports every key or value longer than MaxScalarLength
// characters, without quoting it.
func (l *loader) rejectLong(n *yaml.Node) bool {
	found := false
	var walk func(*yaml.Node)
	walk = func(n *yaml.Node) {
		if n.Kind == yaml.ScalarNode {
			if c := utf8.RuneCountInString(n.Value); c > MaxScalarLength {
				l.errorf(n, "this key or value is %d characters long; accepted: keys, names and values of up to %d characters", c, MaxScalarLength)
				found = true
			}
		}
		for _, c := range n.Content {
			walk(c)
		}
	}
	walk(n)
	return found
}

// firstInvalidUTF8 returns the line and column (in characters) of the first
// byte that is not valid UTF-8.
func firstInvalidUTF8(data []byte) (line, col int) {
	line, col = 1, 1
	for len(data) > 0 {
		r, size := utf8.DecodeRune(data)
		if r == utf8.RuneError && size <= 1 {
			return line, col
		}
		if r == '\n' {
			line, col = line+1, 1
		} else {
			col++
		}
		data = data[size:]
	}
	return line, col
}

// firstControl finds the first character the YAML reader refuses (YAML
// 1.2, 5.1: the printable set is tab, line feed, carriage return, x20-x7E,
// x85, xA0-xD7FF, xE000-xFFFD and x10000-x10FFFF) and returns its line and
// column, so that the message can point at it; the reader's own message
// names no place. data must be valid UTF-8.
func firstControl(data []byte) (line, col int, r rune, found bool) {
	line, col = 1, 1
	for _, r := range string(data) {
		switch {
		case r == '\n':
			line, col = line+1, 1
			continue
		case r == '\t', r == '\r', r >= 0x20 && r <= 0x7E, r == 0x85,
			r >= 0xA0 && r <= 0xD7FF, r >= 0xE000 && r <= 0xFFFD, r >= 0x10000 && r <= 0x10FFFF:
		default:
			return line, col, r, true
		}
		col++
	}
	return 0, 0, 0, false
}

// circuit reads the top-level mapping. Sections are read in the order their
// references need (models before the parts that use them, parts before
// ports, probes and analysis), whatever their order in the file.
func (l *loader) circuit(root *yaml.Node) *Circuit {
	l.c = &Circuit{File: l.file, TemperatureK: defaultTemperatureK, Models: map[string]*Model{}}
	l.nodeAt = map[string]Pos{}
	l.partAt = map[string]Pos{}
	l.partKind = map[string]Kind{}
	l.modelAt = map[string]Pos{}
	l.portAt = map[string]Pos{}
	l.partsComplete, l.portsComplete = true, true

	top := l.fields(root, "the circuit file", topKeys, nil)
	if e, ok := top["name"]; ok {
		if s, ok := l.text(e.val, "`name`", "free text naming the circuit"); ok {
			l.c.Name = s
		}
	}
	if e, ok := top["temperature"]; ok {
		if t, ok := l.quantity(e.val, Temperature, "`temperature`"); ok {
			l.c.TemperatureK = t
		}
	}
	if e, ok := top["diode_models"]; ok {
		l.models(e.val)
	}
	if e, ok := top["parts"]; ok {
		l.parts(e.val)
	} else {
		l.errorf(root, "the circuit file has no `parts`; accepted: a list of parts under `parts:`, e.g. - {type: resistor, name: R1, between: [a, gnd], value: 1k}")
		l.partsComplete = false
	}
	l.collectNodes()
	if e, ok := top["tolerance_groups"]; ok {
		l.resolveTolerances(&e)
	} else {
		l.resolveTolerances(nil)
	}
	if e, ok := top["ports"]; ok {
		l.ports(e.val)
	}
	if e, ok := top["probes"]; ok {
		l.probes(e.val)
	}
	if e, ok := top["analysis"]; ok {
		l.analysis(e.val)
	}
	l.resolveOpenEnds()
	if e, ok := top["parts"]; ok && l.partsComplete && l.portsComplete {
		l.topology(e.key)
		l.wiring()
	}
	return l.c
}

func kindName(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "a mapping"
	case yaml.SequenceNode:
		return "a list"
	case yaml.ScalarNode:
		if n.ShortTag() == "!!null" {
			return "empty"
		}
		return "a single value"
	case yaml.AliasNode:
		return "an alias"
	}
	return "not a value"
}
