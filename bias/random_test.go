package bias

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"qpoint/bias/circuit"
	"qpoint/bias/circuit/circuittest"
)

// randomCircuitFile writes, from seed, the circuit file of a connected
// network of resistors, diodes, voltage and current sources, inductors,
// capacitors and ports, at a random temperature. Diode models span the
// accepted ranges: I_S from 1e-18 A to 1e-5 A, ideality 0.9 to 3, series
// resistance, breakdown knees. The network is valid by construction: a
// resistive spanning tree ties every node to gnd at DC, and no loop is made
// of voltage sources, inductors and junctions alone, so that no source can
// force a junction beyond what a resistor limits. The text is the circuit:
// a failing case is reproduced by loading it.
func randomCircuitFile(seed uint64) string {
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	var b strings.Builder
	fmt.Fprintf(&b, "# Random network, seed %d (bias/random_test.go).\n", seed)
	fmt.Fprintf(&b, "name: random network %d\n", seed)
	fmt.Fprintf(&b, "temperature: %sK\n", circuittest.Num(math.Round((233.15+160*rng.Float64())*100)/100))
	b.WriteString("diode_models:\n")
	models := 1 + rng.IntN(4)
	for m := 0; m < models; m++ {
		fmt.Fprintf(&b, "  m%d: {saturation_current: %s, ideality: %s", m, circuittest.Num(circuittest.LogUniform(rng, 1e-18, 1e-5)), circuittest.Num(0.9+2.1*rng.Float64()))
		if rng.IntN(2) == 0 {
			fmt.Fprintf(&b, ", series_resistance: %s", circuittest.Num(circuittest.LogUniform(rng, 1e-3, 1e3)))
		}
		if rng.IntN(3) == 0 {
			fmt.Fprintf(&b, ", breakdown_voltage: %s, breakdown_current: %s", circuittest.Num(1+100*rng.Float64()), circuittest.Num(circuittest.LogUniform(rng, 1e-9, 1e-2)))
		}
		if rng.IntN(3) == 0 {
			fmt.Fprintf(&b, ", zero_bias_capacitance: %s, transit_time: %s", circuittest.Num(circuittest.LogUniform(rng, 1e-14, 1e-10)), circuittest.Num(circuittest.LogUniform(rng, 1e-12, 1e-7)))
		}
		b.WriteString("}\n")
	}
	nodes := 2 + rng.IntN(14)
	name := func(i int) string {
		if i == 0 {
			return circuit.Ground
		}
		return fmt.Sprintf("n%d", i)
	}
	b.WriteString("parts:\n")
	part := 0
	add := func(format string, args ...any) {
		part++
		fmt.Fprintf(&b, "  - {"+format+"}\n", args...)
	}
	for i := 1; i <= nodes; i++ {
		add("type: resistor, name: Rtree%d, between: [%s, %s], value: %s", i, name(i), name(rng.IntN(i)), circuittest.Num(circuittest.LogUniform(rng, 1, 1e7)))
	}
	// Voltage sources and inductors join groups of nodes; one that would
	// close a loop of them is left out.
	uf := make([]int, nodes+1)
	for i := range uf {
		uf[i] = i
	}
	find := func(x int) int {
		for uf[x] != x {
			x = uf[x]
		}
		return x
	}
	joins := func(a, c int) bool {
		ra, rc := find(a), find(c)
		if ra == rc {
			return false
		}
		uf[ra] = rc
		return true
	}
	supply := 1 + rng.IntN(nodes)
	joins(supply, 0)
	add("type: voltage_source, name: Vmain, plus: %s, minus: gnd, value: %s", name(supply), circuittest.Num(200*(rng.Float64()-0.4)))
	type pick struct{ kind, a, c int }
	var picks []pick
	for k := 0; k < 2*nodes; k++ {
		if a, c := rng.IntN(nodes+1), rng.IntN(nodes+1); a != c {
			picks = append(picks, pick{rng.IntN(10), a, c})
		}
	}
	// Sources and inductors first, so that the groups of nodes they tie
	// together are known before the diodes are placed.
	for k, p := range picks {
		switch {
		case p.kind == 7 && joins(p.a, p.c):
			add("type: voltage_source, name: V%d, plus: %s, minus: %s, value: %s", k, name(p.a), name(p.c), circuittest.Num(20*(rng.Float64()-0.5)))
		case p.kind == 8 && joins(p.a, p.c):
			add("type: inductor, name: L%d, between: [%s, %s], value: %s", k, name(p.a), name(p.c), circuittest.Num(circuittest.LogUniform(rng, 1e-9, 1e-3)))
		}
	}
	for k, p := range picks {
		a, c := p.a, p.c
		switch p.kind {
		case 0, 1, 2, 3:
			// A junction that closes a loop of sources, inductors and
			// junctions could be forced forward by the loop's sources
			// with nothing to limit its current (e^(V/nV_T) I_S): not a
			// circuit anyone builds. Every loop through a junction
			// holds a resistor or a port.
			if joins(a, c) {
				add("type: diode, name: D%d, anode: %s, cathode: %s, model: m%d", k, name(a), name(c), rng.IntN(models))
			}
		case 4, 5:
			add("type: resistor, name: R%d, between: [%s, %s], value: %s", k, name(a), name(c), circuittest.Num(circuittest.LogUniform(rng, 1e-1, 1e7)))
		case 6:
			// A current source has its own shunt: 0.1 A pushed into
			// megohms would ask for megavolts, which no supply the
			// solver accepts delivers.
			add("type: current_source, name: I%d, from: %s, to: %s, value: %s", k, name(a), name(c), circuittest.Num(circuittest.LogUniform(rng, 1e-9, 1e-1)*float64(1-2*rng.IntN(2))))
			add("type: resistor, name: Rshunt%d, between: [%s, %s], value: %s", k, name(a), name(c), circuittest.Num(circuittest.LogUniform(rng, 1, 1e4)))
		case 9:
			add("type: capacitor, name: C%d, between: [%s, %s], value: %s", k, name(a), name(c), circuittest.Num(circuittest.LogUniform(rng, 1e-12, 1e-6)))
		}
	}
	if rng.IntN(2) == 0 {
		b.WriteString("ports:\n")
		for k := 0; k < 1+rng.IntN(2); k++ {
			coupling := "dc"
			if rng.IntN(2) == 0 {
				coupling = "ac"
			}
			fmt.Fprintf(&b, "  - {name: p%d, node: %s, impedance: %s, coupling: %s}\n", k, name(1+rng.IntN(nodes)), circuittest.Num(circuittest.LogUniform(rng, 1, 1e6)), coupling)
		}
	}
	return b.String()
}

