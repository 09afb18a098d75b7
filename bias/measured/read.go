package measured

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"qpoint/bias/circuit"
)

// Limits on what Read takes.
const (
	// MaxBytes bounds a file at 16 MiB, far more than any curve tracer
	// writes for one device.
	MaxBytes = 16 << 20
	// MaxPoints bounds the number of points.
	MaxPoints = 200_000
	// maxMagnitude bounds voltages and currents as the circuit file does.
	maxMagnitude = 1e6
	// maxCapacitance is far above any diode junction's capacitance: a
	// larger value almost always means a column read in farads that was
	// written in picofarads.
	maxCapacitance = 1e-6
)

// Kind says which characteristic a file holds.
type Kind int

const (
	// CurrentVoltage is an I–V file: voltage and current.
	CurrentVoltage Kind = iota + 1
	// CapacitanceVoltage is a C–V file: voltage and capacitance.
	CapacitanceVoltage
)

// String names the kind as messages print it.
func (k Kind) String() string {
	switch k {
	case CurrentVoltage:
		return "I–V"
	case CapacitanceVoltage:
		return "C–V"
	}
	return "unknown"
}

// Point is one measured point in SI base units.
type Point struct {
	Voltage float64 // V, anode minus cathode
	// Value is the current in A (I–V) or the capacitance in F (C–V).
	Value float64
	// TemperatureK is the point's temperature, 0 when the file has no
	// temperature column.
	TemperatureK float64
	// Line is the point's line in the file (1-based), 0 for a point that
	// did not come from a file.
	Line int
}

// Column is one column of the header.
type Column struct {
	Name string // voltage, current, capacitance or temperature
	Unit string // as written, "" when none was given
	// Scale and Offset convert a value as written to SI: Scale x + Offset
	// (the offset is 273.15 K for a temperature in degrees Celsius).
	Scale, Offset float64
	Column        int // 1-based column of the header cell
}

// Table is a measurement file's content.
type Table struct {
	Kind       Kind
	Points     []Point // in file order
	Columns    []Column
	HeaderLine int
	// HasTemperature is whether the file gives a temperature column.
	HasTemperature bool
	// Cautions are things read but worth saying: a column without a unit.
	Cautions []Caution
}

// CautionKind classifies a Caution.
type CautionKind int

const (
	// NoUnit: a column's header gives no unit, so its values were read in
	// SI base units.
	NoUnit CautionKind = iota + 1
)

// String names the kind as JSON and tables print it.
func (k CautionKind) String() string {
	if k == NoUnit {
		return "no-unit"
	}
	return "unknown"
}

// Caution is a typed remark about a file that was read.
type Caution struct {
	Kind         CautionKind
	Line, Column int
	Message      string
}

// ParseError is a problem at a place in a measurement file.
type ParseError struct {
	Line, Column int
	Msg          string // what is wrong; what is accepted
}

func (e *ParseError) Error() string {
	return fmt.Sprintf("line %d, column %d: %s", e.Line, e.Column, e.Msg)
}

// The column names, and how each is written.
var columnQuantity = map[string]circuit.Quantity{
	"voltage":     circuit.Voltage,
	"current":     circuit.Current,
	"capacitance": circuit.Capacitance,
	"temperature": circuit.Temperature,
}

const (
	acceptedHeader = "a header naming the columns voltage and current (an I–V file) or voltage and capacitance (a C–V file), optionally temperature, each with an optional unit in brackets, e.g. voltage [V], current (mA)"
	acceptedNumber = "plain decimal numbers such as 0.125 or -3.2e-6 (units belong in the header; a decimal comma only with ; or tab separators)"
)

