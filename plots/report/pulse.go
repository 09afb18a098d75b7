package report

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"qpoint/ac/transient"
	"qpoint/bias/si"
	"qpoint/smallsignal"
)

// DBmOf returns a power in dBm, or "—".
func DBmOf(w float64) string {
	if !(w > 0) || math.IsInf(w, 0) {
		return "—"
	}
	return fmt.Sprintf("%.2f dBm", 10*math.Log10(w*1e3))
}

// TimeOf formats a duration, or "—" for none.
func TimeOf(t float64) string {
	if math.IsNaN(t) || math.IsInf(t, 0) {
		return "—"
	}
	return si.Format(t, "s", 4)
}

// PulseTables returns the figures of the last pulse, with each pulse's
// when there are several.
func PulseTables(nw *smallsignal.Network, res *transient.PulseResult) []*Table {
	f := res.Figures
	title := "Limiter figures"
	if len(res.Pulses) > 1 {
		title += fmt.Sprintf(" (pulse %d of %d)", f.Pulse+1, len(res.Pulses))
	}
	t := &Table{Caption: title, Header: []string{"quantity", "value", ""}}
	if res.Kind == transient.Detector {
		t.Caption = strings.Replace(title, "Limiter", "Detector", 1)
		t.Add("video change at the end of the flat top", si.Format(f.Settled, "V", 4), "from the DC point's "+si.Format(res.Baseline, "V", 4))
		if !math.IsNaN(res.SteadyShift) {
			t.Add("steady-state DC shift", si.Format(res.SteadyShift, "V", 4), fmt.Sprintf("continuous carrier; the pulse reached %s", ShareDB(f.Settled, res.SteadyShift)))
		}
		t.Add("rise time, 10-90 %", TimeOf(f.RiseTime), "of the change towards the steady state")
		t.Add("fall time, 90-10 %", TimeOf(f.FallTime), "after the flat top")
		return []*Table{t}
	}
	spikeNote := fmt.Sprintf("%s after the pulse's start", TimeOf(f.SpikeTime-f.Start))
	t.Add("spike leakage, peak", DBmOf(f.SpikePeak), spikeNote)
	energy := si.Format(f.SpikeEnergy, "J", 3)
	note := "above the flat leakage"
	if f.SpikeEnergy == 0 {
		energy, note = "0 J", "no spike: the peak stays within 1 dB of the flat leakage"
	}
	if math.IsNaN(f.SpikeEnergy) {
		energy, note = "—", ""
	}
	t.Add("spike leakage, energy", energy, note)
	t.Add("flat leakage", DBmOf(f.Flat), fmt.Sprintf("over the end of the flat top; %s below the pulse", Attenuation(res.LevelDBm(nw), f.Flat)))
	if res.Settings.Pulse.ProbeEMF != 0 {
		t.Add("recovery to within 1 dB", RecoveryText(f.Recovery1dB, f.Recovery1dBBound), "of the probe's loss before the pulse")
		t.Add("recovery to within 3 dB", RecoveryText(f.Recovery3dB, f.Recovery3dBBound), "")
		t.Add("probe loss before the pulse", fmt.Sprintf("%.3f dB", res.LossBefore), fmt.Sprintf("small-signal %.3f dB", res.SmallSignalLoss))
	} else {
		t.Add("recovery", "—", "no probe (--probe none)")
	}
	tables := []*Table{t}
	if len(res.Pulses) > 1 {
		pt := &Table{Caption: "Each pulse", Header: []string{"pulse", "start", "spike peak", "spike energy", "flat leakage", "recovery 1 dB", "recovery 3 dB"}}
		for _, q := range res.Pulses {
			pt.Add(strconv.Itoa(q.Pulse+1), si.Format(q.Start, "s", 4), DBmOf(q.SpikePeak), si.Format(q.SpikeEnergy, "J", 3), DBmOf(q.Flat),
				RecoveryText(q.Recovery1dB, q.Recovery1dBBound), RecoveryText(q.Recovery3dB, q.Recovery3dBBound))
		}
		tables = append(tables, pt)
	}
	return tables
}

// Attenuation is how far the flat leakage lies below the carrier's
// available power.
func Attenuation(levelDBm, flatW float64) string {
	if !(flatW > 0) {
		return "—"
	}
	return fmt.Sprintf("%.1f dB", levelDBm-10*math.Log10(flatW*1e3))
}

// RecoveryText formats a recovery time, marking an upper bound.
func RecoveryText(t float64, bound bool) string {
	switch {
	case math.IsNaN(t):
		return "—"
	case bound:
		return "≤ " + si.Format(t, "s", 3)
	}
	return si.Format(t, "s", 4)
}

// PulseStressTable returns each diode's extremes under the pulse.
func PulseStressTable(res *transient.PulseResult) *Table {
	t := &Table{Caption: "Diodes under the pulse", Header: []string{"diode", "peak junction current", "peak reverse voltage", "mean dissipation over the pulse", "past the knee"}}
	for _, d := range res.Diodes {
		knee := "—"
		if d.PastKnee > 0 {
			knee = si.Format(d.PastKnee, "s", 3)
		}
		t.Add(d.Name, si.Format(d.PeakCurrent, "A", 3), si.Format(d.PeakReverseVoltage, "V", 3), si.Format(d.PulsePower, "W", 3), knee)
	}
	return t
}

// ShareDB says how close a value came to a reference, in dB.
func ShareDB(v, ref float64) string {
	d := 20 * math.Log10(math.Abs(v/ref))
	if math.IsNaN(d) || math.IsInf(d, 0) {
		return "—"
	}
	return fmt.Sprintf("%+.2f dB of it", d)
}
