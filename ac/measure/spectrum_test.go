package measure

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// TestTransformAgainstGonum compares the go-dsp transform of a windowed,
// zero-padded record with gonum's independent real FFT (dsp/fourier).
func TestTransformAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, n := range []int{16, 1000, 4096, 12345} {
		x := make([]float64, n)
		for i := range x {
			x[i] = rng.NormFloat64() + 0.3
		}
		w := Hann.Weights(n)
		got := transform(x, w, 0.3)
		m := len(got)
		seq := make([]float64, m)
		for i := range x {
			seq[i] = w[i] * (x[i] - 0.3)
		}
		want := fourier.NewFFT(m).Coefficients(nil, seq)
		var worst, scale float64
		for k := range want {
			worst = max(worst, cmplx.Abs(got[k]-want[k]))
			scale = max(scale, cmplx.Abs(want[k]))
		}
		t.Logf("N=%d padded to %d: largest difference %.2g of the largest bin", n, m, worst/scale)
		if m&(m-1) != 0 || m < n || m >= 2*n {
			t.Errorf("N=%d padded to %d, want the next power of two", n, m)
		}
		if worst > 1e-12*scale {
			t.Errorf("N=%d: go-dsp and gonum differ by %.3g (largest bin %.3g); want within 1e-12", n, worst, scale)
		}
	}
}

// TestWindowProperties checks each window's equivalent noise bandwidth,
// its scalloping loss (a tone half a bin off centre) and its coherent
// gain correction (a tone on a bin reads its true amplitude) against
// Harris 1978, Table I; the flat-top's figures are from memory.
func TestWindowProperties(t *testing.T) {
	cases := []struct {
		w          Window
		enbw       float64 // bins
		scallopDB  float64 // loss half a bin off centre
		scallopTol float64
		sidelobeDB float64 // highest sidelobe
	}{
		{Rectangular, 1.00, 3.92, 0.01, -13},
		{Hann, 1.50, 1.42, 0.01, -32},
		{BlackmanHarris, 2.00, 0.83, 0.01, -92},
		{FlatTop, 3.77, 0, 0.01, -93}, // "under 0.01 dB", "about -93 dB"
	}
	const n, fs = 4096, 4096.0 // 1 Hz bins, no padding
	tone := func(f float64) *Waveform {
		x := make([]float64, n)
		for i := range x {
			x[i] = math.Cos(2*math.Pi*f*float64(i)/fs + 0.4)
		}
		return &Waveform{SampleRateHz: fs, Samples: x}
	}
	for _, c := range cases {
		if got := NoiseBandwidthBins(c.w.Weights(n)); math.Abs(got-c.enbw) > 0.005 {
			t.Errorf("%s: noise bandwidth %.4f bins, want %.2f", c.w, got, c.enbw)
		}
		on, err := tone(500).Spectrum(c.w)
		if err != nil {
			t.Fatal(err)
		}
		if got := on.AmplitudeV[500]; math.Abs(got-1) > 1e-4 {
			t.Errorf("%s: a 1 V tone on bin 500 reads %.6f V", c.w, got)
		}
		off, err := tone(500.5).Spectrum(c.w)
		if err != nil {
			t.Fatal(err)
		}
		loss := -20 * math.Log10(max(off.AmplitudeV[500], off.AmplitudeV[501]))
		t.Logf("%s: scalloping loss %.4f dB, noise bandwidth %.4f bins", c.w, loss, NoiseBandwidthBins(c.w.Weights(n)))
		if math.Abs(loss-c.scallopDB) > c.scallopTol {
			t.Errorf("%s: scalloping loss %.3f dB, want %.2f ± %.2f dB", c.w, loss, c.scallopDB, c.scallopTol)
		}
		// Harris tabulates whole decibels: -31.5 dB for Hann prints as -32.
		got := highestSidelobe(c.w)
		t.Logf("%s: highest sidelobe %.2f dB", c.w, got)
		if math.Abs(got-c.sidelobeDB) > 0.6 {
			t.Errorf("%s: highest sidelobe %.2f dB, want %.0f dB", c.w, got, c.sidelobeDB)
		}
	}
}

func TestParseWindow(t *testing.T) {
	for in, want := range map[string]Window{
		"blackman-harris": BlackmanHarris, "BlackmanHarris": BlackmanHarris, "hann": Hann,
		"Flat-Top": FlatTop, "flattop": FlatTop, "rectangular": Rectangular,
	} {
		if got, err := ParseWindow(in); err != nil || got != want {
			t.Errorf("ParseWindow(%q) = %v, %v; want %v", in, got, err, want)
		}
	}
	for _, w := range []Window{BlackmanHarris, Hann, FlatTop, Rectangular} {
		if got, err := ParseWindow(w.String()); err != nil || got != w {
			t.Errorf("ParseWindow(%q) = %v, %v", w.String(), got, err)
		}
	}
	if _, err := ParseWindow("hamming"); err == nil {
		t.Error("ParseWindow(hamming): no error")
	}
}

// highestSidelobe evaluates the window's transform W(f) = Σ w[n] e^{-2πifn/N}
// every 1/16 bin from the end of the main lobe to 40 bins and returns its
// largest value relative to W(0), in dB.
func highestSidelobe(win Window) float64 {
	const n = 256
	w := win.Weights(n)
	var w0 float64
	for _, v := range w {
		w0 += v
	}
	worst := math.Inf(-1)
	for f := float64(win.HalfWidthBins()); f <= 40; f += 1.0 / 16 {
		var s complex128
		for i, v := range w {
			s += complex(v, 0) * cmplx.Exp(complex(0, -2*math.Pi*f*float64(i)/n))
		}
		worst = max(worst, 20*math.Log10(cmplx.Abs(s)/w0))
	}
	return worst
}

// TestWindowWeightsCosineSums: the weights gonum's dsp/window gives, taken
// in the DFT-even form, equal the cosine sums of Harris (Proc. IEEE 66(1),
// 1978, eq. 33 and Table I) w[n] = Σ (-1)^m a_m cos(2π m n / N), with the
// flat-top coefficients of D'Antona and Ferrero (2006, from memory).
func TestWindowWeightsCosineSums(t *testing.T) {
	for _, c := range []struct {
		w Window
		a []float64
	}{
		{BlackmanHarris, []float64{0.35875, 0.48829, 0.14128, 0.01168}},
		{Hann, []float64{0.5, 0.5}},
		{FlatTop, []float64{0.21557895, 0.41663158, 0.277263158, 0.083578947, 0.006947368}},
		{Rectangular, []float64{1}},
	} {
		for _, n := range []int{1, 16, 1001, 65536} {
			got := c.w.Weights(n)
			if len(got) != n || c.w.HalfWidthBins() != len(c.a) {
				t.Fatalf("%s: %d weights for %d, half-width %d for %d terms", c.w, len(got), n, c.w.HalfWidthBins(), len(c.a))
			}
			for i := range got {
				v, sign := c.a[0], -1.0
				for m := 1; m < len(c.a); m++ {
					v += sign * c.a[m] * math.Cos(2*math.Pi*float64((m*i)%n)/float64(n))
					sign = -sign
				}
				if math.Abs(got[i]-v) > 1e-12 {
					t.Fatalf("%s, N = %d: w[%d] = %.16g, cosine sum %.16g", c.w, n, i, got[i], v)
				}
			}
		}
	}
}
