package measure

import (
	"errors"
	"fmt"
	"math"
	"slices"
)

// DefaultHarmonics is the highest harmonic order analysed when Settings
// leaves it zero.
const DefaultHarmonics = 10

// MaxHarmonics bounds Settings.Harmonics.
const MaxHarmonics = 1000

// Settings choose how a waveform is analysed. The zero value is usable:
// Blackman-Harris window, fundamental found automatically, 10 harmonics.
type Settings struct {
	Window Window
	// FundamentalHz is f0. Zero means: find it as the largest spectral
	// peak clear of DC and refine it by the harmonic fit. A given value is
	// used as it stands.
	FundamentalHz float64
	// Harmonics is K, the highest order analysed (default 10).
	Harmonics int
}

// SettingsError reports settings that cannot be used with a waveform.
type SettingsError struct{ Msg string }

func (e *SettingsError) Error() string { return e.Msg }

// Harmonic is one order k of the Fourier series of the record.
type Harmonic struct {
	Order       int
	FrequencyHz float64 // k f0
	// Present is false for a harmonic at or within half the window's main
	// lobe of the Nyquist frequency fs/2: it cannot be told from its alias,
	// so it is reported as absent rather than aliased.
	Present bool
	// AmplitudeV is A_k, the peak amplitude in volts; for order 0 it is
	// the signed DC level c. NaN when absent.
	AmplitudeV float64
	// PhaseDeg is φ_k in degrees, (-180, 180], of A_k cos(2π k f0 (t - t0) + φ_k)
	// at the first sample t0. NaN for order 0 and when absent.
	PhaseDeg float64
	// DBc is 20 log10(A_k/A_1). NaN for order 0 and when absent.
	DBc float64
}

// Result is what Analyze finds in a record.
type Result struct {
	Samples      int
	SampleRateHz float64
	Window       Window
	// FundamentalHz is f0: as given, or as found and refined.
	FundamentalHz float64
	// Searched is true when f0 was found rather than given.
	Searched bool
	// Periods is the number of periods of f0 in the record, f0 N/fs.
	Periods float64
	// Harmonics holds orders 0..K, index = order.
	Harmonics []Harmonic
	// THDPercent is 100 sqrt(Σ_{k=2..K} A_k²)/A_1 over the harmonics
	// present, and THDdB is 20 log10 of the same ratio. NaN when no
	// harmonic from 2 up is below the Nyquist frequency.
	THDPercent, THDdB float64
	// SINADdB is 10 log10((A_1²/2)/P_nd), with P_nd the power of
	// everything but DC and the fundamental.
	SINADdB float64
	// NoiseDistortionRMS is sqrt(P_nd), volts RMS: the floor of noise and
	// distortion under the fundamental.
	NoiseDistortionRMS float64
	// NoiseRMS is the RMS of the residual alone, volts: all that is
	// neither DC nor harmonics 1..K, weighted by the window,
	// sqrt(Σ w r² / Σ w) (by Blackman-Harris for the flat-top window,
	// whose weights go negative).
	NoiseRMS float64
	// NoiseDensity is the spectral floor in V/√Hz (one-sided): the median
	// of |R[k]|², R the windowed transform of the residual r, over bins clear of DC, the Nyquist frequency and every
	// harmonic of f0, divided by ln 2 (the median of an exponential
	// distribution, which the power of a bin of Gaussian noise follows) and
	// scaled by 2/(fs Σw²). NaN when too few bins are clear.
	NoiseDensity float64
	// Passes is the number of passes over the record the fit took.
	Passes int
}

