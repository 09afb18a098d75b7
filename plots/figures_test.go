package plots

import (
	"bytes"
	"encoding/xml"
	"errors"
	"flag"
	"image/png"
	"io"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"

	"qpoint/ac"
)

var (
	update  = flag.Bool("update", false, "rewrite the golden SVG files in testdata/ from the current output")
	samples = flag.String("samples", "", "also write every figure of the synthetic sweeps as PNG and SVG into this directory, to look at")
)

// checkSVG fails unless b is a well-formed SVG document.
func checkSVG(t *testing.T, what string, b []byte) {
	t.Helper()
	if !bytes.HasPrefix(b, []byte("<?xml")) && !bytes.HasPrefix(b, []byte("<svg")) {
		t.Errorf("%s: SVG output starts %q, want <?xml or <svg", what, b[:min(len(b), 20)])
		return
	}
	d := xml.NewDecoder(bytes.NewReader(b))
	sawSVG := false
	for {
		tok, err := d.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Errorf("%s: SVG output is not well-formed XML: %v", what, err)
			return
		}
		if se, ok := tok.(xml.StartElement); ok && se.Name.Local == "svg" {
			sawSVG = true
		}
	}
	if !sawSVG {
		t.Errorf("%s: SVG output has no <svg> element", what)
	}
}

// checkPNG fails unless b decodes as a PNG of the figure's size at pngDPI.
func checkPNG(t *testing.T, what string, b []byte, f *Figure) {
	t.Helper()
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Errorf("%s: PNG output does not decode: %v", what, err)
		return
	}
	wantW := int(math.Ceil(float64(f.Width/vg.Inch) * pngDPI))
	wantH := int(math.Ceil(float64(f.Height/vg.Inch) * pngDPI))
	if got := img.Bounds().Size(); abs(got.X-wantW) > 1 || abs(got.Y-wantH) > 1 {
		t.Errorf("%s: PNG is %v pixels, want %dx%d (%v × %v at %d dpi)", what, got, wantW, wantH, f.Width, f.Height, pngDPI)
	}
}

func abs(i int) int {
	if i < 0 {
		return -i
	}
	return i
}

// render writes f in format and fails the test on error or empty output.
func render(t *testing.T, f *Figure, format string) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := Write(&buf, format, f); err != nil {
		t.Fatalf("Write(%s, %q): %v", format, f.Name, err)
	}
	if buf.Len() == 0 {
		t.Fatalf("Write(%s, %q) wrote nothing", format, f.Name)
	}
	return buf.Bytes()
}

var synthetic = []struct {
	name string
	make func() *ac.Response
}{
	{"lowpass", lowPass},
	{"detector", detectorPort},
}

// TestGolden renders every figure of the synthetic sweeps and compares the
// SVG byte for byte with testdata/NAME-FIGURE.golden.svg. gonum/plot's SVG
// writer is deterministic (TestRenderingIsDeterministic checks it), so any
// difference is a change in the drawing. After an intended change, look at
// the new figures (-samples DIR) and rewrite the files with -update.
func TestGolden(t *testing.T) {
	for _, s := range synthetic {
		for _, f := range ResponseFigures(s.make(), 0) {
			what := s.name + "-" + f.Name
			t.Run(what, func(t *testing.T) {
				svg := render(t, f, "svg")
				checkSVG(t, what, svg)
				checkPNG(t, what, render(t, f, "png"), f)
				path := filepath.Join("testdata", what+".golden.svg")
				if *update {
					if err := os.WriteFile(path, svg, 0o644); err != nil {
						t.Fatal(err)
					}
					return
				}
				want, err := os.ReadFile(path)
				if err != nil {
					t.Fatalf("%v (run go test ./plots -update to create it)", err)
				}
				if !bytes.Equal(svg, want) {
					t.Errorf("%s differs from %s at %s; if the change is intended, look at it with -samples and rerun with -update",
						what, path, firstDifference(svg, want))
				}
			})
		}
	}
}