// TestRandomCircuitFiles: 1000 random networks (100 with -short), each
// written as a circuit file and loaded, solve; each point satisfies KCL to
// 1e-12 A + 1e-9 relative plus the rounding floor, both by the solver's own
// residual ratio and by checkKCLFloor's recomputation from the reported
// point. A failure writes the circuit file and names it with its seed; run
// one seed alone with QPOINT_SEED=N, or more cases with
// QPOINT_RANDOM_COUNT=N.
func TestRandomCircuitFiles(t *testing.T) {
	first, count := circuittest.Seeds(t, 1000, 100)
	begin := time.Now()
	strategies := map[Strategy]int{}
	failures := 0
	for seed := first; seed < first+count; seed++ {
		text := randomCircuitFile(seed)
		file := fmt.Sprintf("random-%d.yaml", seed)
		ok := t.Run(fmt.Sprintf("seed=%d", seed), func(t *testing.T) {
			c, err := circuit.Parse(file, []byte(text))
			if err != nil {
				t.Fatalf("the generator wrote a circuit the loader refuses: %v", err)
			}
			p, err := Solve(c, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			if p.Stats.ResidualRatio > 1 {
				t.Errorf("residual ratio %g > 1 (largest residual %g A)", p.Stats.ResidualRatio, p.Stats.Residual)
			}
			checkKCLFloor(t, c, p)
			checkFinite(t, p)
			strategies[p.Stats.Strategy]++
		})
		if !ok {
			failures++
			t.Errorf("seed %d failed; its circuit is written to %s (run it alone with QPOINT_SEED=%d)", seed, circuittest.KeepFailure(t, file, text), seed)
			if failures >= 5 {
				t.Fatalf("stopping after %d failures", failures)
			}
		}
	}
	t.Logf("%d random networks in %v; strategies that converged: %v", count, time.Since(begin), strategies)
}

// checkKCLFloor recomputes, from the reported point alone, the current
// balance at every node, and at every diode's internal node (the current
// in R_S against the junction's), and fails the test where it exceeds
// 1e-12 A + 1e-9 × (sum of current magnitudes at the node) plus the
// rounding floor of the node's currents: a current g·(v_a - v_b) is known
// only to about g·(|v_a| + |v_b|)·ε, which for a milliohm part at tens of
// volts is 1e-11 A and more. The floor allows 16 ε per part, as the
// solver's own residual does (Stats); everything else is computed here
// independently of the solver.
func checkKCLFloor(t *testing.T, c *circuit.Circuit, p *Point) {
	t.Helper()
	checkCurrents(t, c, p, true)
}

// checkKCL is checkKCLFloor without the rounding floor: the strict
// 1e-12 A + 1e-9 relative, for circuits without milliohm parts at volts.
func checkKCL(t *testing.T, c *circuit.Circuit, p *Point) { t.Helper(); checkCurrents(t, c, p, false) }

func checkCurrents(t *testing.T, c *circuit.Circuit, p *Point, withFloor bool) {
	t.Helper()
	sum, mag, floor := map[string]float64{}, map[string]float64{}, map[string]float64{}
	flow := func(from, to string, i float64) {
		sum[from] += i
		sum[to] -= i
		mag[from] += math.Abs(i)
		mag[to] += math.Abs(i)
	}
	v := func(n string) float64 {
		x, ok := p.Voltage(n)
		if !ok {
			t.Fatalf("node %q missing from the point", n)
		}
		return x
	}
	rounding := func(a, b string, g, va, vb float64) {
		if !withFloor {
			return
		}
		e := 16 * eps * math.Abs(g) * (math.Abs(va) + math.Abs(vb))
		floor[a] += e
		floor[b] += e
	}
	current := map[string]float64{}
	for _, s := range append(append([]Source(nil), p.Sources...), p.Inductors...) {
		current[s.Name] = s.Current
	}
	diodes := map[string]QPoint{}
	for _, d := range p.Diodes {
		diodes[d.Name] = d
	}
	for _, part := range c.Parts {
		a, b := part.Nodes[0], part.Nodes[1]
		switch part.Kind {
		case circuit.Resistor:
			flow(a, b, (v(a)-v(b))/part.Value)
			rounding(a, b, 1/part.Value, v(a), v(b))
		case circuit.VoltageSource, circuit.Inductor:
			want := 0.0
			if part.Kind == circuit.VoltageSource {
				want = part.Value
			}
			if d := v(a) - v(b) - want; math.Abs(d) > 1e-9*math.Max(1, math.Abs(want))+4*eps*(math.Abs(v(a))+math.Abs(v(b))) {
				t.Errorf("%s: branch voltage off by %g V", part.Name, d)
			}
			flow(a, b, current[part.Name])
		case circuit.CurrentSource:
			if current[part.Name] != -part.Value {
				t.Errorf("%s: reported current %g A, the source drives %g A", part.Name, current[part.Name], part.Value)
			}
			flow(a, b, part.Value)
		case circuit.Diode:
			d := diodes[part.Name]
			flow(a, b, d.Current)
			internal := v(a) - (d.Voltage - d.JunctionVoltage) // internal anode
			rounding(a, b, d.Conductance, internal, v(b))
			if rs := c.Models[part.Model].Params.SeriesResistance; rs > 0 {
				// The current into the anode is the one in R_S, which
				// the junction's current matches only to the rounding
				// of that resistor's current, checked below.
				rounding(a, b, 1/rs, v(a), internal)
			}
			if math.Abs(d.Voltage-(v(a)-v(b))) > 4*eps*(math.Abs(v(a))+math.Abs(v(b))) {
				t.Errorf("%s: terminal voltage %g V, nodes differ by %g V", part.Name, d.Voltage, v(a)-v(b))
			}
			if rs := c.Models[part.Model].Params.SeriesResistance; rs > 0 {
				ir := (d.Voltage - d.JunctionVoltage) / rs
				// The drop on R_S is the difference of two reported
				// voltages, each rounded to its own size.
				tol := 1e-12 + 1e-9*(math.Abs(d.Current)+math.Abs(ir))
				if withFloor {
					tol += 16*eps*(math.Abs(v(a))+math.Abs(internal)+math.Abs(d.Voltage)+math.Abs(d.JunctionVoltage))/rs +
						16*eps*math.Abs(d.Conductance)*(math.Abs(internal)+math.Abs(v(b)))
				}
				if math.Abs(ir-d.Current) > tol {
					t.Errorf("%s: current in R_S %g A, junction current %g A (tolerance %g A)", part.Name, ir, d.Current, tol)
				}
			}
		}
	}
	for _, port := range c.Ports {
		if !port.ACCoupled {
			flow(port.Node, port.Return, (v(port.Node)-v(port.Return))/port.Impedance)
			rounding(port.Node, port.Return, 1/port.Impedance, v(port.Node), v(port.Return))
		}
	}
	for _, n := range c.Nodes {
		if tol := 1e-12 + 1e-9*mag[n] + floor[n]; math.Abs(sum[n]) > tol {
			t.Errorf("KCL at %s: net %g A leaves the node (tolerance %g A, of which rounding floor %g A)", n, sum[n], tol, floor[n])
		}
	}
}
