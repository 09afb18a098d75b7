package circuit

import (
	"fmt"
	"strings"
)

// Override is a value set from outside the file, such as a command line's
// `--set Rbias.value=100k`: a target of the grammar a study varies
// (`temperature`, `PART.value`, `MODEL.KEY`) and its new value.
type Override struct {
	Target string  // as written
	Value  float64 // SI base units (kelvin for a temperature)
	Text   string  // the value as written
}

// String returns the override as TARGET=VALUE, as it was written.
func (o Override) String() string { return o.Target + "=" + o.Text }

// WithOverride returns a copy of c with the assignment s, `TARGET=VALUE`,
// applied and recorded in Overrides; c itself is not changed. Its error
// says what is accepted, as ResolveVary's does, and names no place: the
// caller knows where the text came from.
func (c *Circuit) WithOverride(s string) (*Circuit, error) {
	target, text, ok := strings.Cut(s, "=")
	target, text = strings.TrimSpace(target), strings.TrimSpace(text)
	if !ok || target == "" || text == "" {
		return nil, fmt.Errorf("`%s` is not NAME=VALUE; e.g. Rbias.value=100k, detector.saturation_current=2uA or temperature=85C", s)
	}
	v, err := c.ResolveVary(target)
	if err != nil {
		return nil, err
	}
	value, err := ParseBounded(text, v.Quantity)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", target, err)
	}
	if err := v.Check(value); err != nil {
		return nil, err
	}
	out, _ := v.Apply(c, value)
	out.rebaseTolerances() // tolerance.go
	out.Overrides = append(append([]Override(nil), c.Overrides...), Override{Target: target, Value: value, Text: text})
	return out, nil
}
