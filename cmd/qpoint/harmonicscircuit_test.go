package main

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"qpoint/ac"
	"qpoint/ac/steady"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// TestHarmonicsAgainstCircuit: a capture synthesised from the limiter's
// own predicted waveform (100 MHz, 0 dBm) compares with --circuit to
// 0.00 dB on every harmonic above the floor.
func TestHarmonicsAgainstCircuit(t *testing.T) {
	lim := filepath.Join(demoDir, "limiter.yaml")
	c, err := circuit.Load(lim)
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
	st, err := steady.Solve(nw, ac.Drive{Input: 0, Output: ac.Output{Port: 1}, FrequencyHz: 100e6, EMF: ac.DBmToEMF(0, 50)}, steady.Settings{Harmonics: 9})
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	b.WriteString("time,value\n")
	for i := 0; i < 4000; i++ {
		tt := float64(i) / 100e6 / 37.3
		v := st.Output[0].Amplitude
		for _, h := range st.Output[1:] {
			v += h.Amplitude * math.Cos(2*math.Pi*float64(h.Order)*100e6*tt+h.PhaseDeg*math.Pi/180)
		}
		fmt.Fprintf(&b, "%.12e,%.12e\n", tt, v)
	}
	path := filepath.Join(t.TempDir(), "capture.csv")
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	out, errs, code := runCLI(t, "harmonics", path, "--circuit", lim, "--level", "0dBm")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// The last table, the comparison, has one row per order: its
	// difference column must read 0.00 dB for the odd orders the limiter
	// makes.
	lines := strings.Split(out, "\n")
	for _, order := range []string{"1", "3", "5"} {
		row := ""
		for _, l := range lines {
			if f := strings.Fields(l); len(f) > 0 && f[0] == order {
				row = l
			}
		}
		if !strings.Contains(row, "0.00 dB") {
			t.Errorf("order %s: no 0.00 dB difference in\n%s", order, out)
		}
	}
}
