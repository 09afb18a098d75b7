package mixer

import (
	"errors"

	"qpoint/ac"
	"qpoint/smallsignal"
)

// LevelPoint is the mixer at one LO level.
type LevelPoint struct {
	LevelDBm float64 // the LO generator's available power
	// Result is the analysis at this level; nil when it failed, and
	// present beside a *BreakdownError, which Err then holds.
	Result *Result
	Err    error
}

// SweepLO analyses the mixer at each LO level (available power in dBm at
// the LO port, in the order given), as a designer chooses the drive on
// the curve of conversion loss against LO power. Each pump starts from
// the DC point, which on the demo costs less than half of continuing
// from the last level (whose spectrum and grid it would inherit: 4.1 s
// against 9.4 s for twelve levels, BenchmarkDemoSweep); a pump that
// fails from there is tried again continuing from the last level that
// converged. s.LOEMF and s.Start are ignored. progress, when not nil, is
// called after each level.
func SweepLO(nw *smallsignal.Network, s Settings, levelsDBm []float64, progress func(done, total int)) []LevelPoint {
	out := make([]LevelPoint, len(levelsDBm))
	z0 := 0.0
	if s.LO >= 0 && s.LO < len(nw.Ports) {
		z0 = nw.Ports[s.LO].Impedance
	}
	var prev *Result
	for i, dbm := range levelsDBm {
		t := s
		t.LOEMF = ac.DBmToEMF(dbm, z0)
		t.Start = nil
		r, err := Analyze(nw, t)
		if r == nil && prev != nil && !isRequest(err) {
			t.Start = prev
			r, err = Analyze(nw, t)
		}
		out[i] = LevelPoint{LevelDBm: dbm, Result: r, Err: err}
		if r != nil {
			prev = r
		}
		if progress != nil {
			progress(i+1, len(levelsDBm))
		}
	}
	return out
}

// isRequest reports whether err refuses the settings rather than the
// solve.
func isRequest(err error) bool {
	var se *SettingError
	return errors.As(err, &se)
}
