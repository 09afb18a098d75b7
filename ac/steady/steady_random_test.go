package steady

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"qpoint/ac"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/circuit/circuittest"
	"qpoint/smallsignal"
)

// randomSteadyFile writes, from seed, the circuit file of a small network
// of resistors, capacitors, diodes with charge (depletion and diffusion),
// a DC supply and a current source, driven at one port: the kind of
// circuit the waveform solver meets. Every node has a resistive path to
// gnd; no loop is made of sources and junctions alone. The file's
// analysis.distortion names the drive (input port, output node, frequency,
// level), so `qpoint distortion FILE` repeats a failing case.
func randomSteadyFile(seed uint64) string {
	rng := rand.New(rand.NewPCG(seed, 0x57ead))
	var b strings.Builder
	fmt.Fprintf(&b, "# Random network for the waveform solver, seed %d (ac/steady_random_test.go).\n", seed)
	fmt.Fprintf(&b, "name: random waveform network %d\n", seed)
	b.WriteString("diode_models:\n")
	models := 1 + rng.IntN(3)
	for m := 0; m < models; m++ {
		fmt.Fprintf(&b, "  m%d: {saturation_current: %s, ideality: %s, zero_bias_capacitance: %s, built_in_potential: %s",
			m, circuittest.Num(circuittest.LogUniform(rng, 1e-16, 1e-5)), circuittest.Num(1+rng.Float64()), circuittest.Num(circuittest.LogUniform(rng, 1e-14, 1e-11)), circuittest.Num(0.3+0.5*rng.Float64()))
		if rng.IntN(2) == 0 {
			fmt.Fprintf(&b, ", series_resistance: %s", circuittest.Num(circuittest.LogUniform(rng, 0.1, 100)))
		}
		if rng.IntN(3) == 0 {
			fmt.Fprintf(&b, ", transit_time: %s", circuittest.Num(circuittest.LogUniform(rng, 1e-12, 1e-8)))
		}
		if rng.IntN(3) == 0 {
			fmt.Fprintf(&b, ", breakdown_voltage: %s, breakdown_current: %s", circuittest.Num(2+20*rng.Float64()), circuittest.Num(circuittest.LogUniform(rng, 1e-6, 1e-3)))
		}
		b.WriteString("}\n")
	}
	nodes := 2 + rng.IntN(5)
	name := func(i int) string {
		if i == 0 {
			return circuit.Ground
		}
		return fmt.Sprintf("n%d", i)
	}
	b.WriteString("parts:\n")
	for i := 1; i <= nodes; i++ {
		fmt.Fprintf(&b, "  - {type: resistor, name: Rtree%d, between: [%s, %s], value: %s}\n", i, name(i), name(rng.IntN(i)), circuittest.Num(circuittest.LogUniform(rng, 10, 1e5)))
	}
	// The supply reaches the network through a resistor: its node is the
	// only one a source fixes, so junctions cannot close a loop of
	// sources without a resistor in it.
	fmt.Fprintf(&b, "  - {type: voltage_source, name: Vsupply, plus: supply, minus: gnd, value: %s}\n", circuittest.Num(10*(rng.Float64()-0.3)))
	fmt.Fprintf(&b, "  - {type: resistor, name: Rsupply, between: [supply, %s], value: %s}\n", name(1+rng.IntN(nodes)), circuittest.Num(circuittest.LogUniform(rng, 100, 1e5)))
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
	diodes := 0
	for k := 0; k < 2*nodes+2; k++ {
		a, c := rng.IntN(nodes+1), rng.IntN(nodes+1)
		if a == c {
			continue
		}
		switch rng.IntN(6) {
		case 0, 1, 2:
			if ra, rc := find(a), find(c); ra != rc {
				uf[ra] = rc
				diodes++
				fmt.Fprintf(&b, "  - {type: diode, name: D%d, anode: %s, cathode: %s, model: m%d}\n", k, name(a), name(c), rng.IntN(models))
			}
		case 3, 4:
			fmt.Fprintf(&b, "  - {type: capacitor, name: C%d, between: [%s, %s], value: %s}\n", k, name(a), name(c), circuittest.Num(circuittest.LogUniform(rng, 1e-12, 1e-8)))
		case 5:
			fmt.Fprintf(&b, "  - {type: resistor, name: R%d, between: [%s, %s], value: %s}\n", k, name(a), name(c), circuittest.Num(circuittest.LogUniform(rng, 10, 1e5)))
		}
	}
	if diodes == 0 {
		fmt.Fprintf(&b, "  - {type: diode, name: Dlast, anode: %s, cathode: gnd, model: m0}\n", name(1+rng.IntN(nodes)))
	}
	in, out := 1+rng.IntN(nodes), 1+rng.IntN(nodes)
	fmt.Fprintf(&b, "  - {type: capacitor, name: Cin, between: [rf, %s], value: %s}\n", name(in), circuittest.Num(circuittest.LogUniform(rng, 1e-11, 1e-8)))
	b.WriteString("ports:\n")
	fmt.Fprintf(&b, "  - {name: rf, node: rf, impedance: 50}\n")
	fmt.Fprintf(&b, "analysis:\n  distortion: {input: rf, output: %s, frequency: %sHz, level: %sdBm}\n",
		name(out), circuittest.Num(math.Round(circuittest.LogUniform(rng, 1e6, 3e9))), circuittest.Num(math.Round(-40+50*rng.Float64())))
	return b.String()
}

