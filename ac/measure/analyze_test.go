package measure

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

// tone is one component A cos(2π f (t - t0) + φ) of a synthetic record.
type tone struct {
	order    int     // harmonic of f0
	amp      float64 // volts peak
	phaseDeg float64 // at the first sample
}

// synth builds a record of n samples at fs from t0: DC plus harmonics of
// f0 plus Gaussian noise of standard deviation sigma from a seeded source.
func synth(fs float64, n int, t0, f0, dc float64, tones []tone, sigma float64, seed uint64) *Waveform {
	rng := rand.New(rand.NewPCG(seed, 7))
	x := make([]float64, n)
	for i := range x {
		t := float64(i) / fs
		v := dc
		for _, c := range tones {
			v += c.amp * math.Cos(2*math.Pi*float64(c.order)*f0*t+c.phaseDeg*math.Pi/180)
		}
		x[i] = v + sigma*rng.NormFloat64()
	}
	return &Waveform{SampleRateHz: fs, StartS: t0, Samples: x}
}

func dB(x float64) float64 { return 20 * math.Log10(x) }

// wrapDeg returns a - b folded into (-180, 180].
func wrapDeg(a, b float64) float64 {
	d := math.Mod(a-b, 360)
	if d > 180 {
		d -= 360
	}
	if d <= -180 {
		d += 360
	}
	return d
}

// TestKnownHarmonics: a record built from known harmonics, with a
// non-integer number of periods and small noise, gives them back. The
// expected values are the ones the record was built from; the THD and
// SINAD figures follow from them by the definitions of IEEE Std 1241.
func TestKnownHarmonics(t *testing.T) {
	const (
		fs    = 1e6
		n     = 10000
		f0    = 12345.678 // 123.45678 periods
		dc    = 0.05
		sigma = 1e-5 // -100 dB re 1 V: "small noise"
	)
	tones := []tone{
		{1, 1, 30},
		{2, 0.01, -75},  // -40 dBc
		{3, 0.001, 140}, // -60 dBc
	}
	wantTHD := math.Sqrt(0.01*0.01+0.001*0.001) / 1                           // 1.004988 %
	wantSINAD := 10 * math.Log10(0.5/((0.01*0.01+0.001*0.001)/2+sigma*sigma)) // 39.957 dB
	wantDensity := sigma * math.Sqrt(2/fs)                                    // one-sided density of white noise (common practice)
	for _, win := range []Window{FlatTop, BlackmanHarris, Hann, Rectangular} {
		t.Run(win.String(), func(t *testing.T) {
			w := synth(fs, n, -2.5e-3, f0, dc, tones, sigma, 1)
			r, err := Analyze(w, Settings{Window: win})
			if err != nil {
				t.Fatal(err)
			}
			if rel := math.Abs(r.FundamentalHz/f0 - 1); rel > 1e-6 {
				t.Errorf("fundamental %.6f Hz, want %.6f Hz within 1e-6 (off by %.2g)", r.FundamentalHz, f0, rel)
			}
			t.Logf("f0 off by %.2g relative in %d passes; periods %.5f", r.FundamentalHz/f0-1, r.Passes, r.Periods)
			if got := r.Harmonics[0].AmplitudeV; math.Abs(got-dc) > 1e-6 {
				t.Errorf("DC %g V, want %g V", got, dc)
			}
			for _, c := range tones {
				h := r.Harmonics[c.order]
				if !h.Present {
					t.Fatalf("harmonic %d absent", c.order)
				}
				da := dB(h.AmplitudeV / c.amp)
				dp := wrapDeg(h.PhaseDeg, c.phaseDeg)
				t.Logf("order %d: amplitude off by %+.5f dB, phase off by %+.4f°", c.order, da, dp)
				if math.Abs(da) > 0.01 {
					t.Errorf("order %d amplitude %.6g V, want %.6g V within 0.01 dB (off %.4f dB)", c.order, h.AmplitudeV, c.amp, da)
				}
				if math.Abs(dp) > 0.1 {
					t.Errorf("order %d phase %.3f°, want %.3f° within 0.1°", c.order, h.PhaseDeg, c.phaseDeg)
				}
				if want := float64(c.order) * f0; math.Abs(h.FrequencyHz/want-1) > 1e-6 {
					t.Errorf("order %d frequency %g Hz, want %g Hz", c.order, h.FrequencyHz, want)
				}
			}
			if math.Abs(r.THDPercent/(100*wantTHD)-1) > 1e-3 {
				t.Errorf("THD %.5f %%, want %.5f %% within 0.1 %%", r.THDPercent, 100*wantTHD)
			}
			if math.Abs(r.SINADdB-wantSINAD) > 0.01 {
				t.Errorf("SINAD %.4f dB, want %.4f dB within 0.01 dB", r.SINADdB, wantSINAD)
			}
			if math.Abs(r.NoiseRMS/sigma-1) > 0.05 {
				t.Errorf("noise %.4g V rms, want %.4g V within 5 %%", r.NoiseRMS, sigma)
			}
			if math.Abs(r.NoiseDensity/wantDensity-1) > 0.1 {
				t.Errorf("noise density %.4g V/√Hz, want %.4g within 10 %%", r.NoiseDensity, wantDensity)
			}
			t.Logf("THD %.5f %% (%.3f dB), SINAD %.4f dB, noise %.4g V rms, density %.4g V/√Hz",
				r.THDPercent, r.THDdB, r.SINADdB, r.NoiseRMS, r.NoiseDensity)
		})
	}
}

