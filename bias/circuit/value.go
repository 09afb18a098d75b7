package circuit

import (
	"errors"
	"fmt"
	"math"
	"math/big"
	"strconv"
	"strings"
)

// Quantity is the physical quantity a circuit-file field holds. It decides
// which unit may follow a number and what the number is converted to.
type Quantity int

const (
	Dimensionless Quantity = iota // a bare number: ideality factor, grading coefficient, exponents
	Resistance                    // ohm
	Capacitance                   // farad
	Inductance                    // henry
	Voltage                       // volt
	Current                       // ampere
	Frequency                     // hertz
	Time                          // second
	Power                         // watt
	Energy                        // electronvolt, for band-gap energies
	Temperature                   // kelvin, written in degrees Celsius or kelvin
	Length                        // metre: a line's length, a strip's width
)

// quantityInfo describes how a quantity is written.
type quantityInfo struct {
	name    string
	units   []string // accepted unit spellings, the first one is shown in messages
	example string
}

var quantities = [...]quantityInfo{
	Dimensionless: {"number", nil, "1.05"},
	Resistance:    {"resistance", []string{"ohm", "Ω", "\u2126"}, "4.7k or 4.7kohm"},
	Capacitance:   {"capacitance", []string{"F"}, "22p or 22pF (f is femto, F is farad)"},
	Inductance:    {"inductance", []string{"H"}, "39n or 39nH"},
	Voltage:       {"voltage", []string{"V"}, "3.3 or 3.3V or 250mV"},
	Current:       {"current", []string{"A"}, "10u or 10uA"},
	Frequency:     {"frequency", []string{"Hz"}, "2.45G or 2.45GHz"},
	Time:          {"time", []string{"s"}, "5n or 5ns"},
	Power:         {"power", []string{"W"}, "75m or 75mW"},
	Energy:        {"energy", []string{"eV"}, "1.11 or 1.11eV"},
	Temperature:   {"temperature", []string{"C", "K"}, "27C or 300.15K"},
	Length:        {"length", []string{"m"}, "8mm or 35um (m is metre as a unit, milli as a prefix)"},
}

// prefixes are the SI multipliers the circuit file knows. They are
// case-sensitive: m is milli, M is mega. Both the micro sign (U+00B5) and
// the Greek small mu (U+03BC) are taken, as keyboards produce either.
var prefixes = []struct {
	symbol string
	exp    int // the prefix stands for 10^exp
}{
	{"f", -15}, {"p", -12}, {"n", -9}, {"u", -6}, {"µ", -6}, {"μ", -6},
	{"m", -3}, {"k", 3}, {"M", 6}, {"G", 9}, {"T", 12},
}

const prefixList = "f p n u µ m k M G T"

// zeroCelsiusK is 0 °C in kelvin (SI Brochure, 9th edition, 2.3.1).
const zeroCelsiusK = 273.15

// String returns the quantity's name as used in messages.
func (q Quantity) String() string {
	if q < 0 || int(q) >= len(quantities) {
		return fmt.Sprintf("Quantity(%d)", int(q))
	}
	return quantities[q].name
}

// Accepted describes the forms a value of this quantity may take, for error
// messages.
func (q Quantity) Accepted() string {
	if q < 0 || int(q) >= len(quantities) {
		return "nothing: unknown quantity"
	}
	info := quantities[q]
	switch q {
	case Dimensionless:
		return "a plain number with an optional SI prefix (" + prefixList + "), e.g. " + info.example
	case Temperature:
		return "a number followed by C (degrees Celsius) or K (kelvin), without prefix, e.g. " + info.example
	case Resistance:
		return "a number with an optional SI prefix (" + prefixList + ") and unit ohm or Ω, e.g. " + info.example
	}
	return "a number with an optional SI prefix (" + prefixList + ") and unit " + info.units[0] + ", e.g. " + info.example
}

// ValueError reports a value that cannot be read. It names the text as
// written, what is wrong with it and the forms the field accepts.
type ValueError struct {
	Text     string // the value as written
	What     string // what the field holds, e.g. "resistance"
	Problem  string // what is wrong
	Accepted string // the forms the field takes
}

func (e *ValueError) Error() string {
	if e.Text == "" {
		return fmt.Sprintf("no %s given; accepted: %s", e.What, e.Accepted)
	}
	return fmt.Sprintf("`%s` is not a valid %s: %s; accepted: %s", e.Text, e.What, e.Problem, e.Accepted)
}

// ParseValue reads a circuit-file value of quantity q and returns it in SI
// base units (kelvin for temperatures, electronvolts for energies).
//
// A value is a plain decimal number, optionally followed by one SI prefix
// and then the quantity's unit: 47k, 4.7kohm, 22pF, 2.45GHz, 5ns, 0.69eV.
// Temperatures instead need a unit, C or K, and take no prefix; they must
// lie above absolute zero. Hexadecimal, NaN, infinities and values outside
// the float64 range are refused.
func ParseValue(s string, q Quantity) (float64, error) {
	if q < 0 || int(q) >= len(quantities) {
		return 0, fmt.Errorf("circuit: ParseValue called with unknown quantity %d", int(q))
	}
	fail := func(problem string) (float64, error) {
		return 0, &ValueError{Text: s, What: q.String(), Problem: problem, Accepted: q.Accepted()}
	}
	d, rest, problem := splitNumber(s)
	if problem != "" {
		return fail(problem)
	}
	if q == Temperature {
		return parseTemperature(d, rest, fail)
	}
	exp, problem := unitScale(rest, q)
	if problem != "" {
		return fail(problem)
	}
	v, problem := d.value(exp)
	if problem != "" {
		return fail(problem)
	}
	return v, nil
}

