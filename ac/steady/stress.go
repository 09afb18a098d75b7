package steady

import (
	"fmt"
	"math"

	"qpoint/bias/si"
	"qpoint/smallsignal"
)

// DiodeStress is a diode's worst case over one period of the steady state.
type DiodeStress struct {
	Name               string
	PeakCurrent        float64 // A, largest forward current
	PeakReverseVoltage float64 // V, largest reverse terminal voltage (positive)
	MeanPower          float64 // W, mean of terminal voltage × current
	// BreakdownFraction is the time fraction the junction spends past its
	// breakdown knee (its knee current above the saturation current); zero
	// for a model without a knee.
	BreakdownFraction float64
	// SmallJunctionCurrent is the forward current above which, for a model
	// without a current rating, the junction is taken to be overdriven
	// (smallJunctionCurrent); zero where the model has a rating or no
	// junction capacitance to size it by.
	SmallJunctionCurrent float64

	maxCurrent, maxReverse, maxPower, knee float64 // ratings and knee
}

// Junction sizing for a model without a current rating: its zero-bias
// capacitance gives its area at about 0.3 fF/µm², the depletion
// capacitance sqrt(qεN/(2 V_bi)) of a lightly doped (N ≈ 1e16 cm⁻³)
// silicon junction at V_bi ≈ 0.7 V (Sze and Ng, "Physics of Semiconductor
// Devices", 3rd ed., 2007, ch. 2); a forward current density of
// 10 kA/cm² (1e-4 A/µm²) is where small junctions and their contacts
// fail (common practice). The light doping makes the area estimate
// generous, so the caution errs towards silence. Their ratio: a junction
// of C_j0 is overdriven above about C_j0 × 3.3e11 A/F (60 mA for
// 0.18 pF).
const (
	capacitancePerArea = 0.3e-15 // F/µm²
	burnoutDensity     = 1e-4    // A/µm²
)

// smallJunctionCurrent returns the forward current above which a junction
// of zero-bias capacitance cj0 is overdriven by the rule above.
func smallJunctionCurrent(cj0 float64) float64 {
	return cj0 / capacitancePerArea * burnoutDensity
}

// OverdriveCurrent returns the forward current above which a junction of
// zero-bias capacitance cj0, in a model without a current rating, is
// taken to be overdriven: cj0 × 3.3e11 A/F, the rule above.
func OverdriveCurrent(cj0 float64) float64 { return smallJunctionCurrent(cj0) }

// Stress reduces the sampled junction currents, terminal voltages and
// junction voltages of one period (per diode, in the network's order) to
// each diode's extremes, for Cautions.
func Stress(nw *smallsignal.Network, currents, terminals, junctions [][]float64) []DiodeStress {
	var out []DiodeStress
	for k, d := range nw.Diodes {
		if k >= len(currents) {
			break
		}
		r := d.Device.Params.Ratings
		s := DiodeStress{Name: d.Name, maxCurrent: r.MaxCurrent, maxReverse: r.MaxReverseVoltage, maxPower: r.MaxPower,
			knee: d.Device.Params.BreakdownVoltage}
		if r.MaxCurrent == 0 && d.Device.ZeroBiasCapacitance > 0 {
			s.SmallJunctionCurrent = smallJunctionCurrent(d.Device.ZeroBiasCapacitance)
		}
		past := 0
		for i, c := range currents[k] {
			v := terminals[k][i]
			s.PeakCurrent = math.Max(s.PeakCurrent, c)
			s.PeakReverseVoltage = math.Max(s.PeakReverseVoltage, -v)
			s.MeanPower += v * c / float64(len(currents[k]))
			if -d.Device.BreakdownCurrent(junctions[k][i]).Value > d.Device.SaturationCurrent {
				past++
			}
		}
		s.BreakdownFraction = float64(past) / float64(max(len(currents[k]), 1))
		out = append(out, s)
	}
	return out
}

// StressKind says what a stress caution concerns.
type StressKind int

// The kinds of stress caution.
const (
	CurrentRating StressKind = iota // peak forward current above the rating
	ReverseRating                   // peak reverse voltage above the rating
	PowerRating                     // mean dissipation above the rating
	PastKnee                        // the junction is driven past its breakdown knee
	SmallJunction                   // no current rating; the current overdrives a junction of this capacitance
)

// StressCaution is one way the signal overstresses a diode. Value is the
// figure seen and Limit what it exceeds (for PastKnee, the fraction of
// the period spent past the knee and the knee voltage).
type StressCaution struct {
	Diode   string
	Kind    StressKind
	Value   float64
	Limit   float64
	Message string
}

// StressCautions returns a caution for every rating the signal exceeds,
// for every junction driven past its breakdown knee during the period, and
// for a junction without a current rating whose peak current exceeds what
// its capacitance says a junction of its size takes (smallJunctionCurrent).
// Results past a rating describe a part that may be damaged.
func (s *State) StressCautions() []StressCaution {
	var c []StressCaution
	add := func(d DiodeStress, k StressKind, v, l float64, format string, args ...any) {
		c = append(c, StressCaution{Diode: d.Name, Kind: k, Value: v, Limit: l, Message: d.Name + ": " + fmt.Sprintf(format, args...)})
	}
	for _, d := range s.Stress {
		if d.maxCurrent > 0 && d.PeakCurrent > d.maxCurrent {
			add(d, CurrentRating, d.PeakCurrent, d.maxCurrent, "peak forward current %s exceeds its %s rating (%.0f%%)",
				si.Format(d.PeakCurrent, "A", 3), si.Format(d.maxCurrent, "A", 3), 100*d.PeakCurrent/d.maxCurrent)
		}
		if d.SmallJunctionCurrent > 0 && d.PeakCurrent > d.SmallJunctionCurrent {
			add(d, SmallJunction, d.PeakCurrent, d.SmallJunctionCurrent,
				"peak forward current %s; its model gives no current rating, and a junction of its %s zero-bias capacitance is overdriven above about %s",
				si.Format(d.PeakCurrent, "A", 3), si.Format(d.SmallJunctionCurrent/(burnoutDensity/capacitancePerArea), "F", 3), si.Format(d.SmallJunctionCurrent, "A", 3))
		}
		if d.maxReverse > 0 && d.PeakReverseVoltage > d.maxReverse {
			add(d, ReverseRating, d.PeakReverseVoltage, d.maxReverse, "peak reverse voltage %s exceeds its %s rating (%.0f%%)",
				si.Format(d.PeakReverseVoltage, "V", 3), si.Format(d.maxReverse, "V", 3), 100*d.PeakReverseVoltage/d.maxReverse)
		}
		if d.maxPower > 0 && d.MeanPower > d.maxPower {
			add(d, PowerRating, d.MeanPower, d.maxPower, "mean dissipation %s exceeds its %s rating (%.0f%%)",
				si.Format(d.MeanPower, "W", 3), si.Format(d.maxPower, "W", 3), 100*d.MeanPower/d.maxPower)
		}
		if d.BreakdownFraction > 0 {
			add(d, PastKnee, d.BreakdownFraction, d.knee, "the signal drives the junction past its %s breakdown knee for %.0f%% of each period",
				si.Format(d.knee, "V", 3), 100*d.BreakdownFraction)
		}
	}
	return c
}

// Cautions returns the messages of StressCautions.
func (s *State) Cautions() []string {
	var m []string
	for _, c := range s.StressCautions() {
		m = append(m, c.Message)
	}
	return m
}
