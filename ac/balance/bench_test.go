package balance

import (
	"fmt"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"qpoint/ac"
	"qpoint/ac/steady"
	"qpoint/bias/circuit"
)

// Benchmarks of harmonic balance (BENCHMARKS.md quotes them):
//
//	go test -run '^$' -bench 'Ladder' -benchtime 3x ./ac/balance/
//	go test -run '^$' -bench 'LadderShooting' -benchtime 1x ./ac/balance/
//	go test -run '^$' -bench 'Validity' -benchtime 1x ./ac/balance/

// ladderDrive is the drive of the ladder benchmarks: 1 GHz at -30 dBm
// (the distortion command's default level) into the input port, observed
// at the output port.
func ladderDrive() ac.Drive {
	return ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 1e9, EMF: ac.DBmToEMF(-30, 50)}
}

// BenchmarkLadder solves the one-tone steady state of the benchmark
// ladders at 16 harmonics by harmonic balance, and reports the Newton
// iterations and the time of one.
func BenchmarkLadder(b *testing.B) {
	for _, n := range []int{100, 150, 300, 1000} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			nw := network(b, ladder(n))
			var r *Result
			var err error
			for b.Loop() {
				r, err = Solve(nw, ladderDrive(), Settings{Harmonics: 16, FixedHarmonics: true})
				if err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(r.Stats.Iterations), "newton")
			b.ReportMetric(float64(r.Stats.LinearIterations), "gmres")
			b.ReportMetric(float64(r.Stats.Runtime.Nanoseconds())/float64(r.Stats.Iterations), "ns/newton")
		})
	}
}

// BenchmarkLadderGrowing is BenchmarkLadder with the harmonic count left
// to grow to the tolerance and the finer-grid check, as a command runs it.
func BenchmarkLadderGrowing(b *testing.B) {
	for _, n := range []int{150, 300, 1000} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			nw := network(b, ladder(n))
			var r *Result
			var err error
			for b.Loop() {
				r, err = Solve(nw, ladderDrive(), Settings{})
				if err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(r.Stats.Harmonics), "harmonics")
			b.ReportMetric(float64(r.Stats.Iterations), "newton")
		})
	}
}

// BenchmarkLadderShooting solves the same steady states by shooting, the
// dense time-domain method harmonic balance is measured against (run it
// with -benchtime 1x: minutes at 300 unknowns).
func BenchmarkLadderShooting(b *testing.B) {
	for _, n := range []int{100, 150, 300} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			nw := network(b, ladder(n))
			for b.Loop() {
				if _, err := steady.Solve(nw, ladderDrive(), steady.Settings{Harmonics: 5}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkValidity runs the validity search the distortion command runs
// by default (from 40 dB below the drive to 40 dB above, 2 dB steps, then
// bisection) on the 100-unknown ladder, each level continuing from the
// last, by the method the automatic choice takes.
func BenchmarkValidity(b *testing.B) {
	nw := network(b, ladder(100))
	d := ladderDrive()
	for _, m := range []Choice{Auto, Shooting} {
		b.Run(m.String(), func(b *testing.B) {
			if m == Shooting && testing.Short() {
				b.Skip("minutes")
			}
			var v *steady.Validity
			start := time.Now()
			for b.Loop() {
				var err error
				v, err = steady.ValidityLimit(nw, d, -70, 10, 0.5, steady.Settings{Method: Method{Choice: m}})
				if err != nil {
					b.Fatal(err)
				}
			}
			_ = start
			b.ReportMetric(float64(v.Steps), "solves")
			b.ReportMetric(v.LevelDBm, "limit-dBm")
		})
	}
}

// BenchmarkHard solves the steady state of every demo and every circuit
// of testdata/hard that names a distortion drive, by harmonic balance and
// by shooting (default settings each), so that the two can be set side by
// side on small circuits driven hard, where shooting is at its best:
//
//	go test -run '^$' -bench 'Hard' -benchtime 1x ./ac/balance/
func BenchmarkHard(b *testing.B) {
	var paths []string
	for _, dir := range []string{"demo", "hard"} {
		p, _ := filepath.Glob(filepath.Join("..", "..", "testdata", dir, "*.yaml"))
		paths = append(paths, p...)
	}
	for _, p := range paths {
		c, err := circuit.Load(p)
		if err != nil {
			b.Fatal(err)
		}
		if !c.Analysis.Distortion.Set {
			continue
		}
		nw := linearise(b, c)
		d := fileDrive(b, c)
		name := strings.TrimSuffix(filepath.Base(p), ".yaml")
		b.Run(name+"/hb", func(b *testing.B) {
			var r *Result
			for b.Loop() {
				if r, err = Solve(nw, d, Settings{}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(r.Stats.Harmonics), "harmonics")
			b.ReportMetric(float64(r.Stats.Iterations), "newton")
		})
		b.Run(name+"/shooting", func(b *testing.B) {
			for b.Loop() {
				if _, err := steady.Solve(nw, d, steady.Settings{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
