package touchstone

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const touchstoneDir = "../../testdata/touchstone"

// closeS compares S-parameters read back with those written: 1e-12
// relative, with an absolute floor of 1e-300 below which float64 (being
// subnormal there) keeps no relative precision.
func closeS(a, b complex128) bool {
	return cmplx.Abs(a-b) <= 1e-12*math.Max(cmplx.Abs(a), cmplx.Abs(b))+1e-300
}

// randomPoints makes k points of an n-port with magnitudes from 1e-6 to
// 10 at all angles, plus the values a polar format handles specially:
// exact zero (isolated ports), a negative real, a pure imaginary.
func randomPoints(n, k int, seed uint64) []Point {
	rng := rand.New(rand.NewPCG(seed, 7))
	pts := make([]Point, k)
	hz := 1e6 * (1 + rng.Float64())
	for p := range pts {
		hz *= 1 + rng.Float64()
		s := make([][]complex128, n)
		for i := range s {
			s[i] = make([]complex128, n)
			for j := range s[i] {
				m := math.Pow(10, -6+7*rng.Float64())
				s[i][j] = cmplx.Rect(m, (2*rng.Float64()-1)*math.Pi)
			}
		}
		if p == 0 {
			s[0][0] = 0
			s[n-1][0] = -0.75
			s[0][n-1] = 0.5i
		}
		pts[p] = Point{FrequencyHz: hz, S: s}
	}
	return pts
}

func portsWith(z ...float64) []Port {
	ps := make([]Port, len(z))
	for i := range z {
		ps[i] = Port{Name: fmt.Sprintf("p%d", i+1), Impedance: z[i]}
	}
	return ps
}

// TestTouchstoneRoundTrip writes sweeps of 1 to 5 ports in every format,
// with equal and with per-port reference impedances, reads them back and
// compares.
func TestTouchstoneRoundTrip(t *testing.T) {
	refs := []float64{50, 75, 100, 25, 37.5}
	for n := 1; n <= 5; n++ {
		for _, perPort := range []bool{false, true} {
			if n == 1 && perPort {
				continue // one port has one impedance
			}
			for _, f := range []Format{FormatRI, FormatMA, FormatDB} {
				name := fmt.Sprintf("%d-port/%v/equal", n, f)
				z := make([]float64, n)
				for i := range z {
					z[i] = 50
					if perPort {
						name = fmt.Sprintf("%d-port/%v/per-port", n, f)
						z[i] = refs[i]
					}
				}
				t.Run(name, func(t *testing.T) {
					ports := portsWith(z...)
					pts := randomPoints(n, 6, uint64(10*n+int(f)))
					var buf bytes.Buffer
					if err := Write(&buf, ports, pts, f, []string{"circuit: test"}); err != nil {
						t.Fatal(err)
					}
					text := buf.String()
					// Version 2.0 only where 1.1 cannot say it (Touchstone
					// 2.0: [Reference] gives per-port impedances).
					if got := strings.Contains(text, "[Version] 2.0"); got != perPort {
						t.Errorf("[Version] 2.0 written: %v, want %v:\n%s", got, perPort, text)
					}
					checkLineWidths(t, text)
					gotPorts, got, err := Read(strings.NewReader(text), n)
					if err != nil {
						t.Fatalf("%v\n%s", err, text)
					}
					for i := range ports {
						if gotPorts[i].Impedance != z[i] {
							t.Errorf("port %d reference %g ohm, want %g", i+1, gotPorts[i].Impedance, z[i])
						}
					}
					comparePoints(t, got, pts, f == FormatRI)
				})
			}
		}
	}
}

// checkLineWidths checks the version 1.1 rule of at most four pairs on a
// data line: nine numbers with the frequency, eight on a continuation.
func checkLineWidths(t *testing.T, text string) {
	t.Helper()
	for i, line := range strings.Split(text, "\n") {
		if line == "" || strings.ContainsAny(line[:1], "!#[") {
			continue
		}
		if n := len(strings.Fields(line)); n > 9 {
			t.Errorf("line %d has %d numbers, more than a frequency and four pairs: %q", i+1, n, line)
		}
	}
}

