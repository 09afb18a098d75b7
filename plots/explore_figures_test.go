package plots

import (
	"strings"
	"testing"

	"qpoint/ac"
)

// TestOperatingPointFigure: every demo diode's I–V figure draws, names
// its load in Thevenin form (the detector's 3.3 V behind Rbias plus the
// video port's 100 kΩ, read off the schematic; the matched detector's
// lines short its anode to ground at DC) and holds the Q point inside its
// axes; the limiter's inductor across the pair is a held voltage, drawn
// as a vertical line.
func TestOperatingPointFigure(t *testing.T) {
	for _, k := range []struct{ demo, load string }{
		{"detector", "load line, 3.3 V behind 320 kΩ"},
		{"attenuator", "load line, 1.8 V behind 1 kΩ"},
		{"limiter", "load line, voltage held at 0 V"},
		{"mixer", "behind 698."},
		{"matched_detector", "load line, 0 V behind 100 kΩ"},
	} {
		nw := demoNetwork(t, k.demo)
		for i, q := range nw.Point.Diodes {
			l, err := nw.LoadLine(i)
			if err != nil {
				t.Fatal(err)
			}
			f := OperatingPoint(q, l)
			checkSVG(t, f.Name, render(t, f, "svg"))
			checkPNG(t, f.Name, render(t, f, "png"), f)
			p := f.Panels[0]
			if !(q.Voltage > p.X.Min && q.Voltage < p.X.Max && q.Current > p.Y.Min && q.Current < p.Y.Max) {
				t.Errorf("%s %s: Q point (%g V, %g A) outside the axes %g..%g V, %g..%g A", k.demo, q.Name, q.Voltage, q.Current, p.X.Min, p.X.Max, p.Y.Min, p.Y.Max)
			}
			if i == 0 && !strings.Contains(f.Key[1].Label, k.load) {
				t.Errorf("%s: load %q, want it to contain %q", k.demo, f.Key[1].Label, k.load)
			}
		}
	}
}

// TestMatchFigure: the transmission and return-loss figure marks the
// design frequency and reads its values there off the sweep; a path to a
// node has no transmission panel.
func TestMatchFigure(t *testing.T) {
	nw := demoNetwork(t, "attenuator")
	freqs, err := ac.LogGrid(100e6, 3e9, 50)
	if err != nil {
		t.Fatal(err)
	}
	r, err := ac.Run(nw, freqs, ac.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	at, err := ac.Run(nw, []float64{900e6}, ac.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	f := Match(r, 0, 1, 900e6)
	checkSVG(t, "match", render(t, f, "svg"))
	if len(f.Panels) != 2 {
		t.Fatalf("%d panels, want 2", len(f.Panels))
	}
	mark := f.Key[len(f.Key)-1].Label
	// The sweep's log-interpolated dB at 900 MHz against a point solved
	// there: within the 0.1 dB the label prints.
	want := "design frequency, 900 MHz: " + formatDB(decibels(at.Points[0].S[1][0])) + " dB"
	if !strings.HasPrefix(mark, want) {
		t.Errorf("key %q, want it to start %q", mark, want)
	}
	if g := Match(r, 0, -1, 900e6); len(g.Panels) != 1 {
		t.Errorf("output at a node: %d panels, want the return loss alone", len(g.Panels))
	}
}
