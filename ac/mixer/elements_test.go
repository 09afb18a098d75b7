package mixer

import (
	"errors"
	"strings"
	"testing"

	"qpoint/ac"
)

// TestRefusesLines: a circuit with a line is refused by name, not
// analysed without it. The mixer demo with its IF return inductor
// replaced by a short line also checks that a transformer's coupling and
// a line's unknowns build together.
func TestRefusesLines(t *testing.T) {
	src := strings.Replace(demoFile(t, "mixer"),
		"{type: inductor,  name: Lret,    between: [ct, ret],     value: 47nH}",
		"{type: transmission_line, name: Tret, ends: [ct, ret], impedance: 50, delay: 50ps}", 1)
	if !strings.Contains(src, "Tret") {
		t.Fatal("the mixer demo changed: its Lret line is not where this test expects it")
	}
	nw := network(t, src)
	s, _ := demoSettings(t)
	_, err := Analyze(nw, s)
	var ee *ElementsError
	if !errors.As(err, &ee) || len(ee.Elements) != 1 || ee.Elements[0] != "Tret" {
		t.Fatalf("error %v, want the line Tret refused by name", err)
	}
	// The linear analyses take the same network.
	if _, err := ac.Run(nw, []float64{1.9e9}, ac.Settings{}); err != nil {
		t.Errorf("response of the mixer with a line: %v", err)
	}
}
