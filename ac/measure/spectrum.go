package measure

import (
	"math"
	"math/cmplx"

	"github.com/mjibson/go-dsp/fft"
)

// Spectrum is the one-sided amplitude spectrum of a windowed record.
type Spectrum struct {
	Window Window
	// BinHz is the spacing of the bins, fs/M for a transform of M points.
	BinHz float64
	// AmplitudeV[k] is the peak amplitude of a sinusoid centred on bin k,
	// 2|X[k]|/Σw (the window's coherent gain removed, Harris 1978,
	// eq. 12); AmplitudeV[0] is |X[0]|/Σw, the magnitude of the mean. A
	// tone between bins reads low by the window's scalloping loss.
	AmplitudeV []float64
}

// Spectrum returns the amplitude spectrum of the whole record under the
// window, computed by FFT (go-dsp) of
//
//	X[k] = Σ_{n=0}^{N-1} w[n] x[n] exp(-2πi kn/M),  k = 0..M/2,
//
// zero-padded to M, the next power of two at or above N.
func (w *Waveform) Spectrum(win Window) (*Spectrum, error) {
	if err := w.check(); err != nil {
		return nil, err
	}
	if !win.valid() {
		return nil, &SettingsError{"window " + win.String() + "; accepted: " + WindowNames}
	}
	weights := win.Weights(len(w.Samples))
	x := transform(w.Samples, weights, 0)
	var sum float64
	for _, v := range weights {
		sum += v
	}
	s := &Spectrum{Window: win, BinHz: w.SampleRateHz / float64(len(x)), AmplitudeV: make([]float64, len(x)/2+1)}
	for k := range s.AmplitudeV {
		a := cmplx.Abs(x[k]) / sum
		if k > 0 && k < len(x)/2 {
			a *= 2
		}
		s.AmplitudeV[k] = a
	}
	return s, nil
}

// transform returns the FFT of w[n] (x[n] - mean), zero-padded to the next
// power of two. Padding to a power of two keeps go-dsp on its radix-2
// path, whose twiddle factors it caches per length: one cache per power of
// two rather than one per record length.
func transform(x, weights []float64, mean float64) []complex128 {
	m := 1
	for m < len(x) {
		m <<= 1
	}
	in := make([]complex128, m)
	for i, v := range x {
		in[i] = complex(weights[i]*(v-mean), 0)
	}
	return fft.FFT(in)
}

// peak finds the largest bin of |X|² from bin lo up to the Nyquist bin
// and, where it is a local maximum, refines its position by a parabola
// through ln|X|² at the bin and its two neighbours. It returns the
// position in bins, or -1 when every bin is zero.
func peak(x []complex128, lo int) float64 {
	half := len(x) / 2
	best, at := 0.0, -1
	for k := max(lo, 1); k <= half; k++ {
		if p := sqAbs(x[k]); p > best {
			best, at = p, k
		}
	}
	if at < 0 || at == half {
		return float64(at)
	}
	a, b, c := sqAbs(x[at-1]), best, sqAbs(x[at+1])
	if !(b > a && b >= c) {
		return float64(at)
	}
	la, lb, lc := math.Log(max(a, 1e-300)), math.Log(b), math.Log(max(c, 1e-300))
	d := 0.0
	if den := la - 2*lb + lc; den < 0 {
		d = 0.5 * (la - lc) / den
	}
	return float64(at) + max(-0.5, min(0.5, d))
}

func sqAbs(z complex128) float64 { return real(z)*real(z) + imag(z)*imag(z) }
