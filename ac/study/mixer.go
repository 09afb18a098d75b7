package study

import (
	"errors"
	"math"

	"qpoint/ac/mixer"
	"qpoint/smallsignal"
)

// MixerFigures are a mixer's figures under its LO at one step
// (mixer.Analyze); NaN where the analysis failed, Err saying why. A step
// whose LO drive takes a junction past its breakdown knee keeps its
// figures and says so in Breakdown.
type MixerFigures struct {
	ConversionLossDB float64
	NoiseFigureSSBDB float64
	NoiseFigureDSBDB float64
	LOAbsorbedDBm    float64 // the LO power the mixer takes
	Breakdown        bool
	Err              error
}

func mixerFigures(nw *smallsignal.Network, s mixer.Settings) *MixerFigures {
	nan := math.NaN()
	f := &MixerFigures{ConversionLossDB: nan, NoiseFigureSSBDB: nan, NoiseFigureDSBDB: nan, LOAbsorbedDBm: nan}
	r, err := mixer.Analyze(nw, s)
	var be *mixer.BreakdownError
	f.Breakdown = errors.As(err, &be)
	if r == nil {
		f.Err = err
		return f
	}
	f.ConversionLossDB, f.NoiseFigureSSBDB, f.NoiseFigureDSBDB = r.ConversionLossDB, r.Noise.FigureSSBDB, r.Noise.FigureDSBDB
	if r.LO.AbsorbedW > 0 {
		f.LOAbsorbedDBm = 10 * math.Log10(r.LO.AbsorbedW*1e3)
	}
	return f
}
