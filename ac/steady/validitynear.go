package steady

import (
	"context"
	"fmt"
	"math"
	"time"

	"qpoint/ac"
	"qpoint/smallsignal"
)

// ValiditySearch sets up ValidityNear.
type ValiditySearch struct {
	// GuessDBm is the level the search starts from: the limit found at a
	// nearby bias, or the drive's own level.
	GuessDBm float64
	// StepDB is the first step away from the guess where no prediction
	// can be made; zero means 0.5 dB.
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
	Steady Settings
	// Slope is how steeply the worst difference grows with level near the
	// limit, in decades per dB, as the last search at a nearby bias
	// measured it (Validity.Slope); zero means unknown. With it the first
	// step goes straight to the crossing it predicts.
	Slope float64
	// MaxSolves, when positive, bounds the waveform solves spent closing
	// the bracket once the limit is bracketed: the search then ends with
	// a bracket wider than ResolutionDB (Validity.FailsDBm says how wide),
	// for a caller that must answer in bounded time and refines later.
	// Finding the bracket is never cut short.
	MaxSolves int
	// Budget, when positive, bounds the time the same way: once the
	// limit is bracketed, no solve starts after Budget has passed since
	// the search began. Unlike MaxSolves it depends on the machine; it
	// is for an interactive caller that refines later.
	Budget time.Duration
	// Progress, when not nil, is called after each waveform solve with
	// the number of solves so far.
	Progress func(solves int)
}

