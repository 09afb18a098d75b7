package transient

import (
	"fmt"
	"math"
	"sort"

	"qpoint/bias/si"
)

// Source is the EMF of the input port's generator as a function of time,
// e(t), in volts behind the port's reference impedance. It must be
// continuous; its slope may jump only at its breakpoints, where the
// integrator ends a step.
type Source interface {
	// EMF returns e(t).
	EMF(t float64) float64
	// NextBreak returns the first breakpoint strictly after t, +Inf when
	// there is none.
	NextBreak(t float64) float64
	// MaxStep returns the longest step that may start at t (a fraction of
	// the period of what is oscillating then), +Inf for no limit.
	MaxStep(t float64) float64
	// Timescale returns the period of the source's fastest oscillation,
	// zero when it has none. The step control remembers each unknown's
	// excursion for a few of these.
	Timescale() float64
}

// PiecewiseLinear is the EMF through the points (Times[i], Values[i]),
// joined by straight lines and constant beyond the ends. Times must rise.
type PiecewiseLinear struct {
	Times, Values []float64
}

// EMF implements Source.
func (p PiecewiseLinear) EMF(t float64) float64 {
	n := len(p.Times)
	switch {
	case n == 0:
		return 0
	case t <= p.Times[0]:
		return p.Values[0]
	case t >= p.Times[n-1]:
		return p.Values[n-1]
	}
	i := sort.SearchFloat64s(p.Times, t) // Times[i-1] < t <= Times[i]
	t0, t1 := p.Times[i-1], p.Times[i]
	return p.Values[i-1] + (p.Values[i]-p.Values[i-1])*(t-t0)/(t1-t0)
}

// NextBreak implements Source.
func (p PiecewiseLinear) NextBreak(t float64) float64 {
	i := sort.Search(len(p.Times), func(i int) bool { return p.Times[i] > t })
	if i == len(p.Times) {
		return math.Inf(1)
	}
	return p.Times[i]
}

// MaxStep implements Source: no limit.
func (PiecewiseLinear) MaxStep(float64) float64 { return math.Inf(1) }

// Timescale implements Source: none.
func (PiecewiseLinear) Timescale() float64 { return 0 }

// check says whether the points can drive a run.
func (p PiecewiseLinear) check() error {
	if len(p.Times) != len(p.Values) {
		return fmt.Errorf("%d times for %d values", len(p.Times), len(p.Values))
	}
	for i := range p.Times {
		if math.IsNaN(p.Times[i]) || math.IsInf(p.Times[i], 0) || math.IsNaN(p.Values[i]) || math.IsInf(p.Values[i], 0) {
			return fmt.Errorf("point %d is not finite", i+1)
		}
		if i > 0 && !(p.Times[i] > p.Times[i-1]) {
			return fmt.Errorf("times must rise; point %d is at %g s after %g s", i+1, p.Times[i], p.Times[i-1])
		}
	}
	return nil
}

// Edge shapes. The rise and fall of a pulse are given as 10-90 % times of
// its amplitude (IEEE Std 181-2011, "IEEE Standard for Transitions,
// Pulses, and Related Waveforms"); the amplitude ramps linearly, so each
// ramp lasts 1.25 times its 10-90 % time.
const (
	rampPer1090 = 1 / 0.8
	// minStepsPerPeriod bounds the step while an oscillation is on: the
	// error control alone could stride over a period's detail it has not
	// yet seen.
	minStepsPerPeriod = 12
)

// Pulse is a pulsed carrier with an optional probe tone:
//
//	e(t) = E a(t) cos(2π f_c (t - t_k)) + E_p cos(2π f_p t),
//
// where t_k is the start of pulse k and the envelope a(t) ramps linearly
// from 0 to 1 over 1.25 × Rise, holds 1, and ramps back to 0 over 1.25 ×
// Fall, so that Rise and Fall are 10-90 % times and Width lies between the
// 50 % points of the two edges (IEEE Std 181-2011). The probe runs from
// t = 0 throughout; a probe of zero EMF is none.
type Pulse struct {
	CarrierHz  float64 // f_c
	CarrierEMF float64 // E, peak volts of the carrier at full amplitude
	Delay      float64 // start of the first pulse's rise
	Width      float64 // between the 50 % points, s
	Rise       float64 // 10-90 %, s
	Fall       float64 // 10-90 %, s
	// Period is the repetition interval; zero for a single pulse.
	Period float64
	// Count is the number of pulses; zero means one.
	Count int

	ProbeHz  float64 // f_p
	ProbeEMF float64 // E_p, peak volts
}

// RequestError is a pulse that cannot be run as asked: Field names the
// setting ("carrier", "width", "rise", "fall", "period", "count",
// "probe", "level"), Message what is wrong and what is accepted.
type RequestError struct {
	Field   string
	Message string
}

func (e *RequestError) Error() string { return e.Field + ": " + e.Message }

func requestf(field, format string, args ...any) error {
	return &RequestError{Field: field, Message: fmt.Sprintf(format, args...)}
}

