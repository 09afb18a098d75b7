package main

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"runtime/metrics"
	"strconv"
	"strings"
	"sync/atomic"
	"testing"
	"time"
)

// readTouchstoneIndependently is a reader written here from the Touchstone
// File Format Specification, version 2.0 (IBIS Open Forum, 2009), sharing
// no code with qpoint's writer or reader: '!' starts a comment, the option
// line is "# <unit> S <format> R <ohms>", keywords are in brackets, and each
// frequency is followed by N² pairs (for two ports in the order
// 11 21 12 22, as [Two-Port Data Order] 21_12 and version 1.1 fix).
func readTouchstoneIndependently(t *testing.T, path string, ports int) (freqs []float64, s [][][]complex128) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var nums []float64
	unit, format := 1.0, "MA"
	inData := true
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		if i := strings.IndexByte(line, '!'); i >= 0 {
			line = line[:i]
		}
		line = strings.TrimSpace(line)
		if line == "" {
			continue
		}
		if strings.HasPrefix(line, "#") {
			fields := strings.Fields(strings.ToUpper(line[1:]))
			for _, w := range fields {
				switch w {
				case "HZ":
					unit = 1
				case "KHZ":
					unit = 1e3
				case "MHZ":
					unit = 1e6
				case "GHZ":
					unit = 1e9
				case "RI", "MA", "DB":
					format = w
				}
			}
			continue
		}
		if strings.HasPrefix(line, "[") {
			kw := strings.ToLower(line)
			inData = !strings.HasPrefix(kw, "[end]")
			if strings.HasPrefix(kw, "[two-port data order]") && !strings.Contains(kw, "21_12") {
				t.Fatalf("unexpected two-port order %q", line)
			}
			continue
		}
		if !inData {
			continue
		}
		for _, w := range strings.Fields(line) {
			v, err := strconv.ParseFloat(w, 64)
			if err != nil {
				// Keyword arguments such as [Reference] values on their own
				// line were consumed above; anything else is data.
				t.Fatalf("not a number: %q in %q", w, line)
			}
			nums = append(nums, v)
		}
	}
	per := 1 + 2*ports*ports
	if len(nums)%per != 0 {
		t.Fatalf("%d numbers do not split into records of %d", len(nums), per)
	}
	for k := 0; k+per <= len(nums); k += per {
		rec := nums[k : k+per]
		freqs = append(freqs, rec[0]*unit)
		m := make([][]complex128, ports)
		for i := range m {
			m[i] = make([]complex128, ports)
		}
		for p := 0; p < ports*ports; p++ {
			a, b := rec[1+2*p], rec[2+2*p]
			var z complex128
			switch format {
			case "RI":
				z = complex(a, b)
			case "MA":
				z = complex(a*math.Cos(b*math.Pi/180), a*math.Sin(b*math.Pi/180))
			case "DB":
				mag := math.Pow(10, a/20)
				z = complex(mag*math.Cos(b*math.Pi/180), mag*math.Sin(b*math.Pi/180))
			}
			i, j := p/ports, p%ports
			if ports == 2 {
				// 11 21 12 22
				i, j = p%2, p/2
			}
			m[i][j] = z
		}
		s = append(s, m)
	}
	return freqs, s
}

