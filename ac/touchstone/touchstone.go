// Package touchstone writes and reads S-parameters in the Touchstone
// format: Touchstone File Format Specification, version 2.0, IBIS Open
// Forum, 2009. Version 1.1 is the subset of it that every tool reads:
// comments start with '!', the option line is
//
//	# <HZ|KHZ|MHZ|GHZ> S <RI|MA|DB> R <ohms>
//
// and each frequency's data is the frequency followed by the matrix
// elements, two numbers each. One- and two-ports put a whole frequency on
// one line, a two-port in the column order N11 N21 N12 N22; three ports
// and more write the matrix row by row, N11 N12 ... N1N, each row starting
// a new line and at most four pairs on a line. Version 2.0 adds bracketed
// keywords ([Version], [Number of Ports], [Two-Port Data Order],
// [Number of Frequencies], [Reference], [Network Data], [End]) and with
// them one reference impedance per port.
//
// The package is a leaf: it imports nothing of the project, so that any
// layer may read a file (a circuit's measured block as well as a sweep's
// result).
package touchstone

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"strconv"
	"strings"
)

// Port is a network port: its name and real reference impedance in ohms.
type Port struct {
	Name      string
	Impedance float64
}

// Point is the S-matrix at one frequency: S[i][j] is S_(i+1)(j+1), each
// normalised to the ports' reference impedances.
type Point struct {
	FrequencyHz float64
	S           [][]complex128
}

// Format is the way a Touchstone file writes each complex matrix element
// (Touchstone 2.0, option line). The zero value is MA, the default of the
// specification.
type Format int

// Touchstone number formats.
const (
	FormatMA Format = iota // magnitude, angle in degrees
	FormatRI               // real part, imaginary part
	FormatDB               // 20 log10 of the magnitude, angle in degrees
)

// ParseFormat reads a format name, "ri", "ma" or "db" in any case.
func ParseFormat(s string) (Format, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "ma":
		return FormatMA, nil
	case "ri":
		return FormatRI, nil
	case "db":
		return FormatDB, nil
	}
	return 0, fmt.Errorf("unknown Touchstone format %q: want ri (real, imaginary), ma (magnitude, angle) or db (dB, angle)", s)
}

// String returns the format as the option line writes it: "MA", "RI" or
// "DB".
func (f Format) String() string {
	switch f {
	case FormatMA:
		return "MA"
	case FormatRI:
		return "RI"
	case FormatDB:
		return "DB"
	}
	return fmt.Sprintf("Format(%d)", int(f))
}

// Set parses s into f, so that a *Format serves as a command-line flag
// value.
func (f *Format) Set(s string) error {
	v, err := ParseFormat(s)
	if err != nil {
		return err
	}
	*f = v
	return nil
}

// Type names the flag's accepted values in help text.
func (f *Format) Type() string { return "ri|ma|db" }

func (f Format) valid() bool { return f == FormatMA || f == FormatRI || f == FormatDB }

// Ext returns the file extension the specification gives an
// nPorts-port file: ".s1p", ".s2p", and so on.
func Ext(nPorts int) string { return ".s" + strconv.Itoa(nPorts) + "p" }

// PortCount returns the port count a file name's extension declares,
// 2 for "amp.s2p" (in any case). A version 1.1 file says its port count
// only this way.
func PortCount(name string) (int, error) {
	i := strings.LastIndexByte(name, '.')
	ext := strings.ToLower(name[i+1:])
	if i < 0 || len(ext) < 3 || ext[0] != 's' || ext[len(ext)-1] != 'p' {
		return 0, fmt.Errorf("file name %q does not end in a Touchstone extension .sNp", name)
	}
	n, err := strconv.Atoi(ext[1 : len(ext)-1])
	if err != nil || n < 1 || n > maxTouchstonePorts || ext[1] == '+' {
		return 0, fmt.Errorf("file name %q: %q is not a Touchstone extension .sNp with 1 <= N <= %d", name, name[i:], maxTouchstonePorts)
	}
	return n, nil
}

// maxTouchstonePorts bounds the port count a reader accepts, so that a
// corrupt count cannot make it size an N² matrix beyond memory. Real
// package models stay well below it.
const maxTouchstonePorts = 10000

// maxLine bounds a line the reader takes. Version 2.0 puts no limit on
// line length, and a many-port row can run long; this one only stops a
// corrupt file from being read into memory whole.
const maxLine = 16 << 20

