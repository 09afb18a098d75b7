package steady

import (
	"math"
	"strings"
	"testing"

	"qpoint/ac"
)

// TestValidityNeverPresentsADefault: driven far above its range, the
// detector's estimates differ from the waveform at the first level tried;
// the search must look lower and report a limit it observed, with the
// estimates holding there and not one step above.
func TestValidityNeverPresentsADefault(t *testing.T) {
	nw := network(t, demo(t, "detector"))
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9}
	s := Settings{Harmonics: 5}
	v, err := ValidityLimit(nw, d, -20, 60, 0.5, s)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("%s", v.Note())
	if v.Outcome != LimitFound || !(v.LevelDBm < -20) {
		t.Fatalf("outcome %d at %.2f dBm; want a limit found below the -20 dBm start", v.Outcome, v.LevelDBm)
	}
	// The limit is what the comparison shows: holding there, not 0.1 dB
	// above the bisection's bracket.
	for _, c := range []struct {
		l    float64
		hold bool
	}{{v.LevelDBm, true}, {v.LevelDBm + 0.1, false}} {
		d.EMF = ac.DBmToEMF(c.l, 50)
		e, err := ac.Volterra(nw, d)
		if err != nil {
			t.Fatal(err)
		}
		st, err := Solve(nw, d, s)
		if err != nil {
			t.Fatal(err)
		}
		w, _ := worst(Compare(e, st))
		if (w <= 0.5) != c.hold {
			t.Errorf("at %.2f dBm the worst difference is %.3f dB; the search said the estimates hold: %v", c.l, w, c.hold)
		}
	}
}

// TestValidityNeverHeld: with a tolerance no estimate can meet, the search
// reports no limit (NaN), the lowest level tried and the difference seen
// there, and its note says so rather than naming a level as the limit.
func TestValidityNeverHeld(t *testing.T) {
	nw := network(t, demo(t, "detector"))
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9}
	v, err := ValidityLimit(nw, d, 0, 20, 1e-9, Settings{Harmonics: 5})
	if err != nil {
		t.Fatal(err)
	}
	if v.Outcome != NeverHeld || !math.IsNaN(v.LevelDBm) || v.LowestDBm != -validityDescent || !(v.WorstDB > 1e-9) {
		t.Fatalf("outcome %d, level %v, lowest %v, worst %v dB; want NeverHeld, NaN, -%d, a difference above the tolerance",
			v.Outcome, v.LevelDBm, v.LowestDBm, v.WorstDB, validityDescent)
	}
	if n := v.Note(); !strings.Contains(n, "no validity limit") || !strings.Contains(n, "-60.0 dBm") {
		t.Errorf("note %q does not say that no limit was found at the lowest level tried", n)
	}
}

// TestValidityHeldThroughout: when the estimates hold up to the highest
// level tried, the note says the limit lies higher.
func TestValidityHeldThroughout(t *testing.T) {
	nw := network(t, demo(t, "detector"))
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9}
	v, err := ValidityLimit(nw, d, -80, -70, 0.5, Settings{Harmonics: 5})
	if err != nil {
		t.Fatal(err)
	}
	if v.Outcome != HeldThroughout || v.LevelDBm != -70 || !strings.Contains(v.Note(), "the limit lies higher") {
		t.Errorf("outcome %d at %v dBm, note %q; want HeldThroughout at -70 dBm", v.Outcome, v.LevelDBm, v.Note())
	}
}
