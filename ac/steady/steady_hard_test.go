package steady

import (
	"math"
	"math/cmplx"
	"path/filepath"
	"testing"
	"time"

	"qpoint/ac"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// hardDrive builds the drive an analysis.distortion section describes: the
// input port's generator at the level given (a peak voltage is what the
// generator delivers into a matched load, half its EMF), the output a port
// or a node.
func hardDrive(t *testing.T, c *circuit.Circuit) ac.Drive {
	t.Helper()
	d := c.Analysis.Distortion
	drive := ac.Drive{Input: -1, Output: ac.Output{Port: -1, Node: d.Output}, FrequencyHz: d.FrequencyHz}
	for i, p := range c.Ports {
		if p.Name == d.Input {
			drive.Input = i
		}
		if p.Name == d.Output {
			drive.Output = ac.Output{Port: i}
		}
	}
	if drive.Input < 0 {
		t.Fatalf("input %q is not a port", d.Input)
	}
	z0 := c.Ports[drive.Input].Impedance
	if d.Level.IsPower {
		drive.EMF = ac.DBmToEMF(d.Level.DBm, z0)
	} else {
		drive.EMF = 2 * d.Level.PeakVolts
	}
	return drive
}

// TestHardSteadyState runs the waveform solver on every circuit of
// testdata/hard that names a distortion analysis, at the level the file
// gives (most are steep: the junctions switch hard each period). Each must
// reach a periodic steady state with finite harmonics, and the harmonics
// must hold, to 1 % of the largest of them, when the period is sampled twice
// as finely: the solver's own extrapolation is checked against a finer grid.
func TestHardSteadyState(t *testing.T) {
	paths, err := filepath.Glob(filepath.Join("..", "..", "testdata", "hard", "*.yaml"))
	if err != nil || len(paths) < 25 {
		t.Fatalf("found %d hard circuits, want at least 25: %v", len(paths), err)
	}
	ran := 0
	for _, path := range paths {
		c, err := circuit.Load(path)
		if err != nil {
			t.Fatal(err)
		}
		if !c.Analysis.Distortion.Set {
			continue
		}
		ran++
		t.Run(filepath.Base(path), func(t *testing.T) {
			p, err := bias.Solve(c, bias.Settings{})
			if err != nil {
				t.Fatal(err)
			}
			nw, err := smallsignal.New(p)
			if err != nil {
				t.Fatal(err)
			}
			d := hardDrive(t, c)
			start := time.Now()
			st, err := Solve(nw, d, Settings{})
			if err != nil {
				t.Fatalf("at %.3g V EMF: %v", d.EMF, err)
			}
			took := time.Since(start)
			checkSteadyFinite(t, st)
			fine, err := Solve(nw, d, Settings{Samples: 511, Start: st})
			if err != nil {
				t.Fatalf("at 511 samples per period: %v", err)
			}
			// The largest harmonic, DC shift included, sets the scale: a
			// full-wave rectifier's output has no fundamental.
			fund, largest := st.Output[1].Amplitude, 0.0
			for _, h := range st.Output {
				largest = math.Max(largest, cmplx.Abs(h.Phasor))
			}
			for k := range st.Output {
				if diff := cmplx.Abs(st.Output[k].Phasor - fine.Output[k].Phasor); diff > 0.01*largest+1e-9 {
					t.Errorf("harmonic %d: %.6g at 255 samples, %.6g at 511 (difference %.3g, largest harmonic %.3g)",
						k, st.Output[k].Phasor, fine.Output[k].Phasor, diff, largest)
				}
			}
			t.Logf("%d iterations, residual %.2g, fundamental %.4g V, DC shift %.4g V, THD %.3g %%, %v",
				st.Iterations, st.Residual, fund, st.Output[0].Amplitude, st.THDPercent, took)
		})
	}
	if ran < 15 {
		t.Errorf("only %d hard circuits name a distortion analysis, want at least 15", ran)
	}
}

// checkSteadyFinite fails on any NaN or infinity in a steady state, but a
// NaN THD where the output has no fundamental.
func checkSteadyFinite(t *testing.T, st *State) {
	t.Helper()
	all := append([]Harmonic(nil), st.Output...)
	for _, h := range st.DiodeCurrents {
		all = append(all, h...)
	}
	for _, h := range all {
		if math.IsNaN(h.Amplitude) || math.IsInf(h.Amplitude, 0) || cmplx.IsNaN(h.Phasor) || cmplx.IsInf(h.Phasor) {
			t.Fatalf("harmonic %d is %v", h.Order, h.Phasor)
		}
	}
	for _, v := range st.Waveform {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("waveform sample %g", v)
		}
	}
	// THD is undefined only without a fundamental above the floor, or
	// with every harmonic from the 2nd up below it (then bounded).
	undefined := st.Output[1].BelowFloor || st.THDBelowPercent > 0
	if math.IsInf(st.THDPercent, 0) || (math.IsNaN(st.THDPercent) && !undefined) {
		t.Fatalf("THD %g %% with a fundamental of %g", st.THDPercent, st.Output[1].Amplitude)
	}
}
