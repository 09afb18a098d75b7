package ac_test

import (
	"math"
	"os"
	"path/filepath"
	"runtime"
	"sync"
	"sync/atomic"
	"syscall"
	"testing"
	"time"

	"qpoint/ac"
	"qpoint/ac/study"
	"qpoint/bias/circuit"
)

// BenchmarkStudy: a 200-step study of the detector demo as `qpoint study`
// runs it by default, its supply swept from 0 to 3.3 V, each step a bias
// solve, the response at the file's distortion frequency (2.45 GHz) and
// the Volterra estimate for its drive (-30 dBm), solved with one worker
// and with one per core in the same iteration, so that both meet the same
// load:
//
//	go test -run '^$' -bench Study -benchtime 1x -count 5 ./ac/
//
// It reports the time per step of each, their ratio (the scaling), the
// cores the parallel runs actually got, and, as a control, the cores a
// trivially parallel busy loop gets right after (cores-free): on a machine
// others are using, the scaling cannot exceed it.
func BenchmarkStudy(b *testing.B) {
	data, err := os.ReadFile(filepath.Join("..", "testdata", "demo", "detector.yaml"))
	if err != nil {
		b.Fatal(err)
	}
	c, err := circuit.Parse("detector.yaml", data)
	if err != nil {
		b.Fatal(err)
	}
	vary, err := c.ResolveVary("Vcc.value")
	if err != nil {
		b.Fatal(err)
	}
	values, err := study.Grid(0, 3.3, 200, false)
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
		b.Fatalf("the detector demo's distortion analysis changed: %+v", d)
	}
	freqs := []float64{d.FrequencyHz}
	drive := ac.Drive{Input: in, Output: ac.Output{Port: out}, FrequencyHz: d.FrequencyHz,
		EMF: ac.DBmToEMF(d.Level.DBm, c.Ports[in].Impedance)}
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
	b.ReportMetric(float64(one.Nanoseconds())/float64(b.N)/200, "ns/step-1worker")
	b.ReportMetric(float64(many.Nanoseconds())/float64(b.N)/200, "ns/step-allworkers")
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
