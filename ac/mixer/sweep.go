package mixer

import (
	"errors"
	"runtime"
	"sync"

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
// against 9.4 s for twelve levels, BenchmarkDemoSweep); the levels are
// therefore independent and run side by side, one per processor
// (GOMAXPROCS). A pump that fails from the DC point is tried again,
// afterwards and in order, continuing from the nearest lower level that
// converged. s.LOEMF and s.Start are ignored. progress, when not nil, is
// called after each level (from one goroutine at a time).
func SweepLO(nw *smallsignal.Network, s Settings, levelsDBm []float64, progress func(done, total int)) []LevelPoint {
	out := make([]LevelPoint, len(levelsDBm))
	z0 := 0.0
	if s.LO >= 0 && s.LO < len(nw.Ports) {
		z0 = nw.Ports[s.LO].Impedance
	}
	at := func(i int, start *Result) {
		t := s
		t.LOEMF = ac.DBmToEMF(levelsDBm[i], z0)
		t.Start = start
		r, err := Analyze(nw, t)
		out[i] = LevelPoint{LevelDBm: levelsDBm[i], Result: r, Err: err}
	}
	var (
		mu   sync.Mutex
		done int
		wg   sync.WaitGroup
	)
	next := make(chan int)
	for range min(runtime.GOMAXPROCS(0), len(levelsDBm)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				at(i, nil)
				if out[i].Result == nil && !isRequest(out[i].Err) {
					continue // counted when retried
				}
				mu.Lock()
				done++
				if progress != nil {
					progress(done, len(levelsDBm))
				}
				mu.Unlock()
			}
		}()
	}
	for i := range levelsDBm {
		next <- i
	}
	close(next)
	wg.Wait()
	var prev *Result
	for i := range out {
		if out[i].Result == nil && !isRequest(out[i].Err) {
			if prev != nil {
				at(i, prev)
			}
			done++
			if progress != nil {
				progress(done, len(levelsDBm))
			}
		}
		if out[i].Result != nil {
			prev = out[i].Result
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
