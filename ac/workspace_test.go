package ac

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"qpoint/smallsignal"
)

// diodeLadder returns the circuit file of an RC ladder of sections
// sections with a biased shunt diode at every node: 2 × sections + 3
// unknowns, enough for a long sweep to take the reduced engine.
func diodeLadder(sections int) string {
	var b strings.Builder
	b.WriteString(`diode_models:
  d: {saturation_current: 10nA, ideality: 1.2, series_resistance: 3, zero_bias_capacitance: 0.5pF}
parts:
  - {type: voltage_source, name: V, plus: vcc, minus: gnd, value: 5V}
`)
	prev := "in"
	for k := 1; k <= sections; k++ {
		node := fmt.Sprintf("n%d", k)
		fmt.Fprintf(&b, "  - {type: resistor, name: R%d, between: [%s, %s], value: 100}\n", k, prev, node)
		fmt.Fprintf(&b, "  - {type: capacitor, name: C%d, between: [%s, gnd], value: 2pF}\n", k, node)
		fmt.Fprintf(&b, "  - {type: resistor, name: Rb%d, between: [vcc, %s], value: 10k}\n", k, node)
		fmt.Fprintf(&b, "  - {type: diode, name: D%d, anode: %s, cathode: gnd, model: d}\n", k, node)
		prev = node
	}
	fmt.Fprintf(&b, `ports:
  - {name: in, node: in, impedance: 50, coupling: ac}
  - {name: out, node: %s, impedance: 50, coupling: ac}
probes: [n1]
`, prev)
	return b.String()
}

// TestWorkspaceMatchesPackage: one workspace running sweeps and Volterra
// estimates on a sequence of networks of different sizes gives, at every
// call, exactly what Sweep and Volterra give alone: the demos one after
// another, then diode ladders, whose long sweeps take the reduced engine
// between sweeps on the workspace's LU.
func TestWorkspaceMatchesPackage(t *testing.T) {
	var networks []*smallsignal.Network
	for _, name := range []string{"detector", "attenuator", "mixer", "limiter", "attenuator"} {
		text, err := os.ReadFile(filepath.Join("..", "testdata", "demo", name+".yaml"))
		if err != nil {
			t.Fatal(err)
		}
		networks = append(networks, network(t, string(text)))
	}
	for _, sections := range []int{6, 2, 6} {
		networks = append(networks, network(t, diodeLadder(sections)))
	}
	short := []float64{900e6, 2.45e9}
	long, err := LogGrid(10e6, 6e9, 20)
	if err != nil {
		t.Fatal(err)
	}
	var ws Workspace
	for k, nw := range networks {
		what := fmt.Sprintf("network %d (%d unknowns)", k, nw.N)
		for _, freqs := range [][]float64{short, long} {
			var got, want []Point
			gotPorts, gotProbes, errGot := ws.Sweep(nw, freqs, Settings{}, func(p Point) error { got = append(got, p); return nil })
			wantPorts, wantProbes, errWant := Sweep(nw, freqs, Settings{}, func(p Point) error { want = append(want, p); return nil })
			if errGot != nil || errWant != nil {
				t.Fatalf("%s: sweep errors %v and %v", what, errGot, errWant)
			}
			if g, w := fmt.Sprint(gotPorts, gotProbes, got), fmt.Sprint(wantPorts, wantProbes, want); g != w {
				t.Fatalf("%s, %d frequencies: the workspace's sweep differs from Sweep's:\n%s\nagainst\n%s", what, len(freqs), g, w)
			}
		}
		for _, d := range []Drive{
			{Input: 0, Output: Output{Port: len(nw.Ports) - 1}, FrequencyHz: 900e6, EMF: 0.02},
			{Input: 0, Output: Output{Port: -1, Node: nw.Names[0]}, FrequencyHz: 900e6, EMF: 0.02, SecondToneHz: 910e6},
		} {
			got, errGot := ws.Volterra(nw, d)
			want, errWant := Volterra(nw, d)
			if errGot != nil || errWant != nil {
				t.Fatalf("%s: Volterra errors %v and %v", what, errGot, errWant)
			}
			if g, w := fmt.Sprintf("%+v", *got), fmt.Sprintf("%+v", *want); g != w {
				t.Fatalf("%s, drive %+v: the workspace's estimate differs from Volterra's:\n%s\nagainst\n%s", what, d, g, w)
			}
		}
	}
}

// TestReservePoints: points carved from a reservation equal points of
// their own, on the LU and on the reduced engine, a reservation too small
// or for the wrong shape falls back to points of their own, and a
// reserved sweep of many points makes a few allocations, not two per
// point.
func TestReservePoints(t *testing.T) {
	long, err := LogGrid(10e6, 6e9, 20)
	if err != nil {
		t.Fatal(err)
	}
	for _, nw := range []*smallsignal.Network{network(t, diodeLadder(2)), network(t, diodeLadder(12))} {
		var want []Point
		if _, _, err := Sweep(nw, long, Settings{}, func(p Point) error { want = append(want, p); return nil }); err != nil {
			t.Fatal(err)
		}
		np, probes := len(nw.Ports), len(nw.Point.Circuit.Probes)
		var ws Workspace
		for _, reserve := range [][3]int{{len(long), np, probes}, {len(long) / 2, np, probes}, {len(long), np + 1, 0}} {
			ws.ReservePoints(reserve[0], reserve[1], reserve[2])
			var got []Point
			if _, _, err := ws.Sweep(nw, long, Settings{}, func(p Point) error { got = append(got, p); return nil }); err != nil {
				t.Fatal(err)
			}
			if g, w := fmt.Sprint(got), fmt.Sprint(want); g != w {
				t.Fatalf("n = %d, reserved %v: the points differ:\n%s\nagainst\n%s", nw.N, reserve, g, w)
			}
		}
		keep := make([]Point, 0, len(long))
		visit := func(p Point) error { keep = append(keep, p); return nil }
		plain := testing.AllocsPerRun(5, func() {
			keep = keep[:0]
			ws.Sweep(nw, long, Settings{}, visit)
		})
		reserved := testing.AllocsPerRun(5, func() {
			keep = keep[:0]
			ws.ReservePoints(len(long), np, probes)
			ws.Sweep(nw, long, Settings{}, visit)
		})
		t.Logf("n = %d, %d points: %.0f allocations a sweep, %.0f reserved", nw.N, len(long), plain, reserved)
		if reserved > plain-float64(len(long)) {
			t.Errorf("n = %d: a reserved sweep made %.0f allocations against %.0f", nw.N, reserved, plain)
		}
	}
}
