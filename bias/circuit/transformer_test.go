package circuit

import (
	"math"
	"testing"
)

// TestTransformerWindings: a transformer becomes its windings, inductors
// named after it, and the couplings between them; a turns ratio N with a
// magnetising inductance L_m gives L1 = L_m, L2 = N² L_m at k = 1, and a
// centre tap halves the secondary into two windings of L2/4 each
// (inductance goes with the square of the turns).
func TestTransformerWindings(t *testing.T) {
	c, err := Parse("t.yaml", []byte(`
parts:
  - {type: resistor, name: R1, between: [a, gnd], value: 50}
  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, gnd], inductances: [100nH, 400nH], coupling: 98%}
  - {type: resistor, name: R3, between: [b, b2], value: 50}
  - {type: transformer, name: T2, primary: [b2, gnd], secondary: [c, d], centre_tap: m, turns_ratio: 2, magnetising_inductance: 1uH}
  - {type: resistor, name: R2, between: [m, gnd], value: 50}
`))
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]struct {
		nodes [2]string
		l     float64
	}{
		"T1.primary":     {[2]string{"a", "gnd"}, 100e-9},
		"T1.secondary":   {[2]string{"b", "gnd"}, 400e-9},
		"T2.primary":     {[2]string{"b2", "gnd"}, 1e-6},
		"T2.secondary_1": {[2]string{"c", "m"}, 1e-6},
		"T2.secondary_2": {[2]string{"m", "d"}, 1e-6},
	}
	seen := 0
	for _, p := range c.Parts {
		w, ok := want[p.Name]
		if !ok {
			continue
		}
		seen++
		if p.Kind != Inductor || p.Nodes != w.nodes || math.Abs(p.Value-w.l) > 1e-21 {
			t.Errorf("%s: %v %v %g H, want an inductor on %v of %g H", p.Name, p.Kind, p.Nodes, p.Value, w.nodes, w.l)
		}
	}
	if seen != len(want) {
		t.Errorf("%d of %d windings found among the parts", seen, len(want))
	}
	wantCouplings := []Coupling{
		{"T1", "T1.primary", "T1.secondary", 0.98},
		{"T2", "T2.primary", "T2.secondary_1", 1},
		{"T2", "T2.primary", "T2.secondary_2", 1},
		{"T2", "T2.secondary_1", "T2.secondary_2", 1},
	}
	if len(c.Couplings) != len(wantCouplings) {
		t.Fatalf("couplings %+v, want %+v", c.Couplings, wantCouplings)
	}
	for i, w := range wantCouplings {
		if got := c.Couplings[i]; got.Transformer != w.Transformer || got.A != w.A || got.B != w.B || math.Abs(got.K-w.K) > 1e-15 {
			t.Errorf("coupling %d = %+v, want %+v", i, got, w)
		}
	}
	if len(c.Transformers) != 2 || c.Transformers[1].TurnsRatio != 2 || c.Transformers[0].Coupling != 0.98 {
		t.Errorf("transformers %+v", c.Transformers)
	}
	// A winding's value can be varied and set like an inductor's.
	if v, err := c.ResolveVary("T1.secondary.value"); err != nil || v.Quantity != Inductance {
		t.Errorf("ResolveVary(T1.secondary.value) = %+v, %v", v, err)
	}
}

// TestTransformerProblems: each way of writing a transformer wrong gets
// its own message at its place.
func TestTransformerProblems(t *testing.T) {
	const head = "parts:\n  - {type: resistor, name: R1, between: [a, gnd], value: 50}\n"
	const rcGround = "  - {type: resistor, name: R9, between: [c, gnd], value: 50}\n"
	tests := []struct {
		name, data string
		wants      []want
	}{
		{"coupling above one", head + "  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, gnd], inductances: [1uH, 1uH], coupling: 1.2}\n",
			[]want{{"3:110", "`coupling` of transformer `T1` is `1.2`, which is outside 0 < k ≤ 1"}}},
		{"coupling zero", head + "  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, gnd], inductances: [1uH, 1uH], coupling: 0%}\n",
			[]want{{"3:110", "outside 0 < k ≤ 1"}}},
		{"both forms", head + "  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, gnd], inductances: [1uH, 1uH], coupling: 1, turns_ratio: 2}\n",
			[]want{{"3:113", "gives both `inductances` and `turns_ratio`"}}},
		{"no values", head + "  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, gnd]}\n",
			[]want{{"3:5", "has neither `inductances` nor `turns_ratio`"}}},
		{"no coupling", head + "  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, gnd], inductances: [1uH, 1uH]}\n",
			[]want{{"3:5", "gives `inductances` but no `coupling`"}}},
		{"ratio without inductance", head + "  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, gnd], turns_ratio: 2}\n",
			[]want{{"3:5", "has no `magnetising_inductance`"}}},
		{"ratio out of range", head + "  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, gnd], turns_ratio: 5000, magnetising_inductance: 1uH}\n",
			[]want{{"3:88", "accepted: 0.001 to 1000 secondary turns per primary turn"}}},
		{"one inductance", head + "  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, gnd], inductances: [1uH], coupling: 1}\n",
			[]want{{"3:88", "`inductances` of transformer `T1` lists 1 values"}}},
		{"winding shorted", head + "  - {type: transformer, name: T1, primary: [a, a], secondary: [b, gnd], inductances: [1uH, 1uH], coupling: 1}\n",
			[]want{{"3:48", "both terminals of the primary winding of transformer `T1` are on node `a`"}}},
		{"tap at an end", head + "  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, c], centre_tap: c, inductances: [1uH, 1uH], coupling: 1}\n" + rcGround,
			[]want{{"3:85", "`centre_tap` of transformer `T1` is node `c`, an end of the secondary"}}},
		{"misspelt tap", head + "  - {type: transformer, name: T1, primary: [a, gnd], secondary: [b, c], center_tap: m, inductances: [1uH, 1uH], coupling: 1}\n" + rcGround,
			[]want{{"3:73", "unknown key `center_tap` in transformer `T1` (did you mean `centre_tap`?)"}}},
		{"winding name taken", head + "  - {type: inductor, name: T1.primary, between: [a, gnd], value: 1u}\n" +
			"  - {type: transformer, name: T1, primary: [b, gnd], secondary: [c, gnd], inductances: [1uH, 1uH], coupling: 1}\n",
			[]want{{"4:31", "winding is named `T1.primary`, a name already used at line 3"}}},
		{"windings in a loop", head + "  - {type: transformer, name: T1, primary: [a, gnd], secondary: [a, gnd], inductances: [1uH, 1uH], coupling: 0.5}\n",
			[]want{{"3:5", "inductors `T1.secondary`, `T1.primary` form a loop"}}},
		{"unknown type lists transformer", head + "  - {type: transfomer, name: T1}\n",
			[]want{{"3:12", "unknown part type `transfomer` (did you mean `transformer`?)"}}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			checkProblems(t, "c.yaml", []byte(tt.data), tt.wants)
		})
	}
}
