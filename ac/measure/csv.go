package measure

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
)

// Limits on what ReadCSV takes.
const (
	// MinSamples is the shortest record accepted: fewer samples cannot
	// resolve a fundamental and its harmonics from DC.
	MinSamples = 16
	// MaxSamples bounds a record at about 80 MB of samples, whose
	// transform (zero-padded to 2^24 points) takes about 0.5 GB.
	MaxSamples = 10_000_000
	// maxLineBytes bounds one line of the file.
	maxLineBytes = 1 << 20
	// timeTolerance is the relative tolerance of the uniform-spacing check.
	timeTolerance = 1e-6
)

// CSVOptions says how to read a waveform file.
type CSVOptions struct {
	// SampleRateHz is the sample rate of a file with one value column. For
	// a file with a time column it may be left zero; if given, it must
	// agree with the time column to 0.1 %.
	SampleRateHz float64
}

// ErrNoSampleRate is wrapped by the error for a one-column file read
// without a sample rate.
var ErrNoSampleRate = errors.New("no sample rate")

// ParseError is a problem at a place in a waveform file. Line and Column
// are 1-based; Column counts bytes from the start of the line.
type ParseError struct {
	Line, Column int
	Msg          string // what is wrong; what is accepted
	Err          error  // a sentinel such as ErrNoSampleRate, or nil
}

func (e *ParseError) Error() string {
	return fmt.Sprintf("line %d, column %d: %s", e.Line, e.Column, e.Msg)
}

func (e *ParseError) Unwrap() error { return e.Err }

const acceptedNumber = "accepted: decimal numbers such as 0.0125 or -1.5e-3 (a decimal comma with ; or tab separators)"

// field is one cell of a line and the 1-based column where it starts;
// quoted tells that it was written in double quotes.
type field struct {
	text   string
	col    int
	quoted bool
}

