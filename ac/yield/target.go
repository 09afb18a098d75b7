package yield

import (
	"fmt"
	"math"
	"strings"

	"qpoint/ac/study"
)

// Bound says which side of its limit a target's measure must stay on.
type Bound int

const (
	// AtLeast: MEASURE>VALUE, the measure must exceed the limit.
	AtLeast Bound = iota
	// AtMost: MEASURE<VALUE, the measure must stay below the limit.
	AtMost
	// Observe: no limit; the measure's spread is reported, and it does
	// not decide whether a run passes.
	Observe
)

// Target is a condition every built circuit should meet: a study measure
// above or below a limit.
type Target struct {
	Text    string // as written, e.g. "s21>-6.2dB@900MHz"
	Measure *study.Measure
	Bound   Bound
	Limit   float64 // in the measure's unit (dB for s21)
}

// ParseTarget reads MEASURE>VALUE or MEASURE<VALUE, where MEASURE is a
// study measure (study.ParseMeasure) and the frequency it is taken at may
// follow either the measure or the value: s21>-6.2dB@900MHz and
// s21@900MHz>-6.2dB are the same target.
func ParseTarget(s string) (Target, error) {
	t := Target{Text: s}
	at := strings.IndexAny(s, "<>")
	if at < 0 || strings.Count(s, "<")+strings.Count(s, ">") != 1 {
		return t, fmt.Errorf("`%s` is not MEASURE>VALUE or MEASURE<VALUE; e.g. s21>-6.2dB@900MHz or hd3<-50dBc", s)
	}
	t.Bound = AtLeast
	if s[at] == '<' {
		t.Bound = AtMost
	}
	m, v := strings.TrimSpace(s[:at]), strings.TrimSpace(s[at+1:])
	if strings.HasPrefix(v, "=") {
		return t, fmt.Errorf("`%s`: write > or < alone (a measure equals its limit with probability zero); e.g. s21>-6.2dB@900MHz", s)
	}
	if i := strings.IndexByte(v, '@'); i >= 0 {
		if strings.IndexByte(m, '@') >= 0 {
			return t, fmt.Errorf("`%s` gives the frequency twice; write it once, after the measure or after the value", s)
		}
		m, v = m+v[i:], v[:i]
	}
	if m == "" || v == "" {
		return t, fmt.Errorf("`%s` is not MEASURE>VALUE or MEASURE<VALUE; e.g. s21>-6.2dB@900MHz or hd3<-50dBc", s)
	}
	var err error
	if t.Measure, err = study.ParseMeasure(m); err != nil {
		return t, err
	}
	if t.Limit, err = t.Measure.ParseValue(v); err != nil {
		return t, err
	}
	return t, nil
}

// Passes reports whether value meets the target; NaN (a measure that
// could not be taken) does not, and an Observe target always does.
func (t *Target) Passes(value float64) bool {
	switch t.Bound {
	case AtLeast:
		return value > t.Limit
	case AtMost:
		return value < t.Limit
	}
	return true
}

// worse returns the worse of two readings for the target: the smaller
// for AtLeast, the larger for AtMost, NaN when either is NaN. For Observe
// it keeps a.
func (t *Target) worse(a, b float64) float64 {
	if math.IsNaN(a) || math.IsNaN(b) {
		return math.NaN()
	}
	switch t.Bound {
	case AtLeast:
		return math.Min(a, b)
	case AtMost:
		return math.Max(a, b)
	}
	return a
}

// String returns the target as written.
func (t *Target) String() string { return t.Text }
