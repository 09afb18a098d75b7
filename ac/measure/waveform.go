package measure

import (
	"fmt"
	"math"
)

// Waveform is a record of uniformly spaced samples.
type Waveform struct {
	SampleRateHz float64   // fs, samples per second
	StartS       float64   // t0, the time of the first sample, s
	Samples      []float64 // x[n] at t0 + n/fs, volts
	// RateUncertainty is the relative uncertainty of SampleRateHz when it
	// comes from a time column: the spacing of float64 numbers at the
	// largest time stamp over the record's span. Every frequency read
	// from the record carries it. Zero for a rate given outright.
	RateUncertainty float64
}

// RateUncertaintyLimit is the relative sample-rate uncertainty above which
// a reader of the record is warned: where time stamps carry an offset so
// large that float64 (or the digits written) no longer resolve their step
// well, frequencies can be off by more than a part per million.
const RateUncertaintyLimit = 1e-6

// DurationS is the record length N/fs: the span one period of the
// periodic extension covers, as the transform sees it.
func (w *Waveform) DurationS() float64 { return float64(len(w.Samples)) / w.SampleRateHz }

// Sample rates accepted: wide enough for a data logger taking a sample a
// day and for a sampling oscilloscope, narrow enough that no frequency
// computed from them is subnormal or overflows.
const (
	MinSampleRateHz = 1e-9
	MaxSampleRateHz = 1e18
)

// maxMagnitude bounds sample values so that sums of squares over a whole
// record cannot overflow.
const maxMagnitude = 1e100

// check reports what makes a waveform unusable for analysis.
func (w *Waveform) check() error {
	if w == nil {
		return fmt.Errorf("no waveform")
	}
	if !(w.SampleRateHz >= MinSampleRateHz && w.SampleRateHz <= MaxSampleRateHz) {
		return fmt.Errorf("sample rate %g Hz; accepted: %g Hz to %g Hz", w.SampleRateHz, MinSampleRateHz, MaxSampleRateHz)
	}
	if n := len(w.Samples); n < MinSamples || n > MaxSamples {
		return fmt.Errorf("%d samples; accepted: %d to %d", n, MinSamples, MaxSamples)
	}
	for i, v := range w.Samples {
		if !(math.Abs(v) <= maxMagnitude) {
			return fmt.Errorf("sample %d is %g; accepted: finite values within ±%g V", i, v, maxMagnitude)
		}
	}
	return nil
}
