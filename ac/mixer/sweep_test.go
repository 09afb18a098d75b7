package mixer

import (
	"sync"
	"testing"

	"qpoint/ac"
)

// TestSweepLOSideBySide: the sweep runs its levels side by side; each
// level's result must be the one Analyze gives alone at that level, to the
// last bit (every pump starts from the DC point), and progress must count
// every level once. Run it under the race detector to check that the
// levels share nothing they write:
// go test -race -run SweepLOSideBySide ./ac/mixer/
func TestSweepLOSideBySide(t *testing.T) {
	nw := network(t, demoFile(t, "mixer"))
	c := nw.Point.Circuit.Analysis.Mixer
	s := Settings{LO: portIndex(t, nw, c.LO), RF: portIndex(t, nw, c.RF), IF: portIndex(t, nw, c.IF),
		LOFrequencyHz: c.LOFrequencyHz, RFFrequencyHz: c.RFFrequencyHz, CheckShooting: true}
	levels := []float64{-3, 7, 1}
	var mu sync.Mutex
	seen := map[int]bool{}
	pts := SweepLO(nw, s, levels, func(done, total int) {
		mu.Lock()
		defer mu.Unlock()
		if total != len(levels) || seen[done] {
			t.Errorf("progress(%d, %d) again or with the wrong total", done, total)
		}
		seen[done] = true
	})
	if len(seen) != len(levels) {
		t.Errorf("progress called for %d of %d levels", len(seen), len(levels))
	}
	for i, p := range pts {
		if p.LevelDBm != levels[i] || p.Err != nil || p.Result == nil {
			t.Fatalf("level %d: %+v", i, p)
		}
		one := s
		one.LOEMF = ac.DBmToEMF(levels[i], nw.Ports[s.LO].Impedance)
		r, err := Analyze(nw, one)
		if err != nil {
			t.Fatal(err)
		}
		if p.Result.ConversionLossDB != r.ConversionLossDB || p.Result.Noise.FigureSSBDB != r.Noise.FigureSSBDB ||
			p.Result.LO.AbsorbedW != r.LO.AbsorbedW || p.Result.Stats.Shooting != r.Stats.Shooting {
			t.Errorf("%g dBm: the sweep gives loss %.17g dB, NF %.17g dB, absorbed %.17g W, shooting %.3g; alone %.17g, %.17g, %.17g, %.3g",
				levels[i], p.Result.ConversionLossDB, p.Result.Noise.FigureSSBDB, p.Result.LO.AbsorbedW, p.Result.Stats.Shooting,
				r.ConversionLossDB, r.Noise.FigureSSBDB, r.LO.AbsorbedW, r.Stats.Shooting)
		}
	}
}