// dbOfZero is written in DB format for an element of exactly zero
// magnitude (an isolated port, a unilateral network): 20 log10 0 is -∞,
// which is not a number the format allows, and 10^(-10000/20) underflows
// to exactly 0 in IEEE 754 double precision, so every reader gets the zero
// back.
const dbOfZero = -10000

// Write writes points as a Touchstone file of len(ports) ports in
// format f, frequencies in Hz. Each line of comment becomes a '!' comment
// in the header (the circuit name, the bias point); the header names
// qpoint and the ports but no date, so that the same sweep always gives
// the same bytes.
//
// When every port has the same reference impedance the file is version
// 1.1 with R <ohms> on the option line, which every tool reads; otherwise
// it is version 2.0 with a [Reference] line, the only way the specification
// gives to state one impedance per port.
//
// Numbers are written with the fewest digits that parse back to the same
// float64 (strconv 'g', precision -1): RI files round-trip bit for bit,
// MA and DB ones to the few ulps of the polar conversion. That is never
// longer than 17 significant digits, which also round-trip but print
// 0.1 as 0.10000000000000001; %.12g would lose up to 1e-12 of every
// value, and again at each read-and-rewrite. Frequencies
// must be finite, non-negative and strictly increasing (the specification
// orders them, and a version 1.1 reader takes a falling frequency in a
// two-port file as the start of noise data); S must be len(ports) square
// and finite.
func Write(w io.Writer, ports []Port, points []Point, f Format, comment []string) error {
	if len(points) == 0 {
		return errors.New("touchstone: no points to write")
	}
	tw, err := NewWriter(w, ports, f, comment, len(points))
	if err != nil {
		return err
	}
	for _, p := range points {
		if err := tw.Write(p); err != nil {
			return err
		}
	}
	return tw.Close()
}

// Writer writes a Touchstone file one point at a time, for sweeps
// too long to hold in memory. It writes the same bytes as Write.
type Writer struct {
	w       *bufio.Writer
	n       int // ports
	format  Format
	v2      bool
	want    int // points announced, -1 when unknown
	written int
	lastHz  float64
	err     error // sticky write error
	closed  bool
	buf     []byte
}

// NewWriter writes the header of a Touchstone file to w and
// returns a writer for its points; see Write for the layout.
// nPoints is the number of points that will be written, or -1 when it is
// not known. Version 2.0 states [Number of Frequencies] before the data,
// so with per-port reference impedances nPoints must be given (a sweep
// knows it: len(freqs)); whenever it is given, Close checks it. Close
// must be called to complete the file; it does not close w.
func NewWriter(w io.Writer, ports []Port, f Format, comment []string, nPoints int) (*Writer, error) {
	if len(ports) == 0 {
		return nil, errors.New("touchstone: no ports")
	}
	if !f.valid() {
		return nil, fmt.Errorf("touchstone: unknown format %v", f)
	}
	if nPoints == 0 || nPoints < -1 {
		return nil, fmt.Errorf("touchstone: %d points announced: want at least 1, or -1 for unknown", nPoints)
	}
	for i, p := range ports {
		if !(p.Impedance > 0) || math.IsInf(p.Impedance, 0) {
			return nil, fmt.Errorf("touchstone: port %d (%s): reference impedance %g ohm: must be a positive real number", i+1, p.Name, p.Impedance)
		}
	}
	tw := &Writer{w: bufio.NewWriter(w), n: len(ports), format: f, want: nPoints, lastHz: math.Inf(-1)}
	for _, p := range ports[1:] {
		if p.Impedance != ports[0].Impedance {
			tw.v2 = true
		}
	}
	if tw.v2 && nPoints < 0 {
		return nil, errors.New("touchstone: per-port reference impedances need version 2.0, whose [Number of Frequencies] comes before the data: give the number of points")
	}

	b := tw.buf[:0]
	b = append(b, "! S-parameters written by qpoint\n"...)
	for _, c := range comment {
		for _, line := range strings.Split(c, "\n") {
			b = append(b, '!')
			if line = strings.TrimRight(oneLine(line), " "); line != "" {
				b = append(b, ' ')
				b = append(b, line...)
			}
			b = append(b, '\n')
		}
	}
	for i, p := range ports {
		b = fmt.Appendf(b, "! Port %d", i+1)
		if p.Name != "" {
			b = append(b, ": "...)
			b = append(b, oneLine(p.Name)...)
		}
		b = append(b, ", reference "...)
		b = appendNum(b, p.Impedance)
		b = append(b, " ohm\n"...)
	}
	b = append(b, "! Each frequency in Hz is followed by "...)
	switch {
	case tw.n == 1:
		b = append(b, "S11"...)
	case tw.n == 2:
		b = append(b, "S11 S21 S12 S22"...)
	default:
		b = fmt.Appendf(b, "S11 S12 ... S%d%d row by row, each row on a new line", tw.n, tw.n)
	}
	switch f {
	case FormatMA:
		b = append(b, ", each as magnitude and angle in degrees.\n"...)
	case FormatRI:
		b = append(b, ", each as real and imaginary part.\n"...)
	case FormatDB:
		b = append(b, ", each as 20 log10 magnitude and angle in degrees.\n"...)
	}
	if tw.v2 {
		b = append(b, "[Version] 2.0\n"...)
	}
	b = append(b, "# Hz S "...)
	b = append(b, f.String()...)
	b = append(b, " R "...)
	b = appendNum(b, ports[0].Impedance)
	b = append(b, '\n')
	if tw.v2 {
		b = fmt.Appendf(b, "[Number of Ports] %d\n", tw.n)
		if tw.n == 2 {
			b = append(b, "[Two-Port Data Order] 21_12\n"...)
		}
		b = fmt.Appendf(b, "[Number of Frequencies] %d\n", nPoints)
		b = append(b, "[Reference]"...)
		for _, p := range ports {
			b = append(b, ' ')
			b = appendNum(b, p.Impedance)
		}
		b = append(b, "\n[Network Data]\n"...)
	}
	tw.buf = b
	if _, err := tw.w.Write(b); err != nil {
		return nil, fmt.Errorf("touchstone: %w", err)
	}
	return tw, nil
}

