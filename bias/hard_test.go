package bias

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"qpoint/bias/circuit"
)

const hardDir = "../testdata/hard"

// hardFiles returns the circuits of testdata/hard, each of which stresses
// the solvers in a way its header comment names.
func hardFiles(t testing.TB) []string {
	t.Helper()
	paths, err := filepath.Glob(filepath.Join(hardDir, "*.yaml"))
	if err != nil || len(paths) < 25 {
		t.Fatalf("found %d hard circuits in %s, want at least 25: %v", len(paths), hardDir, err)
	}
	return paths
}

// TestHardFiles solves every circuit of testdata/hard. Each must converge,
// report a residual ratio of at most 1, and satisfy KCL to 1e-12 A + 1e-9
// relative when recomputed from the reported point alone (checkKCL), with
// every reported number finite.
func TestHardFiles(t *testing.T) {
	for _, path := range hardFiles(t) {
		t.Run(filepath.Base(path), func(t *testing.T) {
			c, err := circuit.Load(path)
			if err != nil {
				t.Fatal(err)
			}
			p, err := Solve(c, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			if p.Stats.ResidualRatio > 1 {
				t.Errorf("residual ratio %g, want at most 1 (largest residual %g A)", p.Stats.ResidualRatio, p.Stats.Residual)
			}
			checkKCL(t, c, p)
			checkFinite(t, p)
			t.Logf("%s in %d iterations, residual %.3g A (ratio %.3g), %v",
				p.Stats.Strategy, p.Stats.Iterations, p.Stats.Residual, p.Stats.ResidualRatio, p.Stats.Runtime)
		})
	}
}

// checkFinite fails on any reported number that is NaN or infinite, other
// than a dynamic resistance whose conductance underflows (+Inf by
// definition, where 1/g overflows).
func checkFinite(t *testing.T, p *Point) {
	t.Helper()
	bad := func(what string, v float64) {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Errorf("%s = %g", what, v)
		}
	}
	for _, n := range p.Nodes {
		bad("voltage of "+n.Name, n.Voltage)
	}
	for _, s := range append(append([]Source(nil), p.Sources...), p.Inductors...) {
		bad("current of "+s.Name, s.Current)
	}
	for _, d := range p.Diodes {
		for what, v := range map[string]float64{"voltage": d.Voltage, "junction voltage": d.JunctionVoltage,
			"current": d.Current, "conductance": d.Conductance, "junction capacitance": d.JunctionCapacitance,
			"diffusion capacitance": d.DiffusionCapacitance, "power": d.Power} {
			bad(d.Name+" "+what, v)
		}
		if math.IsNaN(d.DynamicResistance) || (math.IsInf(d.DynamicResistance, 0) && !math.IsInf(1/d.Conductance, 0)) {
			t.Errorf("%s dynamic resistance = %g with conductance %g", d.Name, d.DynamicResistance, d.Conductance)
		}
	}
}

// TestTangledNetworkRefused: a circuit file of about 270 kB can join a
// thousand nodes at random, so that no ordering keeps the matrix banded;
// each Newton step would take seconds and the strategies together hours.
// Solve refuses it at once, saying why, instead of hanging.
func TestTangledNetworkRefused(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	nt := newNet("tangled")
	nt.model("si", 1e-14, 1)
	nt.V("V", "n1", circuit.Ground, 1)
	const nodes = 1000
	for i := 1; i <= nodes; i++ {
		nt.R(fmt.Sprintf("T%d", i), fmt.Sprintf("n%d", i), circuit.Ground, 1e3)
	}
	for k := 0; k < 3*nodes; k++ {
		a, b := 1+rng.IntN(nodes), 1+rng.IntN(nodes)
		if a != b {
			nt.D(fmt.Sprintf("D%d", k), fmt.Sprintf("n%d", a), fmt.Sprintf("n%d", b), "si")
		}
	}
	start := time.Now()
	_, err := Solve(nt.c, Settings{})
	if took := time.Since(start); took > time.Second {
		t.Errorf("Solve took %v to answer, want under a second", took)
	}
	if err == nil || !strings.Contains(err.Error(), "bandwidth") {
		t.Errorf("Solve: %v; want a refusal naming the bandwidth", err)
	}
	// A ladder of the same size stays banded and solves.
	if _, err := Solve(ladder(nodes).c, Settings{}); err != nil {
		t.Errorf("ladder of %d: %v", nodes, err)
	}
}

