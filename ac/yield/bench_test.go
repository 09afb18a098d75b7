package yield

import (
	"math"
	"os"
	"runtime"
	"runtime/debug"
	"sync"
	"sync/atomic"
	"syscall"
	"testing"
	"time"
)

// BenchmarkYield times 10,000 runs of the attenuator demo with a
// response target (S21 at 900 MHz) and a Volterra target (HD3 at
// -10 dBm), with one worker and with one per core in the same iteration,
// so that both meet the same load. Each is the whole analysis: the
// nominal circuit, the runs, the sensitivities and the corners.
//
//	go test -run '^$' -bench Yield -benchtime 5x -count 5 ./ac/yield/
//
// It reports the time of each, their ratio (the scaling), the cores the
// parallel runs got (CPU time over wall time), the CPU time they took
// over the serial runs' and, as a control, the
// cores a trivially parallel busy loop gets right after (cores-free): on
// a machine others are using, the scaling cannot exceed it. The garbage
// collector is set as the command set it before cmd/qpoint/gc.go bounded
// it (off until a 1 GiB heap) unless GOGC or GOMEMLIMIT is in the
// environment.
func BenchmarkYield(b *testing.B) {
	if os.Getenv("GOGC") == "" && os.Getenv("GOMEMLIMIT") == "" {
		defer debug.SetGCPercent(debug.SetGCPercent(-1))
		defer debug.SetMemoryLimit(debug.SetMemoryLimit(1 << 30))
	}
	c, a := attenuator(b)
	var targets []Target
	for _, s := range []string{"s21>-4.4dB@900MHz", "hd3<-43dBc"} {
		t, err := ParseTarget(s)
		if err != nil {
			b.Fatal(err)
		}
		targets = append(targets, t)
	}
	const runs = 10000
	all := runtime.GOMAXPROCS(0)
	var one, oneCPU, many, manyCPU time.Duration
	for b.Loop() {
		for _, w := range []int{1, all} {
			c0, t0 := cpuTime(), time.Now()
			r, err := Run(c, Settings{Targets: targets, Runs: runs, Seed: 1, Workers: w, Analysis: a})
			if err != nil {
				b.Fatal(err)
			}
			if r.Stats.Failed > 0 {
				b.Fatalf("%d runs failed", r.Stats.Failed)
			}
			if w == 1 {
				one += time.Since(t0)
				oneCPU += cpuTime() - c0
			} else {
				many += time.Since(t0)
				manyCPU += cpuTime() - c0
			}
		}
	}
	b.ReportMetric(one.Seconds()/float64(b.N), "s/10k-1worker")
	b.ReportMetric(many.Seconds()/float64(b.N), "s/10k-allworkers")
	b.ReportMetric(float64(all), "workers")
	b.ReportMetric(float64(one)/float64(many), "scaling")
	b.ReportMetric(float64(manyCPU)/float64(many), "cores-used")
	// The CPU time the parallel runs took over the serial runs': above 1,
	// the same work cost more CPU in parallel (contention, or a core
	// shared with other work on the host).
	b.ReportMetric(float64(manyCPU)/float64(oneCPU), "cpu-ratio")
	b.ReportMetric(coresAvailable(all), "cores-free")
}

// coresAvailable spins one busy goroutine per core for about 50 ms and
// returns the CPU time it got over the wall time: the cores the machine
// could give this process at that moment.
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
