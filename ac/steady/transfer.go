package steady

import (
	"errors"
	"math"
)

// TransferPoint is a detector's output at one input level.
type TransferPoint struct {
	LevelDBm float64 // available input power
	// Volts is the change of the output's DC level from the waveform
	// (signed: negative for a detector whose output falls).
	Volts float64
	// DeviationDB is how far the output lies from the low-level square-law
	// line V = γ P, in decibels of power: 10 log10(V / (γ P)). In square
	// law the output voltage follows the power, so a deviation of 1 dB
	// reads as a 1 dB error of the power it indicates (common practice).
	DeviationDB float64
}

// Transfer is a detector's transfer curve, the output DC voltage against
// the available input power, from the steady-state waveform at each level,
// set against the square-law line of its small-signal voltage sensitivity.
type Transfer struct {
	Points []TransferPoint
	// SensitivityVPerW is γ, the square-law slope V/P (VoltageSensitivity):
	// the line the curve follows at low level.
	SensitivityVPerW float64
	// LowSlope and HighSlope are the log-log slopes d ln|V| / d ln P over
	// the first and the last two points: 1 in square law, near 1/2 where
	// the detector has become linear (peak detection).
	LowSlope, HighSlope float64
	// DeviationDBm is the input level at which the curve first departs 1 dB
	// from square law, interpolated between sweep points; NaN when the
	// sweep does not reach it (or starts beyond it).
	DeviationDBm float64
}

// ErrTooFewLevels reports a level sweep too short for a transfer curve.
var ErrTooFewLevels = errors.New("a transfer curve needs at least three solved levels")

// DetectorTransfer returns the transfer curve of a detector from a level
// sweep of its output (LevelSweep) and its voltage sensitivity γ in V/W
// (VoltageSensitivity, the Volterra DC shift per available watt). The
// square-law region is where V = γ P holds; the level where the waveform
// departs from it by 1 dB bounds the detector's square-law range (common
// practice; Cowley and Sorensen, IEEE Trans. MTT 14(12), 1966, for γ).
func DetectorTransfer(points []LevelPoint, gamma float64) (*Transfer, error) {
	t := &Transfer{SensitivityVPerW: gamma, DeviationDBm: math.NaN(), LowSlope: math.NaN(), HighSlope: math.NaN()}
	for _, p := range points {
		if p.Steady == nil || len(p.Steady.Output) == 0 {
			continue
		}
		v := p.Steady.Output[0].Amplitude
		pw := math.Pow(10, p.LevelDBm/10) * 1e-3
		t.Points = append(t.Points, TransferPoint{LevelDBm: p.LevelDBm, Volts: v, DeviationDB: 10 * math.Log10(v/(gamma*pw))})
	}
	n := len(t.Points)
	if n < 3 {
		return t, ErrTooFewLevels
	}
	slope := func(a, b TransferPoint) float64 {
		return math.Log(math.Abs(b.Volts/a.Volts)) / (math.Ln10 * (b.LevelDBm - a.LevelDBm) / 10)
	}
	t.LowSlope = slope(t.Points[0], t.Points[1])
	t.HighSlope = slope(t.Points[n-2], t.Points[n-1])
	for i, p := range t.Points {
		d := math.Abs(p.DeviationDB)
		if !(d >= 1) {
			continue
		}
		if i == 0 {
			break // already beyond square law at the lowest level
		}
		q := t.Points[i-1]
		dq := math.Abs(q.DeviationDB)
		t.DeviationDBm = q.LevelDBm + (1-dq)/(d-dq)*(p.LevelDBm-q.LevelDBm)
		break
	}
	return t, nil
}

// DynamicRangeDB returns the span from the tangential sensitivity
// tssDBm to the 1 dB square-law deviation, in dB; NaN when either is
// unknown.
func (t *Transfer) DynamicRangeDB(tssDBm float64) float64 {
	return t.DeviationDBm - tssDBm
}
