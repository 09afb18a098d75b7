package main

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
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
