package plots

import (
	"bytes"
	"strings"
	"testing"

	"qpoint/ac/yield"
	"qpoint/bias/circuit"
)

// TestYieldHistogram draws the histogram of a resistor's input resistance
// over 500 runs: the bars hold every run, the bins split at the limit, and
// the figure renders as PNG and SVG.
func TestYieldHistogram(t *testing.T) {
	c, err := circuit.Parse("shunt.yaml", []byte(`
parts:
  - {type: resistor, name: R1, between: [a, gnd], value: 1k, tolerance: {sigma: 2%}}
ports:
  - {name: p, node: a, impedance: 50}
`))
	if err != nil {
		t.Fatal(err)
	}
	tg, err := yield.ParseTarget("zin_re<1010@1MHz")
	if err != nil {
		t.Fatal(err)
	}
	r, err := yield.Run(c, yield.Settings{Targets: []yield.Target{tg}, Runs: 500, Seed: 2})
	if err != nil {
		t.Fatal(err)
	}
	fig, h := yieldHistogram(r, 0)
	total, pass := 0, 0
	for k, n := range h.counts {
		total += n
		a, b := h.origin+float64(k)*h.width, h.origin+float64(k+1)*h.width
		if a < 1010-1e-9 && b > 1010+1e-9 {
			t.Errorf("bin [%g, %g) straddles the limit", a, b)
		}
		if b <= 1010+1e-9 {
			pass += n
		}
	}
	if total != 500 || pass != r.Passed {
		t.Errorf("bars hold %d runs, %d below the limit; want 500 and %d", total, pass, r.Passed)
	}
	for _, want := range []string{"500 runs", "limit 1.01 kΩ", "nominal 1 kΩ"} {
		if !strings.Contains(fig.Note+keyLabels(fig), want) {
			t.Errorf("figure lacks %q: note %q, key %q", want, fig.Note, keyLabels(fig))
		}
	}
	for _, format := range []string{"png", "svg"} {
		var b bytes.Buffer
		if err := Write(&b, format, fig); err != nil || b.Len() == 0 {
			t.Errorf("%s: %v, %d bytes", format, err, b.Len())
		}
	}
}

func keyLabels(f *Figure) string {
	var s []string
	for _, k := range f.Key {
		s = append(s, k.Label)
	}
	return strings.Join(s, "; ")
}
