package transient

import (
	"os"
	"syscall"
	"testing"
	"time"

	"qpoint/ac"
)

// BenchmarkLimiterPulse runs a 1 µs pulse of a 3 GHz carrier at 40 dBm
// available (rise and fall 10 ns, 10-90 %) through the limiter demo, with
// the probe for its recovery: about 3000 carrier periods (BENCHMARKS.md).
func BenchmarkLimiterPulse(b *testing.B) {
	data, err := os.ReadFile("../../testdata/demo/limiter.yaml")
	if err != nil {
		b.Fatal(err)
	}
	nw := network(b, string(data))
	s := PulseSettings{Input: 0, Output: ac.Output{Port: 1},
		Pulse: Pulse{CarrierHz: 3e9, CarrierEMF: ac.DBmToEMF(40, 50), Width: 1e-6, Rise: 10e-9, Fall: 10e-9}}
	var r *PulseResult
	// The machine may be shared: report the process's CPU time per run
	// beside the wall time, which another load stretches.
	cpu0 := cpuTime()
	for b.Loop() {
		if r, err = RunPulse(nw, s); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric((cpuTime()-cpu0).Seconds()/float64(b.N), "cpu-s/op")
	st := r.Run.Stats
	b.ReportMetric(float64(st.Accepted), "accepted")
	b.ReportMetric(float64(st.Rejected), "rejected")
	b.ReportMetric(float64(st.NewtonIterations)/float64(st.Accepted+st.Rejected)/2, "newton/stage")
	b.ReportMetric(float64(st.Accepted)/(r.Run.Times[len(r.Run.Times)-1]*3e9), "steps/period")
}

// cpuTime returns the user and system CPU time the process has used.
func cpuTime() time.Duration {
	var u syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &u); err != nil {
		return 0
	}
	return time.Duration(u.Utime.Nano() + u.Stime.Nano())
}
