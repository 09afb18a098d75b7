package steady

import (
	"math"
	"testing"

	"qpoint/ac"
)

// TestDetectorTransfer: the detector demo's output follows square law,
// V ∝ P (log-log slope 1), at low level and turns towards peak detection,
// V ∝ √P (slope ½), at high level (common practice; Cowley and Sorensen
// 1966 for the low-level constant γ, here VoltageSensitivity). The curve
// meets the square-law line at its lowest level and departs from it by
// 1 dB somewhere in between. The sweep stops at +10 dBm: beyond about
// +14 dBm the reverse swing reaches the 3.8 V breakdown knee and the
// output clamps near 0.59 V.
func TestDetectorTransfer(t *testing.T) {
	if testing.Short() {
		t.Skip("a 36-level waveform sweep")
	}
	nw := network(t, demo(t, "detector"))
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9}
	gamma, err := ac.VoltageSensitivity(nw, ac.NoiseSettings{Input: 0, Output: d.Output}, d.FrequencyHz)
	if err != nil {
		t.Fatal(err)
	}
	var levels []float64
	for l := -60.0; l <= 10; l += 2 {
		levels = append(levels, l)
	}
	pts, err := LevelSweep(nw, d, levels, Settings{Harmonics: 5}, nil)
	if err != nil {
		t.Fatal(err)
	}
	tr, err := DetectorTransfer(pts, gamma)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range tr.Points {
		t.Logf("%6.1f dBm  %12.5g V  %+8.4f dB", p.LevelDBm, p.Volts, p.DeviationDB)
	}
	t.Logf("γ %.4g V/W; slopes %.4f (low), %.4f (high); 1 dB deviation at %.2f dBm", gamma, tr.LowSlope, tr.HighSlope, tr.DeviationDBm)
	if math.Abs(tr.LowSlope-1) > 0.01 {
		t.Errorf("low-level slope %.4f, want 1 (square law)", tr.LowSlope)
	}
	if math.Abs(tr.HighSlope-0.5) > 0.1 {
		t.Errorf("high-level slope %.4f, want near ½ (peak detection)", tr.HighSlope)
	}
	if d := tr.Points[0].DeviationDB; math.Abs(d) > 0.01 {
		t.Errorf("at %.0f dBm the waveform lies %.4f dB from the square-law line, want within 0.01 dB", tr.Points[0].LevelDBm, d)
	}
	if !(tr.DeviationDBm > -60 && tr.DeviationDBm < 10) {
		t.Errorf("1 dB deviation at %v dBm, want within the sweep", tr.DeviationDBm)
	}
}
