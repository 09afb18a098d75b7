package plan

import (
	"fmt"
	"math"
	"math/cmplx"

	"qpoint/ac"
	"qpoint/ac/balance"
	"qpoint/ac/steady"
	"qpoint/smallsignal"
)

// DistortionRequest says what a distortion run computes beside the
// Volterra estimate and the one-tone waveform at the drive's level.
type DistortionRequest struct {
	// Waveform solves the waveforms at the drive's level (one tone, and
	// both tones with TwoTone); Sweep solves the validity search and the
	// level sweeps. Zero values take steady.Settings' defaults.
	Waveform, Sweep steady.Settings
	// TwoTone solves the waveform under both tones too, when the drive
	// has a second tone, and sweeps both tones over Levels.
	TwoTone bool
	// Validity searches the level up to which the estimate stays within
	// 0.5 dB of the waveform, within 40 dB either side of the drive's.
	Validity bool
	// Levels, in dBm of available power per tone, rising, is a level
	// sweep of the waveform; none when empty. At a detector's output it
	// also gives the transfer curve, with the tangential sensitivity
	// over the video band VideoHz (zero: DefaultVideoFromHz to
	// DefaultVideoToHz).
	Levels  []float64
	VideoHz [2]float64
	// Progress, when not nil, starts a report on a stage of n steps
	// ("level sweep", "two-tone sweep") and returns the function the
	// stage calls as it goes and the one it calls when it ends.
	Progress func(stage string, n int) (update func(done, total int), end func())
}

// Distortion is what a distortion run found. A part not asked for, or
// not reached, is nil (NaN for numbers); a part that failed without
// stopping the run holds its error beside it.
type Distortion struct {
	// Estimate is the Volterra estimate under the drive, both tones when
	// there are two; OneTone is its one-tone part.
	Estimate, OneTone *ac.Estimate
	// Waveform is the steady state under the first tone alone, at the
	// drive's level; TwoTone the one under both tones.
	Waveform, TwoTone *steady.State
	// Comparison sets the estimate beside the waveform, order by order.
	Comparison []steady.Comparison
	// Validity is the small-signal limit (with Request.Validity).
	Validity    *steady.Validity
	ValidityErr error
	// Sweep is the level sweep, as far as it got: SweepErr says why it
	// stopped early.
	Sweep    []steady.LevelPoint
	SweepErr error
	// CompressionDBm is the 1 dB compression point found in the sweep,
	// when Compressed.
	CompressionDBm float64
	Compressed     bool
	// Transfer is a detector's transfer curve from the sweep (nil when
	// the output is not a detector's, or the sweep too short), and
	// TangentialDBm its tangential sensitivity over the video band (NaN
	// when it cannot be found).
	// TransferErr says why a detector's sensitivity could not be found.
	Transfer      *steady.Transfer
	TangentialDBm float64
	TransferErr   error
	// TwoToneSweep sweeps both tones over the levels; Intercept is the
	// third-order intercept measured from it, or InterceptErr why not.
	TwoToneSweep    []steady.LevelPoint
	TwoToneSweepErr error
	Intercept       *steady.Intercept
	InterceptErr    error
}

// RunDistortion estimates the distortion of the linearised circuit nw
// under the drive d and checks it against the waveform, then does what r
// asks beside. It fails when the estimate or a waveform at the drive's
// level cannot be found, returning what it had: a Distortion holding the
// estimate, and the error naming the waveform.
func RunDistortion(nw *smallsignal.Network, d *Drive, r DistortionRequest) (*Distortion, error) {
	r.Waveform.Method = ForElements(nw, r.Waveform.Method)
	r.Sweep.Method = ForElements(nw, r.Sweep.Method)
	res := &Distortion{TangentialDBm: math.NaN()}
	var err error
	if res.Estimate, err = ac.Volterra(nw, d.Drive); err != nil {
		return nil, err
	}
	res.OneTone = res.Estimate.OneTone()
	one := d.OneTone()
	if res.Waveform, err = steady.Solve(nw, one, r.Waveform); err != nil {
		return res, &WaveformError{What: "waveform", LevelDBm: d.LevelDBm, Err: err}
	}
	res.Comparison = steady.Compare(res.OneTone, res.Waveform)
	if r.TwoTone && d.SecondToneHz != 0 {
		if res.TwoTone, err = steady.Solve(nw, d.Drive, r.Waveform); err != nil {
			return res, &WaveformError{What: "two-tone waveform", LevelDBm: d.LevelDBm, Err: err}
		}
	}
	if r.Validity {
		res.Validity, res.ValidityErr = steady.ValidityLimit(nw, one, d.LevelDBm-40, d.LevelDBm+40, 0.5, r.Sweep)
		if res.ValidityErr != nil {
			res.Validity = nil
		}
	}
	if len(r.Levels) == 0 {
		return res, nil
	}
	res.Sweep, res.SweepErr = levelSweep(nw, one, r, "level sweep")
	if len(res.Sweep) > 0 {
		gain := cmplx.Abs(res.OneTone.Linear) / res.OneTone.Drive.EMF
		res.CompressionDBm, res.Compressed = steady.Compression(res.Sweep, gain)
	}
	res.Transfer, res.TangentialDBm, res.TransferErr = transferOf(nw, d, res.Sweep, r.VideoHz)
	if res.TwoTone != nil {
		res.TwoToneSweep, res.TwoToneSweepErr = levelSweep(nw, d.Drive, r, "two-tone sweep")
		z0 := 0.0
		if d.Drive.Output.Port >= 0 {
			z0 = nw.Ports[d.Drive.Output.Port].Impedance
		}
		res.Intercept, res.InterceptErr = steady.MeasuredIntercept(res.TwoToneSweep, z0)
	}
	return res, nil
}

