package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestSweepLevelVolts: --sweep-level takes peak voltages as --level does.
// 1 mV peak into a matched 50 Ω load is an EMF of 2 mV, an available power
// of (2 mV)²/(8 · 50 Ω) = 10 nW, -50 dBm (common practice), so
// 1mV:100mV:20dB is the sweep -50dBm:-10dBm:20dB.
func TestSweepLevelVolts(t *testing.T) {
	f := filepath.Join(demoDir, "detector.yaml")
	volts, errs, code := runCLI(t, "distortion", f, "--no-limit", "--json", "--sweep-level", "1mV:100mV:20dB")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	dbm, errs, code := runCLI(t, "distortion", f, "--no-limit", "--json", "--sweep-level", "-50dBm:-10dBm:20dB")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if volts != dbm {
		t.Error("the sweep in peak volts differs from the same sweep in dBm")
	}
	for _, bad := range []string{"1mV:100mV:10dBm", "100mV:1mV:1dB", "1mV:100mV", "1A:2A:1dB", "-50dBm:200dBm:1dB"} {
		_, errs, code := runCLI(t, "distortion", f, "--no-limit", "--sweep-level", bad)
		if code != 2 || !strings.Contains(errs, "flag --sweep-level") {
			t.Errorf("--sweep-level %s: exit %d, %q; want a usage error naming the flag", bad, code, errs)
		}
	}
}
