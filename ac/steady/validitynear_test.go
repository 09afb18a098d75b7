package steady

import (
	"context"
	"errors"
	"math"
	"testing"
	"time"

	"qpoint/ac"
)

// demoDrives are the demos' distortion paths and levels, as their files'
// analysis.distortion give them.
var demoDrives = []struct {
	name    string
	in, out int // input and output ports
	hz, dBm float64
}{
	{"detector", 0, 1, 2.45e9, -30},
	{"attenuator", 0, 1, 900e6, -10},
	{"limiter", 0, 1, 5.8e9, 0},
	{"mixer", 1, 0, 1.8e9, -15},
}

// TestValidityNearAgrees: searched outward from the file's level,
// ValidityNear brackets the same crossing ValidityLimit's climb from 40 dB
// below finds, to their common resolution of 0.05 dB, on every demo; and
// started from that limit, as from the previous step of a slider, it
// needs at most four waveform solves for a 0.25 dB answer.
func TestValidityNearAgrees(t *testing.T) {
	// 63 samples a period keep the test quick; both searches use them.
	s := Settings{Harmonics: 5, Samples: 63}
	for _, k := range demoDrives {
		nw := network(t, demo(t, k.name))
		d := ac.Drive{Input: k.in, Output: ac.Output{Port: k.out}, FrequencyHz: k.hz}
		ref, err := ValidityLimit(nw, d, k.dBm-40, k.dBm+40, 0.5, s)
		if err != nil {
			t.Fatal(err)
		}
		near, err := ValidityNear(context.Background(), nw, d, ValiditySearch{GuessDBm: k.dBm, LowestDBm: k.dBm - 100, HighestDBm: k.dBm + 40, Steady: s})
		if err != nil {
			t.Fatal(err)
		}
		if ref.Outcome != LimitFound || near.Outcome != LimitFound || math.Abs(near.LevelDBm-ref.LevelDBm) > 0.05 || near.Held == nil {
			t.Errorf("%s: near %s; climb %s", k.name, near.Note(), ref.Note())
			continue
		}
		warm, err := ValidityNear(context.Background(), nw, d, ValiditySearch{GuessDBm: ref.LevelDBm - 0.1, ResolutionDB: 0.25,
			LowestDBm: k.dBm - 100, HighestDBm: k.dBm + 40, Steady: Settings{Harmonics: 5, Samples: 63, Start: ref.Held}})
		if err != nil {
			t.Fatal(err)
		}
		if warm.Steps > 4 || math.Abs(warm.LevelDBm-ref.LevelDBm) > 0.25 {
			t.Errorf("%s: from 0.1 dB below the limit, %d solves to %.3f dBm; want at most 4, within 0.25 dB of %.3f dBm",
				k.name, warm.Steps, warm.LevelDBm, ref.LevelDBm)
		}
		t.Logf("%s: limit %.3f dBm; climb %d solves, outward from the file's level %d, warm %d", k.name, ref.LevelDBm, ref.Steps, near.Steps, warm.Steps)
	}
}

// TestValidityNearEnds: held to the top of the range, never held down to
// its bottom, and stopped by its context.
func TestValidityNearEnds(t *testing.T) {
	nw := network(t, demo(t, "detector"))
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 2.45e9}
	s := Settings{Harmonics: 5, Samples: 63}
	v, err := ValidityNear(context.Background(), nw, d, ValiditySearch{GuessDBm: -60, LowestDBm: -70, HighestDBm: -50, Steady: s})
	if err != nil {
		t.Fatal(err)
	}
	if v.Outcome != HeldThroughout || v.LevelDBm != -50 {
		t.Errorf("below the limit throughout: %s", v.Note())
	}
	v, err = ValidityNear(context.Background(), nw, d, ValiditySearch{GuessDBm: -15, LowestDBm: -20, HighestDBm: -10, Steady: s})
	if err != nil {
		t.Fatal(err)
	}
	if v.Outcome != NeverHeld || v.LowestDBm != -20 || !math.IsNaN(v.LevelDBm) || !(v.WorstDB > 0.5) {
		t.Errorf("above the limit throughout: %s (lowest %g)", v.Note(), v.LowestDBm)
	}
	ctx, cancel := context.WithCancel(context.Background())
	calls := 0
	_, err = ValidityNear(ctx, nw, d, ValiditySearch{GuessDBm: -60, LowestDBm: -100, HighestDBm: 20, Steady: s,
		Progress: func(int) {
			calls++
			if calls == 2 {
				cancel()
			}
		}})
	if !errors.Is(err, context.Canceled) || calls != 2 {
		t.Errorf("cancelled after the second solve: %v after %d solves", err, calls)
	}
}

// TestValidityNearBounded: with MaxSolves the search stops closing its
// bracket when the solves run out, and says how wide the bracket is: the
// estimates held at LevelDBm and not at FailsDBm, both observed.
func TestValidityNearBounded(t *testing.T) {
	nw := network(t, demo(t, "mixer"))
	d := ac.Drive{Input: 0, Output: ac.Output{Port: 2}, FrequencyHz: 1.9e9}
	s := ValiditySearch{GuessDBm: -40, LowestDBm: -120, HighestDBm: 20, ResolutionDB: 0.05, Steady: Settings{Harmonics: 5, Samples: 63}}
	full, err := ValidityNear(context.Background(), nw, d, s)
	if err != nil {
		t.Fatal(err)
	}
	s.MaxSolves = 3
	cut, err := ValidityNear(context.Background(), nw, d, s)
	if err != nil {
		t.Fatal(err)
	}
	if full.Outcome != LimitFound || cut.Outcome != LimitFound || !(full.FailsDBm-full.LevelDBm <= 0.05) {
		t.Fatalf("full %s (fails at %g); cut %s", full.Note(), full.FailsDBm, cut.Note())
	}
	if !(cut.Steps < full.Steps) || !(cut.LevelDBm <= full.LevelDBm+0.05) || !(cut.FailsDBm >= full.FailsDBm-0.05) {
		t.Errorf("cut at %d solves: holds at %.3f, fails at %.3f; the full search (%d solves): %.3f to %.3f",
			cut.Steps, cut.LevelDBm, cut.FailsDBm, full.Steps, full.LevelDBm, full.FailsDBm)
	}
	// A budget already spent stops the search as soon as it brackets.
	s.MaxSolves, s.Budget = 0, time.Nanosecond
	spent, err := ValidityNear(context.Background(), nw, d, s)
	if err != nil {
		t.Fatal(err)
	}
	if spent.Outcome != LimitFound || spent.Steps > cut.Steps || !(spent.FailsDBm > spent.LevelDBm) {
		t.Errorf("spent budget: %d solves, %.3f to %.3f; cut at 3: %d", spent.Steps, spent.LevelDBm, spent.FailsDBm, cut.Steps)
	}
}
