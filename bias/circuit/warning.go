package circuit

import (
	"fmt"
	"strings"
	"unicode"
)

// Warning is something the loader found legal but probably not meant: the
// circuit loads and solves, and the warning says what to look at, where.
type Warning struct {
	File      string
	Line, Col int
	Kind      WarningKind
	Message   string
}

func (w Warning) String() string {
	return fmt.Sprintf("%s:%d:%d: %s", w.File, w.Line, w.Col, w.Message)
}

// WarningKind classifies a loader Warning.
type WarningKind int

const (
	// GroundLookalike: a node whose name differs from `gnd` only by
	// letter case, spaces or invisible characters is an ordinary node,
	// not the reference.
	GroundLookalike WarningKind = iota
	// Dangling: a node with a single terminal on it, which carries no
	// current: usually a misspelt node name.
	Dangling
	// Implausible: a value that is legal but far from what the circuit
	// can mean (a 10 F capacitor in a GHz circuit): likely a slip of the
	// prefix; the message names the value likely meant (plausible.go).
	Implausible
	// NotPassive: a measured block's data have a largest singular value
	// of S above 1 (distributed.go).
	NotPassive
	// SparseData: a measured block's data turn a phase by more than
	// linear interpolation follows between two frequencies.
	SparseData
	// OutsideModel: a microstrip outside the range where its models
	// state their accuracy.
	OutsideModel
)

// String names the kind as JSON and tables print it.
func (k WarningKind) String() string {
	switch k {
	case GroundLookalike:
		return "ground-lookalike"
	case Dangling:
		return "dangling-node"
	case Implausible:
		return "implausible-value"
	case NotPassive:
		return "not-passive"
	case SparseData:
		return "sparse-data"
	case OutsideModel:
		return "outside-model"
	}
	return "unknown"
}

// wiring warns about nodes that look like the reference node and about
// nodes with one terminal.
func (l *loader) wiring() {
	terminals := map[string]int{}
	firstPart := map[string]string{}
	for _, p := range l.c.Parts {
		for _, n := range p.Nodes {
			terminals[n]++
			if _, ok := firstPart[n]; !ok {
				firstPart[n] = p.Name
			}
		}
	}
	for _, p := range l.c.Ports {
		terminals[p.Node]++
		terminals[p.Return]++
	}
	for _, d := range l.c.Distributed {
		for k, n := range d.Nodes() {
			terminals[n]++
			if d.Line != nil && k < 2 {
				terminals[n]++ // a line's end with nothing else on it is an open stub
			}
			if _, ok := firstPart[n]; !ok {
				firstPart[n] = d.Name
			}
		}
	}
	for _, name := range l.c.Nodes {
		at := l.nodeAt[name]
		if groundLookalike(name) {
			l.warnAt(at, GroundLookalike, "node %s differs from the reference node `%s` only by %s, so it is an ordinary node and not ground; accepted: `%s` for the reference",
				quoteName(name), Ground, lookalikeHow(name), Ground)
		}
		if terminals[name] == 1 {
			others := []string{Ground}
			for _, n := range l.c.Nodes {
				if n != name {
					others = append(others, n)
				}
			}
			hint := didYouMean(name, others)
			if groundLookalike(name) {
				hint = fmt.Sprintf(" (did you mean `%s`?)", Ground)
			}
			l.warnAt(at, Dangling, "node %s has only one terminal on it (%s), so no current flows through that terminal; a misspelt node name?%s",
				quoteName(name), firstPart[name], hint)
		}
	}
}

func (l *loader) warnAt(at Pos, k WarningKind, format string, args ...any) {
	l.c.Warnings = append(l.c.Warnings, Warning{File: l.file, Line: at.Line, Col: at.Col, Kind: k, Message: fmt.Sprintf(format, args...)})
}

// groundFold removes spaces and invisible characters (Unicode's format
// characters such as zero-width spaces, and control characters) from
// name and folds its case.
func groundFold(name string) string {
	return strings.ToLower(strings.Map(func(r rune) rune {
		if unicode.IsSpace(r) || unicode.Is(unicode.Cf, r) || unicode.IsControl(r) {
			return -1
		}
		return r
	}, name))
}

// groundLookalike reports whether name is not `gnd` but folds to it.
func groundLookalike(name string) bool {
	return name != Ground && groundFold(name) == Ground
}

// lookalikeHow says in what a ground look-alike differs.
func lookalikeHow(name string) string {
	var how []string
	if strings.ToLower(name) != name {
		how = append(how, "letter case")
	}
	if strings.IndexFunc(name, unicode.IsSpace) >= 0 {
		how = append(how, "spaces")
	}
	if strings.IndexFunc(name, func(r rune) bool { return unicode.Is(unicode.Cf, r) || unicode.IsControl(r) }) >= 0 {
		how = append(how, "invisible characters")
	}
	return strings.Join(how, " and ")
}

// quoteName writes a node name between backticks with anything invisible
// shown as an escape, so that `gnd ` and `gnd\u200b` can be told from gnd.
func quoteName(name string) string {
	var b strings.Builder
	b.WriteByte('`')
	for _, r := range name {
		switch {
		case unicode.Is(unicode.Cf, r) || unicode.IsControl(r):
			fmt.Fprintf(&b, "\\u%04x", r)
		default:
			b.WriteRune(r)
		}
	}
	b.WriteByte('`')
	return b.String()
}