// firstDifference describes the first place where got and want differ:
// the line, and the text round the first differing byte in it.
func firstDifference(got, want []byte) string {
	g, w := strings.Split(string(got), "\n"), strings.Split(string(want), "\n")
	for i := 0; i < len(g) && i < len(w); i++ {
		if g[i] != w[i] {
			col := 0
			for col < len(g[i]) && col < len(w[i]) && g[i][col] == w[i][col] {
				col++
			}
			return "line " + strconv.Itoa(i+1) + ": got " + around(g[i], col) + ", want " + around(w[i], col)
		}
	}
	return "the end: got " + strconv.Itoa(len(g)) + " lines, want " + strconv.Itoa(len(w))
}

// around quotes up to 40 bytes either side of s[col].
func around(s string, col int) string {
	from, to := max(0, col-40), min(len(s), col+40)
	return "«…" + s[from:to] + "…»"
}

func TestRenderingIsDeterministic(t *testing.T) {
	r := lowPass()
	for _, f := range ResponseFigures(r, 0) {
		a, b := render(t, f, "svg"), render(t, f, "svg")
		if !bytes.Equal(a, b) {
			t.Errorf("%s: two renderings of the same figure differ at %s", f.Name, firstDifference(a, b))
		}
	}
}

func TestWriteSamples(t *testing.T) {
	if *samples == "" {
		t.Skip("no -samples directory given")
	}
	if err := os.MkdirAll(*samples, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, s := range synthetic {
		for _, f := range ResponseFigures(s.make(), 0) {
			for _, format := range []string{"png", "svg"} {
				path := filepath.Join(*samples, s.name+"-"+f.Name+"."+format)
				if err := os.WriteFile(path, render(t, f, format), 0o644); err != nil {
					t.Fatal(err)
				}
			}
		}
	}
}

func TestFigureNamesAndKeys(t *testing.T) {
	var names []string
	for _, f := range ResponseFigures(lowPass(), 0) {
		names = append(names, f.Name)
	}
	if got, want := strings.Join(names, " "), "gain-phase impedance smith group-delay"; got != want {
		t.Errorf("figure names %q, want %q", got, want)
	}
	keyOf := func(f *Figure) string {
		var ls []string
		for _, e := range f.Key {
			ls = append(ls, e.Label)
		}
		return strings.Join(ls, "|")
	}
	tests := []struct {
		what string
		fig  *Figure
		want string
	}{
		{"two-port with a probe", Bode(lowPass()), "S21|S11|probe filter"},
		{"one-port has no S21", Bode(detectorPort()), "S11"},
		{"chosen traces", Bode(lowPass(), SParameter(2, 2), SParameter(1, 2)), "S22|S12"},
		{"impedance per port", Impedance(lowPass()), "R, in|X, in|R, out|X, out"},
		{"smith per port", Smith(lowPass(), 0), "S11, in|S22, out"},
	}
	for _, tt := range tests {
		if got := keyOf(tt.fig); got != tt.want {
			t.Errorf("%s: key %q, want %q", tt.what, got, tt.want)
		}
	}
	if title := GroupDelay(detectorPort()).Title; title != "Group delay of S11" {
		t.Errorf("one-port group delay titled %q, want it to say S11, the quantity the sweep differentiates", title)
	}
}

func TestProbe(t *testing.T) {
	r := lowPass()
	tr, err := Probe(r, "filter")
	if err != nil {
		t.Fatal(err)
	}
	if got, want := tr.At(r.Points[0]), r.Points[0].Probes[0]; got != want {
		t.Errorf("probe trace at the first point = %v, want %v", got, want)
	}
	if _, err := Probe(r, "nowhere"); err == nil || !strings.Contains(err.Error(), "filter") {
		t.Errorf("unknown probe: error %v, want one that lists the probes there are", err)
	}
}

func TestUnwrapDegrees(t *testing.T) {
	deg := func(d float64) complex128 { return cmplx.Rect(1, d*math.Pi/180) }
	// A phase falling steadily through -180° must carry on to -200°, not
	// jump to +160°; a NaN or zero in between is skipped, not bridged by a
	// false turn.
	in := []complex128{deg(-100), deg(-170), deg(-190), cmplx.NaN(), 0, deg(-260), deg(-350), deg(-370)}
	want := []float64{-100, -170, -190, math.NaN(), math.NaN(), -260, -350, -370}
	got := unwrapDegrees(in)
	for i := range want {
		if math.IsNaN(want[i]) != math.IsNaN(got[i]) || (!math.IsNaN(want[i]) && math.Abs(got[i]-want[i]) > 1e-9) {
			t.Errorf("unwrapped phase %d = %g°, want %g° (all: %v)", i, got[i], want[i], got)
		}
	}
}

func TestCurveSkipsWhatCannotBeDrawn(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	xs := []float64{1, 2, 3, 4, 5, 6, 7}
	ys := []float64{1, 2, nan, 4, inf, 0, 7}
	if got := len(newCurve(xs, ys, true, false).runs); got != 3 {
		t.Errorf("linear y: %d runs, want 3 (broken at the NaN and the ∞)", got)
	}
	if got := len(newCurve(xs, ys, true, true).runs); got != 3 {
		t.Errorf("log y: %d runs, want 3 (the zero joins the ∞ in one gap)", got)
	}
	if got := newCurve([]float64{0, -1}, []float64{1, 1}, true, false); !got.empty() {
		t.Errorf("non-positive frequencies on a log axis kept: %v", got.runs)
	}
	if !math.IsNaN(decibels(0)) || !math.IsNaN(decibels(cmplx.Inf())) {
		t.Errorf("decibels of 0 and ∞ = %g, %g; want NaN so they are skipped", decibels(0), decibels(cmplx.Inf()))
	}
}

// Awkward sweeps that every figure must draw without error or panic.
func TestEdgeCases(t *testing.T) {
	nan := cmplx.NaN()
	onePoint := lowPass()
	onePoint.Points = onePoint.Points[40:41]

	noProbes := lowPass()
	noProbes.Probes = nil
	for i := range noProbes.Points {
		noProbes.Points[i].Probes = nil
	}

	holes := lowPass()
	for i := range holes.Points {
		p := &holes.Points[i]
		switch i % 7 {
		case 1:
			p.S[1][0], p.S[0][0] = nan, cmplx.Inf()
		case 2:
			p.InputImpedance[0] = cmplx.Inf()
			p.GroupDelay = math.NaN()
		case 3:
			p.Probes[0] = nan
			p.GroupDelay = math.Inf(-1)
		}
	}

	isolated := lowPass() // zero transmission: dB of 0 everywhere
	for i := range isolated.Points {
		isolated.Points[i].S[1][0] = 0
		isolated.Points[i].Probes[0] = 0
		isolated.Points[i].InputImpedance[1] = 0
	}

	ragged := lowPass() // slices shorter than the ports and probes say
	for i := range ragged.Points {
		ragged.Points[i].S = ragged.Points[i].S[:1]
		ragged.Points[i].InputImpedance = nil
		ragged.Points[i].Probes = nil
	}

	badFreqs := detectorPort()
	badFreqs.Points[0].FrequencyHz = 0
	badFreqs.Points[1].FrequencyHz = -5
	badFreqs.Points[2].FrequencyHz = math.NaN()

	allNaN := detectorPort()
	for i := range allNaN.Points {
		allNaN.Points[i].S[0][0] = nan
		allNaN.Points[i].InputImpedance[0] = nan
		allNaN.Points[i].GroupDelay = math.NaN()
	}

	flat := detectorPort() // one value throughout: no range to span
	for i := range flat.Points {
		flat.Points[i].S[0][0] = 0.5
		flat.Points[i].InputImpedance[0] = 150
		flat.Points[i].GroupDelay = 0
	}

	crowded := &ac.Response{} // more ports than colours, with long names
	for i := 0; i < 7; i++ {
		crowded.Ports = append(crowded.Ports, ac.PortInfo{Name: "port with a long name " + strconv.Itoa(i+1), Impedance: 50 + 25*float64(i)})
	}
	for _, p := range detectorPort().Points {
		pt := ac.Point{FrequencyHz: p.FrequencyHz, GroupDelay: p.GroupDelay}
		for i := range crowded.Ports {
			row := make([]complex128, len(crowded.Ports))
			for j := range row {
				row[j] = p.S[0][0] * complex(1/float64(1+i+j), 0)
			}
			pt.S = append(pt.S, row)
			pt.InputImpedance = append(pt.InputImpedance, p.InputImpedance[0]*complex(float64(i+1), 0))
		}
		crowded.Points = append(crowded.Points, pt)
	}

	cases := []struct {
		name string
		r    *ac.Response
	}{
		{"one point", onePoint},
		{"one port", detectorPort()},
		{"no probes", noProbes},
		{"NaN and Inf values", holes},
		{"zero transmission", isolated},
		{"ragged slices", ragged},
		{"bad frequencies", badFreqs},
		{"all NaN", allNaN},
		{"flat", flat},
		{"no points", &ac.Response{Ports: lowPass().Ports}},
		{"no ports", &ac.Response{Points: []ac.Point{{FrequencyHz: 1e9}}}},
		{"nil", nil},
		{"seven ports", crowded},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			figs := ResponseFigures(c.r, 0)
			if len(figs) != 4 {
				t.Fatalf("%d figures, want 4", len(figs))
			}
			for _, f := range figs {
				checkSVG(t, f.Name, render(t, f, "svg"))
				b := render(t, f, "png")
				checkPNG(t, f.Name, b, f)
				if *samples != "" {
					dir := filepath.Join(*samples, "edge-cases")
					name := strings.ReplaceAll(c.name, " ", "-") + "-" + f.Name + ".png"
					if err := os.MkdirAll(dir, 0o755); err != nil {
						t.Fatal(err)
					}
					if err := os.WriteFile(filepath.Join(dir, name), b, 0o644); err != nil {
						t.Fatal(err)
					}
				}
			}
		})
	}
}