// Analyze finds the fundamental of a record and fits its harmonics by the
// method of the package comment. The fundamental must lie at least the
// window's main-lobe half-width from DC (that many periods in the record:
// 4 for Blackman-Harris, 2 for Hann, 5 for flat-top, 1 for rectangular)
// and as far from the Nyquist frequency.
//
// Errors about the settings are *SettingsError; others mean the record
// does not support the analysis (no clear peak, harmonics not separable).
func Analyze(w *Waveform, s Settings) (*Result, error) {
	if err := w.check(); err != nil {
		return nil, err
	}
	if !s.Window.valid() {
		return nil, &SettingsError{fmt.Sprintf("window %s; accepted: %s", s.Window, WindowNames)}
	}
	k := s.Harmonics
	if k == 0 {
		k = DefaultHarmonics
	}
	if k < 1 || k > MaxHarmonics {
		return nil, &SettingsError{fmt.Sprintf("%d harmonics; accepted: 1 to %d", s.Harmonics, MaxHarmonics)}
	}
	x := w.Samples
	n := len(x)
	fs := w.SampleRateHz
	half := float64(s.Window.HalfWidthBins())
	weights := s.Window.Weights(n)
	var sw, swx, sw2 float64
	for i, v := range weights {
		sw += v
		sw2 += v * v
		swx += v * x[i]
	}
	// Least squares needs non-negative weights; the flat-top window's go
	// below zero about a fifth of the record from either end. With it, the fundamental is
	// refined and the residual weighted with Blackman-Harris, whose
	// leakage is as low, while the harmonics are still projected with the
	// flat-top weights: at a fixed frequency the normal equations are the
	// windowed transform's equations and need no sign.
	lsWeights := weights
	negative := slices.Min(weights) < 0
	if negative {
		lsWeights = BlackmanHarris.Weights(n)
	}
	nyquist := fs / 2
	margin := half / 2 * fs / float64(n) // half the main lobe, Hz

	r := &Result{Samples: n, SampleRateHz: fs, Window: s.Window, FundamentalHz: s.FundamentalHz}
	if f0 := s.FundamentalHz; f0 != 0 {
		if !(f0 > 0) || math.IsInf(f0, 0) {
			return nil, &SettingsError{fmt.Sprintf("fundamental %g Hz; accepted: a positive frequency below the Nyquist frequency %g Hz, or none to search", f0, nyquist)}
		}
		if f0 >= nyquist-margin {
			return nil, &SettingsError{fmt.Sprintf("fundamental %.6g Hz is not below the Nyquist frequency %.6g Hz by half the %s window's main lobe (%.3g Hz); accepted: a lower fundamental or a higher sample rate", f0, nyquist, s.Window, margin)}
		}
	} else {
		spec := transform(x, weights, swx/sw)
		m := len(spec)
		// The search starts one record bin above DC, not past the window's
		// main lobe, so that a record with too few periods is refused for
		// what it is below, rather than read at a harmonic.
		lo := int(math.Ceil(float64(m) / float64(n)))
		at := peak(spec, lo)
		// A constant record leaves only the rounding of the mean's
		// subtraction, some 300 dB below the mean; a signal 240 dB below
		// it is taken for none.
		var big float64
		for _, v := range x {
			big = max(big, math.Abs(v))
		}
		if at < 0 || sqAbs(spec[int(math.Round(at))]) <= 1e-24*(sw*big)*(sw*big) {
			return nil, fmt.Errorf("the record holds no signal but its mean (%.6g V): nothing to analyse", swx/sw)
		}
		r.FundamentalHz = at * fs / float64(m)
		r.Searched = true
	}
	hint := ""
	if r.Searched {
		hint = "; or give the fundamental, if this largest peak is not it"
	}
	// The search's estimate may be off by a fraction of a bin, so it is
	// held to the limit with half a period to spare; the refined one is
	// held to it exactly, less rounding.
	tooFew := func(slack float64) error {
		r.Periods = r.FundamentalHz * float64(n) / fs
		if r.Periods >= half-slack {
			return nil
		}
		return &SettingsError{fmt.Sprintf("the record holds %.4g periods of %.6g Hz; the %s window needs at least %g: capture a longer record, or choose a window with a narrower main lobe (hann needs 2, rectangular 1)%s", r.Periods, r.FundamentalHz, s.Window, half, hint)}
	}
	slack := 1e-9 * half
	if r.Searched {
		slack = 0.5
	}
	if err := tooFew(slack); err != nil {
		return nil, err
	}
	present := func(f0 float64) int {
		kp := 0
		for j := 1; j <= k && float64(j)*f0 < nyquist-margin; j++ {
			kp = j
		}
		return kp
	}
	kp := present(r.FundamentalHz)
	if kp == 0 {
		return nil, &SettingsError{fmt.Sprintf("the fundamental found at %.6g Hz is not below the Nyquist frequency %.6g Hz by half the %s window's main lobe (%.3g Hz); accepted: a signal sampled at more than twice its frequency, with margin", r.FundamentalHz, nyquist, s.Window, margin)}
	}
	theta := 2 * math.Pi * r.FundamentalHz / fs
	var f *fitResult
	var err error
	if r.Searched {
		f, r.Passes, err = refine(x, lsWeights, theta, kp)
		if err == nil {
			r.FundamentalHz = f.theta * fs / (2 * math.Pi)
			if err := tooFew(1e-9 * half); err != nil {
				return nil, err
			}
			if kp2 := present(r.FundamentalHz); kp2 != kp || negative {
				kp = kp2
				f, err = fit(x, weights, f.theta, kp)
				r.Passes++
			}
		}
	} else {
		f, err = fit(x, weights, theta, kp)
		r.Passes = 1
	}
	if errors.Is(err, errSingular) {
		return nil, fmt.Errorf("%w at %.6g Hz with the %s window (%.3g periods, %d harmonics)", err, r.FundamentalHz, s.Window, r.Periods, kp)
	}
	if err != nil {
		return nil, err
	}
	if kp == 0 {
		return nil, fmt.Errorf("the fundamental, refined to %.6g Hz, lies within half the %s window's main lobe of the Nyquist frequency", r.FundamentalHz, s.Window)
	}
	res := residual(x, f)
	noiseMS := weightedMeanSquare(res, lsWeights)
	r.Passes++

	r.Harmonics = make([]Harmonic, k+1)
	r.Harmonics[0] = Harmonic{Order: 0, Present: true, AmplitudeV: f.dc, PhaseDeg: math.NaN(), DBc: math.NaN()}
	a1 := math.Hypot(f.a[1], f.b[1])
	var distortion float64
	for j := 1; j <= k; j++ {
		h := Harmonic{Order: j, FrequencyHz: float64(j) * r.FundamentalHz, AmplitudeV: math.NaN(), PhaseDeg: math.NaN(), DBc: math.NaN()}
		if j <= kp {
			h.Present = true
			h.AmplitudeV = math.Hypot(f.a[j], f.b[j])
			h.PhaseDeg = math.Atan2(-f.b[j], f.a[j]) * 180 / math.Pi
			if h.PhaseDeg == -180 {
				h.PhaseDeg = 180
			}
			h.DBc = 20 * math.Log10(h.AmplitudeV/a1)
			if j >= 2 {
				distortion += h.AmplitudeV * h.AmplitudeV
			}
		}
		r.Harmonics[j] = h
	}
	r.THDPercent, r.THDdB = math.NaN(), math.NaN()
	if kp >= 2 {
		thd := math.Sqrt(distortion) / a1
		r.THDPercent, r.THDdB = 100*thd, 20*math.Log10(thd)
	}
	pnd := distortion/2 + noiseMS
	r.NoiseDistortionRMS = math.Sqrt(pnd)
	r.NoiseRMS = math.Sqrt(noiseMS)
	r.SINADdB = 10 * math.Log10(a1*a1/2/pnd)
	r.NoiseDensity = noiseDensity(transform(res, weights, 0), n, fs, r.FundamentalHz, half, sw2)
	return r, nil
}

