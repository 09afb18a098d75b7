package report

import (
	"fmt"
	"io"
	"math"
	"strconv"

	"qpoint/ac/measure"
	"qpoint/ac/steady"
	"qpoint/bias/si"
)

// WritePredictionComparison sets measured harmonics beside the predicted
// ones, each relative to its own fundamental.
func WritePredictionComparison(w io.Writer, circuitPath string, r *measure.Result, p *steady.State) {
	t := &Table{Caption: "Measured beside predicted (" + circuitPath + ")", Header: []string{"order", "measured", "predicted", "measured dBc", "predicted dBc", "difference"}}
	mf, pf := 0.0, p.Output[1].Amplitude
	for _, h := range r.Harmonics {
		if h.Order == 1 {
			mf = h.AmplitudeV
		}
	}
	for _, h := range r.Harmonics {
		if h.Order < 1 || h.Order >= len(p.Output) || !h.Present {
			continue
		}
		pa := p.Output[h.Order].Amplitude
		md, pd := 20*math.Log10(h.AmplitudeV/mf), 20*math.Log10(pa/pf)
		diff := fmt.Sprintf("%+.2f dB", md-pd)
		if md < -150 || pd < -150 {
			diff = "—"
		}
		if h.Order == 1 {
			diff = fmt.Sprintf("%+.2f dB", 20*math.Log10(h.AmplitudeV/pa))
		}
		t.Add(strconv.Itoa(h.Order), si.Format(h.AmplitudeV, "V", 4), si.Format(pa, "V", 4), WaveDBc(md), WaveDBc(pd), diff)
	}
	t.WriteText(w)
	fmt.Fprintf(w, "  the fundamental's row compares absolute amplitudes; the others compare levels relative to each fundamental\n")
}

// WriteHarmonics writes a captured waveform's analysis as text: the
// samples, window, fundamental, each harmonic, THD, SINAD and noise.
func WriteHarmonics(w io.Writer, path string, wf *measure.Waveform, r *measure.Result) {
	fmt.Fprintf(w, "%s\n", path)
	fmt.Fprintf(w, "  samples      %d at %s (%s from %s)\n", r.Samples, si.Format(r.SampleRateHz, "Hz", 6),
		si.Format(wf.DurationS(), "s", 4), si.Format(wf.StartS, "s", 4))
	how := "given"
	if r.Searched {
		how = "found by spectral search and fit"
	}
	fmt.Fprintf(w, "  fundamental  %s, %s; %.2f periods captured\n", si.Format(r.FundamentalHz, "Hz", 7), how, r.Periods)
	fmt.Fprintf(w, "  window       %s\n", r.Window)
	if u := wf.RateUncertainty; u > measure.RateUncertaintyLimit {
		fmt.Fprintf(w, "  ! caution: the time stamps start at %s, where float64 resolves only %s, %.2g of the %s step: the sample rate and every frequency here can be off by %.2g (%s at the fundamental); subtract the offset from the time column\n",
			si.Format(wf.StartS, "s", 4), si.Format(u*(float64(r.Samples-1)/r.SampleRateHz), "s", 2),
			u*float64(r.Samples-1), si.Format(1/r.SampleRateHz, "s", 3), u, si.Format(u*r.FundamentalHz, "Hz", 2))
	}

	t := &Table{Caption: "Harmonics", Header: []string{"order", "frequency", "amplitude", "dBc", "phase °"}}
	absent := 0
	for _, h := range r.Harmonics {
		order := strconv.Itoa(h.Order)
		if h.Order == 0 {
			t.Add("DC", si.Format(0, "Hz", 4), si.Format(h.AmplitudeV, "V", 5), "", "")
			continue
		}
		if !h.Present {
			absent++
			t.Add(order, si.Format(h.FrequencyHz, "Hz", 6), "above fs/2", "", "")
			continue
		}
		t.Add(order, si.Format(h.FrequencyHz, "Hz", 6), si.Format(h.AmplitudeV, "V", 5),
			waveformDB(h.DBc), strconv.FormatFloat(h.PhaseDeg, 'f', 2, 64))
	}
	t.WriteText(w)
	fmt.Fprintln(w)
	last := len(r.Harmonics) - 1 - absent
	if math.IsNaN(r.THDPercent) {
		fmt.Fprintf(w, "  total harmonic distortion   — (no harmonic from the 2nd up lies below fs/2)\n")
	} else {
		fmt.Fprintf(w, "  total harmonic distortion   %s %% (%s dB), orders 2 to %d\n",
			strconv.FormatFloat(r.THDPercent, 'g', 4, 64), waveformDB(r.THDdB), last)
	}
	fmt.Fprintf(w, "  SINAD                       %s dB\n", waveformDB(r.SINADdB))
	fmt.Fprintf(w, "  noise and distortion        %s rms\n", si.Format(r.NoiseDistortionRMS, "V", 4))
	fmt.Fprintf(w, "  %-27s %s rms", fmt.Sprintf("left after orders 0 to %d", last), si.Format(r.NoiseRMS, "V", 4))
	if !math.IsNaN(r.NoiseDensity) {
		fmt.Fprintf(w, "; floor %s/√Hz", si.Format(r.NoiseDensity, "V", 3))
	}
	fmt.Fprintln(w)
	if absent > 0 {
		fmt.Fprintf(w, "  orders %d to %d lie above half the sample rate (%s) and are not measured\n",
			last+1, len(r.Harmonics)-1, si.Format(r.SampleRateHz/2, "Hz", 4))
	}
	fmt.Fprintln(w)
}

// waveformDB prints a level in dB with two decimals.
func waveformDB(v float64) string {
	switch {
	case math.IsInf(v, -1):
		return "-∞"
	case math.IsNaN(v) || math.IsInf(v, 1):
		return "—"
	}
	return strconv.FormatFloat(v, 'f', 2, 64)
}