// oneLine replaces control characters so that a name or comment cannot
// end its comment line and turn into data.
func oneLine(s string) string {
	return strings.Map(func(r rune) rune {
		if r < ' ' || r == 0x7f {
			return ' '
		}
		return r
	}, s)
}

func appendNum(b []byte, v float64) []byte { return strconv.AppendFloat(b, v, 'g', -1, 64) }

// Write adds one point. A point that cannot be written (wrong shape, a
// frequency out of order, a value that is not finite) is refused with an
// error and leaves the file as it was; an error from the underlying writer
// is returned by every later call.
func (tw *Writer) Write(p Point) error {
	if tw.err != nil {
		return tw.err
	}
	if tw.closed {
		return errors.New("touchstone: write after Close")
	}
	hz := p.FrequencyHz
	if math.IsNaN(hz) || math.IsInf(hz, 0) || hz < 0 {
		return fmt.Errorf("touchstone: frequency %g Hz: must be finite and not negative", hz)
	}
	if !(hz > tw.lastHz) {
		return fmt.Errorf("touchstone: frequency %g Hz after %g Hz: frequencies must increase strictly", hz, tw.lastHz)
	}
	if tw.want >= 0 && tw.written == tw.want {
		return fmt.Errorf("touchstone: point at %g Hz is one more than the %d announced in [Number of Frequencies]", hz, tw.want)
	}
	if len(p.S) != tw.n {
		return fmt.Errorf("touchstone: at %g Hz: S has %d rows for %d ports", hz, len(p.S), tw.n)
	}
	for i, row := range p.S {
		if len(row) != tw.n {
			return fmt.Errorf("touchstone: at %g Hz: row %d of S has %d elements for %d ports", hz, i+1, len(row), tw.n)
		}
	}

	b := appendNum(tw.buf[:0], hz)
	pairs := 0
	put := func(i, j int) error {
		x, y, err := tw.pair(p.S[i][j])
		if err != nil {
			return fmt.Errorf("touchstone: at %g Hz: S%d%d = %v: %w", hz, i+1, j+1, p.S[i][j], err)
		}
		if pairs == 4 {
			// Version 1.1 allows at most four pairs on a line.
			b = append(b, "\n "...)
			pairs = 0
		}
		b = append(b, ' ')
		b = appendNum(b, x)
		b = append(b, ' ')
		b = appendNum(b, y)
		pairs++
		return nil
	}
	var err error
	if tw.n <= 2 {
		// Column order N11 N21 N12 N22 for a two-port, by both versions
		// (1.1 fixes it, 2.0's [Two-Port Data Order] 21_12 says it).
		for j := 0; j < tw.n && err == nil; j++ {
			for i := 0; i < tw.n && err == nil; i++ {
				err = put(i, j)
			}
		}
	} else {
		for i := 0; i < tw.n && err == nil; i++ {
			if i > 0 {
				b = append(b, "\n "...)
				pairs = 0
			}
			for j := 0; j < tw.n && err == nil; j++ {
				err = put(i, j)
			}
		}
	}
	tw.buf = b
	if err != nil {
		return err
	}
	b = append(b, '\n')
	tw.buf = b
	if _, err := tw.w.Write(b); err != nil {
		tw.err = fmt.Errorf("touchstone: %w", err)
		return tw.err
	}
	tw.written++
	tw.lastHz = hz
	return nil
}

