package report

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/ac/transient"
	"qpoint/bias/si"
	"qpoint/smallsignal"
)

// WritePulseHeader writes what a pulse run drives: the circuit, its bias,
// the carrier and pulse shape, the probe, the output, and the run's steps.
func WritePulseHeader(w io.Writer, nw *smallsignal.Network, pl *plan.Pulse, res *transient.PulseResult) {
	p := res.Settings.Pulse
	z0 := nw.Point.Circuit.Ports[pl.Settings.Input].Impedance
	fmt.Fprintf(w, "%s\n", nw.Point.Circuit.Name)
	fmt.Fprintf(w, "  file         %s\n", nw.Point.Circuit.File)
	WriteOverrides(w, nw.Point.Circuit)
	fmt.Fprintf(w, "  bias         %s\n", BiasLine(nw.Point))
	fmt.Fprintf(w, "  pulse        port %s, %s carrier at %.2f dBm available (EMF %s peak behind %s)\n", pl.InputName,
		si.Format(p.CarrierHz, "Hz", 6), pl.LevelDBm, si.Format(p.CarrierEMF, "V", 4), si.Format(z0, "Ω", 4))
	train := "a single pulse"
	if p.Period > 0 {
		train = fmt.Sprintf("%d pulses every %s", max(p.Count, 1), si.Format(p.Period, "s", 4))
	}
	fmt.Fprintf(w, "               width %s (50 %% points), rise %s, fall %s (10-90 %%), %s starting at %s\n",
		si.Format(p.Width, "s", 4), si.Format(p.Rise, "s", 3), si.Format(p.Fall, "s", 3), train, si.Format(p.Start(0), "s", 3))
	if p.ProbeEMF != 0 {
		fmt.Fprintf(w, "  probe        %.1f dBm at %s, for the recovery\n", ac.EMFToDBm(p.ProbeEMF, z0), si.Format(p.ProbeHz, "Hz", 6))
	}
	kind := "node"
	if pl.Settings.Output.Port >= 0 {
		kind = fmt.Sprintf("port, %s", si.Format(nw.Point.Circuit.Ports[pl.Settings.Output.Port].Impedance, "Ω", 4))
	}
	fmt.Fprintf(w, "  output       %s (%s), read as a %s\n", pl.OutputName, kind, res.Kind)
	if r := res.Run; r != nil && len(r.Times) > 0 {
		st := r.Stats
		fmt.Fprintf(w, "  run          %s from 0 to %s: %d steps (%d rejected, %d fallbacks), %.2f Newton iterations per stage, %.2f s; energy account closes to %.1e\n",
			st.Method, si.Format(r.Times[len(r.Times)-1], "s", 4), st.Accepted, st.Rejected, st.Fallbacks,
			float64(st.NewtonIterations)/math.Max(1, float64(2*(st.Accepted+st.Rejected))), st.Runtime.Seconds(), r.Energy.Imbalance)
	}
}

// WritePulseFigures writes the limiter's or the detector's figures of the
// last pulse, with each pulse's when there are several.
func WritePulseFigures(w io.Writer, nw *smallsignal.Network, res *transient.PulseResult) {
	if len(res.Pulses) == 0 {
		fmt.Fprintln(w, "The run ended before the pulse did: no figures.")
		return
	}
	for _, t := range PulseTables(nw, res) {
		t.WriteText(w)
	}
}

// WritePulseStress prints each diode's extremes.
func WritePulseStress(w io.Writer, res *transient.PulseResult) {
	PulseStressTable(res).WriteText(w)
}

// WritePulseCautions prints the typed cautions' messages.
func WritePulseCautions(w io.Writer, cs []transient.Caution) {
	if len(cs) == 0 {
		return
	}
	fmt.Fprintf(w, "\nCautions\n")
	for _, c := range cs {
		fmt.Fprintf(w, "  ! %s\n", c.Message)
	}
	fmt.Fprintln(w)
}

// WritePulseSweep writes the figures against the carrier level.
func WritePulseSweep(w io.Writer, nw *smallsignal.Network, pl *plan.Pulse, pts []transient.LevelPoint) {
	p := pl.Settings.Pulse
	fmt.Fprintf(w, "%s\n", nw.Point.Circuit.Name)
	fmt.Fprintf(w, "  file         %s\n", nw.Point.Circuit.File)
	WriteOverrides(w, nw.Point.Circuit)
	fmt.Fprintf(w, "  bias         %s\n", BiasLine(nw.Point))
	fmt.Fprintf(w, "  pulse        port %s, %s carrier, width %s, rise %s, fall %s; output %s\n\n", pl.InputName,
		si.Format(p.CarrierHz, "Hz", 6), si.Format(p.Width, "s", 4), si.Format(p.Rise, "s", 3), si.Format(p.Fall, "s", 3), pl.OutputName)
	if len(pts) == 0 || pts[0].Result == nil {
		return
	}
	detector := pts[0].Result.Kind == transient.Detector
	header := []string{"level", "spike peak", "spike energy", "flat leakage", "recovery 1 dB", "recovery 3 dB"}
	title := "Limiter figures against the carrier level"
	if detector {
		header = []string{"level", "video change", "steady-state shift", "rise 10-90 %", "fall 90-10 %"}
		title = "Detector figures against the carrier level"
	}
	if r := pts[0].Result; r != nil {
		for _, d := range r.Diodes {
			header = append(header, d.Name+" peak current")
		}
	}
	header = append(header, "steps", "cautions")
	t := &Table{Caption: title, Header: header}
	for _, pt := range pts {
		r := pt.Result
		row := []string{fmt.Sprintf("%.1f dBm", pt.LevelDBm)}
		if r == nil {
			t.Add(append(row, pt.Err.Error())...)
			continue
		}
		f := r.Figures
		if detector {
			row = append(row, si.Format(f.Settled, "V", 4), si.Format(r.SteadyShift, "V", 4), TimeOf(f.RiseTime), TimeOf(f.FallTime))
		} else {
			row = append(row, DBmOf(f.SpikePeak), si.Format(f.SpikeEnergy, "J", 3), DBmOf(f.Flat), RecoveryText(f.Recovery1dB, f.Recovery1dBBound), RecoveryText(f.Recovery3dB, f.Recovery3dBBound))
		}
		for _, d := range r.Diodes {
			row = append(row, si.Format(d.PeakCurrent, "A", 3))
		}
		kinds := map[string]bool{}
		var names []string
		for _, c := range r.Cautions {
			if k := c.Kind.String(); !kinds[k] {
				kinds[k] = true
				names = append(names, k)
			}
		}
		if pt.Err != nil {
			names = append(names, "stopped")
		}
		row = append(row, strconv.Itoa(r.Run.Stats.Accepted), strings.Join(names, ", "))
		t.Add(row...)
	}
	t.WriteText(w)
	fmt.Fprintf(w, "  cautions name their kinds; run one level (--level) to read them in full\n\n")
}

// WritePulse writes a pulse run as text: the header, the figures, the
// diodes' stress and the cautions.
func WritePulse(w io.Writer, nw *smallsignal.Network, pl *plan.Pulse, res *transient.PulseResult) {
	WritePulseHeader(w, nw, pl, res)
	WritePulseFigures(w, nw, res)
	WritePulseStress(w, res)
	WritePulseCautions(w, res.Cautions)
}