// TestResponseOutputsAgree: the JSON document, the CSV file and the
// Touchstone file (read by the independent reader above) carry the same
// S-parameters for every demo.
func TestResponseOutputsAgree(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join(demoDir, "*.yaml"))
	for _, demo := range files {
		dir := t.TempDir()
		var c struct{ Ports []struct{ Name string } }
		out, errs, code := runCLI(t, "response", demo, "--json", "--per-decade", "5")
		if code != 0 {
			t.Fatalf("%s: exit %d %s", demo, code, errs)
		}
		var doc struct {
			Ports  []struct{ Name string }
			Points []struct {
				Frequency float64
				S         [][][2]float64
			}
		}
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		c.Ports = doc.Ports
		n := len(c.Ports)
		for _, format := range []string{"ri", "ma", "db"} {
			ts := filepath.Join(dir, "r"+format+".s"+strconv.Itoa(n)+"p")
			cs := filepath.Join(dir, "r.csv")
			if _, errs, code := runCLI(t, "response", demo, "--per-decade", "5", "--touchstone", ts, "--format", format, "--csv", cs); code != 0 {
				t.Fatalf("%s: exit %d %s", demo, code, errs)
			}
			freqs, s := readTouchstoneIndependently(t, ts, n)
			if len(freqs) != len(doc.Points) {
				t.Fatalf("%s %s: %d Touchstone points, %d JSON points", demo, format, len(freqs), len(doc.Points))
			}
			rows := readCSV(t, cs)
			for k, p := range doc.Points {
				if math.Abs(freqs[k]-p.Frequency) > 1e-12*p.Frequency {
					t.Errorf("%s: frequency %g in Touchstone, %g in JSON", demo, freqs[k], p.Frequency)
				}
				for i := 0; i < n; i++ {
					for j := 0; j < n; j++ {
						want := complex(p.S[i][j][0], p.S[i][j][1])
						got := s[k][i][j]
						// Printed to full precision: agree to rounding of the
						// polar conversions.
						if d := cmplxAbs(got - want); d > 1e-12*math.Max(cmplxAbs(want), 1e-12) && d > 1e-15 {
							t.Errorf("%s %s S%d%d at %g Hz: Touchstone %v, JSON %v", demo, format, i+1, j+1, freqs[k], got, want)
						}
						re, _ := strconv.ParseFloat(rows[k+1][1+2*(i*n+j)], 64)
						im, _ := strconv.ParseFloat(rows[k+1][2+2*(i*n+j)], 64)
						if complex(re, im) != want {
							t.Errorf("%s S%d%d: CSV %v, JSON %v", demo, i+1, j+1, complex(re, im), want)
						}
					}
				}
			}
		}
	}
}

func cmplxAbs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }

func readCSV(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return rows
}

// TestResponseBadFlags: bad sweeps and references exit 2 with the flag named.
func TestResponseBadFlags(t *testing.T) {
	det := filepath.Join(demoDir, "detector.yaml")
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"response", det, "--from", "1GHz", "--to", "1MHz"}, "--from"},
		{[]string{"response", det, "--points", "0"}, "--points"},
		{[]string{"response", det, "--from", "0Hz"}, "--from"},
		{[]string{"response", det, "--from", "-5MHz"}, "--from"},
		{[]string{"response", det, "--per-decade", "-3"}, "--per-decade"},
		{[]string{"response", det, "--reference", "50,0"}, "--reference"},
		{[]string{"response", det, "--format", "xy"}, "--format"},
		{[]string{"response", det, "--touchstone", "/tmp/x.s5p"}, "--touchstone"},
		{[]string{"distortion", det, "--output", "nowhere"}, "--output"},
		{[]string{"distortion", det, "--input", "video2"}, "--input"},
		{[]string{"distortion", det, "--harmonics", "200"}, "--harmonics"},
		{[]string{"distortion", det, "--level", "loud"}, "--level"},
		{[]string{"distortion", det, "--level", "1e308dBm"}, "--level"},
		{[]string{"response", det, "--reference", "1e-320"}, "--reference"},
		{[]string{"bias", det, "--temperature", "1e308K"}, "--temperature"},
		{[]string{"response", det, "--to", "1e300Hz"}, "--to"},
	}
	for _, c := range cases {
		_, errs, code := runCLI(t, c.args...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("qpoint %s: exit %d, %q; want exit 2 naming %s", strings.Join(c.args, " "), code, errs, c.want)
		}
	}
}