// pair returns the two numbers the format writes for s.
func (tw *Writer) pair(s complex128) (float64, float64, error) {
	if cmplx.IsNaN(s) || cmplx.IsInf(s) {
		return 0, 0, errors.New("not a finite number")
	}
	if tw.format == FormatRI {
		return real(s), imag(s), nil
	}
	m := cmplx.Abs(s)
	if math.IsInf(m, 0) {
		return 0, 0, errors.New("magnitude beyond the float64 range; write it as RI")
	}
	if m == 0 {
		if tw.format == FormatDB {
			return dbOfZero, 0, nil
		}
		return 0, 0, nil
	}
	deg := cmplx.Phase(s) * (180 / math.Pi)
	if tw.format == FormatMA {
		return m, deg, nil
	}
	db := 20 * math.Log10(m)
	if math.IsInf(math.Pow(10, db/20), 0) {
		// Within an ulp of the largest float64 the dB value rounds up
		// past it and would read back as +Inf.
		return 0, 0, errors.New("magnitude too close to the float64 limit to write in dB; write it as RI")
	}
	return db, deg, nil
}

// Close writes what the file still needs ([End] in version 2.0), checks
// that as many points were written as announced, and flushes. It does not
// close the underlying writer.
func (tw *Writer) Close() error {
	if tw.err != nil {
		return tw.err
	}
	if tw.closed {
		return nil
	}
	tw.closed = true
	if tw.written == 0 {
		return errors.New("touchstone: no points written")
	}
	if tw.want >= 0 && tw.written != tw.want {
		return fmt.Errorf("touchstone: %d points written, %d announced", tw.written, tw.want)
	}
	if tw.v2 {
		if _, err := tw.w.WriteString("[End]\n"); err != nil {
			tw.err = fmt.Errorf("touchstone: %w", err)
			return tw.err
		}
	}
	if err := tw.w.Flush(); err != nil {
		tw.err = fmt.Errorf("touchstone: %w", err)
		return tw.err
	}
	return nil
}

// Read reads the S-parameters of a Touchstone file of version 1.1
// or 2.0 (Touchstone File Format Specification 2.0, IBIS Open Forum,
// 2009): any frequency unit, RI, MA or DB numbers, comments anywhere, a
// frequency's data over several lines; in version 2.0 also [Reference],
// [Two-Port Data Order] 12_21 or 21_12 and [Matrix Format] Full, Lower or
// Upper. Noise data (a version 1.1 two-port's trailing lines, version 2.0's
// [Noise Data]) is checked for form and skipped. Y, Z, H and G parameters
// and mixed-mode data are refused.
//
// nPorts is the port count, which a version 1.1 file states only in its
// extension (PortCount); for version 2.0 it must agree with
// [Number of Ports], or be 0 to take it from there.
//
// Ports are named "1", "2", ... (the format has no port names) with the
// file's reference impedances. Points carry the frequency in Hz and S. An
// error names the line and what was expected there.
func Read(r io.Reader, nPorts int) (ports []Port, points []Point, err error) {
	if nPorts < 0 || nPorts > maxTouchstonePorts {
		return nil, nil, fmt.Errorf("touchstone: %d ports: want 1 to %d, or 0 for a version 2.0 file to say", nPorts, maxTouchstonePorts)
	}
	t := &tsReader{given: nPorts, mul: 1e9, format: FormatMA, r: 50, nFreq: -1}
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 64<<10), maxLine)
	for t.section != secEnd && sc.Scan() {
		t.line++
		if err := t.do(sc.Text()); err != nil {
			return nil, nil, err
		}
	}
	if err := sc.Err(); err != nil {
		if errors.Is(err, bufio.ErrTooLong) {
			return nil, nil, &LineError{Line: t.line + 1, Err: fmt.Errorf("longer than %d MiB: %w", maxLine>>20, err)}
		}
		return nil, nil, &LineError{Line: t.line + 1, Err: err}
	}
	if err := t.finish(); err != nil {
		return nil, nil, err
	}
	ports = make([]Port, t.n)
	for i := range ports {
		ports[i] = Port{Name: strconv.Itoa(i + 1), Impedance: t.ref(i)}
	}
	return ports, t.points, nil
}