// Read reads one measurement file; see the package comment for the format.
func Read(r io.Reader) (*Table, error) {
	data, err := io.ReadAll(io.LimitReader(r, MaxBytes+1))
	if err != nil {
		return nil, &ParseError{Line: 1, Column: 1, Msg: "cannot read: " + err.Error()}
	}
	if len(data) > MaxBytes {
		return nil, &ParseError{Line: 1, Column: 1, Msg: fmt.Sprintf("the file is larger than %d MiB; accepted: at most %d points of one device", MaxBytes>>20, MaxPoints)}
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	if line, col, bad := firstInvalid(data); bad != "" {
		return nil, &ParseError{Line: line, Column: col, Msg: bad + "; accepted: UTF-8 text"}
	}
	sep := separator(data)
	cr := csv.NewReader(bytes.NewReader(data))
	cr.Comma = sep
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	cr.ReuseRecord = true

	t := &Table{}
	var cols []Column
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return nil, &ParseError{Line: pe.Line, Column: max(pe.Column, 1), Msg: pe.Err.Error() + "; accepted: comma, semicolon or tab separated values, quotes only around whole fields"}
			}
			return nil, &ParseError{Line: 1, Column: 1, Msg: err.Error()}
		}
		line, _ := cr.FieldPos(0)
		if cols == nil {
			if cols, err = t.header(rec, cr); err != nil {
				return nil, err
			}
			t.HeaderLine = line
			continue
		}
		if blank(rec) {
			continue
		}
		for len(rec) > len(cols) && strings.TrimSpace(rec[len(rec)-1]) == "" {
			rec = rec[:len(rec)-1] // a separator at the end of the line
		}
		if len(rec) != len(cols) {
			last := min(len(rec), len(cols)+1) - 1
			_, col := cr.FieldPos(last)
			return nil, &ParseError{Line: line, Column: col, Msg: fmt.Sprintf("%d fields where the header (line %d) names %d; accepted: one value for each column on every line", len(rec), t.HeaderLine, len(cols))}
		}
		if len(t.Points) >= MaxPoints {
			return nil, &ParseError{Line: line, Column: 1, Msg: fmt.Sprintf("more than %d points; accepted: at most %d", MaxPoints, MaxPoints)}
		}
		p := Point{Line: line}
		for i, c := range cols {
			_, col := cr.FieldPos(i)
			v, msg := number(rec[i], sep)
			if msg != "" {
				return nil, &ParseError{Line: line, Column: col, Msg: fmt.Sprintf("%s: %s; accepted: %s", c.Name, msg, acceptedNumber)}
			}
			v = c.Scale*v + c.Offset
			if msg := outOfRange(c.Name, v, c.Unit == ""); msg != "" {
				return nil, &ParseError{Line: line, Column: col, Msg: msg}
			}
			switch c.Name {
			case "voltage":
				p.Voltage = v
			case "temperature":
				p.TemperatureK = v
			default:
				p.Value = v
			}
		}
		if t.Kind == CurrentVoltage && p.Voltage*p.Value < 0 {
			_, col := cr.FieldPos(columnIndex(cols, "current"))
			return nil, &ParseError{Line: line, Column: col, Msg: fmt.Sprintf(
				"current %.6g A at %.6g V: a junction's current has the sign of its voltage; accepted: positive currents at forward (positive) voltages and negative ones at reverse voltages (check the polarity of the connection or the file's sign convention)", p.Value, p.Voltage)}
		}
		t.Points = append(t.Points, p)
	}
	if cols == nil {
		return nil, &ParseError{Line: 1, Column: 1, Msg: "no header; accepted: " + acceptedHeader}
	}
	if len(t.Points) == 0 {
		return nil, &ParseError{Line: t.HeaderLine + 1, Column: 1, Msg: "no points after the header; accepted: one point a line under the header"}
	}
	if err := checkOrder(t.Points); err != nil {
		return nil, err
	}
	return t, nil
}

// header reads the header record into the table's columns.
func (t *Table) header(rec []string, cr *csv.Reader) ([]Column, error) {
	line, _ := cr.FieldPos(0)
	seen := map[string]int{}
	var cols []Column
	for len(rec) > 1 && strings.TrimSpace(rec[len(rec)-1]) == "" {
		rec = rec[:len(rec)-1] // a separator at the end of the line
	}
	for i, cell := range rec {
		_, col := cr.FieldPos(i)
		name, unit, ok := splitHeader(cell)
		q, known := columnQuantity[name]
		if !ok || !known {
			return nil, &ParseError{Line: line, Column: col, Msg: fmt.Sprintf("column %q is not one qpoint reads; accepted: %s", clip(cell), acceptedHeader)}
		}
		if first, dup := seen[name]; dup {
			return nil, &ParseError{Line: line, Column: col, Msg: fmt.Sprintf("a second %s column (the first is column %d); accepted: each column once", name, first)}
		}
		seen[name] = col
		c := Column{Name: name, Unit: unit, Scale: 1, Column: col}
		switch {
		case unit == "" && q == circuit.Temperature:
			return nil, &ParseError{Line: line, Column: col, Msg: "the temperature column gives no unit; accepted: temperature [C] or temperature [K]"}
		case unit == "":
			t.Cautions = append(t.Cautions, Caution{Kind: NoUnit, Line: line, Column: col,
				Message: fmt.Sprintf("column %s gives no unit; its values are read in %s", name, q.Unit())})
		default:
			scale, offset, msg := unitScale(unit, q)
			if msg != "" {
				return nil, &ParseError{Line: line, Column: col, Msg: msg}
			}
			c.Scale, c.Offset = scale, offset
		}
		cols = append(cols, c)
	}
	_, hasI := seen["current"]
	_, hasC := seen["capacitance"]
	_, t.HasTemperature = seen["temperature"]
	switch {
	case seen["voltage"] == 0:
		return nil, &ParseError{Line: line, Column: 1, Msg: "no voltage column; accepted: " + acceptedHeader}
	case hasI && hasC:
		return nil, &ParseError{Line: line, Column: seen["capacitance"], Msg: "both current and capacitance columns; accepted: one file for the I–V points and another for the C–V points"}
	case hasI:
		t.Kind = CurrentVoltage
	case hasC:
		t.Kind = CapacitanceVoltage
	default:
		return nil, &ParseError{Line: line, Column: 1, Msg: "neither a current nor a capacitance column; accepted: " + acceptedHeader}
	}
	t.Columns = cols
	return cols, nil
}