// TestResponseStreams: asked for files and the table only, the response
// command streams its points to the files and keeps only the table's
// rows, so that a sweep's memory does not grow with its length. Its files
// and table are the same bytes as when it holds the sweep (which it does
// for --plots); a long sweep keeps its heap far below the size of its
// points; and a sweep that fails part way leaves no file.
func TestResponseStreams(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(demoDir, "mixer.yaml")
	stream := []string{"response", file, "--per-decade", "30", "--csv", filepath.Join(dir, "a.csv"), "--touchstone", filepath.Join(dir, "a.s3p")}
	held := []string{"response", file, "--per-decade", "30", "--csv", filepath.Join(dir, "b.csv"), "--touchstone", filepath.Join(dir, "b.s3p"), "--plots", filepath.Join(dir, "figs")}
	outA, errs, code := runCLI(t, stream...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	outB, errs, code := runCLI(t, held...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, pair := range [][2]string{{"a.csv", "b.csv"}, {"a.s3p", "b.s3p"}} {
		a, _ := os.ReadFile(filepath.Join(dir, pair[0]))
		b, _ := os.ReadFile(filepath.Join(dir, pair[1]))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s (%d bytes) and %s (%d bytes) differ", pair[0], len(a), pair[1], len(b))
		}
	}
	table := func(out string) string {
		out = strings.ReplaceAll(out, filepath.Join(dir, "a."), "")
		out = strings.ReplaceAll(out, filepath.Join(dir, "b."), "")
		return regexp.MustCompile(`(?m)^figures written.*\n`).ReplaceAllString(out, "")
	}
	if table(outA) != table(outB) {
		t.Errorf("the tables differ:\n%s\nagainst\n%s", outA, outB)
	}

	// A long sweep: 200 000 points of the three-port mixer, about 300
	// bytes each if held (60 MB), against the most heap in use while it
	// runs, sampled every half millisecond.
	peak := peakHeap(t, func() {
		if _, errs, code := runCLI(t, "response", file, "--points", "200000", "--csv", filepath.Join(dir, "long.csv")); code != 0 {
			t.Fatalf("exit %d: %s", code, errs)
		}
	})
	t.Logf("200 000 points streamed; the heap peaked at %.1f MB", float64(peak)/1e6)
	if peak > 30e6 {
		t.Errorf("the heap peaked at %.1f MB for a streamed sweep", float64(peak)/1e6)
	}

	// A failure part way: the sweep reaches beyond 1 THz.
	if _, _, code := runCLI(t, "response", file, "--from", "100GHz", "--to", "2THz", "--points", "50", "--csv", filepath.Join(dir, "bad.csv")); code == 0 {
		t.Error("a sweep beyond 1 THz succeeded")
	}
	for _, n := range dirEntries(t, dir) {
		if strings.HasPrefix(n, "bad") || strings.HasPrefix(n, ".bad") {
			t.Errorf("a failed sweep left %s", n)
		}
	}
}

// peakHeap runs f and returns the most bytes the heap held in objects,
// live or not yet collected, at samples every half millisecond.
func peakHeap(t *testing.T, f func()) uint64 {
	t.Helper()
	sample := []metrics.Sample{{Name: "/memory/classes/heap/objects:bytes"}}
	var peak atomic.Uint64
	stop, done := make(chan struct{}), make(chan struct{})
	go func() {
		defer close(done)
		tick := time.NewTicker(500 * time.Microsecond)
		defer tick.Stop()
		for {
			metrics.Read(sample)
			if v := sample[0].Value.Uint64(); v > peak.Load() {
				peak.Store(v)
			}
			select {
			case <-stop:
				return
			case <-tick.C:
			}
		}
	}()
	runtime.GC()
	f()
	close(stop)
	<-done
	return peak.Load()
}

// heapWatcher discards what is written to it and, every few megabytes,
// collects garbage and records the largest live heap seen.
type heapWatcher struct {
	written, next int
	peak          uint64
}

func (h *heapWatcher) Write(p []byte) (int, error) {
	h.written += len(p)
	if h.written >= h.next {
		h.next = h.written + 4<<20
		runtime.GC()
		var m runtime.MemStats
		runtime.ReadMemStats(&m)
		h.peak = max(h.peak, m.HeapAlloc)
	}
	return len(p), nil
}

// TestResponseJSONStreams: response --json writes its points as they come
// instead of holding the sweep (issue 13, item 9): the live heap while the
// document is written stays far below what the points would take held
// (about 300 bytes each for two ports, so 30 MB for these 100000).
func TestResponseJSONStreams(t *testing.T) {
	if testing.Short() {
		t.Skip("a 100000-point sweep")
	}
	var h heapWatcher
	var errb bytes.Buffer
	code := run([]string{"response", filepath.Join(demoDir, "attenuator.yaml"), "--points", "100000", "--json"}, &h, &errb)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	if h.peak > 12<<20 {
		t.Errorf("live heap reached %d MB while writing the JSON, want under 12 MB: the points are held", h.peak>>20)
	}
	t.Logf("%d MB written, live heap at most %.1f MB", h.written>>20, float64(h.peak)/(1<<20))
}

// TestWorkersBounded: a huge --workers is refused at once, and the
// library runs no more workers than it has chains of steps.
func TestWorkersBounded(t *testing.T) {
	start := time.Now()
	_, errs, code := runCLI(t, "study", filepath.Join(demoDir, "attenuator.yaml"), "--steps", "3", "--workers", "1000000000")
	if code != exitInput || !strings.Contains(errs, "flag --workers") {
		t.Errorf("--workers 1e9: exit %d, %q; want 2 naming the flag", code, errs)
	}
	_, errs, code = runCLI(t, "study", filepath.Join(demoDir, "attenuator.yaml"), "--steps", "3", "--workers", "1024")
	if code != 0 {
		t.Errorf("--workers 1024: exit %d, %s", code, errs)
	}
	if took := time.Since(start); took > 10*time.Second {
		t.Errorf("took %v", took)
	}
}
