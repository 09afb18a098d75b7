// Package si formats numbers in engineering notation with SI prefixes, the
// way tables and messages show them: 47 kΩ, 2.45 GHz, -65 µA.
package si

import (
	"math"
	"strconv"
	"strings"
)

var prefixes = []struct {
	exp    int
	symbol string
}{
	{-18, "a"}, {-15, "f"}, {-12, "p"}, {-9, "n"}, {-6, "µ"}, {-3, "m"},
	{0, ""}, {3, "k"}, {6, "M"}, {9, "G"}, {12, "T"},
}

// Format returns v with digits significant figures, an SI prefix and unit,
// e.g. Format(4.7e3, "Ω", 3) = "4.7 kΩ". Zero prints as "0 unit"; NaN and
// infinities print as "—", "∞" and "-∞". Values outside the prefix range
// fall back to exponent notation.
func Format(v float64, unit string, digits int) string {
	switch {
	case math.IsNaN(v):
		return "—"
	case math.IsInf(v, 1):
		return "∞"
	case math.IsInf(v, -1):
		return "-∞"
	}
	sep := " "
	if unit == "" {
		sep = ""
	}
	if v == 0 {
		return "0" + sep + unit
	}
	if digits < 1 {
		digits = 1
	}
	// Round first so that 999.96 becomes 1.00 k, not 1000 with the old prefix.
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', digits, 64), 64)
	e := int(math.Floor(math.Log10(math.Abs(r))))
	e3 := int(math.Floor(float64(e)/3)) * 3
	if e3 < prefixes[0].exp || e3 > prefixes[len(prefixes)-1].exp {
		return strconv.FormatFloat(v, 'e', digits-1, 64) + sep + unit
	}
	var p string
	for _, x := range prefixes {
		if x.exp == e3 {
			p = x.symbol
		}
	}
	m := r / math.Pow10(e3)
	decimals := digits - 1 - (e - e3)
	if decimals < 0 {
		decimals = 0
	}
	s := strconv.FormatFloat(m, 'f', decimals, 64)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	if p == "" && unit == "" {
		return s
	}
	return s + sep + p + unit
}
