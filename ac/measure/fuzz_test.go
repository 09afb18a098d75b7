package measure

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// FuzzReadCSV: no bytes make ReadCSV, or Analyze on what it accepts,
// panic; every refusal is a *ParseError with a place and what is accepted.
// Seeds are the files in testdata/waveforms (good and bad) and a few
// edge cases.
func FuzzReadCSV(f *testing.F) {
	for _, pattern := range []string{"../../testdata/waveforms/*.csv", "../../testdata/waveforms/bad/*.csv"} {
		files, _ := filepath.Glob(pattern)
		for _, name := range files {
			b, err := os.ReadFile(name)
			if err != nil {
				f.Fatal(err)
			}
			// The head of a long file keeps the seed small: the fuzzer
			// minimises every new input, which is slow for large ones.
			if len(b) > 4096 {
				b = b[:4096]
			}
			f.Add(b, 0.0)
			f.Add(b, 1e6)
		}
	}
	f.Add([]byte(rows(32, 0, plain)), 0.0)
	f.Add([]byte("t;v\n0;1,5\n1;2,5\n"), 0.0)
	f.Add([]byte("\xef\xbb\xbf\"a\"\t\"b\"\r\n1\t2\t\r\n"), 0.0)
	f.Add([]byte("1e308,1\n-1e308,2\n"), 0.0)
	f.Add([]byte("4.9e-324,0\n1e-323,0\n"), 0.0)
	f.Add([]byte(strings.Repeat("0x1p-2\n", 20)), 1e3)
	f.Add([]byte(strings.Repeat("1e100\n-1e100\n", 10)), 1e-300)
	f.Fuzz(func(t *testing.T, data []byte, rate float64) {
		w, err := ReadCSV(strings.NewReader(string(data)), CSVOptions{SampleRateHz: rate})
		if err != nil {
			pe, ok := err.(*ParseError)
			if !ok || pe.Line < 1 || pe.Column < 1 || !strings.Contains(pe.Msg, "accepted") {
				t.Fatalf("refusal %#v is not a placed *ParseError saying what is accepted", err)
			}
			return
		}
		if len(w.Samples) < MinSamples || !(w.SampleRateHz > 0) || math.IsInf(w.SampleRateHz, 0) {
			t.Fatalf("accepted %d samples at %g Hz", len(w.Samples), w.SampleRateHz)
		}
		for _, v := range w.Samples {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("accepted a non-finite sample %g", v)
			}
		}
		if len(w.Samples) <= 4096 {
			Analyze(w, Settings{Harmonics: 5}) // must not panic; errors are fine
		}
	})
}
