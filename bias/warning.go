package bias

import (
	"fmt"
	"math"

	"qpoint/bias/diode"
	"qpoint/bias/si"
)

// Warning is a caution about a part at the operating point.
type Warning struct {
	Part    string
	Kind    WarningKind
	Message string
}

// WarningKind classifies a Warning.
type WarningKind int

const (
	// RatingExceeded: a current, reverse voltage or power above the part's
	// rating. Results past a rating describe a part that may be damaged.
	RatingExceeded WarningKind = iota
	// Breakdown: the junction is in, or within 20% of, reverse breakdown.
	Breakdown
	// LeakageDominated: the junction is reverse biased and carries only its
	// saturation current, a quantity that varies widely between parts and
	// with temperature.
	LeakageDominated
	// Model: the model had to be adjusted at this temperature.
	Model
	// Overdriven: the junction's forward current is set by the
	// exponential law alone, because the circuit holds its voltage with
	// nothing to limit the current, and that current is more than a
	// milliampere; or it carries more than 10 A whatever sets it; or its
	// voltage lies beyond where the law implies diode.MaxLawCurrent.
	Overdriven
	// Wiring: the circuit file's own warning (circuit.Warning), carried
	// with the point: a node that looks like gnd, a node with one
	// terminal. The message starts with FILE:LINE:COL.
	Wiring
)

// String names the kind as JSON and tables print it.
func (k WarningKind) String() string {
	switch k {
	case RatingExceeded:
		return "rating-exceeded"
	case Breakdown:
		return "breakdown"
	case LeakageDominated:
		return "leakage-dominated"
	case Model:
		return "model"
	case Overdriven:
		return "overdriven"
	case Wiring:
		return "wiring"
	}
	return "unknown"
}

// forcedCurrent is the forward current above which a junction whose
// voltage the circuit holds (its current set by the exponential alone, so
// that 10 mV more at room temperature is half as much current again) gets
// a caution, and hugeCurrent the current no junction of a detector, mixer,
// attenuator or limiter carries, whatever sets it (common practice: small-
// signal and RF junctions are rated in milliamperes to an ampere).
const (
	forcedCurrent = 1e-3 // A
	hugeCurrent   = 10   // A
	forcedShare   = 0.1  // below it the circuit holds the junction's voltage (R_c < r_d/9)
)

func cautions(p *Point) []Warning {
	var w []Warning
	add := func(part string, k WarningKind, format string, args ...any) {
		w = append(w, Warning{part, k, fmt.Sprintf(format, args...)})
	}
	seen := map[string]bool{}
	for _, d := range p.Diodes {
		dev := d.Device
		r := dev.Params.Ratings
		if d.CurrentFraction > 1 {
			add(d.Name, RatingExceeded, "forward current %s exceeds the %s rating (%.0f%%)",
				si.Format(d.Current, "A", 3), si.Format(r.MaxCurrent, "A", 3), 100*d.CurrentFraction)
		}
		if d.ReverseVoltageFraction > 1 {
			add(d.Name, RatingExceeded, "reverse voltage %s exceeds the %s rating (%.0f%%)",
				si.Format(-d.Voltage, "V", 3), si.Format(r.MaxReverseVoltage, "V", 3), 100*d.ReverseVoltageFraction)
		}
		if d.PowerFraction > 1 {
			add(d.Name, RatingExceeded, "dissipation %s exceeds the %s rating (%.0f%%)",
				si.Format(d.Power, "W", 3), si.Format(r.MaxPower, "W", 3), 100*d.PowerFraction)
		}
		switch {
		case dev.OnTangent(d.JunctionVoltage):
			add(d.Name, Overdriven, "junction forced to %s, where its law would carry more than %s: nothing limits its current, and the figures for it describe no real part; add the resistance that sets the current",
				si.Format(d.JunctionVoltage, "V", 3), si.Format(diode.MaxLawCurrent, "A", 1))
		case d.share < forcedShare:
			add(d.Name, Overdriven, "junction forced to %s with nothing to limit its current (%s, set by the exponential alone: %s more would multiply it by %.3g); add the resistance that sets the current",
				si.Format(d.JunctionVoltage, "V", 3), si.Format(d.Current, "A", 3), si.Format(10e-3, "V", 2), math.Exp(10e-3/dev.NVT()))
		case d.Current > hugeCurrent && !(d.CurrentFraction > 1):
			add(d.Name, Overdriven, "forward current %s: more than any detector, mixer or limiter junction carries; check the values that set it",
				si.Format(d.Current, "A", 3))
		}
		kneeVoltage := dev.Params.BreakdownVoltage
		switch {
		case d.InBreakdown:
			add(d.Name, Breakdown, "in reverse breakdown: junction at %s, knee at %s, current %s",
				si.Format(d.JunctionVoltage, "V", 4), si.Format(-kneeVoltage, "V", 3), si.Format(d.Current, "A", 3))
		case kneeVoltage > 0 && -d.JunctionVoltage > 0.8*kneeVoltage:
			add(d.Name, Breakdown, "reverse voltage %s is %.0f%% of the breakdown voltage %s",
				si.Format(-d.JunctionVoltage, "V", 3), 100*-d.JunctionVoltage/kneeVoltage, si.Format(kneeVoltage, "V", 3))
		case d.JunctionVoltage < -5*dev.NVT():
			add(d.Name, LeakageDominated, "reverse biased at %s: its current %s is leakage set by the saturation current, which varies widely between parts and with temperature",
				si.Format(d.JunctionVoltage, "V", 3), si.Format(d.Current, "A", 3))
		}
		if !seen[d.Model] {
			seen[d.Model] = true
			for _, n := range dev.Notes {
				add(d.Model, Model, "%s", n)
			}
		}
	}
	for _, cw := range p.Circuit.Warnings {
		add("", Wiring, "%s", cw)
	}
	return w
}
