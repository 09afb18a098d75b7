package study

import (
	"runtime"
	"testing"

	"qpoint/ac"
)

// BenchmarkStepMemory reports the heap a study allocates per step, bytes
// and allocations, for the detector and attenuator demos as `qpoint study`
// runs them with a distortion level: 200 steps of the file's study range,
// the response at the distortion frequency and a Volterra estimate at
// -10 dBm, one worker. The figures count everything Run allocates,
// including the Result the caller keeps:
//
//	go test -run '^$' -bench StepMemory -benchtime 20x ./ac/study/
//
// They do not depend on the machine's load, unlike the time per step.
func BenchmarkStepMemory(b *testing.B) {
	cases := []struct {
		demo, vary string
		from, to   float64
		hz         float64
	}{
		{"detector", "Vcc.value", 0, 3.3, 2.45e9},
		{"attenuator", "Vctl.value", 0.9, 5, 900e6},
	}
	const steps = 200
	for _, tc := range cases {
		b.Run(tc.demo, func(b *testing.B) {
			c := demo(b, tc.demo)
			s := Settings{
				Axis:          axis(b, c, tc.vary, tc.from, tc.to, steps),
				FrequenciesHz: []float64{tc.hz},
				Drive: ac.Drive{Input: 0, Output: ac.Output{Port: len(c.Ports) - 1}, FrequencyHz: tc.hz,
					EMF: ac.DBmToEMF(-10, c.Ports[0].Impedance)},
				Workers: 1,
			}
			var before, after runtime.MemStats
			runtime.ReadMemStats(&before)
			for b.Loop() {
				r, err := Run(c, s)
				if err != nil {
					b.Fatal(err)
				}
				for i := range r.Steps {
					if r.Steps[i].Err != nil {
						b.Fatal(r.Steps[i].Err)
					}
				}
			}
			runtime.ReadMemStats(&after)
			n := float64(b.N) * steps
			b.ReportMetric(float64(after.TotalAlloc-before.TotalAlloc)/n, "B/step")
			b.ReportMetric(float64(after.Mallocs-before.Mallocs)/n, "allocs/step")
		})
	}
}
