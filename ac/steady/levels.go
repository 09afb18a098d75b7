package steady

import (
	"fmt"
	"math"
	"math/cmplx"

	"qpoint/ac"
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
func Compare(e *ac.Estimate, s *State) []Comparison {
	est := []complex128{complex(e.DCShift, 0), e.Fundamental, e.HD2, e.HD3}
	names := []string{"dc", "1", "2", "3"}
	fund := cmplx.Abs(e.Linear)
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

// LevelPoint is the waveform at one input level.
type LevelPoint struct {
	LevelDBm float64 // available power per tone
	EMF      float64
	Steady   *State
}

// LevelSweep solves the steady state at each available input power (dBm)
// in turn, each solution starting the next (continuation in level).
func LevelSweep(nw *smallsignal.Network, d ac.Drive, levelsDBm []float64, s Settings, progress func(done, total int)) ([]LevelPoint, error) {
	z0 := nw.Ports[d.Input].Impedance
	var out []LevelPoint
	var prev *State
	for i, l := range levelsDBm {
		d.EMF = ac.DBmToEMF(l, z0)
		s.Start = prev
		st, err := Solve(nw, d, s)
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

// ValidityOutcome says what the search for the validity limit found.
type ValidityOutcome int

// The outcomes of ValidityLimit.
const (
	// LimitFound: the estimates held at one level and not at a higher
	// one; LevelDBm is the limit, bisected to 0.05 dB.
	LimitFound ValidityOutcome = iota
	// HeldThroughout: the estimates held at every level tried; the limit
	// lies above LevelDBm, the highest level tried.
	HeldThroughout
	// NeverHeld: the estimates differed from the waveform by more than
	// the tolerance at every level tried, down to LowestDBm; LevelDBm is
	// NaN and WorstDB holds the difference seen there.
	NeverHeld
	// SolveFailed: a waveform solve failed (Err) before a limit was
	// bracketed. LevelDBm is the highest level at which the estimates
	// were seen to hold, or NaN when none was.
	SolveFailed
)

// Validity is the small-signal validity limit at a bias: the highest input
// level at which the Volterra estimates of the DC shift and harmonics 1-3
// hold within TolDB of the waveform.
type Validity struct {
	Outcome   ValidityOutcome
	LevelDBm  float64 // available power per tone; NaN when nothing held (see Outcome)
	TolDB     float64
	LowestDBm float64 // the lowest level tried
	// WorstDB and WorstProduct are the largest difference between
	// estimate and waveform at LowestDBm, and the product it belongs to
	// ("dc", "1", "2", "3").
	WorstDB      float64
	WorstProduct string
	Err          error // SolveFailed: why the waveform solve failed
	FailedDBm    float64
	Steps        int // steady-state solves used
	// Held is the steady state at LevelDBm where the estimates were seen
	// to hold (LimitFound, HeldThroughout), to start a later search at a
	// nearby bias from (ValidityNear); nil otherwise. Slope, from
	// ValidityNear when it found a limit, is how steeply the worst
	// difference grew across the last bracket, in decades per dB
	// (ValiditySearch.Slope); zero otherwise.
	Held  *State
	Slope float64
	// FailsDBm, from ValidityNear when it found a limit, is the level
	// above LevelDBm where the estimates were seen not to hold: within
	// its resolution unless its MaxSolves cut the search short. NaN
	// otherwise.
	FailsDBm float64
}

// Found reports whether a limit was bracketed and bisected.
func (v *Validity) Found() bool { return v.Outcome == LimitFound }

// Note says in one sentence what the search found, with the level or the
// difference seen; it never presents a level that was not observed as a
// limit.
func (v *Validity) Note() string {
	switch v.Outcome {
	case LimitFound:
		return fmt.Sprintf("the estimates hold within %.1f dB up to %.1f dBm available per tone (%d waveform solves)", v.TolDB, v.LevelDBm, v.Steps)
	case HeldThroughout:
		return fmt.Sprintf("the estimates hold within %.1f dB at every level tried, up to %.1f dBm; the limit lies higher", v.TolDB, v.LevelDBm)
	case NeverHeld:
		return fmt.Sprintf("no validity limit: the estimates differ from the waveform by %.2g dB (%s) already at %.1f dBm, the lowest level tried; they do not hold in this range",
			v.WorstDB, productName(v.WorstProduct), v.LowestDBm)
	default:
		if math.IsNaN(v.LevelDBm) {
			return fmt.Sprintf("no validity limit: the waveform solve failed at %.1f dBm (%v)", v.FailedDBm, v.Err)
		}
		return fmt.Sprintf("the estimates hold within %.1f dB up to at least %.1f dBm; the waveform solve failed at %.1f dBm (%v), so the limit was not bracketed",
			v.TolDB, v.LevelDBm, v.FailedDBm, v.Err)
	}
}

func productName(p string) string {
	switch p {
	case "dc":
		return "DC shift"
	case "1":
		return "fundamental"
	case "2":
		return "second harmonic"
	case "3":
		return "third harmonic"
	}
	return p
}

// worst returns the largest |DiffDB| over the trustable comparisons and
// the product it belongs to.
func worst(cs []Comparison) (float64, string) {
	w, name := 0.0, ""
	for _, c := range cs {
		if c.Trustable && !math.IsNaN(c.DiffDB) && math.Abs(c.DiffDB) >= w {
			w, name = math.Abs(c.DiffDB), c.Name
		}
	}
	return w, name
}

// validityDescent is how far below startDBm ValidityLimit looks, in
// 10 dB steps, when the estimates do not hold at startDBm.
const validityDescent = 60

// ValidityLimit steps the input level up from startDBm in 2 dB steps, each
// steady state starting the next, until an estimate departs from the
// waveform by more than tolDB (or maxDBm is reached), then bisects the last
// step to 0.05 dB. When the estimates do not hold at startDBm it first
// looks down in 10 dB steps, up to 60 dB lower, for a level where they do.
// A failed waveform solve ends the search with Outcome SolveFailed: it is
// not taken as the estimates' departure. The error is for a drive the
// estimate refuses.
func ValidityLimit(nw *smallsignal.Network, d ac.Drive, startDBm, maxDBm, tolDB float64, s Settings) (*Validity, error) {
	z0 := nw.Ports[d.Input].Impedance
	v := &Validity{TolDB: tolDB, LevelDBm: math.NaN(), LowestDBm: startDBm, WorstDB: math.NaN(), FailedDBm: math.NaN(), FailsDBm: math.NaN()}
	var solveErr error
	// check reports whether the estimates hold at level l; a failed
	// solve sets solveErr.
	check := func(l float64, start *State) (*State, bool, float64, string, error) {
		v.Steps++
		st, ok, w, name, serr, err := validityCheck(nw, d, z0, l, tolDB, start, s)
		if serr != nil {
			solveErr = serr
		}
		return st, ok, w, name, err
	}
	failed := func(l float64) (*Validity, error) {
		v.Outcome, v.Err, v.FailedDBm = SolveFailed, solveErr, l
		return v, nil
	}

	good, bad := math.NaN(), math.NaN()
	var prev *State
	st, ok, w, name, err := check(startDBm, nil)
	if err != nil {
		return nil, err
	}
	if solveErr != nil {
		return failed(startDBm)
	}
	if ok {
		good, prev = startDBm, st
	} else {
		// Look down for a level where the estimates hold.
		bad = startDBm
		v.WorstDB, v.WorstProduct = w, name
		for l := startDBm - 10; l >= startDBm-validityDescent-1e-9; l -= 10 {
			st, ok, w, name, err = check(l, st)
			if err != nil {
				return nil, err
			}
			if solveErr != nil {
				return failed(l)
			}
			v.LowestDBm = l
			if ok {
				good, prev = l, st
				break
			}
			bad = l
			v.WorstDB, v.WorstProduct = w, name
		}
		if math.IsNaN(good) {
			v.Outcome = NeverHeld
			return v, nil
		}
	}
	if math.IsNaN(bad) {
		for l := startDBm + 2; l <= maxDBm+1e-9; l += 2 {
			st, ok, _, _, err := check(l, prev)
			if err != nil {
				return nil, err
			}
			if solveErr != nil {
				v.LevelDBm = good
				return failed(l)
			}
			if !ok {
				bad = l
				break
			}
			good, prev = l, st
		}
	}
	if math.IsNaN(bad) {
		v.Outcome, v.LevelDBm, v.Held = HeldThroughout, good, prev
		return v, nil
	}
	for bad-good > 0.05 {
		mid := (good + bad) / 2
		st, ok, _, _, err := check(mid, prev)
		if err != nil {
			return nil, err
		}
		if solveErr != nil {
			v.LevelDBm = good
			return failed(mid)
		}
		if ok {
			good, prev = mid, st
		} else {
			bad = mid
		}
	}
	v.Outcome, v.LevelDBm, v.Held = LimitFound, good, prev
	return v, nil
}

// validityCheck reports whether the estimates hold at level l within
// tolDB: the Volterra estimate at l against the steady state solved from
// start, with the largest difference and its product. A failed steady
// state is solveErr; err is for a drive the estimate refuses.
func validityCheck(nw *smallsignal.Network, d ac.Drive, z0, l, tolDB float64, start *State, s Settings) (st *State, ok bool, w float64, name string, solveErr, err error) {
	d.EMF = ac.DBmToEMF(l, z0)
	e, err := ac.Volterra(nw, ac.Drive{Input: d.Input, Output: d.Output, FrequencyHz: d.FrequencyHz, EMF: d.EMF})
	if err != nil {
		return nil, false, 0, "", nil, err
	}
	s.Start = start
	st, err = Solve(nw, d, s)
	if err != nil {
		return nil, false, 0, "", fmt.Errorf("at %.1f dBm: %w", l, err), nil
	}
	w, name = worst(Compare(e, st))
	return st, w <= tolDB, w, name, nil, nil
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
