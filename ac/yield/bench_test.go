package yield

import (
	"strconv"
	"testing"
)

// BenchmarkYield times 10,000 runs of the attenuator demo with a
// response target (S21 at 900 MHz) and a Volterra target (HD3 at
// -10 dBm), on one worker and on two. Each op is the whole analysis:
// the runs, the sensitivities and the corners.
//
//	go test -run '^$' -bench Yield -benchtime 3x ./ac/yield/
func BenchmarkYield(b *testing.B) {
	c, a := attenuator(b)
	ts := []string{"s21>-4.4dB@900MHz", "hd3<-43dBc"}
	var targets []Target
	for _, s := range ts {
		t, err := ParseTarget(s)
		if err != nil {
			b.Fatal(err)
		}
		targets = append(targets, t)
	}
	for _, w := range []int{1, 2} {
		b.Run("workers="+strconv.Itoa(w), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				r, err := Run(c, Settings{Targets: targets, Runs: 10000, Seed: 1, Workers: w, Analysis: a})
				if err != nil {
					b.Fatal(err)
				}
				b.ReportMetric(float64(r.Stats.Runtime.Microseconds())/float64(len(r.Runs)), "µs/run")
			}
		})
	}
}