// ReadCSV reads a waveform: either two columns, time in seconds and value
// in volts, or one value column with the sample rate in opts. Columns are
// separated by commas, semicolons, tabs or runs of spaces (the first data
// line decides); with semicolons or tabs, or inside double quotes, a
// decimal comma is accepted ("0,125"). Fields may be quoted, with "" for a
// quote inside. '#' starts a comment that runs to the end of the line;
// blank lines are skipped.
//
// Lines before the first data line that start with a word, not a number,
// are the instrument's header and metadata (a column header, the model, a
// record length) and are skipped. A metadata line naming the sample
// interval ("Sample Interval,1e-06", "X Increment;2E-9", "dt 5e-7") or the
// sample rate ("Sample Rate,1e6") gives the rate of a one-column file, and
// for a file with a time column it must agree with the times to 0.1 %, as
// opts.SampleRateHz must; a rate in opts takes precedence over the file's.
//
// Times must rise strictly and be uniformly spaced: each step within
// 1 ppm of the median step plus 1 ppm of the time's magnitude (what seven
// printed digits resolve), and never off by a quarter step, so that a
// missing or repeated sample is always caught. The sample rate is then
// (N-1)/(t_last - t_0).
//
// Every error is a *ParseError naming the line and column, what is wrong
// and what is accepted. ReadCSV takes from MinSamples to MaxSamples
// samples and never panics, whatever the bytes.
func ReadCSV(r io.Reader, opts CSVOptions) (*Waveform, error) {
	if opts.SampleRateHz != 0 && !(opts.SampleRateHz >= MinSampleRateHz && opts.SampleRateHz <= MaxSampleRateHz) {
		return nil, &ParseError{Line: 1, Column: 1, Msg: fmt.Sprintf("sample rate %g Hz given; accepted: %g Hz to %g Hz", opts.SampleRateHz, MinSampleRateHz, MaxSampleRateHz)}
	}
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 64*1024), maxLineBytes)

	var (
		times, values []float64
		lineOf        []int // the line of each sample, for the time checks
		columns       int   // 0 until the first data line
		sep           byte
		lineNo        int
		lastPreamble  int     // the last header or metadata line
		fileRate      float64 // the rate a metadata line gives
		fileRateLine  int
	)
	for sc.Scan() {
		lineNo++
		raw := sc.Bytes()
		if lineNo == 1 {
			raw = bytes.TrimPrefix(raw, []byte("\xef\xbb\xbf"))
		}
		line := string(raw)
		if i := strings.IndexByte(line, '#'); i >= 0 {
			line = line[:i]
		}
		if strings.TrimSpace(line) == "" {
			continue
		}
		if columns == 0 {
			s := detectSeparator(line)
			fields := trimEmpty(split(line, s), 1)
			if !leadingNumber(fields, s) {
				// A header or metadata line: it starts with a word.
				lastPreamble = lineNo
				if r, ok := metadataRate(line, s); ok && fileRate == 0 {
					if !(r >= MinSampleRateHz && r <= MaxSampleRateHz) {
						return nil, &ParseError{Line: lineNo, Column: 1,
							Msg: fmt.Sprintf("the file's sample interval or rate gives %g Hz; accepted: %g Hz to %g Hz", r, MinSampleRateHz, MaxSampleRateHz)}
					}
					fileRate, fileRateLine = r, lineNo
				}
				continue
			}
			sep = s
			columns = len(fields)
			switch {
			case columns > 2:
				return nil, &ParseError{Line: lineNo, Column: fields[2].col,
					Msg: fmt.Sprintf("%d columns; accepted: two columns (time in s, value in V) or one value column", columns)}
			case columns == 1 && opts.SampleRateHz == 0 && fileRate == 0:
				return nil, &ParseError{Line: lineNo, Column: fields[0].col, Err: ErrNoSampleRate,
					Msg: "one value column and no sample rate; accepted: a time column before the values, or the sample rate given with the file or in a metadata line such as `Sample Interval,1e-06`"}
			}
		}
		fields := trimEmpty(split(line, sep), columns)
		if len(fields) != columns {
			col := 1
			if len(fields) > 0 {
				col = fields[len(fields)-1].col
			}
			return nil, &ParseError{Line: lineNo, Column: col,
				Msg: fmt.Sprintf("%s where the first data line has %d; accepted: the same columns on every line", plural(len(fields), "column"), columns)}
		}
		if len(values) >= MaxSamples {
			return nil, &ParseError{Line: lineNo, Column: 1,
				Msg: fmt.Sprintf("more than %d samples; accepted: at most %d, so shorten or decimate the record", MaxSamples, MaxSamples)}
		}
		nums := [2]float64{}
		for i, f := range fields {
			v, err := parseNumber(f, sep)
			if err != "" {
				return nil, &ParseError{Line: lineNo, Column: f.col, Msg: err}
			}
			nums[i] = v
		}
		if columns == 2 {
			times = append(times, nums[0])
			values = append(values, nums[1])
			lineOf = append(lineOf, lineNo)
		} else {
			values = append(values, nums[0])
		}
	}
	if err := sc.Err(); err != nil {
		msg := err.Error()
		if errors.Is(err, bufio.ErrTooLong) {
			msg = fmt.Sprintf("line longer than %d bytes; accepted: one sample per line", maxLineBytes)
		} else {
			msg = "cannot read on: " + msg
		}
		return nil, &ParseError{Line: lineNo + 1, Column: 1, Msg: msg}
	}
	end := max(lineNo, 1)
	if len(values) == 0 && lastPreamble > 0 {
		return nil, &ParseError{Line: lastPreamble, Column: 1,
			Msg: fmt.Sprintf("no numeric data follows the header and metadata that end at line %d; accepted: rows of numbers after the header, time in s and value in V, or one value column", lastPreamble)}
	}
	if len(values) < MinSamples {
		return nil, &ParseError{Line: end, Column: 1,
			Msg: fmt.Sprintf("the file ends after %d samples; accepted: at least %d samples", len(values), MinSamples)}
	}
	given := opts.SampleRateHz
	if given == 0 {
		given = fileRate
	}
	w := &Waveform{Samples: values, SampleRateHz: given}
	if columns == 2 {
		start, rate, err := checkTimes(times, lineOf)
		if err != nil {
			return nil, err
		}
		if opts.SampleRateHz != 0 && math.Abs(rate-opts.SampleRateHz) > 1e-3*rate {
			return nil, &ParseError{Line: lineOf[0], Column: 1,
				Msg: fmt.Sprintf("the time column gives a sample rate of %.7g Hz but %.7g Hz was given; accepted: a sample rate that agrees with the time column to 0.1 %%, or none", rate, opts.SampleRateHz)}
		}
		if opts.SampleRateHz == 0 && fileRate != 0 && math.Abs(rate-fileRate) > 1e-3*rate {
			return nil, &ParseError{Line: fileRateLine, Column: 1,
				Msg: fmt.Sprintf("this line gives a sample rate of %.7g Hz but the time column %.7g Hz; accepted: a sample interval that agrees with the time column to 0.1 %%", fileRate, rate)}
		}
		w.StartS, w.SampleRateHz = start, rate
		// A time stamp is known to the spacing of float64 numbers at its
		// size; the rate, from the span, to that over the span.
		last := max(math.Abs(times[0]), math.Abs(times[len(times)-1]))
		w.RateUncertainty = (math.Nextafter(last, math.Inf(1)) - last) / (times[len(times)-1] - times[0])
	}
	return w, nil
}

