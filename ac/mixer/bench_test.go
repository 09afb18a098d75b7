package mixer

import (
	"testing"

	"qpoint/ac"
)

// BenchmarkDemo analyses the demo mixer at its own LO level, without the
// shooting check: go test -run '^$' -bench Demo ./ac/mixer/
func BenchmarkDemo(b *testing.B) {
	nw := network(b, demoFile(b, "mixer"))
	c := nw.Point.Circuit.Analysis.Mixer
	s := Settings{LO: portIndex(b, nw, c.LO), RF: portIndex(b, nw, c.RF), IF: portIndex(b, nw, c.IF),
		LOFrequencyHz: c.LOFrequencyHz, RFFrequencyHz: c.RFFrequencyHz, LOEMF: ac.DBmToEMF(c.LOLevel.DBm, 50)}
	for i := 0; i < b.N; i++ {
		if _, err := Analyze(nw, s); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkDemoSweep sweeps the demo mixer's LO from -9 to +13 dBm in
// 2 dB steps, each pump continuing from the last:
// go test -run '^$' -bench DemoSweep -benchtime 1x ./ac/mixer/
func BenchmarkDemoSweep(b *testing.B) {
	nw := network(b, demoFile(b, "mixer"))
	c := nw.Point.Circuit.Analysis.Mixer
	s := Settings{LO: portIndex(b, nw, c.LO), RF: portIndex(b, nw, c.RF), IF: portIndex(b, nw, c.IF),
		LOFrequencyHz: c.LOFrequencyHz, RFFrequencyHz: c.RFFrequencyHz}
	var levels []float64
	for l := -9.0; l <= 13; l += 2 {
		levels = append(levels, l)
	}
	for i := 0; i < b.N; i++ {
		for _, p := range SweepLO(nw, s, levels, nil) {
			if p.Err != nil {
				b.Fatal(p.Err)
			}
		}
	}
}