func comparePoints(t *testing.T, got, want []Point, exact bool) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("read %d points, wrote %d", len(got), len(want))
	}
	for k := range want {
		g, w := got[k], want[k]
		if g.FrequencyHz != w.FrequencyHz {
			t.Errorf("point %d: %v Hz, want %v Hz exactly (written in Hz, shortest round-trip digits)", k, g.FrequencyHz, w.FrequencyHz)
		}
		for i := range w.S {
			for j := range w.S[i] {
				a, b := g.S[i][j], w.S[i][j]
				ok := closeS(a, b)
				if exact {
					ok = math.Float64bits(real(a)) == math.Float64bits(real(b)) && math.Float64bits(imag(a)) == math.Float64bits(imag(b))
				}
				if !ok {
					t.Errorf("point %d (%g Hz): S%d%d = %v, wrote %v", k, w.FrequencyHz, i+1, j+1, a, b)
				}
			}
		}
	}
}

// TestTouchstoneGolden pins the bytes the writer produces, so that a change
// of layout shows in review. QPOINT_UPDATE_GOLDEN=1 rewrites the files.
func TestTouchstoneGolden(t *testing.T) {
	two := []Point{
		{FrequencyHz: 1e9, S: [][]complex128{{0.1 - 0.2i, 0.01}, {2 + 1i, 0}}},
		{FrequencyHz: 2.5e9, S: [][]complex128{{-0.3, 0.02i}, {1.5i, 0.25 + 0.25i}}},
	}
	three := []Point{{FrequencyHz: 123456.789, S: [][]complex128{
		{0.1, 0.2, 0.3}, {0.4, 0.5, 0.6}, {0.7, 0.8, 0.9i},
	}}}
	cases := []struct {
		file   string
		ports  []Port
		points []Point
		format Format
	}{
		{"golden_v11_ma.s2p", portsWith(50, 50), two, FormatMA},
		{"golden_v11_db.s2p", portsWith(50, 50), two, FormatDB},
		{"golden_v20_ri.s3p", portsWith(50, 75, 100), three, FormatRI},
		{"golden_v20_ri.s2p", portsWith(50, 75), two, FormatRI},
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			var buf bytes.Buffer
			err := Write(&buf, c.ports, c.points, c.format, []string{"circuit: golden test", "bias: none\nsecond line"})
			if err != nil {
				t.Fatal(err)
			}
			path := filepath.Join(touchstoneDir, c.file)
			if os.Getenv("QPOINT_UPDATE_GOLDEN") == "1" {
				if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(buf.Bytes(), want) {
				t.Errorf("output differs from %s (QPOINT_UPDATE_GOLDEN=1 rewrites it):\n%s", path, buf.String())
			}
		})
	}
}

// TestTouchstoneWriterStreams checks that writing point by point gives the
// same bytes as Write, with the count given and (version 1.1)
// not given.
func TestTouchstoneWriterStreams(t *testing.T) {
	for _, z := range [][]float64{{50, 50, 50}, {50, 60, 70}} {
		ports := portsWith(z...)
		pts := randomPoints(3, 5, 3)
		var whole bytes.Buffer
		if err := Write(&whole, ports, pts, FormatDB, nil); err != nil {
			t.Fatal(err)
		}
		counts := []int{len(pts)}
		if z[1] == z[0] {
			counts = append(counts, -1)
		}
		for _, count := range counts {
			var streamed bytes.Buffer
			tw, err := NewWriter(&streamed, ports, FormatDB, nil, count)
			if err != nil {
				t.Fatal(err)
			}
			for _, p := range pts {
				if err := tw.Write(p); err != nil {
					t.Fatal(err)
				}
			}
			if err := tw.Close(); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(whole.Bytes(), streamed.Bytes()) {
				t.Errorf("references %v, count %d: streamed output differs:\n%s\nwant\n%s", z, count, streamed.String(), whole.String())
			}
		}
	}
}

