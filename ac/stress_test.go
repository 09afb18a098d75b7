package ac

import (
	"strings"
	"testing"
)

// TestStressCautions: the limiter demo at +20 dBm is driven past its
// clamp diodes' current rating; at -20 dBm nothing is exceeded.
func TestStressCautions(t *testing.T) {
	nw := network(t, demo(t, "limiter"))
	d := Drive{Input: 0, Output: Output{Port: 1}, FrequencyHz: 1e9}
	d.EMF = DBmToEMF(-20, 50)
	st, err := SteadyState(nw, d, SteadySettings{})
	if err != nil {
		t.Fatal(err)
	}
	if c := st.Cautions(); len(c) != 0 {
		t.Errorf("at -20 dBm: cautions %q, want none", c)
	}
	d.EMF = DBmToEMF(27, 50)
	st, err = SteadyState(nw, d, SteadySettings{Start: st})
	if err != nil {
		t.Fatal(err)
	}
	c := strings.Join(st.Cautions(), "\n")
	if !strings.Contains(c, "peak forward current") {
		t.Errorf("at +27 dBm (10 V peak EMF into 100 mA clamps): cautions %q, want the current rating", c)
	}
	for _, s := range st.Stress {
		if s.PeakCurrent <= 0 || s.MeanPower <= 0 {
			t.Errorf("%s: stress %+v", s.Name, s)
		}
	}
}