// Check returns a *RequestError for a pulse that cannot be run: a carrier
// outside 1 mHz to 1 THz, a pulse shorter than a carrier period, an edge
// shorter than half a carrier period (its ramp would not be smooth at the
// carrier's scale) or longer than the width, edges that leave no flat
// top, a period that does not hold the whole pulse.
func (p Pulse) Check() error {
	bad := func(v float64) bool { return math.IsNaN(v) || math.IsInf(v, 0) }
	if bad(p.CarrierHz) || p.CarrierHz < 1e-3 || p.CarrierHz > 1e12 {
		return requestf("carrier", "%g Hz; accepted: a frequency from 1 mHz to 1 THz", p.CarrierHz)
	}
	if bad(p.CarrierEMF) || p.CarrierEMF < 0 {
		return requestf("level", "EMF %g V; accepted: a finite level", p.CarrierEMF)
	}
	tc := 1 / p.CarrierHz
	cycle := si.Format(tc, "s", 4)
	for _, v := range []struct {
		name string
		x    float64
	}{{"width", p.Width}, {"rise", p.Rise}, {"fall", p.Fall}, {"period", p.Period}, {"delay", p.Delay}} {
		if bad(v.x) || v.x < 0 {
			return requestf(v.name, "%g s; accepted: a finite time, not negative", v.x)
		}
	}
	if p.Width < tc {
		return requestf("width", "%s is shorter than one period of the %s carrier (%s); accepted: a width of at least one carrier period",
			si.Format(p.Width, "s", 4), si.Format(p.CarrierHz, "Hz", 4), cycle)
	}
	for _, e := range []struct {
		name string
		x    float64
	}{{"rise", p.Rise}, {"fall", p.Fall}} {
		if e.x < tc/2 {
			return requestf(e.name, "%s is shorter than half a carrier period (%s); accepted: an edge of at least half a carrier period (the edges are linear ramps of the carrier's amplitude)",
				si.Format(e.x, "s", 4), si.Format(tc/2, "s", 4))
		}
		if e.x > p.Width {
			return requestf(e.name, "%s is longer than the width %s; accepted: an edge no longer than the width",
				si.Format(e.x, "s", 4), si.Format(p.Width, "s", 4))
		}
	}
	if p.flat() < 0 {
		return requestf("rise", "the edges (%s and %s from 10 to 90 %%, ramps of %s and %s) leave no flat top within the %s width; accepted: rise + fall up to 1.6 × the width",
			si.Format(p.Rise, "s", 3), si.Format(p.Fall, "s", 3), si.Format(p.Rise*rampPer1090, "s", 3), si.Format(p.Fall*rampPer1090, "s", 3), si.Format(p.Width, "s", 3))
	}
	if p.Count < 0 || p.Count > 1000 {
		return requestf("count", "%d pulses; accepted: 1 to 1000", p.Count)
	}
	if p.Period == 0 && p.Count > 1 {
		return requestf("period", "%d pulses need a period; accepted: a period of at least the pulse's whole length", p.Count)
	}
	if p.Period != 0 {
		if p.Period < p.Width {
			return requestf("period", "%s is shorter than the width %s; accepted: a period longer than the pulse",
				si.Format(p.Period, "s", 4), si.Format(p.Width, "s", 4))
		}
		if p.Period < p.length() {
			return requestf("period", "%s does not hold the whole pulse (%s from the start of its rise to the end of its fall); accepted: a period of at least %s",
				si.Format(p.Period, "s", 4), si.Format(p.length(), "s", 4), si.Format(p.length(), "s", 4))
		}
	}
	if p.ProbeEMF != 0 {
		if bad(p.ProbeEMF) || p.ProbeEMF < 0 {
			return requestf("probe", "EMF %g V; accepted: a finite level", p.ProbeEMF)
		}
		if bad(p.ProbeHz) || p.ProbeHz < 1e-3 || p.ProbeHz > 1e12 {
			return requestf("probe", "%g Hz; accepted: a frequency from 1 mHz to 1 THz", p.ProbeHz)
		}
	}
	return nil
}

// ramps returns the durations of the rising and falling ramps.
func (p Pulse) ramps() (up, down float64) { return p.Rise * rampPer1090, p.Fall * rampPer1090 }

// flat returns the length of the flat top.
func (p Pulse) flat() float64 {
	up, down := p.ramps()
	return p.Width - up/2 - down/2
}

// length returns the time from the start of a pulse's rise to the end of
// its fall.
func (p Pulse) length() float64 {
	up, down := p.ramps()
	return up/2 + p.Width + down/2
}

// count returns the number of pulses.
func (p Pulse) count() int { return max(p.Count, 1) }

// Start returns the start of pulse k's rise.
func (p Pulse) Start(k int) float64 { return p.Delay + float64(k)*p.Period }

// Corners returns pulse k's four corners: the start and end of its rise,
// the start and end of its fall.
func (p Pulse) Corners(k int) [4]float64 {
	up, down := p.ramps()
	t0 := p.Start(k)
	return [4]float64{t0, t0 + up, t0 + up + p.flat(), t0 + up + p.flat() + down}
}