// squareWave returns the band-limited square wave of amplitude 1,
// Σ_{k odd} 4/(πk) sin(2πk f0 t) over the harmonics below fs/2 (its
// Fourier series; common practice).
func squareWave(fs float64, n int, f0 float64) *Waveform {
	x := make([]float64, n)
	for i := range x {
		t := float64(i) / fs
		for k := 1; float64(k)*f0 < fs/2; k += 2 {
			x[i] += 4 / (math.Pi * float64(k)) * math.Sin(2*math.Pi*float64(k)*f0*t)
		}
	}
	return &Waveform{SampleRateHz: fs, Samples: x}
}

// clippedSineHarmonic is the amplitude of odd harmonic k of sin θ clipped
// at ±sin α, from its Fourier sine series b_k = (4/π) ∫_0^{π/2} x sin kθ dθ
// (elementary integrals, derived here):
//
//	b_1 = (2α + sin 2α)/π
//	b_k = (4/π) [ (sin((k-1)α)/(k-1) - sin((k+1)α)/(k+1))/2 + sin α cos kα / k ].
func clippedSineHarmonic(k int, alpha float64) float64 {
	if k%2 == 0 {
		return 0
	}
	if k == 1 {
		return (2*alpha + math.Sin(2*alpha)) / math.Pi
	}
	fk := float64(k)
	return 4 / math.Pi * ((math.Sin((fk-1)*alpha)/(fk-1)-math.Sin((fk+1)*alpha)/(fk+1))/2 + math.Sin(alpha)*math.Cos(fk*alpha)/fk)
}

// TestTHD checks the total harmonic distortion of signals whose harmonics
// are known in closed form.
func TestTHD(t *testing.T) {
	const fs = 1e6
	alpha := math.Asin(0.8)
	clipped := func(n int, f0 float64) *Waveform {
		x := make([]float64, n)
		for i := range x {
			x[i] = max(-0.8, min(0.8, math.Sin(2*math.Pi*f0*float64(i)/fs)))
		}
		return &Waveform{SampleRateHz: fs, Samples: x}
	}
	thdOf := func(amp func(k int) float64, k int) float64 {
		var s float64
		for j := 2; j <= k; j++ {
			s += amp(j) * amp(j)
		}
		return 100 * math.Sqrt(s) / amp(1)
	}
	square := func(k int) float64 {
		if k%2 == 0 {
			return 0
		}
		return 4 / (math.Pi * float64(k))
	}
	cases := []struct {
		name    string
		w       *Waveform
		k       int
		wantTHD float64 // percent
		wantA1  float64
		source  string
	}{
		// sqrt(1/9 + 1/25 + 1/49 + 1/81) = 42.8802 %
		{"square wave, K=10", squareWave(fs, 20000, 3141.59), 10, thdOf(square, 10), 4 / math.Pi, "Fourier series of a square wave (common practice)"},
		{"square wave, K=40", squareWave(fs, 20000, 3141.59), 40, thdOf(square, 40), 4 / math.Pi, "Fourier series of a square wave (common practice)"},
		{"sine clipped at 0.8, K=10", clipped(16384, 2718.28), 10, thdOf(func(k int) float64 { return clippedSineHarmonic(k, alpha) }, 10), clippedSineHarmonic(1, alpha), "Fourier series of a clipped sine (derived in clippedSineHarmonic)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := Analyze(c.w, Settings{Harmonics: c.k})
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("THD %.5f %%, want %.5f %% (%s); A1 %.7f V, want %.7f V", r.THDPercent, c.wantTHD, c.source, r.Harmonics[1].AmplitudeV, c.wantA1)
			if math.Abs(r.THDPercent/c.wantTHD-1) > 1e-3 {
				t.Errorf("THD %.5f %%, want %.5f %% within 0.1 %% (%s)", r.THDPercent, c.wantTHD, c.source)
			}
			if math.Abs(r.Harmonics[1].AmplitudeV/c.wantA1-1) > 1e-4 {
				t.Errorf("fundamental %.7f V, want %.7f V (%s)", r.Harmonics[1].AmplitudeV, c.wantA1, c.source)
			}
		})
	}
}