func readTouchstoneFile(t *testing.T, name string) ([]Port, []Point) {
	t.Helper()
	n, err := PortCount(name)
	if err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(filepath.Join(touchstoneDir, name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	ports, pts, err := Read(f, n)
	if err != nil {
		t.Fatal(err)
	}
	return ports, pts
}

type sWant struct {
	point, i, j int // S_(i+1)(j+1) of points[point]
	want        complex128
	source      string
}

func checkS(t *testing.T, pts []Point, wants []sWant) {
	t.Helper()
	for _, w := range wants {
		if w.point >= len(pts) {
			t.Errorf("no point %d (%s)", w.point, w.source)
			continue
		}
		if got := pts[w.point].S[w.i][w.j]; !closeS(got, w.want) {
			t.Errorf("point %d: S%d%d = %v, want %v (%s)", w.point, w.i+1, w.j+1, got, w.want, w.source)
		}
	}
}

// TestReadTouchstoneHandWritten reads files written by hand after the
// specification's rules, each checking one rule with values that would
// differ if it were broken.
func TestReadTouchstoneHandWritten(t *testing.T) {
	const order = "Touchstone 1.1: two-port columns are N11 N21 N12 N22"
	t.Run("v1.1 two-port order", func(t *testing.T) {
		ports, pts := readTouchstoneFile(t, "hand_v11_order.s2p")
		if len(pts) != 3 {
			t.Fatalf("%d points, want 3: the lines after 300 MHz are noise data (Touchstone 1.1: the frequency falls back)", len(pts))
		}
		for i, hz := range []float64{100e6, 200e6, 300e6} {
			if pts[i].FrequencyHz != hz {
				t.Errorf("point %d at %g Hz, want %g (the file's MHz)", i, pts[i].FrequencyHz, hz)
			}
		}
		if ports[0].Impedance != 50 || ports[1].Impedance != 50 {
			t.Errorf("references %v, want 50 ohm from R 50", ports)
		}
		checkS(t, pts, []sWant{
			{0, 0, 0, cmplx.Rect(0.1, -10*math.Pi/180), order + ", column 1"},
			{0, 1, 0, cmplx.Rect(2.0, 170*math.Pi/180), order + ", column 2"},
			{0, 0, 1, cmplx.Rect(0.01, 80*math.Pi/180), order + ", column 3"},
			{0, 1, 1, cmplx.Rect(0.3, -20*math.Pi/180), order + ", column 4"},
			{2, 1, 0, cmplx.Rect(1.8, 150*math.Pi/180), order + ", data split over two lines"},
			{2, 0, 1, cmplx.Rect(0.03, 60*math.Pi/180), order + ", data split over two lines"},
		})
	})
	t.Run("v1.1 three-port rows", func(t *testing.T) {
		_, pts := readTouchstoneFile(t, "hand_v11_rows.s3p")
		var wants []sWant
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				wants = append(wants, sWant{0, i, j, complex(float64(3*i+j+1)/10, 0), "Touchstone 1.1: 3 ports and more are written row by row"})
			}
		}
		wants = append(wants, sWant{1, 2, 2, 0.9i, "second frequency, all on one line"})
		checkS(t, pts, wants)
		if pts[0].FrequencyHz != 1e9 || pts[1].FrequencyHz != 2e9 {
			t.Errorf("frequencies %g, %g Hz, want 1e9, 2e9 from GHz", pts[0].FrequencyHz, pts[1].FrequencyHz)
		}
	})
	t.Run("v2.0 reference and 12_21", func(t *testing.T) {
		ports, pts := readTouchstoneFile(t, "hand_v20_reference.s2p")
		if ports[0].Impedance != 50 || ports[1].Impedance != 75 {
			t.Errorf("references %g, %g ohm, want 50, 75 from [Reference] over two lines", ports[0].Impedance, ports[1].Impedance)
		}
		const src = "[Two-Port Data Order] 12_21: columns N11 N12 N21 N22; DB: 10^(dB/20)"
		checkS(t, pts, []sWant{
			{0, 0, 0, 0.1, src},
			{0, 0, 1, 0.01i, src},
			{0, 1, 0, complex(-math.Pow(10, 6.0/20), 0), src},
			{0, 1, 1, cmplx.Rect(math.Pow(10, -0.5), -math.Pi/2), src},
			{1, 0, 1, cmplx.Rect(0.01, 80*math.Pi/180), src},
		})
		if len(pts) != 2 || pts[1].FrequencyHz != 2e9 {
			t.Errorf("points %d, want 2 ([Number of Frequencies] 2) ending at 2 GHz", len(pts))
		}
	})
	t.Run("v2.0 upper matrix", func(t *testing.T) {
		in := "[Version] 2.0\n# Hz S MA\n[Number of Ports] 2\n[Two-Port Data Order] 12_21\n" +
			"[Number of Frequencies] 1\n[Matrix Format] Upper\n[Network Data]\n1 0.11 0 0.12 90 0.22 180\n[End]\n"
		_, pts, err := Read(strings.NewReader(in), 2)
		if err != nil {
			t.Fatal(err)
		}
		const src = "[Matrix Format] Upper: rows N11 N12 / N22, mirrored"
		checkS(t, pts, []sWant{
			{0, 0, 0, 0.11, src}, {0, 0, 1, 0.12i, src}, {0, 1, 0, 0.12i, src}, {0, 1, 1, -0.22, src},
		})
	})
	t.Run("v2.0 lower matrix", func(t *testing.T) {
		ports, pts := readTouchstoneFile(t, "hand_v20_lower.s3p")
		if len(ports) != 3 || ports[2].Impedance != 50 {
			t.Errorf("ports %v, want three of 50 ohm from R 50", ports)
		}
		const src = "[Matrix Format] Lower: rows N11 / N21 N22 / N31 N32 N33, mirrored"
		checkS(t, pts, []sWant{
			{0, 0, 0, 0.11, src}, {0, 1, 0, 0.21, src}, {0, 0, 1, 0.21, src},
			{0, 1, 1, 0.22, src}, {0, 2, 0, 0.31, src}, {0, 0, 2, 0.31, src},
			{0, 2, 1, 0.32, src}, {0, 1, 2, 0.32, src}, {0, 2, 2, 0.33, src},
		})
		if pts[0].FrequencyHz != 5e3 {
			t.Errorf("frequency %g Hz, want 5e3 (5 kHz)", pts[0].FrequencyHz)
		}
	})
}