// parseTemperature converts a temperature in kelvin or degrees Celsius to
// kelvin. The Celsius offset is added in exact decimal arithmetic, so that
// -40C gives the float64 nearest to 233.15, as writing 233.15K would.
func parseTemperature(d decimal, rest string, fail func(string) (float64, error)) (float64, error) {
	var k float64
	switch rest {
	case "K":
		v, problem := d.value(0)
		if problem != "" {
			return fail(problem)
		}
		k = v
	case "C", "°C":
		if len(d.mantissa) > maxExactDigits {
			// Exact arithmetic on a mantissa this long costs time
			// quadratic in its length (seconds for a megabyte of
			// digits) and cannot change the float64 it rounds to.
			v, problem := d.value(0)
			if problem != "" {
				return fail(problem)
			}
			k = v + zeroCelsiusK
			break
		}
		r, ok := new(big.Rat).SetString(d.mantissa + "e" + strconv.Itoa(d.exp))
		if !ok {
			return fail("not a decimal number")
		}
		r.Add(r, big.NewRat(27315, 100))
		v, _ := r.Float64()
		if math.IsInf(v, 0) {
			return fail("too large for a float64")
		}
		k = v
	case "":
		return fail("a temperature needs its unit, C or K")
	default:
		if len(rest) > 1 && (strings.HasSuffix(rest, "C") || strings.HasSuffix(rest, "K")) {
			return fail("temperatures take no prefix")
		}
		return fail(fmt.Sprintf("`%s` is not a temperature unit", rest))
	}
	if k <= 0 {
		return fail("at or below absolute zero")
	}
	return k, nil
}

// maxExactDigits bounds the mantissa a Celsius temperature is converted
// from in exact decimal arithmetic.
const maxExactDigits = 64

// decimal is a number as written: a mantissa and a power of ten.
type decimal struct {
	mantissa string // sign, digits and an optional point
	exp      int
}

// value returns the number times 10^exp. The prefix goes into the decimal
// exponent before conversion, so 22p becomes the float64 nearest to 22e-12
// rather than 22 times the float64 nearest to 1e-12.
func (d decimal) value(exp int) (float64, string) {
	v, err := strconv.ParseFloat(d.mantissa+"e"+strconv.Itoa(d.exp+exp), 64)
	switch {
	case errors.Is(err, strconv.ErrRange) || math.IsInf(v, 0):
		return 0, "too large for a float64"
	case err != nil:
		return 0, "not a decimal number"
	case v == 0 && strings.Trim(d.mantissa, "+-0.") != "":
		return 0, "too small for a float64"
	}
	return v, ""
}

// maxExponent bounds a written exponent; anything beyond is out of the
// float64 range either way, and the bound keeps the sum with a prefix's
// exponent from overflowing an int.
const maxExponent = 99999

// splitNumber separates the leading decimal number from what follows. It
// refuses what strconv.ParseFloat would otherwise take but the circuit file
// does not: hexadecimal, underscores, NaN and infinities.
func splitNumber(s string) (d decimal, rest string, problem string) {
	if s == "" {
		return d, "", "empty"
	}
	if strings.ContainsAny(s, " \t\r\n") {
		return d, "", "it contains a space (write the number, prefix and unit together)"
	}
	i := 0
	if s[i] == '+' || s[i] == '-' {
		i++
	}
	mantStart := i
	digits := 0
	for i < len(s) && isDigit(s[i]) {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && isDigit(s[i]) {
			i++
			digits++
		}
	}
	if digits == 0 {
		word := strings.ToLower(strings.TrimLeft(s[mantStart:], "."))
		if strings.HasPrefix(word, "inf") || strings.HasPrefix(word, "nan") {
			return d, "", "not a finite number"
		}
		return d, "", "it does not start with a decimal number"
	}
	if s[mantStart:i] == "0" && i < len(s) && strings.ContainsRune("xXoObB", rune(s[i])) {
		return d, "", "hexadecimal, octal and binary numbers are not accepted"
	}
	d.mantissa = s[:i]
	// An exponent needs digits after the e; otherwise the e belongs to the
	// unit (0.69eV).
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		sign := 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			if s[j] == '-' {
				sign = -1
			}
			j++
		}
		if j < len(s) && isDigit(s[j]) {
			for j < len(s) && isDigit(s[j]) {
				if d.exp < maxExponent {
					d.exp = d.exp*10 + int(s[j]-'0')
				}
				j++
			}
			d.exp = sign * min(d.exp, maxExponent)
			i = j
		}
	}
	return d, s[i:], ""
}

