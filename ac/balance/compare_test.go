package balance

import (
	"math"
	"path/filepath"
	"testing"
	"time"

	"qpoint/ac/steady"
	"qpoint/bias/circuit"
)

// compareWithShooting solves the circuit's own distortion drive by both
// methods and checks that they agree to 0.001 dB on every harmonic (DC
// shift included) down to floorDBc below the largest. Shooting's own
// accuracy is judged first, by its default grid (255 and 511 samples per
// period) against a finer one (1023 and 2047); the finer solve is the
// reference, and a harmonic on which shooting's two grids differ by more
// than 0.001 dB is not one shooting resolves, so it is logged, not
// compared.
func compareWithShooting(t *testing.T, c *circuit.Circuit, floorDBc float64) {
	t.Helper()
	nw := linearise(t, c)
	d := fileDrive(t, c)
	const harmonics = 10
	t0 := time.Now()
	coarse, err := steady.Solve(nw, d, steady.Settings{Harmonics: harmonics})
	if err != nil {
		t.Skipf("shooting does not solve it: %v", err)
	}
	sh, err := steady.Solve(nw, d, steady.Settings{Harmonics: harmonics, Samples: 1023, Start: coarse})
	if err != nil {
		t.Skipf("shooting does not solve it at 1023 samples: %v", err)
	}
	tShoot := time.Since(t0)
	hb, err := Solve(nw, d, Settings{Report: harmonics})
	if err != nil {
		t.Fatalf("harmonic balance: %v", err)
	}
	largest := 0.0
	for _, h := range sh.Output {
		largest = math.Max(largest, math.Abs(h.Amplitude))
	}
	worst, count, unresolved := 0.0, 0, 0
	for k, h := range sh.Output {
		level := 20 * math.Log10(math.Abs(h.Amplitude)/largest)
		if level < floorDBc {
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
		self := 20 * math.Log10(math.Abs(coarse.Output[k].Amplitude)/math.Abs(h.Amplitude))
		if math.Abs(self) > 0.001 {
			unresolved++
			t.Logf("  %2d: at %.1f dB shooting's grids differ by %+.2e dB: not compared (balance %+.2e dB from the finer)", k, level, self, db)
			continue
		}
		count++
		worst = math.Max(worst, math.Abs(db))
		if math.Abs(db) > 0.001 {
			t.Errorf("harmonic %d at %.1f dB: shooting %.10g, balance %.10g differ by %+.3g dB", k, level, h.Amplitude, got.Amplitude, db)
		}
	}
	t.Logf("worst %.2e dB over %d harmonics (%d not resolved by shooting); shooting %v, balance %v (%d harmonics, %d Newton, %d GMRES, %v)",
		worst, count, unresolved, tShoot, hb.Stats.Runtime, hb.Stats.Harmonics, hb.Stats.Iterations, hb.Stats.LinearIterations, hb.Stats.Fallbacks)
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
			compareWithShooting(t, c, -120)
		})
	}
}

// TestHardMatchShooting: on every circuit of testdata/hard that names a
// distortion analysis and that shooting solves, harmonic balance agrees
// with shooting to 0.001 dB on every harmonic down to -120 dB below the
// largest. Most of these switch hard and need hundreds of harmonics: a
// few seconds each, so -short skips them.
func TestHardMatchShooting(t *testing.T) {
	if testing.Short() {
		t.Skip("-short: the hard circuits take a minute")
	}
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
			compareWithShooting(t, c, -120)
		})
	}
}
