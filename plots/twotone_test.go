package plots

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"qpoint/ac"
	"qpoint/ac/balance"
	"qpoint/ac/steady"
)

// TestTwoToneSpectrum draws the detector demo's two-tone products (by
// harmonic balance, at -20 dBm per tone where the products stand well
// above the floor) and the mixer's (whose symmetry cancels the even
// orders), checks the SVG and PNG, that every product up to the third
// order has its bar, labelled with its name, and compares the detector's
// SVG with testdata/detector-two-tone.golden.svg (-update rewrites it;
// look at it with -samples first).
func TestTwoToneSpectrum(t *testing.T) {
	for _, c := range []struct {
		demo   string
		out    ac.Output
		f1, f2 float64
		dBm    float64
		golden bool
	}{
		{"detector", ac.Output{Port: 1}, 2.45e9, 2.46e9, -20, true},
		{balancedPair, ac.Output{Port: 2}, 1.9e9, 1.91e9, -20, false},
	} {
		nw := demoNetwork(t, c.demo)
		d := ac.Drive{Input: 0, Output: c.out, FrequencyHz: c.f1, SecondToneHz: c.f2, EMF: ac.DBmToEMF(c.dBm, nw.Ports[0].Impedance)}
		est, err := ac.Volterra(nw, d)
		if err != nil {
			t.Fatal(err)
		}
		st, err := steady.Solve(nw, d, steady.Settings{Method: balance.Method{Choice: balance.HarmonicBalance}})
		if err != nil {
			t.Fatal(err)
		}
		fig := TwoToneSpectrum(st, est)
		name := c.demo + "-" + fig.Name
		svg := render(t, fig, "svg")
		checkSVG(t, name, svg)
		checkPNG(t, name, render(t, fig, "png"), fig)
		bars := newProductBars(st, est)
		if len(bars.items) != 12 {
			t.Errorf("%s: %d bars, want the 12 products of orders 1 to 3 at positive frequency", name, len(bars.items))
		}
		for _, label := range []string{"2f1-f2", "f2-f1", "f1+2f2", "3f2"} {
			if !strings.Contains(string(svg), label) {
				t.Errorf("%s: no label %q", name, label)
			}
		}
		if *samples != "" {
			os.WriteFile(filepath.Join(*samples, name+".png"), render(t, fig, "png"), 0o644)
		}
		if !c.golden {
			continue
		}
		path := filepath.Join("testdata", name+".golden.svg")
		if *update {
			if err := os.WriteFile(path, svg, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		want, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run go test ./plots -update to create it)", err)
		}
		if !bytes.Equal(svg, want) {
			t.Errorf("%s differs from %s at %s", name, path, firstDifference(svg, want))
		}
	}
}