// TestAboveNyquist: harmonics at or near fs/2 are absent, and a harmonic
// above fs/2, which aliases into the band, is not mistaken for one.
func TestAboveNyquist(t *testing.T) {
	const fs, f0 = 1e6, 123456.0
	// The 5th harmonic at 617.28 kHz aliases to 382.72 kHz, 12.4 kHz from
	// the 3rd.
	w := synth(fs, 4096, 0, f0, 0, []tone{{1, 1, 0}, {2, 0.1, 0}, {3, 0.01, 0}, {4, 0.001, 0}, {5, 0.3, 0}}, 0, 1)
	r, err := Analyze(w, Settings{Harmonics: 8})
	if err != nil {
		t.Fatal(err)
	}
	for k, want := range []float64{0, 1, 0.1, 0.01, 0.001} {
		if h := r.Harmonics[k]; !h.Present || math.Abs(h.AmplitudeV-want) > 1e-6 {
			t.Errorf("order %d: present %v, %g V; want %g V", k, h.Present, h.AmplitudeV, want)
		}
	}
	for k := 5; k <= 8; k++ {
		h := r.Harmonics[k]
		if h.Present || !math.IsNaN(h.AmplitudeV) || !math.IsNaN(h.PhaseDeg) {
			t.Errorf("order %d at %g Hz, above fs/2 = %g Hz: present %v, %g V; want absent", k, h.FrequencyHz, fs/2, h.Present, h.AmplitudeV)
		}
	}
	wantTHD := 100 * math.Sqrt(0.1*0.1+0.01*0.01+0.001*0.001)
	if math.Abs(r.THDPercent/wantTHD-1) > 1e-3 {
		t.Errorf("THD %.5f %%, want %.5f %% over orders 2-4", r.THDPercent, wantTHD)
	}
}

// TestGivenFundamental: a given fundamental is used as it stands.
func TestGivenFundamental(t *testing.T) {
	w := synth(1e6, 5000, 0, 10e3, 0, []tone{{1, 0.5, -45}, {2, 0.005, 10}}, 0, 1)
	r, err := Analyze(w, Settings{FundamentalHz: 10e3, Window: Hann, Harmonics: 3})
	if err != nil {
		t.Fatal(err)
	}
	if r.Searched || r.FundamentalHz != 10e3 || len(r.Harmonics) != 4 {
		t.Fatalf("searched %v, f0 %g, %d orders; want the given 10 kHz and orders 0-3", r.Searched, r.FundamentalHz, len(r.Harmonics))
	}
	if h := r.Harmonics[2]; math.Abs(h.AmplitudeV-0.005) > 1e-12 || math.Abs(h.DBc-(-40)) > 1e-9 || math.Abs(h.PhaseDeg-10) > 1e-9 {
		t.Errorf("2nd harmonic %g V %g dBc %g°, want 5 mV, -40 dBc, 10°", h.AmplitudeV, h.DBc, h.PhaseDeg)
	}
}

// TestAnalyzeRefuses: settings and records that cannot be analysed give
// errors that say why.
func TestAnalyzeRefuses(t *testing.T) {
	sine := synth(1e6, 1000, 0, 3e3, 0, []tone{{1, 1, 0}}, 0, 1) // 3 periods
	cases := []struct {
		name     string
		w        *Waveform
		s        Settings
		settings bool // a *SettingsError
		want     string
	}{
		{"fundamental above Nyquist", sine, Settings{FundamentalHz: 600e3}, true, "Nyquist"},
		{"negative fundamental", sine, Settings{FundamentalHz: -1}, true, "positive"},
		{"too many harmonics", sine, Settings{Harmonics: 5000}, true, "1 to 1000"},
		{"unknown window", sine, Settings{Window: Window(9)}, true, "accepted"},
		{"3 periods under blackman-harris", sine, Settings{FundamentalHz: 3e3}, true, "at least 4"},
		{"3 periods, searched", sine, Settings{}, true, "needs at least 4"},
		{"constant record", &Waveform{SampleRateHz: 1e3, Samples: make([]float64, 64)}, Settings{}, false, "no signal but its mean"},
		{"constant 0.5 V", &Waveform{SampleRateHz: 1e3, Samples: slices.Repeat([]float64{0.5}, 1000)}, Settings{}, false, "no signal but its mean (0.5 V)"},
		{"NaN sample", &Waveform{SampleRateHz: 1e3, Samples: append(make([]float64, 63), math.NaN())}, Settings{}, false, "finite"},
		{"too short", &Waveform{SampleRateHz: 1e3, Samples: make([]float64, 8)}, Settings{}, false, "8 samples"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Analyze(c.w, c.s)
			if err == nil {
				t.Fatalf("no error; want one containing %q", c.want)
			}
			var se *SettingsError
			if errors.As(err, &se) != c.settings {
				t.Errorf("%v: settings error %v, want %v", err, !c.settings, c.settings)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q lacks %q", err, c.want)
			}
		})
	}
	// Three periods are enough for the Hann window's 2-bin half-width.
	if _, err := Analyze(sine, Settings{Window: Hann}); err != nil {
		t.Errorf("hann on 3 periods: %v", err)
	}
}

func benchmarkAnalyze(b *testing.B, n int) {
	w := synth(1e8, n, 0, 1234567.8, 0.1, []tone{{1, 1, 0}, {2, 0.01, 0}, {3, 0.001, 0}}, 1e-4, 1)
	b.ResetTimer()
	for b.Loop() {
		if _, err := Analyze(w, Settings{}); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkAnalyze10k(b *testing.B) { benchmarkAnalyze(b, 10_000) }
func BenchmarkAnalyze1M(b *testing.B)  { benchmarkAnalyze(b, 1_000_000) }