// TestReadTouchstoneErrors checks that malformed files are refused with the
// line at fault and what was expected there.
func TestReadTouchstoneErrors(t *testing.T) {
	const v2 = "[Version] 2.0\n# GHz S RI R 50\n[Number of Ports] 1\n[Number of Frequencies] 2\n[Network Data]\n"
	cases := []struct {
		name  string
		in    string
		ports int
		want  string
	}{
		{"empty", "", 1, "line 0: the file is empty"},
		{"only comments", "! nothing\n\n", 1, "line 2: the file is empty"},
		{"negative ports", "# Hz S RI\n1 0 0\n", -1, "-1 ports"},
		{"too many ports", "# Hz S RI\n1 0 0\n", 10001, "10001 ports"},
		{"v1.1 without port count", "! c\n# Hz S RI\n1 0 0\n", 0, "line 2: a version 1.1 file does not state its port count"},
		{"data first", "1 0 0\n", 1, `line 1: "1 0 0": expected the option line`},
		{"bad unit", "# THz S MA R 50\n", 1, `line 1: option line: "THz": expected a unit`},
		{"Z-parameters", "# Hz Z MA R 50\n", 1, "line 1: option line: Z-parameters are not supported"},
		{"R without value", "# Hz S MA R\n", 1, "line 1: option line: R without a value"},
		{"R zero", "# Hz S MA R 0\n1 0 0\n", 1, "line 1: option line R 0: expected a positive reference impedance"},
		{"word in data", "# Hz S RI R 50\n1 0.5 x\n", 1, `line 2: number 3: "x": expected a decimal number`},
		{"NaN in data", "# Hz S RI R 50\n1 NaN 0\n", 1, `line 2: number 2: "NaN": expected a decimal number`},
		{"hex in data", "# Hz S RI R 50\n1 0x1p-2 0\n", 1, `line 2: number 2: "0x1p-2": expected a decimal number`},
		{"overflowing number", "# Hz S RI R 50\n1 1e400 0\n", 1, `line 2: number 2: "1e400": beyond the float64 range`},
		{"overflowing dB", "# Hz S DB R 50\n1 7000 0\n", 1, "line 2: S11 at 1 Hz (data from line 2): 7000, 0 is beyond the float64 range"},
		{"overflowing frequency", "# GHz S RI R 50\n1e300 0 0\n", 1, "line 2: frequency 1e300: expected a finite, non-negative frequency"},
		{"negative frequency", "# Hz S RI R 50\n-1 0 0\n", 1, "line 2: frequency -1: expected a finite, non-negative frequency"},
		{"truncated two-port", "# GHz S RI R 50\n1 0.1 0 0.2 0\n", 2, "line 2: end of file: the data for 1e+09 Hz from line 2 stops after 5 of 9 numbers"},
		{"two frequencies on a line", "# Hz S RI R 50\n1 0 0 2 0 0\n", 1, "line 2: 3 numbers more than the data for 1 Hz from line 2 holds (3 for 1 ports): each frequency starts a new line"},
		{"frequency falls, one-port", "# Hz S RI R 50\n2 0 0\n1 0 0\n", 1, "line 3: frequency 1 after 2 Hz: expected frequencies in increasing order"},
		{"frequency repeats, three-port", "# Hz S RI R 50\n2" + strings.Repeat(" 0", 18) + "\n2" + strings.Repeat(" 0", 18) + "\n", 3, "line 3: frequency 2 after 2 Hz"},
		{"short noise line", "# Hz S RI R 50\n2 0 0 0 0 0 0 0 0\n1 2 0.5 30\n", 2, "line 3: 4 numbers in noise data: expected 5"},
		{"keyword in v1.1", "# Hz S RI R 50\n[Number of Ports] 1\n", 1, "line 2: keyword [Number of Ports] in a version 1.1 file"},
		{"keyword before version", "[Number of Ports] 1\n", 1, "line 1: [Number of Ports] before [Version]"},
		{"version 3", "[Version] 3.0\n", 1, `line 1: [Version] "3.0": expected 2.0`},
		{"unknown keyword", "[Version] 2.0\n[Foo] 1\n", 1, "line 2: unknown keyword [Foo]"},
		{"mixed mode", "[Version] 2.0\n# Hz S RI\n[Number of Ports] 4\n[Mixed-Mode Order] D2,1 D4,3 C2,1 C4,3\n", 4, "line 4: [Mixed-Mode Order]: mixed-mode parameters are not supported"},
		{"ports disagree", "[Version] 2.0\n# Hz S RI\n[Number of Ports] 3\n", 2, "line 3: [Number of Ports] 3, but 2 ports were expected"},
		{"ports not a number", "[Version] 2.0\n# Hz S RI\n[Number of Ports] two\n", 0, `line 3: [Number of Ports] "two": expected a whole number from 1 to 10000`},
		{"reference before ports", "[Version] 2.0\n# Hz S RI\n[Reference] 50\n", 0, "line 3: [Reference] before [Number of Ports]"},
		{"reference short", "[Version] 2.0\n# Hz S RI\n[Number of Ports] 2\n[Reference] 50\n[Two-Port Data Order] 21_12\n", 0, "line 5: [Two-Port Data Order]: expected 1 more [Reference] impedances from line 4 first"},
		{"reference negative", "[Version] 2.0\n# Hz S RI\n[Number of Ports] 2\n[Reference] 50 -75\n", 0, "line 4: [Reference] -75 ohm for port 2: expected a positive impedance"},
		{"reference too long", "[Version] 2.0\n# Hz S RI\n[Number of Ports] 1\n[Reference] 50 75\n", 0, `line 4: [Reference] "75": more than the 1 impedances of 1 ports`},
		{"two-port without order", "[Version] 2.0\n# Hz S RI\n[Number of Ports] 2\n[Number of Frequencies] 1\n[Network Data]\n", 0, "line 5: [Network Data] of a two-port without [Two-Port Data Order]"},
		{"no frequency count", "[Version] 2.0\n# Hz S RI\n[Number of Ports] 1\n[Network Data]\n", 0, "line 4: [Network Data] without [Number of Frequencies]"},
		{"data outside network data", "[Version] 2.0\n# Hz S RI\n[Number of Ports] 1\n1 0 0\n", 0, `line 4: "1 0 0": expected a keyword; data belongs after [Network Data]`},
		{"missing end", v2 + "1 0 0\n2 0 0\n", 0, "line 7: end of file: expected [End]"},
		{"fewer frequencies", v2 + "1 0 0\n[End]\n", 0, "line 7: 1 frequencies of network data, but [Number of Frequencies] on line 4 says 2"},
		{"more frequencies", v2 + "1 0 0\n2 0 0\n3 0 0\n[End]\n", 0, "line 8: more frequencies than the 2 [Number of Frequencies] on line 4 gives"},
		{"keyword inside a frequency", v2 + "1 0\n[End]\n", 0, "line 7: [End]: the data for 1e+09 Hz from line 6 stops after 2 of 3 numbers"},
		{"unclosed information", "[Version] 2.0\n[Begin Information]\n[End]\n", 0, "line 3: end of file inside [Begin Information]"},
		{"matrix format", "[Version] 2.0\n[Matrix Format] Diagonal\n", 0, `line 2: [Matrix Format] "Diagonal": expected Full, Lower or Upper`},
		{"ports twice", "[Version] 2.0\n# Hz S RI\n[Number of Ports] 1\n[Number of Ports] 1\n", 0, "line 4: [Number of Ports] appears a second time"},
		{"bad data order", "[Version] 2.0\n# Hz S RI\n[Number of Ports] 2\n[Two-Port Data Order] 21-12\n", 0, `line 4: [Two-Port Data Order] "21-12": expected 12_21 or 21_12`},
		{"end information alone", "[Version] 2.0\n[End Information]\n", 0, "line 2: [End Information] without [Begin Information]"},
		{"noise data first", "[Version] 2.0\n[Noise Data]\n", 0, "line 2: [Noise Data] before [Network Data]"},
		{"end first", "[Version] 2.0\n[End]\n", 0, "line 2: [End] before [Network Data]"},
		{"reference cut off", "[Version] 2.0\n# Hz S RI\n[Number of Ports] 3\n[Reference] 50\n60\n", 0, "line 5: end of file: [Reference] on line 4 has 2 of 3 impedances"},
		{"no network data", "# Hz S RI R 50\n! nothing\n", 1, "line 2: end of file: no network data"},
		{"keyword after data", v2 + "1 0 0\n[Reference] 50\n", 0, "line 7: [Reference] after [Network Data]: expected [Noise Data] or [End]"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, _, err := Read(strings.NewReader(c.in), c.ports)
			if err == nil {
				t.Fatalf("no error, want one containing %q", c.want)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q\nwant it to contain %q", err, c.want)
			}
		})
	}
}