type tsSection int

const (
	secHeader tsSection = iota
	secInfo             // inside [Begin Information]
	secNetwork
	secNoise
	secEnd
)

type tsMatrix int

const (
	matFull tsMatrix = iota
	matLower
	matUpper
)

// tsReader holds the state of Read between lines.
type tsReader struct {
	given       int // nPorts argument, 0 if not given
	line        int
	started     bool // a non-comment line has been seen
	v2          bool
	haveVersion bool
	section     tsSection

	haveOpt bool
	mul     float64 // Hz per file unit
	format  Format
	r       float64 // option line R

	n         int // ports, 0 while unknown
	nLine     int // line of [Number of Ports]
	order1221 bool
	haveOrder bool
	matrix    tsMatrix
	nFreq     int // [Number of Frequencies], -1 while unknown
	nFreqLine int
	refs      []float64
	refWant   bool // [Reference] still short of values
	refLine   int
	noise     bool // in version 1.1 two-port noise data

	rec     []float64 // numbers of the frequency being read
	recLine int
	points  []Point
}

func (t *tsReader) errf(format string, a ...any) error {
	return &LineError{Line: t.line, Err: fmt.Errorf(format, a...)}
}

// LineError is a problem at a line of a Touchstone file: Read's errors
// about the file's contents are LineErrors, so that a caller can point at
// the line (a circuit file's block names the file and the line).
type LineError struct {
	Line int   // 1-based
	Err  error // what is wrong there
}

func (e *LineError) Error() string { return fmt.Sprintf("touchstone line %d: %v", e.Line, e.Err) }

// Unwrap returns what is wrong.
func (e *LineError) Unwrap() error { return e.Err }

func (t *tsReader) ref(i int) float64 {
	if t.refs != nil {
		return t.refs[i]
	}
	return t.r
}

// pairs is the number of matrix elements a frequency's data holds.
func (t *tsReader) pairs() int {
	if t.matrix == matFull {
		return t.n * t.n
	}
	return t.n * (t.n + 1) / 2
}

func (t *tsReader) do(raw string) error {
	text := raw
	if i := strings.IndexByte(text, '!'); i >= 0 {
		text = text[:i]
	}
	text = strings.TrimSpace(text)
	if text == "" {
		return nil
	}
	if t.section == secInfo {
		if kw, _, ok := keyword(text); ok && strings.EqualFold(kw, "end information") {
			t.section = secHeader
		}
		return nil
	}
	first := !t.started
	t.started = true
	if text[0] == '[' {
		kw, arg, ok := keyword(text)
		if !ok {
			return t.errf("%q: expected a keyword in brackets, like [Network Data]", text)
		}
		if first {
			if !strings.EqualFold(kw, "version") {
				return t.errf("[%s] before [Version]: expected a version 2.0 file to start with [Version] 2.0, or a version 1.1 file with its option line", kw)
			}
			t.v2 = true
		} else if !t.v2 {
			return t.errf("keyword [%s] in a version 1.1 file: a version 2.0 file must start with [Version] 2.0", kw)
		}
		if t.refWant {
			return t.errf("[%s]: expected %d more [Reference] impedances from line %d first", kw, t.n-len(t.refs), t.refLine)
		}
		if len(t.rec) > 0 {
			return t.errf("[%s]: the data for %g Hz from line %d stops after %d of %d numbers", kw, t.rec[0]*t.mul, t.recLine, len(t.rec), 1+2*t.pairs())
		}
		return t.keyword(kw, arg)
	}
	if text[0] == '#' {
		if first && t.given == 0 {
			return t.errf("a version 1.1 file does not state its port count: give it (from the extension .sNp)")
		}
		if first {
			t.n = t.given
		}
		if t.haveOpt {
			// Version 1.1: only the first option line counts.
			return nil
		}
		return t.option(text[1:])
	}
	if first {
		return t.errf("%q: expected the option line # <unit> S <RI|MA|DB> R <ohms>, or [Version] 2.0", clip(text))
	}
	if t.refWant {
		return t.reference(text)
	}
	if t.v2 && t.section != secNetwork && t.section != secNoise {
		return t.errf("%q: expected a keyword; data belongs after [Network Data]", clip(text))
	}
	if !t.haveOpt {
		return t.errf("%q: data before the option line # <unit> S <RI|MA|DB> R <ohms>", clip(text))
	}
	return t.data(text)
}

