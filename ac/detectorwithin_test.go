package ac

import (
	"math"
	"testing"
)

// TestDetectorWithin: integrated to 1e-4 instead of 1e-6, the detector
// demo's tangential sensitivity stays within 0.001 dB of Detector's
// (5 log10(1 + 1e-4) = 2.2e-4 dB for a noise power off by the last
// grid's change), its sensitivity and NEP are the same numbers, and the
// integration stops at a coarser grid.
func TestDetectorWithin(t *testing.T) {
	nw := network(t, demo(t, "detector"))
	s := NoiseSettings{Input: 0, Output: Output{Port: 1}}
	ref, err := Detector(nw, s, 2.45e9, 1, 2e6)
	if err != nil {
		t.Fatal(err)
	}
	d, err := DetectorWithin(nw, s, 2.45e9, 1, 2e6, 1e-4)
	if err != nil {
		t.Fatal(err)
	}
	if diff := math.Abs(d.TangentialDBm() - ref.TangentialDBm()); diff > 1e-3 {
		t.Errorf("tangential sensitivity %.6f dBm, Detector's %.6f dBm: %.2g dB apart", d.TangentialDBm(), ref.TangentialDBm(), diff)
	}
	if d.Sensitivity != ref.Sensitivity || d.NEP != ref.NEP || !(d.Video.Change < 1e-4) || !(d.Video.PerDecade < ref.Video.PerDecade) {
		t.Errorf("γ %g and %g, NEP %g and %g, grids %d and %d per decade, last change %g",
			d.Sensitivity, ref.Sensitivity, d.NEP, ref.NEP, d.Video.PerDecade, ref.Video.PerDecade, d.Video.Change)
	}
}
