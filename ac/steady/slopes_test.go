package steady

import (
	"math"
	"math/cmplx"
	"testing"

	"qpoint/ac"

	"gonum.org/v1/gonum/dsp/fourier"
)

// TestLevelSweepSlopes: at small levels the waveform's fundamental rises
// 1 dB per dB of input, the second harmonic 2 and the third 3 (common
// practice; the intercept construction rests on it).
func TestLevelSweepSlopes(t *testing.T) {
	nw := network(t, demo(t, "detector"))
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9}
	pts, err := LevelSweep(nw, d, []float64{-60, -50}, Settings{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for k, want := range map[int]float64{1: 1, 2: 2, 3: 3} {
		a, b := pts[0].Steady.Output[k].Amplitude, pts[1].Steady.Output[k].Amplitude
		slope := 20 * math.Log10(b/a) / 10
		if math.Abs(slope-want) > 0.01*want {
			t.Errorf("harmonic %d rises %.4f dB/dB between -60 and -50 dBm, want %g", k, slope, want)
		}
	}
}

// TestHarmonicsAgainstGonumFFT: the steady state's harmonics, taken with
// go-dsp's FFT, equal those of gonum's dsp/fourier (an independent FFT) on
// the same samples.
func TestHarmonicsAgainstGonumFFT(t *testing.T) {
	nw := network(t, demo(t, "limiter"))
	st, err := Solve(nw, ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 1e9, EMF: ac.DBmToEMF(5, 50)}, Settings{Harmonics: 7})
	if err != nil {
		t.Fatal(err)
	}
	x := st.Waveform
	ours := harmonics(x, 7)
	fft := fourier.NewFFT(len(x))
	coef := fft.Coefficients(nil, x)
	n := float64(len(x))
	for k := 0; k <= 7; k++ {
		want := coef[k] / complex(n, 0)
		if k > 0 {
			want *= 2
		}
		if cmplx.Abs(ours[k].Phasor-want) > 1e-12*cmplx.Abs(ours[1].Phasor) {
			t.Errorf("harmonic %d: go-dsp %v, gonum %v", k, ours[k].Phasor, want)
		}
	}
}
