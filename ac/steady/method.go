package steady

import (
	"math"

	"qpoint/ac"
	"qpoint/smallsignal"
)

// The names a Steady carries in Method.
const (
	MethodShooting        = "shooting"
	MethodHarmonicBalance = "harmonic balance"
)

// Method is a way of solving for the periodic (or, with two tones,
// quasi-periodic) steady state. Solve uses it when
// Settings.Method is set; shooting, in this package, is the default,
// and package balance supplies harmonic balance and the automatic choice
// between the two. SolveSteady receives the settings Solve was
// given, Method included, and returns a Steady whose Method names what
// ran.
type Method interface {
	SolveSteady(nw *smallsignal.Network, d ac.Drive, s Settings) (*State, error)
}

// ToneProduct is the output at one mixing product m·f1 + n·f2 of a
// two-tone steady state: Orders = (m, n), with the frequency non-negative.
// Order (0, 0) is the change of the output's DC level.
type ToneProduct struct {
	Orders      [2]int
	FrequencyHz float64
	Amplitude   float64 // peak volts; order (0, 0): the signed DC shift
	PhaseDeg    float64 // of the cosine phasor
	Phasor      complex128
}

// Product returns the output at m·f1 + n·f2 (or its mirror -m, -n, the
// same frequency) and false when the steady state holds no such product.
func (s *State) Product(m, n int) (ToneProduct, bool) {
	for _, p := range s.Products {
		if (p.Orders[0] == m && p.Orders[1] == n) || (p.Orders[0] == -m && p.Orders[1] == -n) {
			return p, true
		}
	}
	return ToneProduct{}, false
}

// IM2dBc returns the two-tone output at |f2 - f1| relative to the output
// at f1, in dB (NaN for one tone), as Estimate.IM2dBc does.
func (s *State) IM2dBc() float64 { return s.relative(-1, 1) }

// IM3dBc returns the two-tone output at 2 f1 - f2 relative to the output
// at f1, in dB (NaN for one tone), as Estimate.IM3dBc does.
func (s *State) IM3dBc() float64 { return s.relative(2, -1) }

func (s *State) relative(m, n int) float64 {
	f1, ok1 := s.Product(1, 0)
	p, ok2 := s.Product(m, n)
	if !ok1 || !ok2 {
		return math.NaN()
	}
	return 20 * math.Log10(p.Amplitude/f1.Amplitude)
}

// FinishHarmonics marks the output harmonics that lie below the steady
// state's rounding floor (NoiseFloor, and dcFloorRel of scale for the DC
// shift) and computes THD from those above it, as every method's Steady
// reports them; scale is the circuit's voltage scale, the larger of the
// drive's EMF and the DC node voltages.
func (s *State) FinishHarmonics(scale float64) {
	// Readings below the floor are rounding: a -200 dBm drive once
	// showed 6 % THD and HD3 at -28 dBc of nothing but that.
	for i := range s.Output {
		s.Output[i].BelowFloor = s.Output[i].Amplitude < s.NoiseFloor
	}
	if len(s.Output) == 0 {
		return
	}
	// The DC shift is the small difference of the waveform's mean and
	// the bias: its rounding runs higher (measured up to 2e-11 of the
	// voltage scale on the detector demo at -200 to -100 dBm).
	// The shift is signed: compare its size.
	s.Output[0].BelowFloor = math.Abs(s.Output[0].Amplitude) < dcFloorRel*scale
	s.THDPercent, s.THDBelowPercent = math.NaN(), 0
	if len(s.Output) < 2 {
		return
	}
	var sum float64
	above := 0
	for _, h := range s.Output[2:] {
		if !h.BelowFloor {
			sum += h.Amplitude * h.Amplitude
			above++
		}
	}
	if a1 := s.Output[1].Amplitude; a1 > 0 && !s.Output[1].BelowFloor {
		if above > 0 {
			s.THDPercent = 100 * math.Sqrt(sum) / a1
		} else {
			s.THDBelowPercent = 100 * math.Sqrt(float64(len(s.Output)-2)) * s.NoiseFloor / a1
		}
	}
}
