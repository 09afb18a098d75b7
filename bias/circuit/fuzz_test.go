package circuit

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf8"
)

// FuzzParseValue checks that any text either reads as a finite value or
// gives a *ValueError, for every quantity.
func FuzzParseValue(f *testing.F) {
	for _, s := range []string{"0.5", "1e-9", "-3", "47k", "4.7kΩ", "22pF", "1fF", "1F", "10µA",
		"2.45GHz", "27C", "300.15K", "0.69eV", "0x1F", "NaN", "1e309", "4.7K", "", "1 k", "1e", "-40C"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		for q := Dimensionless; q <= Temperature; q++ {
			v, err := ParseValue(s, q)
			if err != nil {
				var ve *ValueError
				if !errors.As(err, &ve) || !strings.Contains(err.Error(), "; accepted: ") {
					t.Fatalf("ParseValue(%q, %v): error %q is not a *ValueError naming the accepted forms", s, q, err)
				}
				continue
			}
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("ParseValue(%q, %v) = %v, not finite", s, q, v)
			}
			if q == Temperature && v <= 0 {
				t.Fatalf("ParseValue(%q, temperature) = %v K", s, v)
			}
		}
		if lv, err := ParseLevel(s); err == nil {
			if math.IsNaN(lv.DBm) || math.IsInf(lv.DBm, 0) || (!lv.IsPower && !(lv.PeakVolts > 0 && !math.IsInf(lv.PeakVolts, 0))) {
				t.Fatalf("ParseLevel(%q) = %+v", s, lv)
			}
		}
	})
}

// FuzzParse checks that no input makes the loader panic, that every
// problem has a place in the file and that a loaded circuit keeps the
// promises the later stages rely on.
func FuzzParse(f *testing.F) {
	paths, _ := filepath.Glob("../../testdata/bad/*.yaml")
	paths = append(paths, fullFile)
	for _, p := range paths {
		if data, err := os.ReadFile(p); err == nil {
			f.Add(data)
		}
	}
	f.Add([]byte(""))
	f.Add([]byte("parts: [{type: resistor, name: R, between: [a, gnd], value: 1}]"))
	f.Fuzz(func(t *testing.T, data []byte) {
		c, err := Parse("f.yaml", data)
		if err != nil {
			var list ErrorList
			if !errors.As(err, &list) || len(list) == 0 || len(list) > MaxErrors+1 {
				t.Fatalf("error %T with %d entries: %v", err, len(list), err)
			}
			for _, e := range list {
				if e.File != "f.yaml" || e.Line < 1 || e.Col < 1 || e.Msg == "" {
					t.Fatalf("problem without a place: %#v", e)
				}
			}
			return
		}
		if len(c.Parts) == 0 || c.TemperatureK <= 0 {
			t.Fatalf("loaded circuit with %d parts at %v K", len(c.Parts), c.TemperatureK)
		}
		nodes := map[string]bool{Ground: true}
		for _, n := range c.Nodes {
			if n == Ground || nodes[n] || !utf8.ValidString(n) {
				t.Fatalf("bad or repeated node %q in %v", n, c.Nodes)
			}
			nodes[n] = true
		}
		for _, p := range c.Parts {
			if !nodes[p.Nodes[0]] || !nodes[p.Nodes[1]] || p.Nodes[0] == p.Nodes[1] {
				t.Fatalf("part %s has nodes %v", p.Name, p.Nodes)
			}
			if p.Kind == Diode && c.Models[p.Model] == nil {
				t.Fatalf("diode %s uses missing model %q", p.Name, p.Model)
			}
			if (p.Kind == Resistor || p.Kind == Capacitor || p.Kind == Inductor) && !(p.Value > 0) {
				t.Fatalf("part %s has value %v", p.Name, p.Value)
			}
		}
		for _, p := range c.Ports {
			if !nodes[p.Node] || !nodes[p.Return] || !(p.Impedance > 0) {
				t.Fatalf("port %+v", p)
			}
		}
	})
}
