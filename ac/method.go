package ac

import (
	"math"

	"qpoint/smallsignal"
)

// The names a Steady carries in Method.
const (
	MethodShooting        = "shooting"
	MethodHarmonicBalance = "harmonic balance"
)

// SteadyMethod is a way of solving for the periodic (or, with two tones,
// quasi-periodic) steady state. SteadyState uses it when
// SteadySettings.Method is set; shooting, in this package, is the default,
// and package balance supplies harmonic balance and the automatic choice
// between the two. SolveSteady receives the settings SteadyState was
// given, Method included, and returns a Steady whose Method names what
// ran.
type SteadyMethod interface {
	SolveSteady(nw *smallsignal.Network, d Drive, s SteadySettings) (*Steady, error)
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
func (s *Steady) Product(m, n int) (ToneProduct, bool) {
	for _, p := range s.Products {
		if (p.Orders[0] == m && p.Orders[1] == n) || (p.Orders[0] == -m && p.Orders[1] == -n) {
			return p, true
		}
	}
	return ToneProduct{}, false
}

// IM2dBc returns the two-tone output at |f2 - f1| relative to the output
// at f1, in dB (NaN for one tone), as Estimate.IM2dBc does.
func (s *Steady) IM2dBc() float64 { return s.relative(-1, 1) }

// IM3dBc returns the two-tone output at 2 f1 - f2 relative to the output
// at f1, in dB (NaN for one tone), as Estimate.IM3dBc does.
func (s *Steady) IM3dBc() float64 { return s.relative(2, -1) }

func (s *Steady) relative(m, n int) float64 {
	f1, ok1 := s.Product(1, 0)
	p, ok2 := s.Product(m, n)
	if !ok1 || !ok2 {
		return math.NaN()
	}
	return 20 * math.Log10(p.Amplitude/f1.Amplitude)
}