// TestReadTouchstoneLongLine checks that a line beyond the scanner's limit
// is an error naming it, not a silent truncation.
func TestReadTouchstoneLongLine(t *testing.T) {
	in := "# Hz S RI R 50\n1 0 0\n2 " + strings.Repeat("0 ", 9<<20) + "\n"
	_, _, err := Read(strings.NewReader(in), 1)
	if err == nil || !strings.Contains(err.Error(), "line 3: longer than 16 MiB") {
		t.Errorf("error %v, want one naming line 3 and the limit", err)
	}
}

type failWriter struct{}

var errDiskFull = errors.New("disk full")

func (failWriter) Write([]byte) (int, error) { return 0, errDiskFull }

// TestWriteTouchstoneErrors checks that what the format cannot hold is
// refused before it is written.
func TestWriteTouchstoneErrors(t *testing.T) {
	one := func(hz float64, s complex128) Point {
		return Point{FrequencyHz: hz, S: [][]complex128{{s}}}
	}
	good := []Point{one(1, 0.5)}
	cases := []struct {
		name   string
		ports  []Port
		points []Point
		format Format
		want   string
	}{
		{"no ports", nil, good, FormatMA, "no ports"},
		{"no points", portsWith(50), nil, FormatMA, "no points to write"},
		{"zero impedance", portsWith(0), good, FormatMA, "port 1 (p1): reference impedance 0 ohm"},
		{"NaN impedance", portsWith(math.NaN()), good, FormatMA, "reference impedance NaN ohm"},
		{"infinite impedance", portsWith(50, math.Inf(1)), good, FormatMA, "port 2 (p2): reference impedance +Inf ohm"},
		{"unknown format", portsWith(50), good, Format(7), "unknown format Format(7)"},
		{"frequency repeats", portsWith(50), []Point{one(1, 0), one(1, 0)}, FormatMA, "frequency 1 Hz after 1 Hz: frequencies must increase strictly"},
		{"frequency falls", portsWith(50), []Point{one(2, 0), one(1, 0)}, FormatRI, "frequency 1 Hz after 2 Hz"},
		{"negative frequency", portsWith(50), []Point{one(-1, 0)}, FormatRI, "frequency -1 Hz: must be finite and not negative"},
		{"NaN frequency", portsWith(50), []Point{one(math.NaN(), 0)}, FormatRI, "frequency NaN Hz"},
		{"NaN S", portsWith(50), []Point{one(1, complex(math.NaN(), 0))}, FormatRI, "S11 = (NaN+0i): not a finite number"},
		{"infinite S", portsWith(50), []Point{one(1, complex(0, math.Inf(-1)))}, FormatMA, "not a finite number"},
		{"magnitude overflows", portsWith(50), []Point{one(1, complex(math.MaxFloat64, math.MaxFloat64))}, FormatMA, "magnitude beyond the float64 range"},
		{"dB at the limit", portsWith(50), []Point{one(1, complex(math.MaxFloat64, 0))}, FormatDB, "too close to the float64 limit"},
		{"rows", portsWith(50, 50), []Point{one(1, 0)}, FormatRI, "S has 1 rows for 2 ports"},
		{"columns", portsWith(50, 50), []Point{{FrequencyHz: 1, S: [][]complex128{{0, 0}, {0}}}}, FormatRI, "row 2 of S has 1 elements for 2 ports"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := Write(&bytes.Buffer{}, c.ports, c.points, c.format, nil)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one containing %q", err, c.want)
			}
		})
	}

	t.Run("per-port references need a count", func(t *testing.T) {
		_, err := NewWriter(&bytes.Buffer{}, portsWith(50, 75), FormatMA, nil, -1)
		if err == nil || !strings.Contains(err.Error(), "give the number of points") {
			t.Errorf("error %v, want one asking for the number of points", err)
		}
	})
	t.Run("count", func(t *testing.T) {
		tw, err := NewWriter(&bytes.Buffer{}, portsWith(50), FormatMA, nil, 2)
		if err != nil {
			t.Fatal(err)
		}
		if err := tw.Write(one(1, 0)); err != nil {
			t.Fatal(err)
		}
		if err := tw.Close(); err == nil || !strings.Contains(err.Error(), "1 points written, 2 announced") {
			t.Errorf("Close: %v, want a count mismatch", err)
		}
		if err := tw.Write(one(2, 0)); err == nil || !strings.Contains(err.Error(), "write after Close") {
			t.Errorf("Write after Close: %v", err)
		}
	})
	t.Run("one more than announced", func(t *testing.T) {
		tw, _ := NewWriter(&bytes.Buffer{}, portsWith(50, 60), FormatRI, nil, 1)
		p := Point{FrequencyHz: 1, S: [][]complex128{{0, 0}, {0, 0}}}
		if err := tw.Write(p); err != nil {
			t.Fatal(err)
		}
		p.FrequencyHz = 2
		if err := tw.Write(p); err == nil || !strings.Contains(err.Error(), "one more than the 1 announced") {
			t.Errorf("error %v", err)
		}
	})
	t.Run("writer fails", func(t *testing.T) {
		err := Write(failWriter{}, portsWith(50), good, FormatMA, nil)
		if !errors.Is(err, errDiskFull) {
			t.Errorf("error %v, want it to wrap the writer's %v", err, errDiskFull)
		}
	})
	t.Run("comment cannot inject data", func(t *testing.T) {
		var buf bytes.Buffer
		err := Write(&buf, []Port{{Name: "a\n1 2 3", Impedance: 50}}, good, FormatRI, []string{"x\n2 0 0", "y\r3 0 0"})
		if err != nil {
			t.Fatal(err)
		}
		_, pts, err := Read(&buf, 1)
		if err != nil || len(pts) != 1 {
			t.Errorf("read back %d points, error %v; want the one point written", len(pts), err)
		}
	})
}

