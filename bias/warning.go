package bias

import (
	"fmt"

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
	// Overdriven: the circuit forces a forward voltage across the junction
	// with nothing to limit its current, so the result lies where the
	// exponential law has no physical meaning.
	Overdriven
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
	}
	return "unknown"
}

// overdriveArg is the forward bias, in units of n V_T, beyond which a
// junction's current (at least e^60 I_S, 1e8 A even at I_S = 1e-18 A) is
// not a physical result.
const overdriveArg = 60

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
		if d.JunctionVoltage > overdriveArg*dev.NVT() {
			add(d.Name, Overdriven, "junction forced to %s with nothing to limit its current (%s): no real part survives this; add the resistance that sets the current",
				si.Format(d.JunctionVoltage, "V", 3), si.Format(d.Current, "A", 3))
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
	return w
}
