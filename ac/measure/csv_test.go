package measure

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// rows writes n lines "t,v" of a 1 kHz sine sampled at 100 kHz from t0,
// each through format.
func rows(n int, t0 float64, format func(i int, t, v float64) string) string {
	var b strings.Builder
	for i := 0; i < n; i++ {
		t := t0 + float64(i)*1e-5
		b.WriteString(format(i, t, math.Sin(2*math.Pi*1e3*float64(i)*1e-5)))
		b.WriteByte('\n')
	}
	return b.String()
}

func plain(_ int, t, v float64) string { return fmt.Sprintf("%.9g,%.9g", t, v) }

func TestReadCSV(t *testing.T) {
	cases := []struct {
		name      string
		in        string
		opts      CSVOptions
		n         int
		rateHz    float64
		startS    float64
		firstV    float64 // the value of the second sample, to check the column
		checkSecV bool
	}{
		{"two columns", rows(20, 0, plain), CSVOptions{}, 20, 1e5, 0, 0, false},
		{"header, comments, blank lines, CRLF", "# bench capture\r\ntime (s),voltage (V)\r\n\r\n" + strings.ReplaceAll(rows(20, -1e-4, plain), "\n", "\r\n"), CSVOptions{}, 20, 1e5, -1e-4, 0, false},
		{"byte-order mark and quotes", "\xef\xbb\xbf\"time\",\"ch1\"\n" + rows(20, 0, func(_ int, t, v float64) string { return fmt.Sprintf("\"%.9g\",\"%.9g\"", t, v) }), CSVOptions{}, 20, 1e5, 0, 0, false},
		{"semicolons with decimal commas", "Zeit;Spannung\n" + rows(20, 0, func(_ int, t, v float64) string {
			return strings.ReplaceAll(fmt.Sprintf("%.9f;%.9f", t, v), ".", ",")
		}), CSVOptions{}, 20, 1e5, 0, 0, false},
		{"tabs and trailing separator", rows(20, 1, func(_ int, t, v float64) string { return fmt.Sprintf("%.12g\t%.9g\t", t, v) }), CSVOptions{}, 20, 1e5, 1, 0, false},
		{"spaces", rows(20, 0, func(_ int, t, v float64) string { return fmt.Sprintf("  %.9g   %.9g ", t, v) }), CSVOptions{}, 20, 1e5, 0, 0, false},
		{"one column with sample rate", "volts\n" + rows(16, 0, func(i int, _, _ float64) string { return fmt.Sprint(i) }), CSVOptions{SampleRateHz: 2e6}, 16, 2e6, 0, 1, true},
		{"times printed to 7 digits", rows(500, 0.0123, func(_ int, t, v float64) string { return fmt.Sprintf("%.7g,%.6g", t, v) }), CSVOptions{}, 500, 1e5, 0.0123, 0, false},
		{"time column with agreeing rate", rows(20, 0, plain), CSVOptions{SampleRateHz: 100.01e3}, 20, 1e5, 0, 0, false},
		{"inline comment", rows(20, 0, func(i int, t, v float64) string { return fmt.Sprintf("%.9g, %d # note", t, i) }), CSVOptions{}, 20, 1e5, 0, 1, true},
		{"two header lines", "t,v\nunits,volts\n" + rows(20, 0, plain), CSVOptions{}, 20, 1e5, 0, 0, false},
		{"commas with quoted decimal commas", "\"Zeit\",\"Spannung\"\n" + rows(20, 0, func(i int, t, _ float64) string {
			return strings.ReplaceAll(fmt.Sprintf("\"%.9f\",\"%d.5\"", t, i), ".", ",")
		}), CSVOptions{}, 20, 1e5, 0, 1.5, true},
		{"instrument export with metadata", "Model,QX-200\nFirmware,1.02\nSample Interval,1e-05\nRecord Length,20\nTime,CH1\n" + rows(20, 0, plain), CSVOptions{}, 20, 1e5, 0, 0, false},
		{"one column, interval from metadata", "Sample Interval: 1e-05 s\nVolts\n" + rows(20, 0, func(i int, _, _ float64) string { return fmt.Sprint(i) }), CSVOptions{}, 20, 1e5, 0, 1, true},
		{"one column, rate from metadata, decimal comma", "Sample Rate;2,5e6\n" + rows(20, 0, func(i int, _, _ float64) string { return fmt.Sprintf("\"%d,25\"", i) }), CSVOptions{}, 20, 2.5e6, 0, 1.25, true},
		{"the rate given beats the file's", "Sample Interval,1e-05\n" + rows(20, 0, func(i int, _, _ float64) string { return fmt.Sprint(i) }), CSVOptions{SampleRateHz: 1e3}, 20, 1e3, 0, 1, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			w, err := ReadCSV(strings.NewReader(c.in), c.opts)
			if err != nil {
				t.Fatal(err)
			}
			if len(w.Samples) != c.n || math.Abs(w.SampleRateHz/c.rateHz-1) > 1e-9 || math.Abs(w.StartS-c.startS) > 1e-15 {
				t.Errorf("%d samples at %.9g Hz from %g s; want %d at %g Hz from %g s", len(w.Samples), w.SampleRateHz, w.StartS, c.n, c.rateHz, c.startS)
			}
			if c.checkSecV && w.Samples[1] != c.firstV {
				t.Errorf("second sample %g, want %g", w.Samples[1], c.firstV)
			}
		})
	}
}

