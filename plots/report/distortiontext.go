package report

import (
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"strings"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/ac/steady"
	"qpoint/bias/si"
	"qpoint/plots"
	"qpoint/smallsignal"
)

// WriteDistortion writes a distortion run as text: the drive, the
// estimate, the waveform beside it, the validity limit, sweeps and cautions.
func WriteDistortion(out io.Writer, nw *smallsignal.Network, d *plan.Drive, res *plan.Distortion) {
	WriteDistortionHeader(out, nw, d)
	writeEstimate(out, res.Estimate)
	writeJunctionDrive(out, nw, res.Estimate)
	writeContributions(out, res.Estimate)
	st := res.Waveform
	writeWaveform(out, st)
	if note := TruncationNote(st); note != "" {
		fmt.Fprintf(out, "  %s\n", note)
	}
	WriteCautions(out, st.Cautions())
	WriteOutside(out, res.Outside())
	writeComparison(out, res.Comparison, res.Validity)
	if two := res.TwoTone; two != nil {
		writeTwoTone(out, two, res.Estimate)
		WriteCautions(out, two.Cautions())
	}
	if len(res.Sweep) > 0 {
		writeLevelSweep(out, res.Sweep, res.OneTone, res.CompressionDBm, res.Compressed)
		WriteCautions(out, SweepCautions(res.Sweep))
	}
	if res.Transfer != nil {
		writeTransfer(out, res.Transfer, res.TangentialDBm)
	}
	if len(res.TwoToneSweep) > 0 {
		writeTwoToneSweep(out, res.TwoToneSweep, res.Intercept, res.InterceptErr, res.Estimate)
	}
}

// writeTransfer prints a detector's transfer curve and its square-law
// range.
func writeTransfer(w io.Writer, t *steady.Transfer, tssDBm float64) {
	tb := &Table{Caption: "Detector transfer curve (waveform)", Header: []string{"input", "output DC change", "from square law"}}
	for _, p := range t.Points {
		tb.Add(fmt.Sprintf("%.1f dBm", p.LevelDBm), si.Format(p.Volts, "V", 4), fmt.Sprintf("%+.3f dB", p.DeviationDB))
	}
	tb.WriteText(w)
	fmt.Fprintf(w, "  square law V = γP with γ = %s (small-signal voltage sensitivity)\n", si.Format(t.SensitivityVPerW, "V/W", 4))
	fmt.Fprintf(w, "  log-log slope %.3f at the lowest level, %.3f at the highest (1: square law, 0.5: linear detection)\n", t.LowSlope, t.HighSlope)
	if math.IsNaN(t.DeviationDBm) {
		fmt.Fprintf(w, "  within 1 dB of square law over the whole sweep, or beyond it from the lowest level\n")
	} else {
		fmt.Fprintf(w, "  1 dB from square law at %.2f dBm input\n", t.DeviationDBm)
	}
	if !math.IsNaN(tssDBm) {
		fmt.Fprintf(w, "  tangential sensitivity %.2f dBm", tssDBm)
		if dr := t.DynamicRangeDB(tssDBm); !math.IsNaN(dr) {
			fmt.Fprintf(w, "; square-law dynamic range %.1f dB", dr)
		}
		fmt.Fprintln(w)
		if len(t.Points) > 0 && t.Points[0].LevelDBm > tssDBm {
			fmt.Fprintf(w, "  the sweep starts above the tangential sensitivity; start below %.0f dBm to see the whole range\n", math.Floor(tssDBm))
		}
	}
	fmt.Fprintln(w)
}

// FrequencyRow is the estimate at one frequency of a sweep.
type FrequencyRow struct {
	FrequencyHz float64
	Estimate    *ac.Estimate
}

