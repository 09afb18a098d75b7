package ac_test

import (
	"math"
	"os"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"sync"
	"sync/atomic"
	"syscall"
	"testing"
	"time"

	"qpoint/ac"
	"qpoint/ac/study"
	"qpoint/bias/circuit"
)

// BenchmarkStudy: 200-step studies of two demos as `qpoint study` runs
// them, each step a bias solve, the response at the study frequencies and
// the Volterra estimate for a drive, solved with one worker and with one
// per core in the same iteration, so that both meet the same load. The
// cases:
//
//   - detector: its supply swept from 0 to 3.3 V, the response at the
//     file's distortion frequency (2.45 GHz) and the estimate for its
//     drive (-30 dBm): a light step, a few microseconds;
//   - attenuator: its control voltage over the file's study range
//     (0.9 to 5 V), the response at 50 frequencies log-spaced from 100 MHz
//     to 3 GHz and the estimate at -10 dBm at the file's distortion
//     frequency: the measurement of BENCHMARKS.md's study scaling.
//
// Run with
//
//	go test -run '^$' -bench Study -benchtime 20x -count 5 ./ac/
//
// It reports the time per step of each, their ratio (the scaling), the
// cores the parallel runs actually got, and, as a control, the cores a
// trivially parallel busy loop gets right after (cores-free): on a machine
// others are using, the scaling cannot exceed it. The garbage collector is
// set as the command set it before cmd/qpoint/gc.go bounded it (collect
// only near a 1 GiB heap) unless GOGC or GOMEMLIMIT is in the environment.
func BenchmarkStudy(b *testing.B) {
	if os.Getenv("GOGC") == "" && os.Getenv("GOMEMLIMIT") == "" {
		defer debug.SetGCPercent(debug.SetGCPercent(-1))
		defer debug.SetMemoryLimit(debug.SetMemoryLimit(1 << 30))
	}
	b.Run("detector", func(b *testing.B) {
		benchStudy(b, "detector.yaml", "Vcc.value", 0, 3.3, nil, math.NaN())
	})
	freqs := make([]float64, 50)
	for k := range freqs {
		freqs[k] = 100e6 * math.Pow(30, float64(k)/49)
	}
	b.Run("attenuator", func(b *testing.B) {
		benchStudy(b, "attenuator.yaml", "Vctl.value", 0.9, 5, freqs, -10)
	})
}

// benchStudy runs BenchmarkStudy's case: 200 steps of vary from from to
// to in the demo file, the response at freqs (nil: the file's distortion
// frequency) and the estimate at levelDBm (NaN: the file's level).
func benchStudy(b *testing.B, file, varyName string, from, to float64, freqs []float64, levelDBm float64) {
	data, err := os.ReadFile(filepath.Join("..", "testdata", "demo", file))
	if err != nil {
		b.Fatal(err)
	}
	c, err := circuit.Parse(file, data)
	if err != nil {
		b.Fatal(err)
	}
	vary, err := c.ResolveVary(varyName)
	if err != nil {
		b.Fatal(err)
	}
	const steps = 200
	values, err := study.Grid(from, to, steps, false)
	if err != nil {
		b.Fatal(err)
	}
	d := c.Analysis.Distortion
	in, out := -1, -1
	for i, p := range c.Ports {
		if p.Name == d.Input {
			in = i
		}
		if p.Name == d.Output {
			out = i
		}
	}
	if in < 0 || out < 0 || !d.Level.IsPower {
		b.Fatalf("the %s demo's distortion analysis changed: %+v", file, d)
	}
	if freqs == nil {
		freqs = []float64{d.FrequencyHz}
	}
	if math.IsNaN(levelDBm) {
		levelDBm = d.Level.DBm
	}
	drive := ac.Drive{Input: in, Output: ac.Output{Port: out}, FrequencyHz: d.FrequencyHz,
		EMF: ac.DBmToEMF(levelDBm, c.Ports[in].Impedance)}
	all := runtime.GOMAXPROCS(0)
	var one, many, manyCPU time.Duration
	for b.Loop() {
		for _, w := range []int{1, all} {
			c0 := cpuTime()
			t0 := time.Now()
			res, err := study.Run(c, study.Settings{Axis: study.Axis{Vary: vary, Values: values}, FrequenciesHz: freqs, Drive: drive, Workers: w})
			if err != nil {
				b.Fatal(err)
			}
			for _, st := range res.Steps {
				if st.Err != nil {
					b.Fatal(st.Err)
				}
			}
			if w == 1 {
				one += time.Since(t0)
			} else {
				many += time.Since(t0)
				manyCPU += cpuTime() - c0
			}
		}
	}
	b.ReportMetric(float64(one.Nanoseconds())/float64(b.N)/steps, "ns/step-1worker")
	b.ReportMetric(float64(many.Nanoseconds())/float64(b.N)/steps, "ns/step-allworkers")
	b.ReportMetric(float64(all), "workers")
	b.ReportMetric(float64(one)/float64(many), "scaling")
	// CPU time over wall time of the parallel runs: the cores the
	// process actually had (the machine's other work takes the rest).
	b.ReportMetric(float64(manyCPU)/float64(many), "cores-used")
	b.ReportMetric(coresAvailable(all), "cores-free")
}

// coresAvailable spins one busy goroutine per core for about 50 ms and
// returns the CPU time it got over the wall time: the cores the machine
// could give this process at that moment, the ceiling of any scaling.
func coresAvailable(workers int) float64 {
	c0, t0 := cpuTime(), time.Now()
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			x := 1.0
			for time.Since(t0) < 50*time.Millisecond {
				for range 10000 {
					x = x*1.0000001 + 1e-9
				}
			}
			spinSink.Store(math.Float64bits(x))
		}()
	}
	wg.Wait()
	return float64(cpuTime()-c0) / float64(time.Since(t0))
}

var spinSink atomic.Uint64

// cpuTime returns the process's user and system CPU time so far.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