// TestReadCSVErrors: each bad file is refused with the line and column of
// the first problem, what is wrong and what is accepted.
func TestReadCSVErrors(t *testing.T) {
	good := rows(20, 0, plain)
	lines := strings.Split(good, "\n")
	with := func(i int, line string) string { // replace data line i (0-based)
		l := append([]string(nil), lines...)
		l[i] = line
		return strings.Join(l, "\n")
	}
	cases := []struct {
		name      string
		in        string
		opts      CSVOptions
		line, col int
		want      []string
	}{
		{"word in the data", "t,v\n" + with(4, "4e-05,abc"), CSVOptions{}, 6, 7, []string{`"abc" is not a number`, "accepted: decimal numbers"}},
		{"header only", "Model,QX-200\nSample Interval,1e-05\nTime,CH1\n", CSVOptions{}, 3, 1, []string{"no numeric data follows the header and metadata that end at line 3"}},
		{"metadata interval disagrees", "Sample Interval,2e-05\nTime,CH1\n" + good, CSVOptions{}, 1, 1, []string{"gives a sample rate of 50000 Hz but the time column 100000 Hz"}},
		{"word after the data began", "t,v\n" + with(0, "0,0\nunits,volts"), CSVOptions{}, 3, 1, []string{`"units" is not a number`}},
		{"NaN", with(3, "3e-05,NaN"), CSVOptions{}, 4, 7, []string{`"NaN" is not a finite number`}},
		{"infinity", with(3, "3e-05, -Inf"), CSVOptions{}, 4, 8, []string{"not a finite number"}},
		{"overflow", with(3, "3e-05,1e999"), CSVOptions{}, 4, 7, []string{"too large"}},
		{"empty field", with(3, "3e-05,,"), CSVOptions{}, 4, 7, []string{"empty field"}},
		{"missing column", with(5, "5e-05"), CSVOptions{}, 6, 1, []string{"1 column where the first data line has 2"}},
		{"three columns", "0,1,2\n", CSVOptions{}, 1, 5, []string{"3 columns", "accepted: two columns"}},
		{"one column, no rate", "0.5\n0.7\n", CSVOptions{}, 1, 1, []string{"no sample rate"}},
		{"repeated time", with(7, lines[6]), CSVOptions{}, 8, 1, []string{"not after the previous time", "(line 7)"}},
		{"falling time", with(7, "1e-06,0"), CSVOptions{}, 8, 1, []string{"not after"}},
		{"missing sample", strings.Join(append(append([]string(nil), lines[:9]...), lines[10:]...), "\n"), CSVOptions{}, 10, 1, []string{"time step 2e-05 s differs from the record's usual step 1e-05 s"}},
		{"jitter of 10 ppm", with(12, "0.0001200012,0"), CSVOptions{}, 13, 1, []string{"time step", "uniformly spaced"}},
		{"too short", "t,v\n" + rows(15, 0, plain), CSVOptions{}, 16, 1, []string{"after 15 samples", "at least 16"}},
		{"empty file", "", CSVOptions{}, 1, 1, []string{"after 0 samples"}},
		{"rate disagrees with time column", good, CSVOptions{SampleRateHz: 1e6}, 1, 1, []string{"gives a sample rate of 100000 Hz but 1000000 Hz was given"}},
		{"negative rate", good, CSVOptions{SampleRateHz: -5}, 1, 1, []string{"accepted: 1e-09 Hz to 1e+18 Hz"}},
		{"overlong line", strings.Repeat("1", maxLineBytes+10), CSVOptions{}, 1, 1, []string{"line longer than"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadCSV(strings.NewReader(c.in), c.opts)
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %v, want a *ParseError", err)
			}
			if pe.Line != c.line || pe.Column != c.col {
				t.Errorf("at line %d, column %d; want line %d, column %d (%s)", pe.Line, pe.Column, c.line, c.col, pe.Msg)
			}
			for _, w := range c.want {
				if !strings.Contains(pe.Msg, w) {
					t.Errorf("message %q lacks %q", pe.Msg, w)
				}
			}
			if !strings.Contains(pe.Msg, "accepted") {
				t.Errorf("message %q does not say what is accepted", pe.Msg)
			}
		})
	}
	_, err := ReadCSV(strings.NewReader("0.5\n"), CSVOptions{})
	if !errors.Is(err, ErrNoSampleRate) {
		t.Errorf("one column without rate: %v does not wrap ErrNoSampleRate", err)
	}
}