// detectSeparator picks the column separator of a line: tab, then
// semicolon, then comma, then spaces; 0 means a single column.
func detectSeparator(line string) byte {
	for _, s := range []byte{'\t', ';', ','} {
		if strings.IndexByte(line, s) >= 0 {
			return s
		}
	}
	if len(strings.Fields(line)) > 1 {
		return ' '
	}
	return 0
}

// split cuts a line into trimmed, unquoted fields with their columns. A
// field in double quotes may hold the separator; "" inside it is a quote.
// Empty trailing fields (a separator at the end of the line) are dropped
// by trimEmpty.
func split(line string, sep byte) []field {
	var out []field
	if sep == ' ' {
		i := 0
		for i < len(line) {
			for i < len(line) && (line[i] == ' ' || line[i] == '\t' || line[i] == '\r') {
				i++
			}
			j := i
			for j < len(line) && line[j] != ' ' && line[j] != '\t' && line[j] != '\r' {
				j++
			}
			if j > i {
				text, quoted := unquote(line[i:j])
				out = append(out, field{text, i + 1, quoted})
			}
			i = j
		}
		return out
	}
	start := 0
	for {
		// Skip leading blanks; a quote then opens a quoted field.
		i := start
		for i < len(line) && (line[i] == ' ' || line[i] == '\t' && sep != '\t' || line[i] == '\r') {
			i++
		}
		end := len(line)
		if i < len(line) && line[i] == '"' {
			// The field runs to the closing quote (not a doubled one).
			k := i + 1
			for k < len(line) {
				if line[k] == '"' {
					if k+1 < len(line) && line[k+1] == '"' {
						k += 2
						continue
					}
					break
				}
				k++
			}
			if sep != 0 {
				if m := strings.IndexByte(line[min(k, len(line)):], sep); m >= 0 {
					end = k + m
				}
			}
		} else if sep != 0 {
			if k := strings.IndexByte(line[start:], sep); k >= 0 {
				end = start + k
			}
		}
		cell := line[start:end]
		lead := len(cell) - len(strings.TrimLeft(cell, " \t\r"))
		text, quoted := unquote(strings.TrimSpace(cell))
		out = append(out, field{text, start + lead + 1, quoted})
		if end == len(line) {
			break
		}
		start = end + 1
	}
	return out
}

// trimEmpty drops empty trailing fields (a separator at the end of the
// line) beyond the first keep.
func trimEmpty(fields []field, keep int) []field {
	for len(fields) > max(keep, 1) && fields[len(fields)-1].text == "" {
		fields = fields[:len(fields)-1]
	}
	return fields
}

func plural(n int, word string) string {
	if n == 1 {
		return "1 " + word
	}
	return fmt.Sprintf("%d %ss", n, word)
}

// unquote strips a field's double quotes, undoubling "" inside, and
// reports whether it was quoted.
func unquote(s string) (string, bool) {
	if len(s) >= 2 && s[0] == '"' && s[len(s)-1] == '"' {
		return strings.TrimSpace(strings.ReplaceAll(s[1:len(s)-1], `""`, `"`)), true
	}
	return s, false
}

// leadingNumber reports whether a line's first field reads as a number,
// finite or not: a data line, not a header or metadata line.
func leadingNumber(fields []field, sep byte) bool {
	if len(fields) == 0 {
		return false
	}
	_, err := strconv.ParseFloat(decimalPoint(fields[0], sep), 64)
	return err == nil || errors.Is(err, strconv.ErrRange)
}

// metadataRate reads the sample rate a metadata line gives: a line that
// starts by naming the sample interval (interval, increment, time step,
// dt: seconds) or the sample rate (Hz), and the first number after that
// name. A decimal comma is read as the line's separator allows.
func metadataRate(line string, sep byte) (float64, bool) {
	lower := strings.ToLower(line)
	var at int
	interval := false
	for _, k := range []struct {
		word     string
		interval bool
	}{{"sample interval", true}, {"sampling interval", true}, {"x increment", true}, {"xincrement", true}, {"horizontal increment", true},
		{"increment", true}, {"interval", true}, {"time step", true}, {"timestep", true}, {"delta t", true}, {"dt", true},
		{"sample rate", false}, {"sampling rate", false}, {"samplerate", false}} {
		if i := strings.Index(lower, k.word); i >= 0 && strings.TrimLeft(lower[:i], " \t\"") == "" {
			at, interval = i+len(k.word), k.interval
			break
		}
		at = -1
	}
	if at < 0 {
		return 0, false
	}
	for _, tok := range strings.FieldsFunc(line[at:], func(r rune) bool {
		return r == ' ' || r == '\t' || r == ':' || r == '=' || r == '"' || r == ';' || r == ',' && sep != ';' && sep != '\t' && !strings.Contains(line[at:], "\"")
	}) {
		t := strings.TrimSuffix(strings.TrimSuffix(tok, "Hz"), "s")
		v, err := strconv.ParseFloat(decimalPoint(field{text: t, quoted: strings.Contains(line[at:], "\"")}, sep), 64)
		if err != nil || !(v > 0) || math.IsInf(v, 0) {
			continue
		}
		if interval {
			return 1 / v, true
		}
		return v, true
	}
	return 0, false
}

