package ac

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"qpoint/ac/internal/fixture"
)

// BenchmarkDemoSweep times a 1000-point sweep (10 MHz to 10 GHz) of each
// demo circuit through Sweep, results streamed and dropped.
func BenchmarkDemoSweep(b *testing.B) {
	files, _ := filepath.Glob(filepath.Join("..", "testdata", "demo", "*.yaml"))
	freqs, _ := LogGrid(10e6, 10e9, 333)
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			b.Fatal(err)
		}
		nw := network(b, string(data))
		b.Run(strings.TrimSuffix(filepath.Base(f), ".yaml"), func(b *testing.B) {
			for b.Loop() {
				if _, _, err := Sweep(nw, freqs, Settings{}, func(Point) error { return nil }); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(len(freqs)), "points")
		})
	}
}

// rcLadder returns a 200-node RC ladder between two 50 Ω ports.
func rcLadder(n int) string {
	var sb strings.Builder
	sb.WriteString("parts:\n")
	for i := 0; i < n; i++ {
		fmt.Fprintf(&sb, "  - {type: resistor, name: R%d, between: [n%d, n%d], value: 10}\n", i, i, i+1)
		fmt.Fprintf(&sb, "  - {type: capacitor, name: C%d, between: [n%d, gnd], value: 1pF}\n", i, i+1)
	}
	fmt.Fprintf(&sb, "ports:\n  - {name: in, node: n0, impedance: 50}\n  - {name: out, node: n%d, impedance: 50}\n", n)
	return sb.String()
}

// BenchmarkRCLadderSweep times a 1000-point sweep of a 200-node RC ladder.
func BenchmarkRCLadderSweep(b *testing.B) {
	nw := network(b, rcLadder(200))
	freqs, _ := LogGrid(1e6, 10e9, 250)
	for b.Loop() {
		if _, _, err := Sweep(nw, freqs, Settings{}, func(Point) error { return nil }); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(freqs)), "points")
}

// BenchmarkVolterraSweep times the distortion estimate (one tone and two
// tones) of the detector demo at 100 frequencies.
func BenchmarkVolterraSweep(b *testing.B) {
	data, err := os.ReadFile(filepath.Join("..", "testdata", "demo", "detector.yaml"))
	if err != nil {
		b.Fatal(err)
	}
	nw := network(b, string(data))
	freqs, _ := LogGrid(100e6, 6e9, 56)
	for _, two := range []bool{false, true} {
		b.Run(map[bool]string{false: "one-tone", true: "two-tone"}[two], func(b *testing.B) {
			for b.Loop() {
				for _, f := range freqs {
					d := Drive{Input: 0, Output: Output{Port: 1}, FrequencyHz: f, EMF: DBmToEMF(-30, 50)}
					if two {
						d.SecondToneHz = f * 1.01
					}
					if _, err := Volterra(nw, d); err != nil {
						b.Fatal(err)
					}
				}
			}
			b.ReportMetric(float64(len(freqs)), "frequencies")
		})
	}
}

// BenchmarkVolterraLadderSweep: the distortion estimate of the 150-unknown
// diode ladder (benchLadder) at 100 frequencies from 10 MHz to 1 GHz, one
// tone, as `distortion --sweep-frequency` makes it: each frequency alone
// (Volterra: dense LUs at f, 2f and 3f) against VolterraSweep (one solver,
// the reduction, for all 300 product frequencies).
//
//	go test -run '^$' -bench VolterraLadderSweep -benchtime 3x -count 3 ./ac/
func BenchmarkVolterraLadderSweep(b *testing.B) {
	nw := network(b, fixture.Ladder(150))
	freqs, _ := LogGrid(10e6, 1e9, 50)
	d := Drive{Input: 0, Output: Output{Port: 1}, EMF: DBmToEMF(-30, 50)}
	b.Run("each", func(b *testing.B) {
		for b.Loop() {
			for _, f := range freqs {
				d.FrequencyHz = f
				if _, err := Volterra(nw, d); err != nil {
					b.Fatal(err)
				}
			}
		}
	})
	b.Run("sweep", func(b *testing.B) {
		for b.Loop() {
			if err := VolterraSweep(nw, d, freqs, func(*Estimate) error { return nil }); err != nil {
				b.Fatal(err)
			}
		}
	})
}