func TestParseFormat(t *testing.T) {
	cases := []struct {
		in   string
		want Format
	}{
		{"ri", FormatRI}, {"RI", FormatRI}, {"Ma", FormatMA}, {" db ", FormatDB},
	}
	for _, c := range cases {
		got, err := ParseFormat(c.in)
		if err != nil || got != c.want {
			t.Errorf("ParseFormat(%q) = %v, %v; want %v", c.in, got, err, c.want)
		}
		if back, _ := ParseFormat(got.String()); back != got {
			t.Errorf("%v.String() = %q does not parse back", got, got.String())
		}
	}
	_, err := ParseFormat("dbm")
	if err == nil || !strings.Contains(err.Error(), "want ri (real, imaginary), ma (magnitude, angle) or db (dB, angle)") {
		t.Errorf("ParseFormat(\"dbm\") error %v, want one listing the accepted forms", err)
	}
	var f Format
	if err := f.Set("RI"); err != nil || f != FormatRI {
		t.Errorf("Set(\"RI\") gave %v, %v", f, err)
	}
	if err := f.Set("x"); err == nil || f != FormatRI {
		t.Errorf("Set(\"x\") gave %v, %v; want an error and no change", f, err)
	}
	if got := f.Type(); got != "ri|ma|db" {
		t.Errorf("Type() = %q, want the accepted values for help text", got)
	}
	if Format(0) != FormatMA {
		t.Errorf("zero Format is %v, want MA, the Touchstone default", Format(0))
	}
}

