// Package measure analyses waveforms captured on an instrument: a record
// of N uniformly spaced samples x[n] of a periodic signal, read from a CSV
// file, from which it estimates the fundamental frequency f0 and the
// amplitude and phase of the harmonics, the total harmonic distortion and
// the signal to noise-and-distortion ratio.
//
// Each harmonic k of the record is modelled as A_k cos(2π k f0 (t - t0) + φ_k),
// with t0 the time of the first sample, so that φ_k is the phase of a cosine
// at the first sample. The steps are:
//
//  1. The record, less its mean, is multiplied by a window w[n] and
//     transformed by FFT (github.com/mjibson/go-dsp/fft), zero-padded to a
//     power of two. Unless the fundamental is given, it is the largest
//     spectral peak clear of the DC main lobe, refined by a parabola through
//     the logarithm of the three highest bins.
//
//  2. The DC level c and the quadrature parts a_k, b_k of harmonics
//     1..K are fitted by weighted least squares,
//
//     min Σ_n w[n] (x[n] - c - Σ_k [a_k cos(kθn) + b_k sin(kθn)])²,  θ = 2π f0/fs,
//
//     which is the three-parameter sine fit of IEEE Std 1057 (Standard for
//     digitizing waveform recorders) extended to K harmonics and weighted
//     by the window. When the fundamental was searched for, θ is refined by
//     Gauss-Newton steps on the same sum, the standard's four-parameter
//     fit (with Blackman-Harris weights when the window is the flat-top,
//     whose negative weights no least-squares sum can take). Then A_k = sqrt(a_k² + b_k²) and φ_k = atan2(-b_k, a_k).
//
//  3. THD = sqrt(Σ_{k=2..K} A_k²)/A_1, and SINAD = (A_1²/2) / P_nd, where
//     the noise-and-distortion power P_nd = Σ_{k=2..K} A_k²/2 + Σ w r²/Σ w is
//     everything but DC and the fundamental (r is the fit's residual), as
//     IEEE Std 1241 (ADC testing) defines them.
//
// The noise floor is read from the windowed spectrum of the residual r:
// the median bin power clear of DC and every harmonic, over ln 2, gives
// the one-sided density in V/√Hz (see Result.NoiseDensity).
//
// ReadCSV reads the record from a two-column (time, value) or one-column
// file and checks that the times are uniformly spaced.
//
// Why a fit and not the spectrum's bins: a fit at the known harmonic
// frequencies is exact for every modelled component whatever the number of
// periods in the record, so there is no scalloping loss and no leakage
// between the fundamental and its harmonics. The window still matters: it
// sets how much of what is not modelled (noise, spurs, harmonics above K)
// leaks into the estimates, and how closely the fundamental can be found.
// Window properties are those of Harris, "On the use of windows for
// harmonic analysis with the discrete Fourier transform", Proc. IEEE 66(1),
// 1978.
package measure
