package circuit

import (
	"fmt"
	"strconv"
	"strings"
	"unicode/utf8"

	"go.yaml.in/yaml/v3"
)

// entry is one key: value pair of a YAML mapping.
type entry struct {
	key, val *yaml.Node
}

// fields reads the mapping n, whose keys must come from accepted. It reports
// keys that are not scalars, unknown keys (suggesting a near miss) and keys
// given twice, and returns the first occurrence of each known key. what
// names the mapping in messages; hint, when not nil, may add a sentence
// about an unknown key.
func (l *loader) fields(n *yaml.Node, what string, accepted []string, hint func(key string) string) map[string]entry {
	out := map[string]entry{}
	if n.Kind != yaml.MappingNode {
		l.errorf(n, "%s is %s, not a mapping; accepted: keys %s", what, kindName(n), strings.Join(accepted, ", "))
		return out
	}
	seen := map[string]*yaml.Node{}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		if k.Kind != yaml.ScalarNode {
			l.errorf(k, "a key in %s is %s; accepted: keys %s", what, kindName(k), strings.Join(accepted, ", "))
			continue
		}
		if first, ok := seen[k.Value]; ok {
			l.errorf(k, "key `%s` appears twice in %s, first at line %d; accepted: each key once", k.Value, what, first.Line)
			continue
		}
		seen[k.Value] = k
		if !contains(accepted, k.Value) {
			extra := ""
			if hint != nil {
				extra = hint(k.Value)
			}
			if extra == "" {
				if s := suggest(k.Value, accepted); s != "" {
					extra = fmt.Sprintf(" (did you mean `%s`?)", s)
				}
			}
			l.errorf(k, "unknown key `%s` in %s%s; accepted keys: %s", k.Value, what, extra, strings.Join(accepted, ", "))
			continue
		}
		out[k.Value] = entry{k, v}
	}
	return out
}

// misspelt returns a key of mapping n that is not in accepted but is a near
// miss of key, or "". fields has then reported it as unknown with key as
// its suggestion, so reporting key as missing as well would say one thing
// twice.
func misspelt(n *yaml.Node, key string, accepted []string) string {
	if n.Kind != yaml.MappingNode {
		return ""
	}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k := n.Content[i]
		if k.Kind == yaml.ScalarNode && !contains(accepted, k.Value) && suggest(k.Value, accepted) == key {
			return k.Value
		}
	}
	return ""
}

// missing reports that mapping n lacks key, unless a misspelling of key is
// there and already reported.
func (l *loader) missing(n *yaml.Node, key string, accepted []string, format string, args ...any) {
	if misspelt(n, key, accepted) == "" {
		l.errorf(n, format, args...)
	}
}

// lookup returns the value of the first key named key in mapping n, or nil.
func lookup(n *yaml.Node, key string) *yaml.Node {
	if n.Kind != yaml.MappingNode {
		return nil
	}
	for i := 0; i+1 < len(n.Content); i += 2 {
		if k := n.Content[i]; k.Kind == yaml.ScalarNode && k.Value == key {
			return n.Content[i+1]
		}
	}
	return nil
}

// text reads a single non-empty value.
func (l *loader) text(n *yaml.Node, what, accepted string) (string, bool) {
	if n.Kind != yaml.ScalarNode {
		l.errorf(n, "%s is %s; accepted: %s", what, kindName(n), accepted)
		return "", false
	}
	if n.ShortTag() == "!!null" || n.Value == "" {
		l.errorf(n, "%s is empty; accepted: %s", what, accepted)
		return "", false
	}
	return n.Value, true
}

// scalarText returns the text of a single value, empty for a YAML null, or
// records that n is a list or mapping.
func (l *loader) scalarText(n *yaml.Node, what, accepted string) (string, bool) {
	if n.Kind != yaml.ScalarNode {
		l.errorf(n, "%s is %s; accepted: %s", what, kindName(n), accepted)
		return "", false
	}
	if n.ShortTag() == "!!null" {
		return "", true
	}
	return n.Value, true
}

// quantity reads a value of quantity q.
func (l *loader) quantity(n *yaml.Node, q Quantity, what string) (float64, bool) {
	s, ok := l.scalarText(n, what, q.Accepted())
	if !ok {
		return 0, false
	}
	v, err := ParseValue(s, q)
	if err != nil {
		l.wrapf(n, err, "%s", what)
		return 0, false
	}
	if problem := outOfSpan(v, q); problem != "" {
		l.errorf(n, "%s is `%s`, %s; accepted: %s", what, s, problem, spans[q].words)
		return 0, false
	}
	return v, true
}