func TestWriteRejects(t *testing.T) {
	f := GroupDelay(lowPass())
	if err := Write(io.Discard, "bmp", f); err == nil || !strings.Contains(err.Error(), "svg or png") {
		t.Errorf("unknown format: error %v, want one naming the formats there are", err)
	}
	if err := Write(io.Discard, "svg", nil); err == nil {
		t.Error("nil figure: no error")
	}
	f.Width = 0
	if err := Write(io.Discard, "png", f); err == nil {
		t.Error("zero-width figure: no error")
	}
	if err := Write(failingWriter{}, "svg", GroupDelay(lowPass())); err == nil {
		t.Error("a writer that fails: no error")
	}
}

type failingWriter struct{}

func (failingWriter) Write([]byte) (int, error) { return 0, errors.New("disk full") }

func TestWrapNote(t *testing.T) {
	perRune := func(s string) vg.Length { return vg.Length(len([]rune(s))) }
	// "aaaa · bbbb" is 11 runes and fits; "cc dddddddddddd" does not; the
	// last word alone is wider than the line and stays whole.
	got := wrapNote("aaaa · bbbb cc  dddddddddddd", 11, perRune)
	want := []string{"aaaa · bbbb", "cc", "dddddddddddd"}
	if strings.Join(got, "|") != strings.Join(want, "|") {
		t.Errorf("wrapNote = %q, want %q", got, want)
	}
}

// TestSmithDesignFrequency: a design frequency inside the sweep is marked
// on port 1's trace and named in the key; outside the sweep, or zero, it
// is neither.
func TestSmithDesignFrequency(t *testing.T) {
	r := lowPass()
	fs := frequencies(r)
	mid := math.Sqrt(fs[0] * fs[len(fs)-1])
	for _, c := range []struct {
		hz   float64
		want bool
	}{{mid, true}, {0, false}, {fs[len(fs)-1] * 10, false}} {
		f := Smith(r, c.hz)
		keyed := false
		for _, k := range f.Key {
			keyed = keyed || strings.HasPrefix(k.Label, "design frequency")
		}
		var marked bool
		tr := SmithTrace{Gamma: values(r, SParameter(1, 1)), FrequencyHz: fs, DesignHz: c.hz}
		for _, m := range tr.markers(smithFrame{radius: 100}) {
			marked = marked || m.kind == markerDesign
		}
		if keyed != c.want || marked != c.want {
			t.Errorf("design at %g Hz: keyed %v, marked %v; want %v", c.hz, keyed, marked, c.want)
		}
	}
}