// splitHeader reads `name`, `name [unit]` or `name (unit)`.
func splitHeader(cell string) (name, unit string, ok bool) {
	s := strings.TrimSpace(cell)
	for _, br := range []string{"[]", "()"} {
		if i := strings.IndexByte(s, br[0]); i >= 0 {
			if !strings.HasSuffix(s, br[1:]) {
				return "", "", false
			}
			name = strings.ToLower(strings.TrimSpace(s[:i]))
			unit = strings.TrimSpace(s[i+1 : len(s)-1])
			return name, unit, unit != ""
		}
	}
	return strings.ToLower(s), "", true
}

// unitScale reads a unit of quantity q with an optional SI prefix, through
// the circuit file's own value grammar, and returns SI = scale x + offset.
func unitScale(unit string, q circuit.Quantity) (scale, offset float64, msg string) {
	u := strings.TrimPrefix(unit, "°")
	symbol := q.Unit()
	if q == circuit.Temperature {
		if u != "C" && u != "K" {
			return 0, 0, fmt.Sprintf("temperature unit %q; accepted: C (degrees Celsius) or K (kelvin), without prefix", clip(unit))
		}
	} else if !strings.HasSuffix(u, symbol) {
		return 0, 0, fmt.Sprintf("%q is not a unit of %s; accepted: %s with an optional SI prefix (f p n u µ m k M G T), e.g. m%s", clip(unit), q, symbol, symbol)
	}
	// Two points of the line SI = scale x + offset (1 and 2, since 0 K
	// is not a temperature the grammar takes).
	one, err1 := circuit.ParseValue("1"+u, q)
	two, err2 := circuit.ParseValue("2"+u, q)
	if err1 != nil || err2 != nil {
		return 0, 0, fmt.Sprintf("%q is not a unit of %s; accepted: %s with an optional SI prefix (f p n u µ m k M G T), e.g. m%s", clip(unit), q, symbol, symbol)
	}
	return two - one, 2*one - two, ""
}

// number reads one plain decimal number, or says what is wrong with it.
func number(s string, sep rune) (float64, string) {
	s = strings.TrimSpace(s)
	if s == "" {
		return 0, "an empty field"
	}
	if (sep == ';' || sep == '\t') && strings.Count(s, ",") == 1 && !strings.Contains(s, ".") {
		s = strings.Replace(s, ",", ".", 1)
	}
	if !plainDecimal(s) {
		return 0, fmt.Sprintf("%q is not a plain number", clip(s))
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(v, 0) {
		return 0, fmt.Sprintf("%q is out of range", clip(s))
	}
	return v, ""
}

// plainDecimal reports whether s is [+-]digits[.digits][e[+-]digits] (at
// least one digit in the mantissa): no hexadecimal, no underscores, no
// NaN or infinity.
func plainDecimal(s string) bool {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && isDigit(s[i]) {
		i, digits = i+1, digits+1
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && isDigit(s[i]) {
			i, digits = i+1, digits+1
		}
	}
	if digits == 0 {
		return false
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			i++
		}
		exp := 0
		for i < len(s) && isDigit(s[i]) {
			i, exp = i+1, exp+1
		}
		if exp == 0 {
			return false
		}
	}
	return i == len(s)
}

