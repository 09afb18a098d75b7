package steady

import (
	"fmt"
	"os"
	"path/filepath"
	"testing"

	"qpoint/ac"
	"qpoint/ac/internal/fixture"
)

// BenchmarkSteadyState: the periodic steady state of the detector demo
// under its own distortion drive (2.45 GHz at -30 dBm into the rf port,
// observed at the video port), default settings.
func BenchmarkSteadyState(b *testing.B) {
	data, err := os.ReadFile(filepath.Join("..", "..", "testdata", "demo", "detector.yaml"))
	if err != nil {
		b.Fatal(err)
	}
	nw := network(b, string(data))
	dist := nw.Point.Circuit.Analysis.Distortion
	in, out := -1, -1
	for i, p := range nw.Ports {
		if p.Name == dist.Input {
			in = i
		}
		if p.Name == dist.Output {
			out = i
		}
	}
	if in < 0 || out < 0 || !dist.Level.IsPower {
		b.Fatalf("the detector demo's distortion analysis changed: %+v", dist)
	}
	d := ac.Drive{Input: in, Output: ac.Output{Port: out}, FrequencyHz: dist.FrequencyHz,
		EMF: ac.DBmToEMF(dist.Level.DBm, nw.Ports[in].Impedance)}
	var iters int
	for b.Loop() {
		st, err := Solve(nw, d, Settings{})
		if err != nil {
			b.Fatal(err)
		}
		iters = st.Iterations
	}
	b.ReportMetric(float64(iters), "newton-iterations")
}

// BenchmarkSteadyLadder: the periodic steady state of the diode-loaded
// ladder (benchLadder) of n unknowns at 1 GHz, -20 dBm into port 1,
// default settings. Its cost is that of the time steps: an LU of the n×n
// step matrix and the sensitivity products, per step.
//
//	go test -run '^$' -bench SteadyLadder -benchtime 1x -count 3 ./ac/
func BenchmarkSteadyLadder(b *testing.B) {
	for _, n := range []int{60, 150} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			nw := network(b, fixture.Ladder(n))
			d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 1e9, EMF: ac.DBmToEMF(-20, 50)}
			var iters int
			for b.Loop() {
				st, err := Solve(nw, d, Settings{})
				if err != nil {
					b.Fatal(err)
				}
				iters = st.Iterations
			}
			b.ReportMetric(float64(iters), "newton-iterations")
		})
	}
}
