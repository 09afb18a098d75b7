package ac

import (
	"context"
	"fmt"
	"math"

	"qpoint/smallsignal"
)

// ValiditySearch sets up ValidityNear.
type ValiditySearch struct {
	// GuessDBm is the level the search starts from: the limit found at a
	// nearby bias, or the drive's own level.
	GuessDBm float64
	// StepDB is the first step away from the guess; each further step
	// doubles, until the estimates' agreement with the waveform changes.
	// Zero means 0.5 dB.
	StepDB float64
	// ResolutionDB is the width the bracket is bisected to; zero means
	// 0.05 dB, as ValidityLimit's.
	ResolutionDB float64
	// TolDB is the agreement the estimates must keep with the waveform;
	// zero means 0.5 dB.
	TolDB float64
	// LowestDBm and HighestDBm bound the levels tried (available power
	// per tone).
	LowestDBm, HighestDBm float64
	// Steady solves each waveform. Steady.Start, when set, starts the
	// first solve: a steady state at a nearby level of a nearby circuit of
	// the same shape, such as the Held of the last search.
	Steady SteadySettings
	// Progress, when not nil, is called after each waveform solve with
	// the number of solves so far.
	Progress func(solves int)
}

// ValidityNear finds the small-signal validity limit as ValidityLimit
// does — the highest level at which the Volterra estimates of the DC
// shift and harmonics 1 to 3 agree with the waveform within TolDB — but
// searches outward from a guess: from GuessDBm it steps up (where the
// estimates hold there) or down (where they do not) by StepDB, doubling
// the step each time, until the agreement changes, then bisects that
// bracket to ResolutionDB, each waveform starting from the nearest one
// that held. Near a good guess, as from the limit at the previous step of
// a slider, this takes three or four waveform solves where
// ValidityLimit's climb from far below takes twenty or more.
//
// The limit it finds is the crossing nearest the guess: where agreement
// comes and goes with level (a product passing through a null), it can
// be another crossing than ValidityLimit's. Outcomes are ValidityLimit's;
// Held is the steady state at the limit. ctx is checked before each
// waveform solve, and its error returned once it is done.
func ValidityNear(ctx context.Context, nw *smallsignal.Network, d Drive, s ValiditySearch) (*Validity, error) {
	if d.Input < 0 || d.Input >= len(nw.Ports) {
		return nil, fmt.Errorf("input port %d: the circuit has %d ports", d.Input+1, len(nw.Ports))
	}
	if !(s.LowestDBm <= s.HighestDBm) {
		return nil, fmt.Errorf("validity search from %g dBm to %g dBm: the range is empty", s.LowestDBm, s.HighestDBm)
	}
	step, res, tol := s.StepDB, s.ResolutionDB, s.TolDB
	if step <= 0 {
		step = 0.5
	}
	if res <= 0 {
		res = 0.05
	}
	if tol <= 0 {
		tol = 0.5
	}
	z0 := nw.Ports[d.Input].Impedance
	g := math.Min(math.Max(s.GuessDBm, s.LowestDBm), s.HighestDBm)
	if math.IsNaN(g) {
		g = s.HighestDBm
	}
	v := &Validity{TolDB: tol, LevelDBm: math.NaN(), LowestDBm: g, WorstDB: math.NaN(), FailedDBm: math.NaN()}
	var solveErr error
	check := func(l float64, start *Steady) (*Steady, bool, float64, string, error) {
		if err := ctx.Err(); err != nil {
			return nil, false, 0, "", err
		}
		v.Steps++
		st, ok, w, name, serr, err := validityCheck(nw, d, z0, l, tol, start, s.Steady)
		solveErr = serr
		if s.Progress != nil {
			s.Progress(v.Steps)
		}
		return st, ok, w, name, err
	}
	failed := func(l float64) (*Validity, error) {
		v.Outcome, v.Err, v.FailedDBm = SolveFailed, solveErr, l
		return v, nil
	}

	good, bad := math.NaN(), math.NaN()
	var held *Steady
	st, ok, w, name, err := check(g, s.Steady.Start)
	switch {
	case err != nil:
		return nil, err
	case solveErr != nil:
		return failed(g)
	case ok:
		good, held = g, st
		for math.IsNaN(bad) {
			if good >= s.HighestDBm {
				v.Outcome, v.LevelDBm, v.Held = HeldThroughout, good, held
				return v, nil
			}
			l := math.Min(good+step, s.HighestDBm)
			st, ok, _, _, err := check(l, held)
			switch {
			case err != nil:
				return nil, err
			case solveErr != nil:
				v.LevelDBm = good
				return failed(l)
			case ok:
				good, held = l, st
				step *= 2
			default:
				bad = l
			}
		}
	default:
		bad = g
		v.WorstDB, v.WorstProduct = w, name
		last := st
		for math.IsNaN(good) {
			if bad <= s.LowestDBm {
				v.Outcome = NeverHeld
				return v, nil
			}
			l := math.Max(bad-step, s.LowestDBm)
			st, ok, w, name, err := check(l, last)
			switch {
			case err != nil:
				return nil, err
			case solveErr != nil:
				return failed(l)
			}
			v.LowestDBm = l
			if ok {
				good, held = l, st
				break
			}
			bad, last = l, st
			v.WorstDB, v.WorstProduct = w, name
			step *= 2
		}
	}
	for bad-good > res {
		mid := (good + bad) / 2
		st, ok, _, _, err := check(mid, held)
		switch {
		case err != nil:
			return nil, err
		case solveErr != nil:
			v.LevelDBm = good
			return failed(mid)
		case ok:
			good, held = mid, st
		default:
			bad = mid
		}
	}
	v.Outcome, v.LevelDBm, v.Held = LimitFound, good, held
	return v, nil
}