// decimalPoint turns a decimal comma into a point where nothing else can
// be meant: with ; or tab separators, or inside quotes, one comma and no
// point.
func decimalPoint(f field, sep byte) string {
	s := f.text
	if (sep == ';' || sep == '\t' || f.quoted) && strings.Count(s, ",") == 1 && !strings.Contains(s, ".") {
		return strings.Replace(s, ",", ".", 1)
	}
	return s
}

// parseNumber reads one finite number, or says what is wrong with it.
func parseNumber(f field, sep byte) (float64, string) {
	s := f.text
	if s == "" {
		return 0, "an empty field; " + acceptedNumber
	}
	v, err := strconv.ParseFloat(decimalPoint(f, sep), 64)
	show := s
	if len(show) > 40 {
		show = show[:40] + "..."
	}
	show = strconv.Quote(show)
	switch {
	case err != nil && errors.Is(err, strconv.ErrRange):
		return 0, fmt.Sprintf("%s is too large for a float64; %s", show, acceptedNumber)
	case err != nil:
		return 0, fmt.Sprintf("%s is not a number; %s", show, acceptedNumber)
	case math.IsNaN(v) || math.IsInf(v, 0):
		return 0, fmt.Sprintf("%s is not a finite number; %s", show, acceptedNumber)
	}
	return v, ""
}

// checkTimes verifies that times rise strictly and uniformly and returns
// the start time and the sample rate (N-1)/(t_last - t_0).
func checkTimes(t []float64, lineOf []int) (start, rate float64, err error) {
	n := len(t)
	for i := 1; i < n; i++ {
		if !(t[i] > t[i-1]) {
			return 0, 0, &ParseError{Line: lineOf[i], Column: 1,
				Msg: fmt.Sprintf("time %.9g s is not after the previous time %.9g s (line %d); accepted: times rising strictly at a constant step", t[i], t[i-1], lineOf[i-1])}
		}
	}
	steps := make([]float64, n-1)
	for i := range steps {
		steps[i] = t[i+1] - t[i]
	}
	slices.Sort(steps)
	median := steps[len(steps)/2]
	magnitude := func(a, b float64) float64 { return max(math.Abs(a), math.Abs(b)) }
	for i := 1; i < n; i++ {
		step := t[i] - t[i-1]
		tol := min(0.25*median, timeTolerance*(median+2*magnitude(t[i], t[i-1])))
		if math.Abs(step-median) > tol {
			return 0, 0, &ParseError{Line: lineOf[i], Column: 1,
				Msg: fmt.Sprintf("time step %.9g s differs from the record's usual step %.9g s; accepted: uniformly spaced times (a missing, repeated or re-timed sample breaks the record)", step, median)}
		}
	}
	span := t[n-1] - t[0]
	dt := span / float64(n-1)
	rate = 1 / dt
	if !(rate >= MinSampleRateHz && rate <= MaxSampleRateHz) {
		return 0, 0, &ParseError{Line: lineOf[n-1], Column: 1,
			Msg: fmt.Sprintf("times span %.9g s over %d samples, a sample rate of %.3g Hz; accepted: times in seconds giving %g Hz to %g Hz", span, n, rate, MinSampleRateHz, MaxSampleRateHz)}
	}
	tol := min(0.25*dt, timeTolerance*(dt+magnitude(t[0], t[n-1])))
	for i := 1; i < n-1; i++ {
		if d := t[i] - (t[0] + float64(i)*dt); math.Abs(d) > tol {
			return 0, 0, &ParseError{Line: lineOf[i], Column: 1,
				Msg: fmt.Sprintf("time %.9g s is %.3g s off the uniform grid from %.9g s in steps of %.9g s; accepted: uniformly spaced times", t[i], d, t[0], dt)}
		}
	}
	return t[0], rate, nil
}
