package plan

import (
	"math"
	"math/cmplx"
	"path/filepath"
	"testing"

	"qpoint/ac/balance"
	"qpoint/ac/steady"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

func linearised(t *testing.T, name string) (*Drive, *smallsignal.Network) {
	t.Helper()
	return linearisedCircuit(t, demo(t, name))
}

func linearisedCircuit(t *testing.T, c *circuit.Circuit) (*Drive, *smallsignal.Network) {
	t.Helper()
	d, err := ResolveDrive(c, DriveRequest{})
	if err != nil {
		t.Fatal(err)
	}
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		t.Fatal(err)
	}
	return d, nw
}

// TestRunDistortionDetector: on the detector demo a run does what is
// asked and no more, and its parts agree with each other: the sweep
// holds every level asked, the sweep point at the drive's level is the
// waveform at it, the comparison's fundamental is the waveform's and
// near the linear gain's, and the transfer curve (a detector's output) is drawn
// from the sweep with a finite tangential sensitivity.
func TestRunDistortionDetector(t *testing.T) {
	d, nw := linearised(t, "detector")
	bare, err := RunDistortion(nw, d, DistortionRequest{})
	if err != nil {
		t.Fatal(err)
	}
	if bare.Validity != nil || bare.Sweep != nil || bare.Transfer != nil || bare.TwoTone != nil || !math.IsNaN(bare.TangentialDBm) {
		t.Errorf("a bare run computed more than the estimate and the waveform: %+v", bare)
	}
	levels := []float64{-40, -35, -30, -25, -20}
	var stages []string
	res, err := RunDistortion(nw, d, DistortionRequest{Validity: true, Levels: levels,
		Progress: func(stage string, n int) (func(int, int), func()) {
			stages = append(stages, stage)
			if n != len(levels) {
				t.Errorf("stage %s of %d steps, want %d", stage, n, len(levels))
			}
			return func(int, int) {}, func() {}
		}})
	if err != nil {
		t.Fatal(err)
	}
	if len(stages) != 1 || stages[0] != "level sweep" {
		t.Errorf("progress stages %q, want one level sweep", stages)
	}
	if len(res.Sweep) != len(levels) || res.SweepErr != nil {
		t.Fatalf("sweep of %d levels (%v), want %d", len(res.Sweep), res.SweepErr, len(levels))
	}
	at := res.Sweep[2]
	if at.LevelDBm != d.LevelDBm {
		t.Fatalf("third level %g dBm, want the drive's %g", at.LevelDBm, d.LevelDBm)
	}
	a, b := at.Steady.Output[1].Amplitude, res.Waveform.Output[1].Amplitude
	if math.Abs(a-b) > 1e-6*b {
		t.Errorf("fundamental %g V in the sweep at the drive's level, %g V in the waveform", a, b)
	}
	var c steady.Comparison
	for _, c = range res.Comparison {
		if c.Order == 1 {
			break
		}
	}
	// The estimate's fundamental carries its third-order correction: at
	// -30 dBm, hundredths of a dB from the linear gain.
	lin := cmplx.Abs(res.OneTone.Linear)
	if c.Order != 1 || math.Abs(20*math.Log10(c.Estimate/lin)) > 0.05 || math.Abs(c.Waveform-b) > 1e-12*b {
		t.Errorf("comparison %+v; want within 0.05 dB of the linear %g and the waveform's %g", c, lin, b)
	}
	if res.Validity == nil || res.ValidityErr != nil {
		t.Errorf("validity %v, %v", res.Validity, res.ValidityErr)
	}
	if res.Transfer == nil || len(res.Transfer.Points) != len(levels) || math.IsNaN(res.TangentialDBm) {
		t.Errorf("detector transfer %v, tangential %g dBm; want a curve of %d points and a number", res.Transfer, res.TangentialDBm, len(levels))
	}
	if res.TwoToneSweep != nil || res.Intercept != nil {
		t.Error("a one-tone drive swept two tones")
	}
}

// TestRunDistortionTwoTones: on a balanced pair's two-tone drive (a
// test fixture) the run solves the two-tone waveform and sweeps both
// tones only when asked, and measures an intercept from that sweep.
func TestRunDistortionTwoTones(t *testing.T) {
	c, err := circuit.Load(filepath.Join("..", "..", "testdata", "fixtures", "balanced_pair.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	d, nw := linearisedCircuit(t, c)
	if d.SecondToneHz == 0 {
		t.Fatal("the balanced pair's drive has no second tone")
	}
	levels := []float64{-40, -35, -30}
	one, err := RunDistortion(nw, d, DistortionRequest{Levels: levels})
	if err != nil {
		t.Fatal(err)
	}
	if one.TwoTone != nil || one.TwoToneSweep != nil {
		t.Error("two tones solved without TwoTone")
	}
	res, err := RunDistortion(nw, d, DistortionRequest{TwoTone: true, Levels: levels,
		Waveform: steady.Settings{Method: balance.Method{}}, Sweep: steady.Settings{Method: balance.Method{}}})
	if err != nil {
		t.Fatal(err)
	}
	if res.TwoTone == nil || len(res.TwoToneSweep) != len(levels) {
		t.Fatalf("two-tone waveform %v, sweep of %d levels; want both", res.TwoTone != nil, len(res.TwoToneSweep))
	}
	if res.Intercept == nil && res.InterceptErr == nil {
		t.Error("neither an intercept nor why not")
	}
}
