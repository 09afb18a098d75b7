package report

import (
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"qpoint/ac/mixer"
	"qpoint/ac/plan"
	"qpoint/bias/si"
	"qpoint/smallsignal"
)

// DBm prints a power in watts as dBm, or "—".
func DBm(w float64) string {
	if !(w > 0) || math.IsInf(w, 0) {
		return "—"
	}
	return strconv.FormatFloat(10*math.Log10(w*1e3), 'f', 2, 64) + " dBm"
}

// ReturnLossDB returns -20 log10 |Γ| of an impedance z against a real
// reference z0, Γ = (z - z0)/(z + z0).
func ReturnLossDB(z complex128, z0 float64) float64 {
	g := (z - complex(z0, 0)) / (z + complex(z0, 0))
	return -20 * math.Log10(cmplx.Abs(g))
}

// IsolationDB returns how far a leaked power lies below the available
// power, in dB; +Inf where nothing leaks.
func IsolationDB(availableW, leakedW float64) float64 {
	if !(leakedW > 0) {
		return math.Inf(1)
	}
	return 10 * math.Log10(availableW/leakedW)
}

// isolationText prints an isolation, "∞" where nothing leaks (a circuit
// balanced to rounding).
func isolationText(db float64) string {
	if math.IsInf(db, 1) || db > 300 {
		return "> 300 dB"
	}
	return FigureText(db)
}

// MixerSetupLines describes a mixer analysis as label, text pairs, for a
// header.
func MixerSetupLines(nw *smallsignal.Network, m *plan.Mixer) [][2]string {
	s := m.Settings
	side := "above"
	if s.RFFrequencyHz < s.LOFrequencyHz {
		side = "below"
	}
	zLO := nw.Ports[s.LO].Impedance
	return [][2]string{
		{"LO", fmt.Sprintf("port %s, %s at %.2f dBm available (EMF %s peak behind %s)", m.LOName, si.Format(s.LOFrequencyHz, "Hz", 6),
			m.LOLevelDBm, si.Format(s.LOEMF, "V", 4), si.Format(zLO, "Ω", 4))},
		{"RF", fmt.Sprintf("port %s, %s, %s the LO; image at %s", m.RFName, si.Format(s.RFFrequencyHz, "Hz", 6), side,
			si.Format(math.Abs(2*s.LOFrequencyHz-s.RFFrequencyHz), "Hz", 6))},
		{"IF", fmt.Sprintf("port %s, %s", m.IFName, si.Format(s.IFHz(), "Hz", 6))},
	}
}

// MixerTable returns the conversion losses and noise figures.
func MixerTable(r *mixer.Result) *Table {
	t := &Table{Caption: "Conversion under the LO", Header: []string{"quantity", "value", ""}}
	t.Add("conversion loss, RF to IF", FigureText(r.ConversionLossDB), "single sideband: RF available power over IF power delivered")
	t.Add("image conversion loss", FigureText(r.ImageConversionLossDB), "a signal at the image frequency entering the RF port")
	t.Add("up-conversion loss, IF to RF", FigureText(r.UpconversionLossDB), "IF available power over RF power delivered")
	t.Add("noise figure, single sideband", FigureText(r.Noise.FigureSSBDB), "RF source at 290 K, the signal in the RF sideband only")
	t.Add("noise figure, double sideband", FigureText(r.Noise.FigureDSBDB), "the signal in the RF and image sidebands")
	return t
}

// MixerPortTable returns the impedances each port shows under pump.
func MixerPortTable(nw *smallsignal.Network, m *plan.Mixer, r *mixer.Result) *Table {
	s := m.Settings
	t := &Table{Caption: "Ports under the LO", Header: []string{"port", "frequency", "impedance", "return loss", "looking"}}
	row := func(name string, port int, f float64, z complex128, what string) {
		t.Add(name, si.Format(f, "Hz", 6), FormatImpedance(z), FigureText(ReturnLossDB(z, nw.Ports[port].Impedance)), what)
	}
	row(m.LOName, s.LO, s.LOFrequencyHz, r.LO.InputImpedance, "into the LO port, at its fundamental")
	row(m.RFName, s.RF, s.RFFrequencyHz, r.RFInputImpedance, "into the RF port, every other port and sideband terminated")
	row(m.RFName, s.RF, math.Abs(2*s.LOFrequencyHz-s.RFFrequencyHz), r.ImageInputImpedance, "into the RF port at the image")
	row(m.IFName, s.IF, r.IFHz, r.IFOutputImpedance, "into the IF port: the mixer as the IF amplifier's source")
	return t
}

// MixerLOTable returns what the LO gives and where it leaks.
func MixerLOTable(m *plan.Mixer, r *mixer.Result) *Table {
	t := &Table{Caption: "Local oscillator", Header: []string{"quantity", "value", ""}}
	t.Add("available", DBm(r.LO.AvailableW), "from the generator behind port "+m.LOName)
	t.Add("absorbed", DBm(r.LO.AbsorbedW), "delivered into the circuit at the fundamental, Re{V I*}/2")
	t.Add("isolation, LO to RF", isolationText(IsolationDB(r.LO.AvailableW, r.LO.LeakageToRFW)), "LO available power over the LO power reaching the RF port ("+DBm(r.LO.LeakageToRFW)+")")
	t.Add("isolation, LO to IF", isolationText(IsolationDB(r.LO.AvailableW, r.LO.LeakageToIFW)), "the same at the IF port ("+DBm(r.LO.LeakageToIFW)+")")
	return t
}