// TestRandomSteadyState: 100 random networks (20 with -short) reach a
// periodic steady state at the level and frequency their file names, with
// finite harmonics; and at -70 dBm, where the circuit is linear to 1e-5,
// the waveform's fundamental agrees with the Volterra estimate's (the
// linear response, from the frequency domain) to 1e-3 relative. A failure
// writes the circuit file and names it with its seed; run one seed alone
// with QPOINT_SEED=N, more with QPOINT_RANDOM_COUNT=N.
func TestRandomSteadyState(t *testing.T) {
	first, count := circuittest.Seeds(t, 100, 20)
	begin := time.Now()
	failures, iterations := 0, 0
	for seed := first; seed < first+count; seed++ {
		text := randomSteadyFile(seed)
		file := fmt.Sprintf("random-steady-%d.yaml", seed)
		ok := t.Run(fmt.Sprintf("seed=%d", seed), func(t *testing.T) {
			c, err := circuit.Parse(file, []byte(text))
			if err != nil {
				t.Fatalf("the generator wrote a circuit the loader refuses: %v", err)
			}
			p, err := bias.Solve(c, bias.Settings{})
			if err != nil {
				t.Fatal(err)
			}
			nw, err := smallsignal.New(p)
			if err != nil {
				t.Fatal(err)
			}
			d := hardDrive(t, c)
			st, err := Solve(nw, d, Settings{})
			if err != nil {
				t.Fatalf("at %.3g dBm, %.4g Hz: %v", c.Analysis.Distortion.Level.DBm, d.FrequencyHz, err)
			}
			checkSteadyFinite(t, st)
			iterations += st.Iterations

			d.EMF = ac.DBmToEMF(-70, c.Ports[d.Input].Impedance)
			small, err := Solve(nw, d, Settings{})
			if err != nil {
				t.Fatalf("at -70 dBm: %v", err)
			}
			est, err := ac.Volterra(nw, d)
			if err != nil {
				t.Fatal(err)
			}
			want, got := est.Fundamental, small.Output[1].Phasor
			if cmplx.Abs(want) > 1e-12 && cmplx.Abs(got-want) > 1e-3*cmplx.Abs(want) {
				t.Errorf("at -70 dBm the waveform's fundamental is %.6g, the linear response %.6g (relative difference %.2g)",
					got, want, cmplx.Abs(got-want)/cmplx.Abs(want))
			}
		})
		if !ok {
			failures++
			t.Errorf("seed %d failed; its circuit is written to %s (run it alone with QPOINT_SEED=%d)", seed, circuittest.KeepFailure(t, file, text), seed)
			if failures >= 5 {
				t.Fatalf("stopping after %d failures", failures)
			}
		}
	}
	t.Logf("%d random networks in %v, %d shooting iterations at their own levels", count, time.Since(begin), iterations)
}
