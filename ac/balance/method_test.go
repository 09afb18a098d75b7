package balance

import (
	"math"
	"testing"

	"qpoint/ac"
	"qpoint/ac/steady"
)

// TestMethodChoice: through steady.Solve, the automatic choice takes
// shooting for a small lumped circuit under one tone and harmonic
// balance for two tones and for large circuits, says which ran, and both
// methods agree on the detector.
func TestMethodChoice(t *testing.T) {
	nw := network(t, demo(t, "detector"))
	d := fileDrive(t, nw.Point.Circuit)
	for _, c := range []struct {
		choice Choice
		second float64
		want   string
	}{
		{Auto, 0, steady.MethodShooting},
		{Auto, 2.46e9, steady.MethodHarmonicBalance},
		{HarmonicBalance, 0, steady.MethodHarmonicBalance},
		{Shooting, 0, steady.MethodShooting},
	} {
		dd := d
		dd.SecondToneHz = c.second
		st, err := steady.Solve(nw, dd, steady.Settings{Method: Method{Choice: c.choice}})
		if err != nil {
			t.Fatalf("%s: %v", c.choice, err)
		}
		if st.Method != c.want {
			t.Errorf("%s with second tone %g: %q ran, want %q", c.choice, c.second, st.Method, c.want)
		}
		if c.choice == Auto && st.Choice == "" {
			t.Errorf("auto: no reason given for the choice")
		}
		if c.second != 0 && (len(st.Products) == 0 || math.IsNaN(st.IM3dBc())) {
			t.Errorf("two tones: no products in the steady state")
		}
	}
	if _, err := steady.Solve(nw, ac.Drive{Input: d.Input, Output: d.Output, FrequencyHz: d.FrequencyHz, SecondToneHz: 2.46e9, EMF: d.EMF},
		steady.Settings{Method: Method{Choice: Shooting}}); err == nil {
		t.Errorf("shooting accepted two tones")
	}
	big := network(t, ladder(100))
	st, err := steady.Solve(big, ladderDrive(), steady.Settings{Method: Method{}})
	if err != nil {
		t.Fatal(err)
	}
	if st.Method != steady.MethodHarmonicBalance {
		t.Errorf("a 100-unknown ladder: %q ran, want harmonic balance", st.Method)
	}
}

// TestLevelSweepContinues: a level sweep through steady.LevelSweep by
// harmonic balance starts each level from the last, taking fewer Newton
// iterations than cold solves, and gives the same harmonics (to 1e-6
// relative) as a cold solve at each level.
func TestLevelSweepContinues(t *testing.T) {
	nw := network(t, demo(t, "limiter"))
	d := fileDrive(t, nw.Point.Circuit)
	levels := []float64{-10, -5, 0, 5}
	m := steady.Settings{Method: Method{Choice: HarmonicBalance}}
	pts, err := steady.LevelSweep(nw, d, levels, m, nil)
	if err != nil {
		t.Fatal(err)
	}
	warm, cold := 0, 0
	for i, p := range pts {
		warm += p.Steady.Iterations
		dd := d
		dd.EMF = p.EMF
		c, err := steady.Solve(nw, dd, m)
		if err != nil {
			t.Fatal(err)
		}
		cold += c.Iterations
		for k := 1; k < len(c.Output); k += 2 {
			a, b := p.Steady.Output[k].Amplitude, c.Output[k].Amplitude
			if math.Abs(a-b) > 1e-6*math.Abs(b)+1e-12*c.Output[1].Amplitude {
				t.Errorf("at %g dBm, harmonic %d: %g continued, %g cold", levels[i], k, a, b)
			}
		}
	}
	t.Logf("Newton iterations: %d continued, %d cold", warm, cold)
	if warm >= cold {
		t.Errorf("continuation took %d Newton iterations against %d cold", warm, cold)
	}
}

// TestMeasuredIntercept: the intercept read from a two-tone level sweep
// of the waveform, as a bench reads it (lines of slope 1 and 3 through
// the small-signal levels), equals the Volterra estimate's IIP3 within
// 0.05 dB on the detector, and the measured slope is 3 dB/dB.
func TestMeasuredIntercept(t *testing.T) {
	nw := network(t, demo(t, "detector"))
	d := fileDrive(t, nw.Point.Circuit)
	d.SecondToneHz = d.FrequencyHz + 10e6
	var levels []float64
	for l := -75.0; l <= -20; l += 5 {
		levels = append(levels, l)
	}
	pts, err := steady.LevelSweep(nw, d, levels, steady.Settings{Method: Method{}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	ip, err := steady.MeasuredIntercept(pts, nw.Ports[d.Output.Port].Impedance)
	if err != nil {
		t.Fatal(err)
	}
	d.EMF = ac.DBmToEMF(-70, nw.Ports[d.Input].Impedance)
	est, err := ac.Volterra(nw, d)
	if err != nil {
		t.Fatal(err)
	}
	oip3, _ := est.OIP3dBm()
	t.Logf("measured IIP3 %.3f dBm, OIP3 %.3f dBm, slope %.4f over %.0f..%.0f dBm (%d levels); estimate IIP3 %.3f dBm, OIP3 %.3f dBm",
		ip.IIP3DBm, ip.OIP3DBm, ip.Slope, ip.FromDBm, ip.ToDBm, ip.Levels, est.IIP3dBm(), oip3)
	if math.Abs(ip.IIP3DBm-est.IIP3dBm()) > 0.05 || math.Abs(ip.OIP3DBm-oip3) > 0.05 {
		t.Errorf("measured intercept %.3f/%.3f dBm, estimate %.3f/%.3f dBm", ip.IIP3DBm, ip.OIP3DBm, est.IIP3dBm(), oip3)
	}
	if math.Abs(ip.Slope-3) > 0.01 {
		t.Errorf("IM3 slope %.4f dB/dB, want 3", ip.Slope)
	}
}
