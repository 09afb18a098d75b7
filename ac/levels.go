package ac

import (
	"fmt"
	"math"
	"math/cmplx"

	"qpoint/smallsignal"
)

// Comparison sets a Volterra estimate beside the waveform for one product.
type Comparison struct {
	Name      string  // "dc", "1", "2", "3"
	Order     int     // harmonic order; 0 for the DC shift
	Estimate  float64 // amplitude, V (signed for the DC shift)
	Waveform  float64
	DiffDB    float64 // 20 log10(|waveform| / |estimate|)
	Trustable bool    // false when the product lies below the waveform's numerical floor
}

// floorDBc is where a waveform harmonic is lost in the steady-state
// solver's numerical noise: about -140 dB relative to the fundamental.
const floorDBc = -140

// Compare returns the estimate beside the waveform for the DC shift and
// harmonics 1 to 3.
func Compare(e *Estimate, s *Steady) []Comparison {
	est := []complex128{complex(e.DCShift, 0), e.Fundamental, e.HD2, e.HD3}
	names := []string{"dc", "1", "2", "3"}
	fund := cmplx.Abs(e.Fundamental)
	var out []Comparison
	for k := 0; k < len(est) && k < len(s.Output); k++ {
		c := Comparison{Name: names[k], Order: k, Waveform: s.Output[k].Amplitude}
		if k == 0 {
			c.Estimate = e.DCShift
		} else {
			c.Estimate = cmplx.Abs(est[k])
		}
		c.DiffDB = 20 * math.Log10(math.Abs(c.Waveform)/math.Abs(c.Estimate))
		c.Trustable = 20*math.Log10(math.Abs(c.Estimate)/fund) > floorDBc && c.Estimate != 0 &&
			math.Abs(c.Estimate) > s.NoiseFloor
		out = append(out, c)
	}
	return out
}

// worstDiff returns the largest |DiffDB| over the trustable comparisons.
func worstDiff(cs []Comparison) float64 {
	w := 0.0
	for _, c := range cs {
		if c.Trustable && !math.IsNaN(c.DiffDB) {
			w = math.Max(w, math.Abs(c.DiffDB))
		}
	}
	return w
}

// LevelPoint is the waveform at one input level.
type LevelPoint struct {
	LevelDBm float64 // available power per tone
	EMF      float64
	Steady   *Steady
}

// LevelSweep solves the steady state at each available input power (dBm)
// in turn, each solution starting the next (continuation in level).
func LevelSweep(nw *smallsignal.Network, d Drive, levelsDBm []float64, s SteadySettings, progress func(done, total int)) ([]LevelPoint, error) {
	z0 := nw.Ports[d.Input].Impedance
	var out []LevelPoint
	var prev *Steady
	for i, l := range levelsDBm {
		d.EMF = DBmToEMF(l, z0)
		s.Start = prev
		st, err := SteadyState(nw, d, s)
		if err != nil {
			return out, fmt.Errorf("at %.2f dBm: %w", l, err)
		}
		out = append(out, LevelPoint{LevelDBm: l, EMF: d.EMF, Steady: st})
		prev = st
		if progress != nil {
			progress(i+1, len(levelsDBm))
		}
	}
	return out, nil
}

// Validity is the small-signal validity limit at a bias: the highest input
// level at which the Volterra estimates of the DC shift and harmonics 1-3
// hold within TolDB of the waveform.
type Validity struct {
	LevelDBm float64 // the limit, available power per tone
	TolDB    float64
	Found    bool // false: the estimates held up to the highest level tried
	Steps    int  // steady-state solves used
}

// ValidityLimit steps the input level up from startDBm in 2 dB steps, each
// steady state starting the next, until an estimate departs from the
// waveform by more than tolDB (or maxDBm is reached), then bisects the last
// step to 0.05 dB.
func ValidityLimit(nw *smallsignal.Network, d Drive, startDBm, maxDBm, tolDB float64, s SteadySettings) (*Validity, error) {
	z0 := nw.Ports[d.Input].Impedance
	v := &Validity{TolDB: tolDB}
	check := func(l float64, start *Steady) (*Steady, bool, error) {
		d.EMF = DBmToEMF(l, z0)
		e, err := Volterra(nw, Drive{Input: d.Input, Output: d.Output, FrequencyHz: d.FrequencyHz, EMF: d.EMF})
		if err != nil {
			return nil, false, err
		}
		s.Start = start
		st, err := SteadyState(nw, d, s)
		v.Steps++
		if err != nil {
			return nil, false, err
		}
		return st, worstDiff(Compare(e, st)) <= tolDB, nil
	}
	good, bad := math.NaN(), math.NaN()
	var prev *Steady
	for l := startDBm; l <= maxDBm+1e-9; l += 2 {
		st, ok, err := check(l, prev)
		if err != nil || !ok {
			bad = l
			break
		}
		good, prev = l, st
	}
	if math.IsNaN(good) {
		return v, fmt.Errorf("the estimates already differ from the waveform by more than %.2g dB at %.1f dBm", tolDB, startDBm)
	}
	if math.IsNaN(bad) {
		v.LevelDBm = good
		return v, nil
	}
	v.Found = true
	for bad-good > 0.05 {
		mid := (good + bad) / 2
		st, ok, err := check(mid, prev)
		if err == nil && ok {
			good, prev = mid, st
		} else {
			bad = mid
		}
	}
	v.LevelDBm = good
	return v, nil
}

// Compression returns the input level (dBm) at which the fundamental
// output falls 1 dB below the small-signal line |V_out| = gain·EMF (gain
// from the linear network, volts per volt of EMF), interpolating linearly
// in dB between sweep points, and false when the sweep does not reach it.
func Compression(points []LevelPoint, gain float64) (float64, bool) {
	drop := func(p LevelPoint) float64 {
		return 20*math.Log10(gain*p.EMF) - 20*math.Log10(p.Steady.Output[1].Amplitude)
	}
	for i, p := range points {
		d := drop(p)
		if d < 1 {
			continue
		}
		if i == 0 {
			return p.LevelDBm, true
		}
		q := points[i-1]
		dq := drop(q)
		f := (1 - dq) / (d - dq)
		return q.LevelDBm + f*(p.LevelDBm-q.LevelDBm), true
	}
	return 0, false
}