func TestTouchstoneExt(t *testing.T) {
	for n, want := range map[int]string{1: ".s1p", 2: ".s2p", 4: ".s4p", 12: ".s12p"} {
		if got := Ext(n); got != want {
			t.Errorf("Ext(%d) = %q, want %q", n, got, want)
		}
		if got, err := PortCount("dir.v2/amp" + strings.ToUpper(want)); err != nil || got != n {
			t.Errorf("PortCount(%q) = %d, %v; want %d", "amp"+want, got, err, n)
		}
	}
	for _, bad := range []string{"amp", "amp.txt", "amp.sp", "amp.s0p", "amp.s-1p", "amp.s+2p", "amp.sxp", "amp.s99999p", "s2p"} {
		if n, err := PortCount(bad); err == nil {
			t.Errorf("PortCount(%q) = %d, want an error", bad, n)
		}
	}
}

// fuzzBytes hands out the fuzzer's bytes, zeros once they run out.
type fuzzBytes []byte

func (b *fuzzBytes) next(n int) []byte {
	out := make([]byte, n)
	copy(out, *b)
	*b = (*b)[min(n, len(*b)):]
	return out
}
func (b *fuzzBytes) byte() byte     { return b.next(1)[0] }
func (b *fuzzBytes) uint32() uint32 { return binary.LittleEndian.Uint32(b.next(4)) }
func (b *fuzzBytes) float64() float64 {
	return math.Float64frombits(binary.LittleEndian.Uint64(b.next(8)))
}

