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
