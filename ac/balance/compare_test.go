package balance

import (
	"math"
	"path/filepath"
	"testing"
	"time"

	"qpoint/ac"
	"qpoint/bias/circuit"
)

// compareWithShooting solves the circuit's own distortion drive by both
// methods and returns the worst difference in dB over the harmonics (DC
// shift included) that lie above floorDBc of the largest, with the count
// compared.
func compareWithShooting(t *testing.T, c *circuit.Circuit, samples int, floorDBc float64) {
	t.Helper()
	nw := linearise(t, c)
	d := fileDrive(t, c)
	const harmonics = 10
	t0 := time.Now()
	sh, err := ac.SteadyState(nw, d, ac.SteadySettings{Harmonics: harmonics, Samples: samples})
	if err != nil {
		t.Skipf("shooting does not solve it: %v", err)
	}
	tShoot := time.Since(t0)
	t0 = time.Now()
	hb, err := Solve(nw, d, Settings{Report: harmonics})
	if err != nil {
		t.Fatalf("harmonic balance: %v", err)
	}
	tHB := time.Since(t0)
	largest := 0.0
	for _, h := range sh.Output {
		largest = math.Max(largest, math.Abs(h.Amplitude))
	}
	worst, count := 0.0, 0
	for k, h := range sh.Output {
		if 20*math.Log10(math.Abs(h.Amplitude)/largest) < floorDBc {
			continue
		}
		got := hb.Output[k]
		if got.Orders[0] != k {
			t.Fatalf("harmonic balance output %d has orders %v", k, got.Orders)
		}
		db := 20 * math.Log10(math.Abs(got.Amplitude)/math.Abs(h.Amplitude))
		if math.Signbit(got.Amplitude) != math.Signbit(h.Amplitude) {
			db = math.Inf(1)
		}
		count++
		t.Logf("  %2d: shooting %.10g, balance %.10g (%+.2e dB) at %.1f dB below the largest", k, h.Amplitude, got.Amplitude, db, 20*math.Log10(largest/math.Abs(h.Amplitude)))
		worst = math.Max(worst, math.Abs(db))
	}
	t.Logf("worst %.2e dB over %d harmonics; shooting %v (%d iterations), balance %v (%d harmonics, %d Newton, %d GMRES, %s, %v)",
		worst, count, tShoot, sh.Iterations, tHB, hb.Stats.Harmonics, hb.Stats.Iterations, hb.Stats.LinearIterations, hb.Stats.Linear, hb.Stats.Fallbacks)
	if worst > 0.001 {
		t.Errorf("harmonic balance and shooting differ by %.3g dB", worst)
	}
}

// TestDemosMatchShooting: on every demo circuit, at its own distortion
// drive, harmonic balance and shooting (two independent methods, one in
// the frequency domain and one in the time domain) agree to 0.001 dB on
// every harmonic down to -120 dB below the largest.
func TestDemosMatchShooting(t *testing.T) {
	paths, _ := filepath.Glob(filepath.Join("..", "..", "testdata", "demo", "*.yaml"))
	if len(paths) < 4 {
		t.Fatalf("found %d demos", len(paths))
	}
	for _, p := range paths {
		t.Run(filepath.Base(p), func(t *testing.T) {
			c, err := circuit.Load(p)
			if err != nil {
				t.Fatal(err)
			}
			compareWithShooting(t, c, 0, -120)
		})
	}
}

// TestHardMatchShooting: on every circuit of testdata/hard that names a
// distortion analysis and that shooting solves, harmonic balance agrees
// with shooting to 0.001 dB on every harmonic down to -120 dB below the
// largest.
func TestHardMatchShooting(t *testing.T) {
	paths, _ := filepath.Glob(filepath.Join("..", "..", "testdata", "hard", "*.yaml"))
	if len(paths) < 25 {
		t.Fatalf("found %d hard circuits", len(paths))
	}
	for _, p := range paths {
		c, err := circuit.Load(p)
		if err != nil {
			t.Fatal(err)
		}
		if !c.Analysis.Distortion.Set {
			continue
		}
		t.Run(filepath.Base(p), func(t *testing.T) {
			compareWithShooting(t, c, 0, -120)
		})
	}
}