// residual returns r[n] = x[n] - c - Σ_k (a_k cos(kθn) + b_k sin(kθn)).
func residual(x []float64, f *fitResult) []float64 {
	k := len(f.a) - 1
	r := make([]float64, len(x))
	for i, v := range x {
		s1, c1 := math.Sincos(f.theta * float64(i))
		c, s := c1, s1
		model := f.dc
		for j := 1; j <= k; j++ {
			model += f.a[j]*c + f.b[j]*s
			c, s = c*c1-s*s1, s*c1+c*s1
		}
		r[i] = v - model
	}
	return r
}

// weightedMeanSquare returns Σ w r² / Σ w, computed from the residual
// itself rather than from the normal equations, whose subtraction loses
// the floor of a clean record to rounding.
func weightedMeanSquare(r, w []float64) float64 {
	var num, den float64
	for i, v := range r {
		num += w[i] * v * v
		den += w[i]
	}
	return num / den
}

// noiseDensity estimates the one-sided noise floor in V/√Hz from the
// median bin power of the spectrum of the fit's residual (see
// Result.NoiseDensity): with DC and harmonics 1..K subtracted, their
// leakage cannot raise the floor, whatever the window.
// Bins within the main-lobe half-width (plus one bin) of DC, of the
// Nyquist frequency or of any harmonic of f0 below it are left out.
func noiseDensity(spec []complex128, n int, fs, f0, half, sw2 float64) float64 {
	m := len(spec)
	pad := float64(m) / float64(n)
	guard := half*pad + 1 // in bins of the padded transform
	keep := make([]bool, m/2+1)
	for i := range keep {
		keep[i] = float64(i) > guard && float64(m/2-i) > guard
	}
	binHz := fs / float64(m)
	for j := 1; float64(j)*f0 < fs/2; j++ {
		c := float64(j) * f0 / binHz
		for i := max(0, int(math.Ceil(c-guard))); i <= min(m/2, int(math.Floor(c+guard))); i++ {
			keep[i] = false
		}
	}
	var p []float64
	for i, ok := range keep {
		if ok {
			p = append(p, sqAbs(spec[i]))
		}
	}
	// Bins of a zero-padded transform are correlated in groups of about
	// pad, so ask for a dozen independent ones.
	if float64(len(p)) < 12*pad {
		return math.NaN()
	}
	slices.Sort(p)
	med := p[len(p)/2]
	return math.Sqrt(2 * med / math.Ln2 / (fs * sw2))
}
