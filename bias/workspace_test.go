package bias

import (
	"fmt"
	"testing"

	"qpoint/bias/circuit"
)

// describe prints everything p holds but its runtime, pointers replaced
// by what they point to, so that two points compare as text (NaN
// fractions included, which reflect.DeepEqual would call unequal).
func describe(p *Point) string {
	q := *p
	q.Circuit = nil
	q.Stats.Runtime = 0
	devices := ""
	q.Diodes = append([]QPoint(nil), p.Diodes...)
	for i := range q.Diodes {
		devices += fmt.Sprintf("%+v\n", *q.Diodes[i].Device)
		q.Diodes[i].Device = nil
	}
	return fmt.Sprintf("%+v\n%s", q, devices)
}

// TestWorkspaceMatchesSolve: one workspace solving a sequence of circuits
// gives, at every call, the point Solve gives alone. The sequence changes
// what the workspace keeps between calls: whole random networks (nodes,
// models, band ordering), a part value along a continuation chain (only
// values), the temperature (the diode devices), and a diode's series
// resistance between zero and non-zero (an unknown added and removed, so
// the band ordering again). Each chain step starts from the previous
// point, which for the workspace is its own point being overwritten.
func TestWorkspaceMatchesSolve(t *testing.T) {
	var ws Workspace
	check := func(what string, c *circuit.Circuit, s, fresh Settings) (*Point, *Point) {
		t.Helper()
		got, errGot := ws.Solve(c, s)
		want, errWant := Solve(c, fresh)
		if (errGot == nil) != (errWant == nil) || errGot != nil && errGot.Error() != errWant.Error() {
			t.Fatalf("%s: workspace error %v, Solve error %v", what, errGot, errWant)
		}
		if errGot != nil {
			return nil, nil
		}
		if g, w := describe(got), describe(want); g != w {
			t.Fatalf("%s: the workspace's point differs from Solve's:\n%s\nagainst\n%s", what, g, w)
		}
		return got, want
	}
	for seed := uint64(1); seed <= 40; seed++ {
		text := randomCircuitFile(seed)
		c, err := circuit.Parse(fmt.Sprintf("random-%d.yaml", seed), []byte(text))
		if err != nil {
			t.Fatal(err)
		}
		check(fmt.Sprintf("seed %d", seed), c, Settings{}, Settings{})

		// A chain stepping the first tree resistor, then the temperature.
		vary, err := c.ResolveVary("Rtree1.value")
		if err != nil {
			t.Fatal(err)
		}
		var prevGot, prevWant *Point
		for k := 0; k < 4; k++ {
			cc, _ := vary.Apply(c, c.Parts[0].Value*(1+0.5*float64(k)))
			prevGot, prevWant = check(fmt.Sprintf("seed %d, Rtree1 step %d", seed, k), cc,
				Settings{Start: prevGot}, Settings{Start: prevWant})
		}
		for _, tempK := range []float64{250, 300, 350} {
			prevGot, prevWant = check(fmt.Sprintf("seed %d, %g K", seed, tempK), c,
				Settings{TemperatureK: tempK, Start: prevGot}, Settings{TemperatureK: tempK, Start: prevWant})
		}

		// The first model's series resistance to zero and back.
		rs, err := c.ResolveVary("m0.series_resistance")
		if err != nil {
			t.Fatal(err)
		}
		for _, ohm := range []float64{0, 2, 0, 5} {
			cc, _ := rs.Apply(c, ohm)
			prevGot, prevWant = check(fmt.Sprintf("seed %d, m0 R_S = %g", seed, ohm), cc,
				Settings{Start: prevGot}, Settings{Start: prevWant})
		}
	}
}
