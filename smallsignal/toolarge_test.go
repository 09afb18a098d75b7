package smallsignal

import (
	"errors"
	"fmt"
	"runtime"
	"strings"
	"testing"

	"qpoint/bias"
	"qpoint/bias/circuit"
)

// TestTooLargeRefused: a legal file of 14000 parts (a ladder of 7000
// resistors and junctions, under 1 MiB) solves its bias in a moment, but
// its dense small-signal matrices would take gigabytes (issue 13, item 8:
// response reached 6.2 GB and distortion 10.8 GB before refusing). New
// refuses it before allocating them, saying why and what is accepted; a
// network at the bound is built.
func TestTooLargeRefused(t *testing.T) {
	ladder := func(rungs int) *circuit.Circuit {
		var b strings.Builder
		b.WriteString("name: ladder\ndiode_models:\n  m: {saturation_current: 1e-14, zero_bias_capacitance: 1p}\nparts:\n")
		b.WriteString("  - {type: voltage_source, name: V, plus: n0, minus: gnd, value: 5}\n")
		for i := 1; i <= rungs; i++ {
			fmt.Fprintf(&b, "  - {type: resistor, name: R%d, between: [n%d, n%d], value: 100}\n", i, i-1, i)
			fmt.Fprintf(&b, "  - {type: diode, name: D%d, anode: n%d, cathode: gnd, model: m}\n", i, i)
		}
		fmt.Fprintf(&b, "ports:\n  - {name: p1, node: n1, impedance: 50, coupling: ac}\n")
		c, err := circuit.Parse("ladder.yaml", []byte(b.String()))
		if err != nil {
			t.Fatal(err)
		}
		return c
	}
	p, err := bias.Solve(ladder(7000), bias.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	_, err = New(p)
	runtime.ReadMemStats(&after)
	var tooLarge *TooLargeError
	if !errors.As(err, &tooLarge) || tooLarge.Unknowns != 7002 || !strings.Contains(err.Error(), "accepted: up to 3000 unknowns,") {
		t.Errorf("New on 7002 unknowns: %v; want a TooLargeError naming the limit", err)
	}
	if alloc := after.TotalAlloc - before.TotalAlloc; alloc > 64<<20 {
		t.Errorf("New allocated %d MB before refusing, want under 64 MB", alloc>>20)
	}
	if testing.Short() {
		return
	}
	// At the bound: MaxUnknowns - 2 rungs make MaxUnknowns - 1 nodes and a source branch.
	p, err = bias.Solve(ladder(MaxUnknowns-2), bias.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if nw, err := New(p); err != nil || nw.N != MaxUnknowns {
		t.Errorf("New at %d unknowns: %v", MaxUnknowns, err)
	}
}