// clip shortens quoted input in messages.
func clip(s string) string {
	if len(s) > 40 {
		return s[:40] + "..."
	}
	return s
}

// keyword splits "[Number of  Ports] 2" into "Number of Ports" and "2".
// Keywords are matched without regard to case (Touchstone 2.0).
func keyword(text string) (kw, arg string, ok bool) {
	end := strings.IndexByte(text, ']')
	if !strings.HasPrefix(text, "[") || end < 0 {
		return "", "", false
	}
	kw = strings.Join(strings.Fields(text[1:end]), " ")
	return kw, strings.TrimSpace(text[end+1:]), true
}

func (t *tsReader) count(kw, arg string, max int) (int, error) {
	n, err := strconv.Atoi(arg)
	if err != nil || n < 1 || n > max {
		return 0, t.errf("[%s] %q: expected a whole number from 1 to %d", kw, arg, max)
	}
	return n, nil
}

func (t *tsReader) keyword(kw, arg string) error {
	once := func(done bool) error {
		if done {
			return t.errf("[%s] appears a second time", kw)
		}
		return nil
	}
	needPorts := func() error {
		if t.n == 0 {
			return t.errf("[%s] before [Number of Ports]: expected [Number of Ports] first", kw)
		}
		return nil
	}
	key := strings.ToLower(kw)
	if t.section != secHeader && key != "noise data" && key != "end" {
		return t.errf("[%s] after [Network Data]: expected [Noise Data] or [End]", kw)
	}
	switch key {
	case "version":
		if err := once(t.haveVersion); err != nil {
			return err
		}
		t.haveVersion = true
		if arg != "2.0" && arg != "2.1" {
			return t.errf("[Version] %q: expected 2.0", arg)
		}
	case "number of ports":
		if err := once(t.n > 0); err != nil {
			return err
		}
		n, err := t.count(kw, arg, maxTouchstonePorts)
		if err != nil {
			return err
		}
		if t.given > 0 && n != t.given {
			return t.errf("[Number of Ports] %d, but %d ports were expected (from the file name or its use)", n, t.given)
		}
		t.n, t.nLine = n, t.line
	case "two-port data order":
		if err := once(t.haveOrder); err != nil {
			return err
		}
		switch arg {
		case "12_21":
			t.order1221 = true
		case "21_12":
		default:
			return t.errf("[Two-Port Data Order] %q: expected 12_21 or 21_12", arg)
		}
		t.haveOrder = true
	case "number of frequencies":
		if err := once(t.nFreq >= 0); err != nil {
			return err
		}
		n, err := t.count(kw, arg, math.MaxInt32)
		if err != nil {
			return err
		}
		t.nFreq, t.nFreqLine = n, t.line
	case "number of noise frequencies":
		if _, err := t.count(kw, arg, math.MaxInt32); err != nil {
			return err
		}
	case "reference":
		if err := needPorts(); err != nil {
			return err
		}
		if err := once(t.refs != nil); err != nil {
			return err
		}
		t.refs, t.refWant, t.refLine = make([]float64, 0, min(t.n, 1024)), true, t.line
		if arg != "" {
			return t.reference(arg)
		}
	case "matrix format":
		switch strings.ToLower(arg) {
		case "full":
			t.matrix = matFull
		case "lower":
			t.matrix = matLower
		case "upper":
			t.matrix = matUpper
		default:
			return t.errf("[Matrix Format] %q: expected Full, Lower or Upper", arg)
		}
	case "mixed-mode order":
		return t.errf("[Mixed-Mode Order]: mixed-mode parameters are not supported, only single-ended S-parameters")
	case "begin information":
		t.section = secInfo
	case "network data":
		if err := needPorts(); err != nil {
			return err
		}
		if !t.haveOpt {
			return t.errf("[Network Data] before the option line # <unit> S <RI|MA|DB> R <ohms>")
		}
		if t.nFreq < 0 {
			return t.errf("[Network Data] without [Number of Frequencies], which version 2.0 requires")
		}
		if t.n == 2 && !t.haveOrder && t.matrix == matFull {
			// Version 2.0 requires it for two-ports; guessing would swap
			// S21 and S12 if the guess were wrong.
			return t.errf("[Network Data] of a two-port without [Two-Port Data Order] 12_21 or 21_12, which version 2.0 requires")
		}
		t.section = secNetwork
	case "noise data":
		if t.section != secNetwork {
			return t.errf("[Noise Data] before [Network Data]")
		}
		if err := t.checkCount(); err != nil {
			return err
		}
		t.section = secNoise
	case "end":
		switch t.section {
		case secNetwork:
			if err := t.checkCount(); err != nil {
				return err
			}
		case secNoise:
		default:
			return t.errf("[End] before [Network Data]")
		}
		t.section = secEnd
	case "end information":
		return t.errf("[End Information] without [Begin Information]")
	default:
		return t.errf("unknown keyword [%s]", kw)
	}
	return nil
}

