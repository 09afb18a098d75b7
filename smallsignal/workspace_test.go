package smallsignal

import (
	"fmt"
	"testing"

	"gonum.org/v1/gonum/mat"

	"qpoint/bias"
	"qpoint/bias/circuit"
)

// describeNetwork prints what nw holds but its matrices and pointers.
func describeNetwork(nw *Network) string {
	q := *nw
	q.Point, q.G, q.C, q.GLinear, q.CLinear = nil, nil, nil, nil, nil
	q.Diodes = append([]Diode(nil), nw.Diodes...)
	for i := range q.Diodes {
		q.Diodes[i].Device = nil
	}
	return fmt.Sprintf("%+v", q)
}

// TestWorkspaceMatchesNew: one workspace linearising a sequence of bias
// points gives, at every call, the network New gives alone: the demo
// circuits one after another (other sizes and names), then the attenuator
// with its diode's series resistance at zero and non-zero (an internal
// node removed and added), at several control voltages.
func TestWorkspaceMatchesNew(t *testing.T) {
	var circuits []*circuit.Circuit
	for _, name := range []string{"detector", "attenuator", "mixer", "limiter", "detector"} {
		c, err := circuit.Load("../testdata/demo/" + name + ".yaml")
		if err != nil {
			t.Fatal(err)
		}
		circuits = append(circuits, c)
	}
	att := circuits[1]
	rs, err := att.ResolveVary("attenuator_diode.series_resistance")
	if err != nil {
		t.Fatal(err)
	}
	ctl, err := att.ResolveVary("Vctl.value")
	if err != nil {
		t.Fatal(err)
	}
	for _, ohm := range []float64{0, 1.5, 0, 3} {
		for _, volts := range []float64{0.9, 2, 5} {
			c, _ := rs.Apply(att, ohm)
			c, _ = ctl.Apply(c, volts)
			circuits = append(circuits, c)
		}
	}
	var ws Workspace
	var gotDC mat.Dense // reused, as New reuses its matrices
	for k, c := range circuits {
		p, err := bias.Solve(c, bias.Settings{})
		if err != nil {
			t.Fatal(err)
		}
		got, err := ws.New(p)
		if err != nil {
			t.Fatal(err)
		}
		want, err := New(p)
		if err != nil {
			t.Fatal(err)
		}
		if g, w := describeNetwork(got), describeNetwork(want); g != w {
			t.Fatalf("circuit %d (%s): the workspace's network differs from New's:\n%s\nagainst\n%s", k, c.Name, g, w)
		}
		for _, m := range []struct {
			name      string
			got, want *mat.Dense
		}{{"G", got.G, want.G}, {"C", got.C, want.C}, {"GLinear", got.GLinear, want.GLinear}, {"CLinear", got.CLinear, want.CLinear}} {
			if !mat.Equal(m.got, m.want) {
				t.Fatalf("circuit %d (%s): the workspace's %s differs from New's:\n%v\nagainst\n%v", k, c.Name, m.name, mat.Formatted(m.got), mat.Formatted(m.want))
			}
		}
		var wantDC mat.Dense
		got.GDCTo(&gotDC)
		wantDC.CloneFrom(want.GDC())
		if !mat.Equal(&gotDC, &wantDC) {
			t.Fatalf("circuit %d (%s): GDCTo differs from GDC", k, c.Name)
		}
	}
}
