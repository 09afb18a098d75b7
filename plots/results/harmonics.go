package results

import (
	"qpoint/ac/measure"
	"qpoint/ac/steady"
)

// CaptureHarmonic is one harmonic measured on a captured waveform.
type CaptureHarmonic struct {
	Order     int    `json:"order"`
	Frequency Number `json:"frequency"`
	Amplitude Number `json:"amplitude"`
	Phase     Number `json:"phase"`
	DBc       Number `json:"dbc"`
}

// Harmonics is `harmonics --json`: the capture's fundamental, harmonics, THD and SINAD.
type Harmonics struct {
	File                  string            `json:"file"`
	Samples               int               `json:"samples"`
	SampleRate            Number            `json:"sample_rate"`
	StartTime             Number            `json:"start_time"`
	Window                string            `json:"window"`
	Fundamental           Number            `json:"fundamental"`
	FundamentalSearched   bool              `json:"fundamental_searched"`
	Periods               Number            `json:"periods"`
	Harmonics             []CaptureHarmonic `json:"harmonics"`
	THDPercent            Number            `json:"thd_percent"`
	THDdB                 Number            `json:"thd_db"`
	SINADdB               Number            `json:"sinad_db"`
	NoiseAndDistortionRMS Number            `json:"noise_and_distortion_rms"`
	NoiseRMS              Number            `json:"noise_rms"`
	NoiseDensity          Number            `json:"noise_density"`
	Prediction            *Waveform         `json:"prediction,omitempty"`
	// SampleRateUncertainty is the relative uncertainty of the sample
	// rate from the time column's resolution (0 when given outright).
	SampleRateUncertainty Number `json:"sample_rate_uncertainty"`
}

// HarmonicsOf returns the document of the waveform w read from path and
// its analysis r, with the circuit's predicted waveform when pred is not
// nil.
func HarmonicsOf(path string, w *measure.Waveform, r *measure.Result, pred *steady.State) *Harmonics {
	d := &Harmonics{
		File: path, Samples: r.Samples, SampleRate: Number(r.SampleRateHz), StartTime: Number(w.StartS),
		Window: r.Window.String(), Fundamental: Number(r.FundamentalHz), FundamentalSearched: r.Searched,
		Periods: Number(r.Periods), THDPercent: Number(r.THDPercent), THDdB: Number(r.THDdB),
		SINADdB: Number(r.SINADdB), NoiseAndDistortionRMS: Number(r.NoiseDistortionRMS),
		NoiseRMS: Number(r.NoiseRMS), NoiseDensity: Number(r.NoiseDensity),
		SampleRateUncertainty: Number(w.RateUncertainty),
	}
	for _, h := range r.Harmonics {
		d.Harmonics = append(d.Harmonics, CaptureHarmonic{Order: h.Order, Frequency: Number(h.FrequencyHz),
			Amplitude: Number(h.AmplitudeV), Phase: Number(h.PhaseDeg), DBc: Number(h.DBc)})
	}
	if pred != nil {
		d.Prediction = WaveformOf(pred)
	}
	return d
}