// ValidityNear finds the small-signal validity limit as ValidityLimit
// does — the highest level at which the Volterra estimates of the DC
// shift and harmonics 1 to 3 agree with the waveform within TolDB — but
// searches from a guess, and steers by how far the estimates are off
// rather than by halving alone. The difference a third-order series
// leaves grows with the terms it drops, as a power of the drive, so its
// logarithm rises about linearly with the level in dB (common practice
// for a power series; how steeply depends on the product, and near the
// limit of a balanced circuit it can reach two decades per dB). The
// search predicts where the worst difference reaches TolDB: from the
// guess alone at Slope (when a search at a nearby bias measured it),
// else by a first step of StepDB; then from its last two levels, the
// logarithm interpolated linearly (regula falsi), each step at most four
// times the last; once the crossing is bracketed, it closes the bracket
// with probes half a resolution to the near side of each prediction,
// halving instead whenever a prediction is unusable or the bracket did
// not halve. It ends as ValidityLimit's bisection does: the estimates
// seen to hold at LevelDBm and not at a level at most ResolutionDB
// above. From the limit at the previous step of a slider this takes two
// to four waveform solves where ValidityLimit's climb from far below
// takes twenty or more.
//
// The limit it finds is the crossing nearest the guess: where agreement
// comes and goes with level (a product passing through a null), it can
// be another crossing than ValidityLimit's. Outcomes are ValidityLimit's;
// Held is the steady state at the limit and Slope the growth measured
// across the final bracket. ctx is checked before each waveform solve,
// and its error returned once it is done.
func ValidityNear(ctx context.Context, nw *smallsignal.Network, d ac.Drive, s ValiditySearch) (*Validity, error) {
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
	began := time.Now()
	z0 := nw.Ports[d.Input].Impedance
	g := math.Min(math.Max(s.GuessDBm, s.LowestDBm), s.HighestDBm)
	if math.IsNaN(g) {
		g = s.HighestDBm
	}
	v := &Validity{TolDB: tol, LevelDBm: math.NaN(), LowestDBm: g, WorstDB: math.NaN(), FailedDBm: math.NaN(), FailsDBm: math.NaN()}
	var solveErr error
	check := func(l float64, start *State) (*probe, error) {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		v.Steps++
		st, ok, w, name, serr, err := validityCheck(nw, d, z0, l, tol, start, s.Steady)
		if serr != nil && start != nil && err == nil {
			// A start from another bias can lead Newton astray where the
			// DC point would not: try once from there.
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			v.Steps++
			st, ok, w, name, serr, err = validityCheck(nw, d, z0, l, tol, nil, s.Steady)
		}
		solveErr = serr
		if s.Progress != nil {
			s.Progress(v.Steps)
		}
		return &probe{l: l, st: st, ok: ok, w: w, name: name}, err
	}
	failed := func(l float64) (*Validity, error) {
		v.Outcome, v.Err, v.FailedDBm = SolveFailed, solveErr, l
		return v, nil
	}

	var good, bad *probe // highest level seen to hold; lowest above it seen not to
	first, err := check(g, s.Steady.Start)
	switch {
	case err != nil:
		return nil, err
	case solveErr != nil:
		return failed(g)
	case first.ok:
		good = first
	default:
		bad = first
		v.WorstDB, v.WorstProduct = first.w, first.name
	}

	// Bracket: step up from a level that holds, or down from one that
	// does not, to the predicted crossing and half a resolution past it.
	var prev *probe
	// next is the size of the step away from cur (after prev, when not
	// nil) towards a crossing predicted ahead: the first step is StepDB,
	// or just under a resolution when the crossing is predicted that
	// close; later steps go half a resolution past the crossing predicted
	// from the last two levels, at least a resolution and at most four
	// times the last step.
	next := func(prev, cur *probe, ahead float64) float64 {
		if prev == nil {
			switch {
			case ahead >= 0 && ahead <= 0.9*res:
				return 0.95 * res
			case s.Slope > 0 && ahead > 0:
				return math.Min(ahead+res/2, 30)
			}
			return step
		}
		last := math.Abs(cur.l - prev.l)
		if math.IsNaN(ahead) || ahead < 0 {
			return 4 * last
		}
		return math.Min(math.Max(ahead+res/2, 0.95*res), 4*last)
	}
	for good == nil || bad == nil {
		if good != nil {
			if good.l >= s.HighestDBm {
				v.Outcome, v.LevelDBm, v.Held = HeldThroughout, good.l, good.st
				return v, nil
			}
			l := good.l + next(prev, good, crossing(prev, good, tol, s.Slope)-good.l)
			l = math.Min(l, math.Min(good.l+40, s.HighestDBm))
			p, err := check(l, good.st)
			switch {
			case err != nil:
				return nil, err
			case solveErr != nil:
				v.LevelDBm = good.l
				return failed(l)
			case p.ok:
				prev, good = good, p
			default:
				bad = p
			}
			continue
		}
		if bad.l <= s.LowestDBm {
			v.Outcome = NeverHeld
			return v, nil
		}
		l := bad.l - next(prev, bad, bad.l-crossing(prev, bad, tol, s.Slope))
		l = math.Max(l, math.Max(bad.l-60, s.LowestDBm))
		p, err := check(l, bad.st)
		switch {
		case err != nil:
			return nil, err
		case solveErr != nil:
			return failed(l)
		}
		v.LowestDBm = l
		if p.ok {
			good = p
		} else {
			prev, bad = bad, p
			v.WorstDB, v.WorstProduct = p.w, p.name
		}
	}

	// Close the bracket to the resolution.
	lastWidth := math.Inf(1)
	for w := bad.l - good.l; w > res && (s.MaxSolves <= 0 || v.Steps < s.MaxSolves) && (s.Budget <= 0 || time.Since(began) < s.Budget); w = bad.l - good.l {
		l := crossing(good, bad, tol, s.Slope)
		switch {
		case math.IsNaN(l) || w > lastWidth/2:
			l = good.l + w/2 // halve: no usable prediction, or too slow a gain
		case l-good.l <= 0.9*res:
			l = good.l + 0.95*res // expected to fail: closes the bracket
		case bad.l-l <= 0.9*res:
			l = bad.l - 0.95*res // expected to hold: closes it from below
		default:
			l -= res / 2
		}
		margin := math.Min(res/4, w/4)
		l = math.Min(math.Max(l, good.l+margin), bad.l-margin)
		lastWidth = w
		p, err := check(l, good.st)
		switch {
		case err != nil:
			return nil, err
		case solveErr != nil:
			v.LevelDBm = good.l
			return failed(l)
		case p.ok:
			good = p
		default:
			bad = p
		}
	}
	v.Outcome, v.LevelDBm, v.Held, v.FailsDBm = LimitFound, good.l, good.st, bad.l
	if good.w > 0 && bad.w > good.w && !math.IsInf(bad.w, 0) {
		v.Slope = (math.Log10(bad.w) - math.Log10(good.w)) / (bad.l - good.l)
	}
	return v, nil
}

// probe is one level a validity search has tried: the steady state
// there, whether the estimates held, and the largest difference seen.
type probe struct {
	l    float64
	st   *State
	ok   bool
	w    float64
	name string
}

// crossing predicts the level where the worst difference reaches tol,
// with log w taken linear in the level: through a and b when both are
// given and the difference grows between them, else from b alone at the
// slope given (decades per dB), or one decade per 10 dB. NaN where
// nothing can be predicted (no trustable product, or differences that do
// not grow with level).
func crossing(a, b *probe, tol, slope float64) float64 {
	if b == nil || !(b.w > 0) || math.IsInf(b.w, 0) {
		return math.NaN()
	}
	if !(slope > 0) {
		slope = 0.1
	}
	if a != nil && a.w > 0 && !math.IsInf(a.w, 0) && a.l != b.l {
		s := (math.Log10(b.w) - math.Log10(a.w)) / (b.l - a.l)
		if !(s > 0.01) || math.IsNaN(s) {
			return math.NaN()
		}
		slope = s
	}
	return b.l + (math.Log10(tol)-math.Log10(b.w))/slope
}
