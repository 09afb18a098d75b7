package transient

import (
	"runtime"
	"sync"

	"qpoint/ac"
	"qpoint/smallsignal"
)

// LevelPoint is a pulse run at one carrier level: its result (without
// its time series, see PulseResult.Compact) or the error that stopped it.
type LevelPoint struct {
	LevelDBm float64 // available power of the carrier
	Result   *PulseResult
	Err      error
}

// SweepLevel runs s at each available carrier power in levelsDBm (dBm
// behind the input port's reference impedance), workers at a time (zero:
// one per CPU), and returns the points in the order of the levels. Each
// run is independent of the others, so the results do not depend on the
// worker count. A run that stops early keeps what it reached, with its
// error. progress, when not nil, is called after each run, from one
// goroutine at a time.
func SweepLevel(nw *smallsignal.Network, s PulseSettings, levelsDBm []float64, workers int, progress func(done, total int)) []LevelPoint {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	// The kind is the same at every level: read it once.
	if s.Kind == AutoKind && s.Input >= 0 && s.Input < len(nw.Ports) {
		s.Kind = Limiter
		if ac.Detects(nw, ac.NoiseSettings{Input: s.Input, Output: s.Output}, s.Pulse.CarrierHz) {
			s.Kind = Detector
		}
	}
	out := make([]LevelPoint, len(levelsDBm))
	z0 := 0.0
	if s.Input >= 0 && s.Input < len(nw.Ports) {
		z0 = nw.Ports[s.Input].Impedance
	}
	next := make(chan int)
	var wg sync.WaitGroup
	var mu sync.Mutex
	done := 0
	for w := 0; w < min(workers, len(levelsDBm)); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				ls := s
				ls.Pulse.CarrierEMF = ac.DBmToEMF(levelsDBm[i], z0)
				r, err := RunPulse(nw, ls)
				if r != nil {
					r.Compact()
				}
				out[i] = LevelPoint{LevelDBm: levelsDBm[i], Result: r, Err: err}
				if progress != nil {
					mu.Lock()
					done++
					progress(done, len(levelsDBm))
					mu.Unlock()
				}
			}
		}()
	}
	for i := range levelsDBm {
		next <- i
	}
	close(next)
	wg.Wait()
	return out
}

// Compact drops the run's time series (points, traces, envelopes),
// keeping the figures, the diodes' stress, the cautions, the energy
// account and the statistics.
func (r *PulseResult) Compact() {
	if r.Run != nil {
		run := *r.Run
		run.Times, run.EMF, run.Watched, run.BlockCurrents = nil, nil, nil, nil
		run.Diodes = nil
		r.Run = &run
	}
	r.Output, r.EnvelopeTimes, r.Envelope, r.Video, r.LossChange = nil, nil, nil, nil, nil
}