// TestReadCSVTooMany checks the sample cap without building a huge file in
// memory: a reader that repeats one line forever.
func TestReadCSVTooMany(t *testing.T) {
	if testing.Short() {
		t.Skip("reads 10 million lines")
	}
	_, err := ReadCSV(&repeat{line: []byte("0.125\n")}, CSVOptions{SampleRateHz: 1e6})
	var pe *ParseError
	if !errors.As(err, &pe) || pe.Line != MaxSamples+1 || !strings.Contains(pe.Msg, "more than 10000000 samples") {
		t.Fatalf("error %v, want more than %d samples at line %d", err, MaxSamples, MaxSamples+1)
	}
}

type repeat struct {
	line []byte
	off  int
}

func (r *repeat) Read(p []byte) (int, error) {
	n := 0
	for n < len(p) {
		c := copy(p[n:], r.line[r.off:])
		n += c
		r.off = (r.off + c) % len(r.line)
	}
	return n, nil
}

func BenchmarkReadCSV100k(b *testing.B) {
	in := rows(100_000, 0, plain)
	b.SetBytes(int64(len(in)))
	for b.Loop() {
		if _, err := ReadCSV(strings.NewReader(in), CSVOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

// TestTimeOffsetResolution: time stamps written with an offset of 1e9 s
// and a step of 1 µs are resolved by float64 only to 1.2e-7 s (the
// spacing of doubles at 1e9, IEEE 754 binary64), so the sample rate from
// the span can be off by about 1.2e-7 s / 1 ms over a 1000-sample record.
// The reader reports that uncertainty, and the rate it reads lies within
// it; the same record from zero is resolved to rounding (issue 13,
// item 14).
func TestTimeOffsetResolution(t *testing.T) {
	for _, offset := range []float64{0, 1e9} {
		var b strings.Builder
		b.WriteString("time,voltage\n")
		for i := 0; i < 1000; i++ {
			fmt.Fprintf(&b, "%.17g,%.9g\n", offset+float64(i)*1e-6, math.Sin(2*math.Pi*float64(i)/100))
		}
		w, err := ReadCSV(strings.NewReader(b.String()), CSVOptions{})
		if err != nil {
			t.Fatal(err)
		}
		ulp := math.Nextafter(offset+999e-6, 2e9) - (offset + 999e-6)
		want := ulp / 999e-6
		if math.Abs(w.RateUncertainty-want) > 1e-3*want {
			t.Errorf("offset %g s: rate uncertainty %g, want %g", offset, w.RateUncertainty, want)
		}
		if err := math.Abs(w.SampleRateHz-1e6) / 1e6; err > w.RateUncertainty+1e-15 {
			t.Errorf("offset %g s: rate %g Hz is off by %g, beyond the stated %g", offset, w.SampleRateHz, err, w.RateUncertainty)
		}
		if warned := w.RateUncertainty > RateUncertaintyLimit; warned != (offset != 0) {
			t.Errorf("offset %g s: uncertainty %g, warned %v", offset, w.RateUncertainty, warned)
		}
	}
}
