package explore

import (
	"context"
	"math"
	"runtime/debug"
	"testing"
)

// BenchmarkMove measures the server's time for one move of the page, as a
// user drags a slider: each demo's study quantity (the one its file's
// analysis.study varies) stepped 0.5 % of the slider's travel at a time,
// back and forth over a fifth of it; and, as "DEMO/jumps", to scattered
// positions over the whole slider, as a click on the track does. Every step is a whole move: bias
// from the last point, the Q-point tables, the I–V figure, the response
// with two figures, the Volterra estimate, the validity limit searched
// from the last and, for the detector, its sensitivity, with the
// figures rendered as SVG. The first move (a validity search from
// nothing) is made before the clock starts.
//
//	go test -run '^$' -bench Move -benchtime 200x ./plots/explore/
func BenchmarkMove(b *testing.B) {
	// The command runs the collector at 400 % (cmd/qpoint/gc.go); so
	// does the benchmark, to measure the server as it runs.
	defer debug.SetGCPercent(debug.SetGCPercent(400))
	for _, k := range []struct{ demo, control string }{
		{"detector", "Vcc.value"},
		{"attenuator", "Vctl.value"},
		{"limiter", "temperature"},
		{"mixer", "Vbias.value"},
		{"matched_detector", "temperature"},
	} {
		for _, jump := range []bool{false, true} {
			name := k.demo
			if jump {
				name += "/jumps"
			}
			b.Run(name, func(b *testing.B) {
				s := newSession(b, k.demo)
				vals := startValues(s)
				ctl := control(b, s, k.control)
				if _, err := s.Move(context.Background(), Request{Values: vals}); err != nil {
					b.Fatal(err)
				}
				start := positionOf(ctl, ctl.Value)
				solves := 0
				var stages [5]float64 // bias, operating point, response, distortion, detector (ms)
				b.ResetTimer()
				for i := 0; i < b.N; i++ {
					// A triangle wave of 40 steps of 5 positions each, or
					// jumps to scattered positions over the whole slider
					// (a fixed sequence: 0, 379, 758, 137, ...).
					pos := i % 80
					if pos >= 40 {
						pos = 80 - pos
					}
					pos = start + 5*pos
					if jump {
						pos = (379 * (i + 1)) % 1001
					}
					vals[ctl.Name] = ctl.text(valueAt(ctl, pos))
					v, err := s.Move(context.Background(), Request{Values: vals})
					if err != nil || v.Errors != nil || v.Failure != "" {
						b.Fatalf("%s=%s: %v %v %s", ctl.Name, vals[ctl.Name], err, v.Errors, v.Failure)
					}
					solves += v.Timing.WaveformSolves
					tm := v.Timing
					for k, x := range []float64{tm.BiasMS, tm.OperatingMS, tm.ResponseMS, tm.DistortionMS, tm.DetectorMS} {
						stages[k] += x
					}
				}
				b.ReportMetric(float64(solves)/float64(b.N), "waveforms/move")
				for k, name := range []string{"bias", "iv", "response", "distortion", "detector"} {
					b.ReportMetric(stages[k]/float64(b.N), name+"-ms/move")
				}
			})
		}
	}
}

// positionOf and valueAt map a slider position (0 to 1000) to a value and
// back, as the page's script does.
func positionOf(c Control, v float64) int {
	u := (v - c.Min) / (c.Max - c.Min)
	if c.Log {
		u = math.Log(v/c.Min) / math.Log(c.Max/c.Min)
	}
	return int(math.Round(1000 * math.Max(0, math.Min(1, u))))
}

func valueAt(c Control, pos int) float64 {
	u := float64(pos) / 1000
	if c.Log {
		return c.Min * math.Pow(c.Max/c.Min, u)
	}
	return c.Min + (c.Max-c.Min)*u
}