// WriteDistortionHeader writes what a distortion run drives: the circuit,
// its file and values set, the ports, the frequency and level.
func WriteDistortionHeader(w io.Writer, nw *smallsignal.Network, d *plan.Drive) {
	fmt.Fprintf(w, "%s\n", nw.Point.Circuit.Name)
	fmt.Fprintf(w, "  file         %s\n", nw.Point.Circuit.File)
	WriteOverrides(w, nw.Point.Circuit)
	fmt.Fprintf(w, "  bias         %s\n", BiasLine(nw.Point))
	z0 := nw.Point.Circuit.Ports[d.Drive.Input].Impedance
	fmt.Fprintf(w, "  drive        port %s, %s, %.2f dBm available (EMF %s peak behind %s)\n", d.InputName,
		si.Format(d.Drive.FrequencyHz, "Hz", 6), d.LevelDBm, si.Format(d.Drive.EMF, "V", 4), si.Format(z0, "Ω", 4))
	if d.Drive.SecondToneHz != 0 {
		fmt.Fprintf(w, "               second tone %s at the same level\n", si.Format(d.Drive.SecondToneHz, "Hz", 6))
	}
	kind := "node"
	if d.Drive.Output.Port >= 0 {
		kind = "port"
	}
	fmt.Fprintf(w, "  output       %s %s\n", kind, d.OutputName)
}

func writeEstimate(w io.Writer, e *ac.Estimate) {
	t, notes := EstimateTable(e)
	t.WriteText(w)
	for _, n := range notes {
		fmt.Fprintf(w, "  %s\n", n)
	}
}

func writeContributions(w io.Writer, e *ac.Estimate) {
	ContributionTable(e).WriteText(w)
}

func writeWaveform(w io.Writer, s *steady.State) {
	t, note := WaveformTable(s)
	t.WriteText(w)
	fmt.Fprintf(w, "  %s\n", note)
	if len(s.Stress) > 0 {
		StressTable(s).WriteText(w)
	}
}

func writeComparison(w io.Writer, cs []steady.Comparison, v *steady.Validity) {
	t, note := ComparisonTable(cs, v)
	t.WriteText(w)
	if note != "" {
		fmt.Fprintf(w, "  %s\n", note)
	}
	fmt.Fprintln(w)
}

func writeLevelSweep(w io.Writer, pts []steady.LevelPoint, e *ac.Estimate, comp float64, ok bool) {
	LevelSweepTable(pts).WriteText(w)
	if ok {
		fmt.Fprintf(w, "  1 dB compression at %.2f dBm input (waveform)\n", comp)
	} else {
		fmt.Fprintf(w, "  no 1 dB compression within the sweep (waveform)\n")
	}
	if e != nil {
		if l, compress := e.GainStepDBm(1); !math.IsNaN(l) {
			kind := "compression"
			if !compress {
				kind = "expansion"
			}
			fmt.Fprintf(w, "  1 dB %s at %.2f dBm input (third-order series estimate)\n", kind, l)
		}
	}
	fmt.Fprintln(w)
}

// WriteFrequencySweep writes the estimate's fundamental, HD2, HD3 and
// DC shift (and the two-tone products) at each frequency of a sweep.
func WriteFrequencySweep(w io.Writer, rows []FrequencyRow) {
	t := &Table{Caption: "Volterra estimate across frequency", Header: []string{"frequency", "fundamental", "HD2", "HD3", "DC shift"}}
	two := len(rows) > 0 && rows[0].Estimate.Drive.SecondToneHz != 0
	if two {
		t.Header = append(t.Header, "IM3", "IIP3")
	}
	for _, r := range rows {
		cells := []string{si.Format(r.FrequencyHz, "Hz", 4), si.Format(cmplx.Abs(r.Estimate.Fundamental), "V", 4), DBc(r.Estimate.HD2dBc()), DBc(r.Estimate.HD3dBc()), si.Format(r.Estimate.DCShift, "V", 4)}
		if two {
			cells = append(cells, DBc(r.Estimate.IM3dBc()), fmt.Sprintf("%.2f dBm", r.Estimate.IIP3dBm()))
		}
		t.Add(cells...)
	}
	t.WriteText(w)
	fmt.Fprintln(w)
}