func isDigit(b byte) bool { return '0' <= b && b <= '9' }

// outOfRange checks a value in SI units against what its column takes.
func outOfRange(name string, v float64, noUnit bool) string {
	switch name {
	case "voltage":
		if math.Abs(v) > maxMagnitude {
			return fmt.Sprintf("voltage %.6g V; accepted: up to %g V in magnitude", v, maxMagnitude)
		}
	case "current":
		if math.Abs(v) > maxMagnitude {
			return fmt.Sprintf("current %.6g A; accepted: up to %g A in magnitude", v, maxMagnitude)
		}
	case "capacitance":
		if !(v > 0) {
			return fmt.Sprintf("capacitance %.6g F; accepted: a capacitance above zero", v)
		}
		if v > maxCapacitance {
			hint := ""
			if noUnit {
				hint = " (the header gives no unit, so it is read in farads: write e.g. capacitance [pF])"
			}
			return fmt.Sprintf("capacitance %.6g F%s; accepted: a junction capacitance up to 1 µF", v, hint)
		}
	case "temperature":
		if !(v >= 1e-3 && v <= 1e9) {
			return fmt.Sprintf("temperature %.6g K; accepted: 1 mK to 1e9 K (above absolute zero)", v)
		}
	}
	return ""
}

// checkOrder verifies that the points of each temperature are sorted by
// voltage, rising or falling, without repeats.
func checkOrder(ps []Point) error {
	type run struct {
		last, dir int // index of the last point; +1 rising, -1 falling, 0 unknown
	}
	runs := map[float64]*run{}
	for i, p := range ps {
		r, ok := runs[p.TemperatureK]
		if !ok {
			runs[p.TemperatureK] = &run{last: i}
			continue
		}
		prev := ps[r.last]
		dir := 0
		switch {
		case p.Voltage > prev.Voltage:
			dir = 1
		case p.Voltage < prev.Voltage:
			dir = -1
		default:
			return &ParseError{Line: p.Line, Column: 1, Msg: fmt.Sprintf(
				"voltage %.9g V repeats line %d%s; accepted: one point per voltage (average repeated readings before fitting)", p.Voltage, prev.Line, atTemperature(p))}
		}
		if r.dir != 0 && dir != r.dir {
			way := "rising"
			if r.dir < 0 {
				way = "falling"
			}
			return &ParseError{Line: p.Line, Column: 1, Msg: fmt.Sprintf(
				"voltage %.9g V after %.9g V (line %d) breaks the %s order%s; accepted: the points of one temperature sorted by voltage, rising or falling (sort the file, or split joined sweeps)", p.Voltage, prev.Voltage, prev.Line, way, atTemperature(p))}
		}
		r.dir, r.last = dir, i
	}
	return nil
}

func atTemperature(p Point) string {
	if p.TemperatureK == 0 {
		return ""
	}
	return fmt.Sprintf(" at %.6g K", p.TemperatureK)
}

func columnIndex(cols []Column, name string) int {
	for i, c := range cols {
		if c.Name == name {
			return i
		}
	}
	return 0
}

// separator picks the column separator from the first line that is not a
// comment or blank: tab, then semicolon, then comma.
func separator(data []byte) rune {
	for _, line := range strings.Split(string(data), "\n") {
		if strings.TrimSpace(line) == "" || strings.HasPrefix(line, "#") {
			continue
		}
		for _, s := range []rune{'\t', ';'} {
			if strings.ContainsRune(line, s) {
				return s
			}
		}
		break
	}
	return ','
}

// blank reports whether a record has only empty fields (a line of
// separators).
func blank(rec []string) bool {
	for _, f := range rec {
		if strings.TrimSpace(f) != "" {
			return false
		}
	}
	return true
}

// firstInvalid finds the first byte that is not UTF-8 text, or a NUL.
func firstInvalid(data []byte) (line, col int, what string) {
	line, start := 1, 0
	for i := 0; i < len(data); {
		r, size := utf8.DecodeRune(data[i:])
		switch {
		case r == utf8.RuneError && size == 1:
			return line, i - start + 1, "a byte that is not UTF-8"
		case r == 0:
			return line, i - start + 1, "a NUL byte"
		case r == '\n':
			line, start = line+1, i+1
		}
		i += size
	}
	return 0, 0, ""
}

// clip shortens text quoted in a message.
func clip(s string) string {
	if utf8.RuneCountInString(s) > 40 {
		r := []rune(s)
		return string(r[:40]) + "..."
	}
	return s
}