// TestHotCircuitsHonest: at 1e6 K the detector demo's junction conducts
// about 2e10 S, so its current is known only to ±0.1 mA from the rounding
// of its voltage while 10 µA flows. The solver used to call such a point
// solved with KCL off by 7 %. Now every point Solve returns passes the
// independent check of KCL on its reported values (checkKCLFloor,
// written apart from the library's own), and a point that cannot is a
// *Failure that says why.
func TestHotCircuitsHonest(t *testing.T) {
	paths := append(hardFiles(t), "../testdata/demo/detector.yaml", "../testdata/demo/mixer.yaml")
	for _, path := range paths {
		t.Run(filepath.Base(path), func(t *testing.T) {
			c, err := circuit.Load(path)
			if err != nil {
				t.Fatal(err)
			}
			for _, tempK := range []float64{1e5, 1e6, 1e9} {
				p, err := Solve(c, Settings{TemperatureK: tempK})
				if err != nil {
					var f *Failure
					if !errors.As(err, &f) {
						t.Errorf("%g K: %v is not a *Failure", tempK, err)
					}
					continue
				}
				checkKCLFloor(t, c, p)
				checkFinite(t, p)
			}
		})
	}
	c, err := circuit.Load("../testdata/demo/detector.yaml")
	if err != nil {
		t.Fatal(err)
	}
	_, err = Solve(c, Settings{TemperatureK: 1e6})
	if err == nil || !strings.Contains(err.Error(), "float64 cannot resolve") || !strings.Contains(err.Error(), "D1") {
		t.Errorf("detector at 1e6 K: %v; want a failure naming D1 and the rounding", err)
	}
}

// TestReversePairs: a reverse-biased junction in series with a second
// junction, each with series resistance, from 50 mV to 100 V, solves; its
// middle node is set by the balance of the two leakage currents. Where
// both sides are stacks whose inner nodes connect only to junctions
// (anti-parallel stacks with series resistance), their voltages rest on
// balances below float64's rounding of the series currents, and the
// failure says so and what to add. Expected: the currents balance at every
// node (checkKCLFloor) and the reverse junction carries its saturation
// current, -I_S (1 - e^(-|v|/nV_T)) (Sze and Ng, 3rd ed., 2007, ch. 2).
func TestReversePairs(t *testing.T) {
	for _, volts := range []float64{0.05, 0.3, 1, 5, 20, 100} {
		for _, rs := range []float64{1, 1e3} {
			name := fmt.Sprintf("%gV RS=%g", volts, rs)
			t.Run(name, func(t *testing.T) {
				nt := newNet(name)
				nt.model("upper", 1e-14, 1).SeriesResistance = rs
				nt.model("lower", 1e-14, 1.5).SeriesResistance = rs
				nt.V("Vs", "vin", circuit.Ground, volts)
				nt.D("Du", "mid", "vin", "upper").D("Dl", "mid", circuit.Ground, "lower")
				p, err := Solve(nt.c, Settings{})
				if err != nil {
					t.Fatal(err)
				}
				checkKCLFloor(t, nt.c, p)
				d := p.Diodes[0]
				want := -1e-14 * -math.Expm1(d.JunctionVoltage/d.Device.NVT())
				if math.Abs(d.Current-want) > 1e-6*math.Abs(want) {
					t.Errorf("reverse junction at %g V carries %g A, want %g A", d.JunctionVoltage, d.Current, want)
				}
			})
		}
	}
	for _, k := range []int{2, 3, 5, 10} {
		t.Run(fmt.Sprintf("stacks of %d", k), func(t *testing.T) {
			nt := newNet("stacks")
			nt.model("si", 1e-14, 1.05).SeriesResistance = 2
			nt.V("Vs", "vin", circuit.Ground, 5).R("R1", "vin", "line", 50)
			prevP, prevQ := "line", circuit.Ground
			for i := 1; i <= k; i++ {
				p, q := fmt.Sprintf("p%d", i), fmt.Sprintf("q%d", i)
				if i == k {
					p, q = circuit.Ground, "line"
				}
				nt.D(fmt.Sprintf("Dp%d", i), prevP, p, "si").D(fmt.Sprintf("Dn%d", i), prevQ, q, "si")
				prevP, prevQ = p, q
			}
			p, err := Solve(nt.c, Settings{})
			if err == nil {
				checkKCLFloor(t, nt.c, p)
				return
			}
			var f *Failure
			if !errors.As(err, &f) || len(f.JunctionOnly) != 2*(k-1) || !strings.Contains(err.Error(), "connect only to junctions") {
				t.Errorf("stacks of %d: %v; want a solution or a failure naming the %d junction-only nodes", k, err, 2*(k-1))
			}
		})
	}
}