// WriteCautions prints each caution as its own marked line.
func WriteCautions(w io.Writer, c []string) {
	if len(c) == 0 {
		return
	}
	fmt.Fprintf(w, "\nCautions (model estimates: the part may be damaged here)\n")
	for _, x := range c {
		fmt.Fprintf(w, "  ! %s\n", x)
	}
}

// writeJunctionDrive prints each junction's drive x = |v|/(n V_T) at the
// fundamental: below about 0.1 the junction runs weakly nonlinear and the
// estimate holds; near 1 and above it does not.
func writeJunctionDrive(w io.Writer, nw *smallsignal.Network, e *ac.Estimate) {
	var parts []string
	for k, d := range nw.Diodes {
		if k < len(e.Junctions) {
			parts = append(parts, fmt.Sprintf("%s %.3g", d.Name, cmplx.Abs(e.Junctions[k])/d.Device.NVT()))
		}
	}
	if len(parts) > 0 {
		fmt.Fprintf(w, "  junction drive x = |v|/(n V_T) at f1: %s\n", strings.Join(parts, ", "))
	}
}

func writeTwoTone(w io.Writer, st *steady.State, est *ac.Estimate) {
	TwoToneTable(st, est).WriteText(w)
	if note := TruncationNote(st); note != "" {
		fmt.Fprintf(w, "  %s\n", note)
	}
	var parts []string
	for _, c := range []struct {
		name     string
		m, n     int
		product  ac.Product
		waveform float64
		estimate float64
	}{{"IM3", 2, -1, ac.IM3, st.IM3dBc(), est.IM3dBc()}, {"IM2", -1, 1, ac.IM2Diff, st.IM2dBc(), est.IM2dBc()}} {
		p, ok := st.Product(c.m, c.n)
		if !ok || est.Balanced(c.product) || p.Amplitude <= st.NoiseFloor {
			parts = append(parts, c.name+" not compared (cancelled by symmetry or below the floor)")
			continue
		}
		parts = append(parts, fmt.Sprintf("%s %+.3f dB", c.name, c.waveform-c.estimate))
	}
	fmt.Fprintf(w, "  waveform against estimate: %s\n", strings.Join(parts, ", "))
}

func writeTwoToneSweep(w io.Writer, pts []steady.LevelPoint, ip *steady.Intercept, ipErr error, est *ac.Estimate) {
	TwoToneSweepTable(pts).WriteText(w)
	if ipErr != nil {
		fmt.Fprintf(w, "  no measured intercept: %v\n", ipErr)
		return
	}
	fmt.Fprintf(w, "  measured intercept: IIP3 %.2f dBm", ip.IIP3DBm)
	if !math.IsNaN(ip.OIP3DBm) {
		fmt.Fprintf(w, ", OIP3 %.2f dBm", ip.OIP3DBm)
	}
	fmt.Fprintf(w, " (lines of slope 1 and 3 through %.1f to %.1f dBm, %d levels; IM3 rises %.3f dB/dB there)\n",
		ip.FromDBm, ip.ToDBm, ip.Levels, ip.Slope)
	fmt.Fprintf(w, "  estimate:           IIP3 %.2f dBm", est.IIP3dBm())
	if o, ok := est.OIP3dBm(); ok {
		fmt.Fprintf(w, ", OIP3 %.2f dBm", o)
	}
	fmt.Fprintln(w)
}

// TwoToneFigures is the two-tone spectrum, when there is a second tone.
func TwoToneFigures(two *steady.State, est *ac.Estimate) []*plots.Figure {
	if two == nil {
		return nil
	}
	return []*plots.Figure{plots.TwoToneSpectrum(two, est)}
}

// WriteDistortionFrequency writes the estimate swept over frequency as
// text: the drive and a row per frequency.
func WriteDistortionFrequency(w io.Writer, nw *smallsignal.Network, d *plan.Drive, rows []FrequencyRow) {
	WriteDistortionHeader(w, nw, d)
	WriteFrequencySweep(w, rows)
}