func (t *tsReader) checkCount() error {
	if len(t.points) != t.nFreq {
		return t.errf("%d frequencies of network data, but [Number of Frequencies] on line %d says %d", len(t.points), t.nFreqLine, t.nFreq)
	}
	return nil
}

// reference takes [Reference] impedances, which may continue over lines.
func (t *tsReader) reference(text string) error {
	for _, tok := range strings.Fields(text) {
		if len(t.refs) == t.n {
			return t.errf("[Reference] %q: more than the %d impedances of %d ports", tok, t.n, t.n)
		}
		z, err := number(tok)
		if err != nil {
			return t.errf("[Reference]: %w", err)
		}
		if !(z > 0) {
			return t.errf("[Reference] %s ohm for port %d: expected a positive impedance", tok, len(t.refs)+1)
		}
		t.refs = append(t.refs, z)
	}
	t.refWant = len(t.refs) < t.n
	return nil
}

// option reads the option line after its '#'.
func (t *tsReader) option(text string) error {
	f := strings.Fields(text)
	for i := 0; i < len(f); i++ {
		switch tok := strings.ToLower(f[i]); tok {
		case "hz":
			t.mul = 1
		case "khz":
			t.mul = 1e3
		case "mhz":
			t.mul = 1e6
		case "ghz":
			t.mul = 1e9
		case "s":
		case "y", "z", "h", "g":
			return t.errf("option line: %s-parameters are not supported, only S", strings.ToUpper(tok))
		case "ma":
			t.format = FormatMA
		case "ri":
			t.format = FormatRI
		case "db":
			t.format = FormatDB
		case "r":
			if i+1 == len(f) {
				return t.errf("option line: R without a value: expected R <ohms>")
			}
			i++
			z, err := number(f[i])
			if err != nil {
				return t.errf("option line R: %w", err)
			}
			if !(z > 0) {
				return t.errf("option line R %s: expected a positive reference impedance", f[i])
			}
			t.r = z
		default:
			return t.errf("option line: %q: expected a unit (Hz, kHz, MHz, GHz), the parameter S, a format (RI, MA, DB) or R <ohms>", clip(f[i]))
		}
	}
	t.haveOpt = true
	return nil
}

// number parses a decimal number. ParseFloat alone would also take "NaN",
// "Inf", hexadecimal and underscores, none of which the format allows.
func number(tok string) (float64, error) {
	for i := 0; i < len(tok); i++ {
		c := tok[i]
		if !('0' <= c && c <= '9' || c == '.' || c == '-' || c == '+' || c == 'e' || c == 'E') {
			return 0, fmt.Errorf("%q: expected a decimal number", clip(tok))
		}
	}
	v, err := strconv.ParseFloat(tok, 64)
	if err != nil {
		if errors.Is(err, strconv.ErrRange) {
			return 0, fmt.Errorf("%q: beyond the float64 range: %w", clip(tok), strconv.ErrRange)
		}
		return 0, fmt.Errorf("%q: expected a decimal number: %w", clip(tok), strconv.ErrSyntax)
	}
	return v, nil
}

