package transient

import (
	"os"
	"testing"

	"qpoint/ac"
)

// TestSweepLevelWorkers: a level sweep gives the same figures, bit for
// bit, on one worker and on three (each level is a run of its own), and
// the flat leakage rises with the level while the limiter limits.
func TestSweepLevelWorkers(t *testing.T) {
	data, err := os.ReadFile("../../testdata/demo/limiter.yaml")
	if err != nil {
		t.Fatal(err)
	}
	nw := network(t, string(data))
	s := PulseSettings{Input: 0, Output: ac.Output{Port: 1}, Pulse: Pulse{CarrierHz: 5.8e9, Width: 5e-9, Rise: 0.5e-9, Fall: 0.5e-9}}
	levels := []float64{10, 20, 30}
	one := SweepLevel(nw, s, levels, 1, nil)
	three := SweepLevel(nw, s, levels, 3, nil)
	for i := range levels {
		if one[i].Err != nil || three[i].Err != nil {
			t.Fatalf("level %g: %v, %v", levels[i], one[i].Err, three[i].Err)
		}
		a, b := one[i].Result.Figures, three[i].Result.Figures
		if a.Flat != b.Flat || a.SpikePeak != b.SpikePeak || a.Recovery1dB != b.Recovery1dB {
			t.Errorf("level %g: one worker %+v, three %+v", levels[i], a, b)
		}
		if one[i].Result.Output != nil {
			t.Errorf("level %g: a sweep's results keep no time series", levels[i])
		}
		if i > 0 && !(a.Flat > one[i-1].Result.Figures.Flat) {
			t.Errorf("flat leakage %g W at %g dBm is not above %g W at %g dBm", a.Flat, levels[i], one[i-1].Result.Figures.Flat, levels[i-1])
		}
	}
}