// value reads a value of quantity q that must keep to r.
func (l *loader) value(n *yaml.Node, q Quantity, what string, r rule) (float64, bool) {
	v, ok := l.quantity(n, q, what)
	return v, ok && l.check(n, v, q, what, r)
}

// rule is a range a value must lie in.
type rule struct {
	ok   func(v float64) bool
	bad  string // what is wrong with a value outside, e.g. "not above zero"
	want string // the range in words; %s, if present, becomes the quantity
}

var (
	positive    = rule{func(v float64) bool { return v > 0 }, "not above zero", "a positive %s"}
	nonNegative = rule{func(v float64) bool { return v >= 0 }, "negative", "zero or a positive %s"}
)

// check records a problem when v, read from n, breaks r.
func (l *loader) check(n *yaml.Node, v float64, q Quantity, what string, r rule) bool {
	if r.ok(v) {
		return true
	}
	want := r.want
	if strings.Contains(want, "%s") {
		want = fmt.Sprintf(want, q)
	}
	l.errorf(n, "%s is `%s`, which is %s; accepted: %s", what, n.Value, r.bad, want)
	return false
}

// count reads a whole number from 1 to limit.
func (l *loader) count(n *yaml.Node, what string, min, limit int) (int, bool) {
	accepted := fmt.Sprintf("a whole number from %d to %d", min, limit)
	s, ok := l.text(n, what, accepted)
	if !ok {
		return 0, false
	}
	digits := strings.TrimPrefix(s, "+")
	if digits == "" || strings.Trim(digits, "0123456789") != "" {
		l.errorf(n, "%s is `%s`, which is not a whole number; accepted: %s", what, s, accepted)
		return 0, false
	}
	v, err := strconv.Atoi(digits)
	if err != nil || v < min || v > limit {
		l.errorf(n, "%s is `%s`, which is out of range; accepted: %s", what, s, accepted)
		return 0, false
	}
	return v, true
}

// flag reads true or false.
func (l *loader) flag(n *yaml.Node, what string) (bool, bool) {
	s, ok := l.text(n, what, "true or false")
	if !ok {
		return false, false
	}
	switch s {
	case "true", "True", "TRUE":
		return true, true
	case "false", "False", "FALSE":
		return false, true
	}
	l.errorf(n, "%s is `%s`; accepted: true or false", what, s)
	return false, false
}

// sequence returns the items of list n.
func (l *loader) sequence(n *yaml.Node, what, accepted string) ([]*yaml.Node, bool) {
	if n.Kind != yaml.SequenceNode {
		l.errorf(n, "%s is %s, not a list; accepted: %s", what, kindName(n), accepted)
		return nil, false
	}
	return n.Content, true
}

// suggest returns the candidate closest to word when it is near enough to
// be a slip of the keyboard, or "".
func suggest(word string, candidates []string) string {
	n := utf8.RuneCountInString(word)
	limit := 2
	if n <= 3 {
		limit = 1
	}
	best, bestDist := "", limit+1
	for _, c := range candidates {
		if strings.EqualFold(word, c) {
			return c
		}
		// Names longer than any key are not slips of the keyboard; skipping
		// them keeps the quadratic distance off long inputs.
		m := utf8.RuneCountInString(c)
		if n > 64 || m > 64 || n-m > limit || m-n > limit {
			continue
		}
		if d := editDistance(word, c); d < bestDist {
			best, bestDist = c, d
		}
	}
	return best
}

// editDistance is the Levenshtein distance between a and b: the fewest
// single-character insertions, deletions and substitutions turning one into
// the other (V. I. Levenshtein, Soviet Physics Doklady 10 (1966) 707).
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}

// nameList joins names for a message, cut after max of them.
func nameList(names []string, max int) string {
	if len(names) == 0 {
		return "(none)"
	}
	quoted := make([]string, 0, max+1)
	for i, n := range names {
		if i == max {
			quoted = append(quoted, fmt.Sprintf("and %d more", len(names)-max))
			break
		}
		quoted = append(quoted, "`"+n+"`")
	}
	return strings.Join(quoted, ", ")
}

// plainList joins names without quotes, cut after max of them.
func plainList(names []string, max int) string {
	if len(names) > max {
		return strings.Join(names[:max], ", ") + fmt.Sprintf(" and %d more", len(names)-max)
	}
	return strings.Join(names, ", ")
}

// didYouMean returns " (did you mean `X`?)" for a near miss among names.
func didYouMean(word string, names []string) string {
	if s := suggest(word, names); s != "" {
		return fmt.Sprintf(" (did you mean `%s`?)", s)
	}
	return ""
}