// ForElements returns the steady-state method for nw when the request
// names m: m itself, or, when m is nil (shooting) and nw holds lines or
// measured blocks, which shooting cannot carry, harmonic balance by the
// automatic choice.
func ForElements(nw *smallsignal.Network, m steady.Method) steady.Method {
	if m == nil && nw.HasElements() {
		return balance.Method{Choice: balance.Auto}
	}
	return m
}

// MaxPredictedHarmonic is the highest harmonic PredictHarmonics solves.
const MaxPredictedHarmonic = 25

// PredictHarmonics solves the steady state of nw under drive's first tone
// alone to the given harmonic (at most MaxPredictedHarmonic), as a
// capture at the drive's frequency is set beside it; harmonic balance
// when the network holds lines or blocks (ForElements).
func PredictHarmonics(nw *smallsignal.Network, drive ac.Drive, harmonics int) (*steady.State, error) {
	k := min(harmonics, MaxPredictedHarmonic)
	drive.SecondToneHz = 0
	return steady.Solve(nw, drive, steady.Settings{Harmonics: k, Samples: max(255, 8*k+1), Method: ForElements(nw, nil)})
}

// WaveformError is a waveform at the drive's level that could not be
// solved.
type WaveformError struct {
	What     string // "waveform" or "two-tone waveform"
	LevelDBm float64
	Err      error
}

func (e *WaveformError) Error() string {
	per := ""
	if e.What == "two-tone waveform" {
		per = " per tone"
	}
	return fmt.Sprintf("%s at %.1f dBm%s: %v", e.What, e.LevelDBm, per, e.Err)
}

func (e *WaveformError) Unwrap() error { return e.Err }

// levelSweep sweeps the drive over r.Levels, reporting progress.
func levelSweep(nw *smallsignal.Network, d ac.Drive, r DistortionRequest, stage string) ([]steady.LevelPoint, error) {
	var update func(done, total int)
	if r.Progress != nil {
		var end func()
		update, end = r.Progress(stage, len(r.Levels))
		defer end()
	}
	return steady.LevelSweep(nw, d, r.Levels, r.Sweep, update)
}

// transferOf is a detector's transfer curve from the sweep and its
// tangential sensitivity over the video band; nil and NaN when the output
// is not a detector's, the sweep is shorter than three levels or the
// curve cannot be drawn from it; an error when the detector's
// sensitivity cannot be found.
func transferOf(nw *smallsignal.Network, d *Drive, sweep []steady.LevelPoint, videoHz [2]float64) (*steady.Transfer, float64, error) {
	path := ac.NoiseSettings{Input: d.Drive.Input, Output: d.Drive.Output}
	if len(sweep) < 3 || !ac.Detects(nw, path, d.FrequencyHz) {
		return nil, math.NaN(), nil
	}
	if videoHz == [2]float64{} {
		videoHz = [2]float64{DefaultVideoFromHz, DefaultVideoToHz}
	}
	gamma, err := ac.VoltageSensitivity(nw, path, d.FrequencyHz)
	if err != nil {
		return nil, math.NaN(), err
	}
	t, err := steady.DetectorTransfer(sweep, gamma)
	if err != nil {
		return nil, math.NaN(), nil
	}
	tss := math.NaN()
	if det, err := ac.Detector(nw, path, d.FrequencyHz, videoHz[0], videoHz[1]); err == nil {
		tss = det.TangentialDBm()
	}
	return t, tss, nil
}

// Outside returns the range cautions of a distortion run: the
// waveform's (harmonic balance sees every product it solved), else the
// estimate's.
func (d *Distortion) Outside() []smallsignal.OutsideRange {
	if d.Waveform != nil && len(d.Waveform.Outside) > 0 {
		return d.Waveform.Outside
	}
	return d.Estimate.Outside
}