func isDigit(b byte) bool { return '0' <= b && b <= '9' }

// unitScale reads an optional SI prefix and an optional unit of q and
// returns the prefix's power of ten.
func unitScale(rest string, q Quantity) (int, string) {
	units := quantities[q].units
	if rest == "" || contains(units, rest) {
		return 0, ""
	}
	for _, p := range prefixes {
		if u, ok := strings.CutPrefix(rest, p.symbol); ok && (u == "" || contains(units, u)) {
			return p.exp, ""
		}
	}
	return 0, unitProblem(rest, q)
}

// unitProblem explains why rest is neither a prefix nor a unit of q,
// pointing at the usual slips.
func unitProblem(rest string, q Quantity) string {
	if strings.HasPrefix(rest, "K") && q != Temperature {
		return "K is not a prefix (kilo is written k)"
	}
	unit := rest
	for _, p := range prefixes {
		if u, ok := strings.CutPrefix(rest, p.symbol); ok && u != "" {
			unit = u
			break
		}
	}
	for other, info := range quantities {
		if Quantity(other) != q && (contains(info.units, rest) || contains(info.units, unit)) {
			if q == Dimensionless {
				return fmt.Sprintf("%s is a unit of %s, but this field is a plain number", unit, info.name)
			}
			return fmt.Sprintf("%s is a unit of %s, not of %s", unit, info.name, q)
		}
	}
	for _, u := range quantities[q].units {
		if strings.EqualFold(unit, u) || strings.EqualFold(rest, u) {
			return fmt.Sprintf("the unit is written %s", u)
		}
	}
	if q == Dimensionless {
		return fmt.Sprintf("`%s` after the number is not an SI prefix", rest)
	}
	return fmt.Sprintf("`%s` after the number is not an SI prefix or a unit of %s", rest, q)
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// levelAccepted describes how a signal level is written.
const levelAccepted = "the generator's available power in dBm, e.g. -20dBm, or a peak voltage with unit V, e.g. 50mV"

// MinLevelDBm and MaxLevelDBm bound a signal level's available power:
// -200 dBm is far below any thermal floor, +90 dBm is a megawatt.
const (
	MinLevelDBm = -200
	MaxLevelDBm = 90
)

// ParseLevel reads a signal level: the available power of a port's
// generator in dBm (-20dBm, no prefix) or a peak voltage above zero with its
// unit (50mV). A bare number is refused because it could be either.
func ParseLevel(s string) (Level, error) {
	fail := func(problem string) (Level, error) {
		return Level{}, &ValueError{Text: s, What: "signal level", Problem: problem, Accepted: levelAccepted}
	}
	d, rest, problem := splitNumber(s)
	if problem != "" {
		return fail(problem)
	}
	exp, power := 0, false
	switch {
	case rest == "dBm":
		power = true
	case rest == "":
		return fail("a level needs its unit, dBm or V")
	case strings.HasSuffix(rest, "dBm"):
		return fail("dBm takes no prefix")
	case strings.HasPrefix(rest, "dB"):
		return fail(rest + " is not accepted here, only dBm or a peak voltage")
	case strings.HasSuffix(rest, "V"):
		if exp, problem = unitScale(rest, Voltage); problem != "" {
			return fail(problem)
		}
	default:
		return fail(fmt.Sprintf("`%s` after the number is not dBm or a voltage unit", rest))
	}
	num, problem := d.value(exp)
	if problem != "" {
		return fail(problem)
	}
	if power {
		// -200 dBm is far below any thermal floor; +90 dBm is a megawatt.
		if num < MinLevelDBm || num > MaxLevelDBm {
			return fail("outside -200 dBm to +90 dBm")
		}
		return Level{DBm: num, IsPower: true}, nil
	}
	if num <= 0 {
		return fail("a peak voltage must be above zero")
	}
	if problem := outOfSpan(num, Voltage); problem != "" {
		return fail(problem)
	}
	return Level{PeakVolts: num}, nil
}

// Unit returns the quantity's SI unit symbol as tables and column headers
// print it ("ohm" spelled out for plain-text files), or "" for a number.
func (q Quantity) Unit() string {
	switch q {
	case Resistance:
		return "ohm"
	case Capacitance:
		return "F"
	case Inductance:
		return "H"
	case Voltage:
		return "V"
	case Current:
		return "A"
	case Frequency:
		return "Hz"
	case Time:
		return "s"
	case Power:
		return "W"
	case Energy:
		return "eV"
	case Temperature:
		return "K"
	case Length:
		return "m"
	}
	return ""
}

// ParseBounded reads a value as ParseValue does and also refuses one whose
// magnitude lies outside what the quantity accepts anywhere in a circuit
// file (1e-12 to 1e15 ohm, 1 mHz to 1 THz, 1 mK to 1e9 K, ...): command
// line flags get the same limits as the file.
func ParseBounded(s string, q Quantity) (float64, error) {
	v, err := ParseValue(s, q)
	if err != nil {
		return 0, err
	}
	if problem := outOfSpan(v, q); problem != "" {
		return 0, &ValueError{Text: s, What: q.String(), Problem: problem, Accepted: spans[q].words}
	}
	return v, nil
}
