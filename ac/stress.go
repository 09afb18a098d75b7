package ac

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

	maxCurrent, maxReverse, maxPower, knee float64 // ratings and knee
}

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

// Cautions returns a sentence for every rating the signal exceeds and for
// every junction driven into breakdown during the period. Results past a
// rating describe a part that may be damaged.
func (s *Steady) Cautions() []string {
	var c []string
	for _, d := range s.Stress {
		if d.maxCurrent > 0 && d.PeakCurrent > d.maxCurrent {
			c = append(c, fmt.Sprintf("%s: peak forward current %s exceeds its %s rating (%.0f%%)", d.Name,
				si.Format(d.PeakCurrent, "A", 3), si.Format(d.maxCurrent, "A", 3), 100*d.PeakCurrent/d.maxCurrent))
		}
		if d.maxReverse > 0 && d.PeakReverseVoltage > d.maxReverse {
			c = append(c, fmt.Sprintf("%s: peak reverse voltage %s exceeds its %s rating (%.0f%%)", d.Name,
				si.Format(d.PeakReverseVoltage, "V", 3), si.Format(d.maxReverse, "V", 3), 100*d.PeakReverseVoltage/d.maxReverse))
		}
		if d.maxPower > 0 && d.MeanPower > d.maxPower {
			c = append(c, fmt.Sprintf("%s: mean dissipation %s exceeds its %s rating (%.0f%%)", d.Name,
				si.Format(d.MeanPower, "W", 3), si.Format(d.maxPower, "W", 3), 100*d.MeanPower/d.maxPower))
		}
		if d.BreakdownFraction > 0 {
			c = append(c, fmt.Sprintf("%s: the signal drives the junction past its %s breakdown knee for %.0f%% of each period",
				d.Name, si.Format(d.knee, "V", 3), 100*d.BreakdownFraction))
		}
	}
	return c
}