// data reads a line of numbers: network data, or noise data to skip.
func (t *tsReader) data(text string) error {
	f := strings.Fields(text)
	vals := make([]float64, len(f))
	for i, tok := range f {
		v, err := number(tok)
		if err != nil {
			return t.errf("number %d: %w", i+1, err)
		}
		vals[i] = v
	}
	if len(t.rec) == 0 && !t.noise && t.section != secNoise {
		hz := vals[0] * t.mul
		if math.IsInf(hz, 0) || hz < 0 {
			return t.errf("frequency %s: expected a finite, non-negative frequency", f[0])
		}
		if len(t.points) > 0 && !(hz > t.points[len(t.points)-1].FrequencyHz) {
			if !t.v2 && t.n == 2 {
				// Version 1.1 two-port: a frequency not above the last
				// one starts the noise parameters.
				t.noise = true
			} else {
				return t.errf("frequency %s after %g Hz: expected frequencies in increasing order", f[0], t.points[len(t.points)-1].FrequencyHz)
			}
		}
	}
	if t.noise || t.section == secNoise {
		if len(vals) != 5 {
			return t.errf("%d numbers in noise data: expected 5 (frequency, NFmin in dB, |Γopt|, angle of Γopt, Rn/Z0)", len(vals))
		}
		return nil
	}
	if t.v2 && len(t.rec) == 0 && len(t.points) == t.nFreq {
		return t.errf("more frequencies than the %d [Number of Frequencies] on line %d gives", t.nFreq, t.nFreqLine)
	}
	if len(t.rec) == 0 {
		t.recLine = t.line
	}
	need := 1 + 2*t.pairs()
	if len(t.rec)+len(vals) > need {
		f0 := vals[0]
		if len(t.rec) > 0 {
			f0 = t.rec[0]
		}
		return t.errf("%d numbers more than the data for %g Hz from line %d holds (%d for %d ports): each frequency starts a new line",
			len(t.rec)+len(vals)-need, f0*t.mul, t.recLine, need, t.n)
	}
	t.rec = append(t.rec, vals...)
	if len(t.rec) < need {
		return nil
	}
	p, err := t.point(t.rec)
	t.rec = t.rec[:0]
	if err != nil {
		return err
	}
	t.points = append(t.points, p)
	return nil
}

// point turns a frequency's numbers into a Point.
func (t *tsReader) point(v []float64) (Point, error) {
	p := Point{FrequencyHz: v[0] * t.mul, S: make([][]complex128, t.n)}
	for i := range p.S {
		p.S[i] = make([]complex128, t.n)
	}
	k := 1
	next := func(i, j int) error {
		a, b := v[k], v[k+1]
		k += 2
		var s complex128
		switch t.format {
		case FormatRI:
			s = complex(a, b)
		case FormatMA:
			s = polar(a, b)
		case FormatDB:
			s = polar(math.Pow(10, a/20), b)
		}
		if cmplx.IsInf(s) || cmplx.IsNaN(s) {
			return t.errf("S%d%d at %g Hz (data from line %d): %g, %g is beyond the float64 range", i+1, j+1, p.FrequencyHz, t.recLine, a, b)
		}
		p.S[i][j] = s
		return nil
	}
	n := t.n
	switch {
	case t.matrix == matFull && n == 2 && !t.order1221:
		for _, ij := range [4][2]int{{0, 0}, {1, 0}, {0, 1}, {1, 1}} {
			if err := next(ij[0], ij[1]); err != nil {
				return p, err
			}
		}
	case t.matrix == matFull:
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				if err := next(i, j); err != nil {
					return p, err
				}
			}
		}
	default:
		// Lower and Upper give one triangle of a reciprocal network's
		// symmetric matrix, row by row.
		for i := 0; i < n; i++ {
			lo, hi := 0, i
			if t.matrix == matUpper {
				lo, hi = i, n-1
			}
			for j := lo; j <= hi; j++ {
				if err := next(i, j); err != nil {
					return p, err
				}
				p.S[j][i] = p.S[i][j]
			}
		}
	}
	return p, nil
}

// polar returns m∠deg.
func polar(m, deg float64) complex128 {
	s, c := math.Sincos(deg * (math.Pi / 180))
	return complex(m*c, m*s)
}

func (t *tsReader) finish() error {
	switch {
	case !t.started:
		return &LineError{Line: t.line, Err: errors.New("the file is empty: expected an option line or [Version] 2.0")}
	case t.refWant:
		return t.errf("end of file: [Reference] on line %d has %d of %d impedances", t.refLine, len(t.refs), t.n)
	case len(t.rec) > 0:
		return t.errf("end of file: the data for %g Hz from line %d stops after %d of %d numbers", t.rec[0]*t.mul, t.recLine, len(t.rec), 1+2*t.pairs())
	case t.v2 && t.section == secInfo:
		return t.errf("end of file inside [Begin Information]: expected [End Information]")
	case t.v2 && t.section != secEnd:
		return t.errf("end of file: expected [End], which closes a version 2.0 file (is it truncated?)")
	case !t.haveOpt:
		return t.errf("end of file: no option line # <unit> S <RI|MA|DB> R <ohms>")
	case len(t.points) == 0:
		return t.errf("end of file: no network data")
	}
	return nil
}