// End returns the end of the last pulse's fall.
func (p Pulse) End() float64 { return p.Corners(p.count() - 1)[3] }

// pulseAt returns the index of the pulse whose span [start, end of fall)
// holds t, or -1.
func (p Pulse) pulseAt(t float64) int {
	k := 0
	if p.Period > 0 {
		k = int(math.Floor((t - p.Delay) / p.Period))
	}
	if k < 0 || k >= p.count() {
		return -1
	}
	c := p.Corners(k)
	if t >= c[0] && t < c[3] {
		return k
	}
	return -1
}

// Envelope returns a(t), the carrier's amplitude relative to E.
func (p Pulse) Envelope(t float64) float64 {
	k := p.pulseAt(t)
	if k < 0 {
		return 0
	}
	c := p.Corners(k)
	switch {
	case t < c[1]:
		return (t - c[0]) / (c[1] - c[0])
	case t <= c[2]:
		return 1
	default:
		return (c[3] - t) / (c[3] - c[2])
	}
}

// EMF implements Source.
func (p Pulse) EMF(t float64) float64 {
	e := 0.0
	if k := p.pulseAt(t); k >= 0 {
		e = p.CarrierEMF * p.Envelope(t) * math.Cos(2*math.Pi*p.CarrierHz*(t-p.Start(k)))
	}
	if p.ProbeEMF != 0 {
		e += p.ProbeEMF * math.Cos(2*math.Pi*p.ProbeHz*t)
	}
	return e
}

// NextBreak implements Source: the next corner of an edge.
func (p Pulse) NextBreak(t float64) float64 {
	k := 0
	if p.Period > 0 {
		k = max(0, int(math.Floor((t-p.Delay)/p.Period)))
	}
	for ; k < p.count(); k++ {
		for _, c := range p.Corners(k) {
			if c > t {
				return c
			}
		}
	}
	return math.Inf(1)
}

// MaxStep implements Source: 1/12 of the carrier's period while a pulse
// is on, of the probe's while only the probe is.
func (p Pulse) MaxStep(t float64) float64 {
	h := math.Inf(1)
	if p.pulseAt(t) >= 0 {
		h = 1 / (p.CarrierHz * minStepsPerPeriod)
	}
	if p.ProbeEMF != 0 {
		h = math.Min(h, 1/(p.ProbeHz*minStepsPerPeriod))
	}
	return h
}

// Timescale implements Source: the shorter of the carrier's and the
// probe's periods.
func (p Pulse) Timescale() float64 {
	f := p.CarrierHz
	if p.ProbeEMF != 0 {
		f = math.Max(f, p.ProbeHz)
	}
	return 1 / f
}

// pulseSource is a checked Pulse with its edges' lengths worked out once,
// for the many calls of a run.
type pulseSource struct {
	p                        Pulse
	up, down, flat, length   float64
	count                    int
	carrierStep, probeStep   float64
	carrierOmega, probeOmega float64
}

func newPulseSource(p Pulse) *pulseSource {
	s := &pulseSource{p: p, count: p.count(), flat: p.flat(), length: p.length()}
	s.up, s.down = p.ramps()
	s.carrierStep = 1 / (p.CarrierHz * minStepsPerPeriod)
	s.carrierOmega = 2 * math.Pi * p.CarrierHz
	s.probeStep = math.Inf(1)
	if p.ProbeEMF != 0 {
		s.probeStep = 1 / (p.ProbeHz * minStepsPerPeriod)
		s.probeOmega = 2 * math.Pi * p.ProbeHz
	}
	return s
}

// at returns the pulse whose span holds t and its start, or -1.
func (s *pulseSource) at(t float64) (int, float64) {
	k := 0
	if s.p.Period > 0 {
		k = int(math.Floor((t - s.p.Delay) / s.p.Period))
	}
	if k < 0 || k >= s.count {
		return -1, 0
	}
	t0 := s.p.Delay + float64(k)*s.p.Period
	if t >= t0 && t < t0+s.up+s.flat+s.down {
		return k, t0
	}
	return -1, 0
}

// EMF implements Source.
func (s *pulseSource) EMF(t float64) float64 {
	e := 0.0
	if k, t0 := s.at(t); k >= 0 {
		a := 1.0
		switch u := t - t0; {
		case u < s.up:
			a = u / s.up
		case u > s.up+s.flat:
			a = (s.up + s.flat + s.down - u) / s.down
		}
		e = s.p.CarrierEMF * a * math.Cos(s.carrierOmega*(t-t0))
	}
	if s.p.ProbeEMF != 0 {
		e += s.p.ProbeEMF * math.Cos(s.probeOmega*t)
	}
	return e
}

// NextBreak implements Source.
func (s *pulseSource) NextBreak(t float64) float64 { return s.p.NextBreak(t) }

// MaxStep implements Source.
func (s *pulseSource) MaxStep(t float64) float64 {
	if k, _ := s.at(t); k >= 0 {
		return math.Min(s.carrierStep, s.probeStep)
	}
	return s.probeStep
}

// Timescale implements Source.
func (s *pulseSource) Timescale() float64 { return s.p.Timescale() }