// MixerDiodeTable returns each diode under the LO.
func MixerDiodeTable(r *mixer.Result) *Table {
	t := &Table{Caption: "Diodes under the LO", Header: []string{"diode", "DC current", "peak forward current", "peak reverse voltage", "mean dissipation", "past the knee"}}
	for _, d := range r.Diodes {
		knee := "—"
		if d.BreakdownFraction > 0 {
			knee = Percent(d.BreakdownFraction) + " of the period"
		}
		t.Add(d.Name, si.Format(d.DCCurrent, "A", 4), si.Format(d.PeakCurrent, "A", 3), si.Format(d.PeakReverseVoltage, "V", 3), si.Format(d.MeanPower, "W", 3), knee)
	}
	return t
}

// MixerNoiseTable returns the largest rows contributions to the IF noise.
func MixerNoiseTable(r *mixer.Result, rows int) *Table {
	t := &Table{Caption: "Noise at the IF port by source (every sideband)", Header: []string{"source", "share", "density"}}
	for i, c := range r.Noise.Contributions {
		if i == rows {
			rest := 0.0
			for _, x := range r.Noise.Contributions[i:] {
				rest += x.Share
			}
			t.Add(fmt.Sprintf("%d others", len(r.Noise.Contributions)-i), ShareText(rest), "")
			break
		}
		t.Add(c.Source, ShareText(c.Share), Density(math.Sqrt(c.Density), "V/√Hz"))
	}
	t.Add("total", ShareText(1), Density(math.Sqrt(r.Noise.OutputDensity), "V/√Hz"))
	return t
}

// MixerMethodLine says how the figures were found.
func MixerMethodLine(r *mixer.Result) string {
	st := r.Stats
	line := fmt.Sprintf("pump by %s: %d harmonics, %s, residual %.1e; conversion at %d sidebands each side",
		st.Pump.Method, st.Pump.Harmonics, Plural(st.Pump.Iterations, "Newton iteration"), st.Pump.Residual, st.Sidebands)
	if !r.Settings.FixedSidebands {
		line += fmt.Sprintf(" (the last doubling moved the figures by %.1e dB)", st.SidebandChange)
	}
	switch {
	case st.ShootingError != "":
		line += "; the shooting check failed"
	case !math.IsNaN(st.Shooting):
		line += fmt.Sprintf("; shooting agrees to %.1e of the junction currents", st.Shooting)
	}
	return line
}

// MixerSweepTable returns the mixer's figures against the LO level.
func MixerSweepTable(pts []mixer.LevelPoint) *Table {
	t := &Table{Caption: "Mixer against LO level", Header: []string{"LO level", "absorbed", "conversion loss", "image loss", "NF SSB", "NF DSB", "RF impedance", "IF impedance"}}
	var names []string
	for _, p := range pts {
		if p.Result != nil {
			for _, d := range p.Result.Diodes {
				names = append(names, d.Name)
			}
			break
		}
	}
	for _, n := range names {
		t.Header = append(t.Header, n+" DC")
	}
	t.Header = append(t.Header, "cautions")
	for _, p := range pts {
		row := []string{fmt.Sprintf("%.1f dBm", p.LevelDBm)}
		r := p.Result
		if r == nil {
			t.Add(append(row, "failed: "+p.Err.Error())...)
			continue
		}
		row = append(row, DBm(r.LO.AbsorbedW), FigureText(r.ConversionLossDB), FigureText(r.ImageConversionLossDB),
			FigureText(r.Noise.FigureSSBDB), FigureText(r.Noise.FigureDSBDB), FormatImpedance(r.RFInputImpedance), FormatImpedance(r.IFOutputImpedance))
		for _, d := range r.Diodes {
			row = append(row, si.Format(d.DCCurrent, "A", 3))
		}
		kinds := map[mixer.CautionKind]bool{}
		var list []string
		for _, c := range r.Cautions {
			if !kinds[c.Kind] {
				kinds[c.Kind] = true
				list = append(list, string(c.Kind))
			}
		}
		t.Add(append(row, strings.Join(list, ", "))...)
	}
	return t
}

// MixerCards returns the headline cards of a mixer analysis.
func MixerCards(m *plan.Mixer, r *mixer.Result) []Card {
	return []Card{
		{Label: "conversion loss", Value: FigureText(r.ConversionLossDB), Detail: fmt.Sprintf("%s to %s at %.1f dBm LO; NF %s SSB",
			si.Format(m.Settings.RFFrequencyHz, "Hz", 4), si.Format(r.IFHz, "Hz", 4), m.LOLevelDBm, FigureText(r.Noise.FigureSSBDB))},
		{Label: "LO to RF isolation", Value: isolationText(IsolationDB(r.LO.AvailableW, r.LO.LeakageToRFW)), Detail: "LO absorbed " + DBm(r.LO.AbsorbedW)},
	}
}

// MixerCautionMessages returns the cautions' messages.
func MixerCautionMessages(r *mixer.Result) []string {
	var out []string
	for _, c := range r.Cautions {
		out = append(out, c.Message)
	}
	return out
}
