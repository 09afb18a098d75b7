package plots

import (
	"math"
	"strconv"

	"gonum.org/v1/plot"

	"qpoint/bias/si"
)

// LogTicks marks a logarithmic axis of a quantity in Unit: a labelled line
// at each decade with an SI prefix ("1 MHz", "10 MHz", "100 MHz",
// "1 GHz"), unlabelled ones at 2…9 times each decade. Over less than two
// decades it labels 2 and 5 times each decade too; over less than about
// half a decade, where decade lines would be too sparse to read values
// from, it falls back to LinearTicks. Over many decades it labels every
// second or third decade so that labels never crowd.
type LogTicks struct {
	Unit string
}

var _ plot.Ticker = LogTicks{}

// Ticks returns the tick marks in [min, max]; none unless 0 < min < max.
func (t LogTicks) Ticks(min, max float64) []plot.Tick {
	if !(min > 0) || !(max > min) || math.IsInf(max, 0) {
		return nil
	}
	decades := math.Log10(max / min)
	if decades < 0.6 {
		return LinearTicks(t).Ticks(min, max)
	}
	labelled := map[int]bool{1: true}
	if decades < 2 {
		labelled[2], labelled[5] = true, true
	}
	stride := 1 + int(decades/8) // at most about eight decade labels
	lo := int(math.Floor(math.Log10(min)))
	hi := int(math.Ceil(math.Log10(max)))
	var ticks []plot.Tick
	for e := lo; e <= hi; e++ {
		decade := math.Pow10(e)
		for m := 1; m <= 9; m++ {
			v := float64(m) * decade
			if !inRange(v, min, max) {
				continue
			}
			tk := plot.Tick{Value: v}
			if labelled[m] && (m != 1 || floorMod(e, stride) == 0) {
				tk.Label = si.Format(v, t.Unit, 1)
			}
			ticks = append(ticks, tk)
		}
	}
	return ticks
}

// LinearTicks marks a linear axis at multiples of 1, 2 or 5 times a power
// of ten, aiming at four to seven labelled lines, with an unlabelled line
// halfway between. With a Unit the labels carry an SI prefix ("1.5 ns",
// "200 Ω"); without one they are plain numbers ("-20"), as suits decibels.
type LinearTicks struct {
	Unit string
}

var _ plot.Ticker = LinearTicks{}

// Ticks returns the tick marks in [min, max]; none unless min < max.
func (t LinearTicks) Ticks(min, max float64) []plot.Tick {
	step := niceStep(min, max, 6)
	if step == 0 {
		return nil
	}
	return stepTicks(min, max, step, 2, func(v float64) string { return formatStep(v, step, t.Unit) })
}

// PhaseTicks marks an axis in degrees at multiples of 15, 30, 45, 90, 180
// or 360° (or of 1, 2, 5 or 10° over a narrow range), labelled like "-90°".
type PhaseTicks struct{}

var _ plot.Ticker = PhaseTicks{}

// Ticks returns the tick marks in [min, max]; none unless min < max.
func (PhaseTicks) Ticks(min, max float64) []plot.Tick {
	step := phaseStep(min, max)
	if step == 0 {
		return nil
	}
	return stepTicks(min, max, step, 1, func(v float64) string { return formatStep(v, step, "") + "°" })
}

// phaseStep is the smallest step of the degree ladder that gives at most
// seven labelled lines over [min, max].
func phaseStep(min, max float64) float64 {
	span := max - min
	if !(span > 0) || math.IsInf(span, 0) {
		return 0
	}
	for _, s := range []float64{1, 2, 5, 10, 15, 30, 45, 90, 180, 360} {
		if span/s <= 7 {
			return s
		}
	}
	// Beyond ±1000° or so the ladder continues in whole turns.
	return 360 * niceStep(0, span/360, 6)
}

// stepTicks returns labelled ticks at the multiples of step in [min, max]
// and, when minorPerStep > 1, unlabelled ones between them.
func stepTicks(min, max, step float64, minorPerStep int, label func(float64) string) []plot.Tick {
	minor := step / float64(minorPerStep)
	first := math.Ceil(min/minor - 1e-9)
	last := math.Floor(max/minor + 1e-9)
	if last-first > 1000 { // a degenerate step; drawing thousands of lines helps nobody
		return nil
	}
	var ticks []plot.Tick
	for k := first; k <= last; k++ {
		v := k * minor
		tk := plot.Tick{Value: v}
		if math.Mod(k, float64(minorPerStep)) == 0 {
			if v == 0 || math.Abs(v) < step*1e-9 {
				v, tk.Value = 0, 0 // no "-0" and no 1e-17 from rounding
			}
			tk.Label = label(v)
		}
		ticks = append(ticks, tk)
	}
	return ticks
}

// niceStep returns 1, 2 or 5 times a power of ten such that [min, max]
// holds at most about target steps, or 0 for an empty or infinite range.
func niceStep(min, max float64, target int) float64 {
	span := max - min
	if !(span > 0) || math.IsInf(span, 0) || target < 1 {
		return 0
	}
	raw := span / float64(target)
	p := math.Pow10(int(math.Floor(math.Log10(raw))))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= raw*(1-1e-9) {
			return m * p
		}
	}
	return 10 * p
}

// formatStep labels v, one of the multiples of step, with just enough
// significant figures that neighbouring labels differ.
func formatStep(v, step float64, unit string) string {
	if v == 0 {
		return si.Format(0, unit, 1)
	}
	if unit == "" {
		decimals := 0
		if step < 1 {
			decimals = int(math.Ceil(-math.Log10(step) - 1e-9))
		}
		return strconv.FormatFloat(v, 'f', decimals, 64)
	}
	digits := int(math.Floor(math.Log10(math.Abs(v))+1e-9)) - int(math.Floor(math.Log10(step)+1e-9)) + 1
	if digits < 1 {
		digits = 1
	}
	return si.Format(v, unit, digits)
}

// hideLabels keeps a ticker's lines but drops its labels, for the upper
// panels of a stack whose shared axis is labelled once at the bottom.
type hideLabels struct{ plot.Ticker }

func (h hideLabels) Ticks(min, max float64) []plot.Tick {
	ticks := h.Ticker.Ticks(min, max)
	for i := range ticks {
		ticks[i].Label = ""
	}
	return ticks
}

func inRange(v, min, max float64) bool {
	// A relative slop keeps the end decades whose values come out of
	// Pow10 a rounding error outside the range.
	return v >= min*(1-1e-9) && v <= max*(1+1e-9)
}

func floorMod(a, b int) int {
	m := a % b
	if m < 0 {
		m += b
	}
	return m
}