// FuzzTouchstoneRoundTrip builds S-matrices from arbitrary float64 bit
// patterns (NaN, infinities, subnormals included), writes them and reads
// them back: whatever the writer accepts must read back equal, and finite
// values of sensible size must be accepted.
func FuzzTouchstoneRoundTrip(f *testing.F) {
	f.Add([]byte{0, 0, 0, 0})
	f.Add([]byte{1, 1, 1, 2, 0, 0, 0, 0, 0, 0, 0xf0, 0x3f, 0, 0, 0, 0, 0, 0, 0xf8, 0x7f})
	f.Add([]byte{2, 2, 1, 1, 9, 9, 9, 9, 1, 2, 3, 4, 5, 6, 7, 8, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xef, 0x7f})
	f.Add([]byte{4, 2, 0, 2, 1, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0x80})
	f.Fuzz(func(t *testing.T, data []byte) {
		b := fuzzBytes(data)
		n := 1 + int(b.byte()%5)
		format := Format(b.byte() % 3)
		perPort := b.byte()&1 == 1
		k := 1 + int(b.byte()%3)
		ports := make([]Port, n)
		for i := range ports {
			ports[i].Impedance = 50
			if perPort {
				ports[i].Impedance = 1 + float64(b.uint32()%100000)/7
			}
		}
		nice := true
		pts := make([]Point, k)
		hz := 0.0
		for p := range pts {
			hz += 1 + float64(b.uint32())*1e3
			s := make([][]complex128, n)
			for i := range s {
				s[i] = make([]complex128, n)
				for j := range s[i] {
					s[i][j] = complex(b.float64(), b.float64())
					if v := s[i][j]; cmplx.IsNaN(v) || cmplx.IsInf(v) || cmplx.Abs(v) > 1e300 {
						nice = false
					}
				}
			}
			pts[p] = Point{FrequencyHz: hz, S: s}
		}
		var buf bytes.Buffer
		err := Write(&buf, ports, pts, format, []string{"fuzz"})
		if err != nil {
			if nice {
				t.Fatalf("writing finite values below 1e300 in %v: %v", format, err)
			}
			return
		}
		gotPorts, got, err := Read(&buf, n)
		if err != nil {
			t.Fatalf("reading back what was written: %v\n%s", err, buf.String())
		}
		for i := range ports {
			if gotPorts[i].Impedance != ports[i].Impedance {
				t.Errorf("port %d: %g ohm, wrote %g", i+1, gotPorts[i].Impedance, ports[i].Impedance)
			}
		}
		comparePoints(t, got, pts, format == FormatRI)
	})
}

// FuzzReadTouchstone feeds the reader arbitrary bytes: it must not panic,
// and whatever it accepts must be a valid sweep that writes and reads back
// bit for bit in RI.
func FuzzReadTouchstone(f *testing.F) {
	paths, _ := filepath.Glob(filepath.Join(touchstoneDir, "*"))
	for _, p := range paths {
		data, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		n, _ := PortCount(p)
		f.Add(data, int8(n))
		f.Add(data, int8(0))
	}
	f.Add([]byte("# Hz S DB R 50\n1 -10000 0\n"), int8(1))
	f.Fuzz(func(t *testing.T, data []byte, nPorts int8) {
		ports, pts, err := Read(bytes.NewReader(data), int(nPorts))
		if err != nil {
			if !strings.HasPrefix(err.Error(), "touchstone") {
				t.Errorf("error %q does not say it comes from the Touchstone reader", err)
			}
			return
		}
		if len(ports) == 0 || len(pts) == 0 {
			t.Fatalf("accepted %d ports and %d points", len(ports), len(pts))
		}
		var buf bytes.Buffer
		if err := Write(&buf, ports, pts, FormatRI, nil); err != nil {
			t.Fatalf("the writer refuses what the reader accepted: %v", err)
		}
		_, again, err := Read(&buf, len(ports))
		if err != nil {
			t.Fatalf("reading back: %v\n%s", err, buf.String())
		}
		comparePoints(t, again, pts, true)
	})
}
