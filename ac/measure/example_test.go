package measure_test

import (
	"fmt"
	"math"

	"qpoint/ac/measure"
)

// A record of 1000 samples at 100 kHz of a 1 kHz tone of 1 V peak with a
// second harmonic 40 dB down and a third 60 dB down: the fundamental is
// found, and the harmonics come out at their levels, whatever the phase.
// THD is sqrt(0.01² + 0.001²) = 1.005 % (its definition; IEEE Std 1241).
func ExampleAnalyze() {
	const fs, f0 = 100e3, 1e3
	w := &measure.Waveform{SampleRateHz: fs}
	for n := range 1000 {
		t := float64(n) / fs
		w.Samples = append(w.Samples, 0.2+
			math.Cos(2*math.Pi*f0*t+0.3)+
			0.01*math.Cos(2*math.Pi*2*f0*t-1)+
			0.001*math.Cos(2*math.Pi*3*f0*t+2))
	}
	r, err := measure.Analyze(w, measure.Settings{Harmonics: 5})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("f0 %.6g Hz, DC %.4g V, fundamental %.4g V\n", r.FundamentalHz, r.Harmonics[0].AmplitudeV, r.Harmonics[1].AmplitudeV)
	for _, h := range r.Harmonics[2:4] {
		fmt.Printf("harmonic %d: %.2f dBc at %.1f°\n", h.Order, h.DBc, h.PhaseDeg)
	}
	fmt.Printf("THD %.4g %%\n", r.THDPercent)
	// Output:
	// f0 1000 Hz, DC 0.2 V, fundamental 1 V
	// harmonic 2: -40.00 dBc at -57.3°
	// harmonic 3: -60.00 dBc at 114.6°
	// THD 1.005 %
}
