package report

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strconv"

	"qpoint/ac"
	"qpoint/ac/balance"
	"qpoint/ac/steady"
	"qpoint/bias/si"
)

// DBc prints a level relative to the carrier in dBc, to a tenth, or a
// dash when it has no finite value.
func DBc(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	return strconv.FormatFloat(v, 'f', 1, 64) + " dBc"
}

// WaveDBc prints a waveform harmonic relative to the fundamental, or says
// it is lost in the solver's numerical floor (about -150 dBc).
func WaveDBc(v float64) string {
	if v < -150 {
		return "below floor"
	}
	return DBc(v)
}

// EstimateTable returns the Volterra estimate as a table, and notes to
// print under it.
func EstimateTable(e *ac.Estimate) (*Table, []string) {
	var notes []string
	t := &Table{Caption: "Volterra estimate (third order)", Header: []string{"quantity", "value"}}
	if cmplx.Abs(e.Linear) <= 1e-12*e.Drive.EMF {
		t.Add("fundamental", "none: this output is isolated from the input")
	} else {
		t.Add("fundamental", si.Format(cmplx.Abs(e.Fundamental), "V", 4)+" peak")
	}
	if p, ok := e.OutputDBm(); ok && cmplx.Abs(e.Linear) > 1e-12*e.Drive.EMF {
		t.Add("fundamental power", fmt.Sprintf("%.2f dBm", p+e.GainChangeDB()))
	}
	if cmplx.Abs(e.Linear) > 1e-12*e.Drive.EMF {
		t.Add("gain change at f1", GainChange(e.GainChangeDB()))
		t.Add("phase change at f1", fmt.Sprintf("%+.3g° (AM-to-PM %+.3g°/dB)", e.PhaseChangeDeg(), e.AMPMDegPerDB()))
		if l, compress := e.GainStepDBm(1); !math.IsNaN(l) {
			kind := "1 dB compression (series)"
			if !compress {
				kind = "1 dB expansion (series)"
			}
			t.Add(kind, fmt.Sprintf("%.2f dBm input", l))
		}
	}
	const cancelled = "cancelled by symmetry"
	pick := func(p ac.Product, v string) string {
		if e.Balanced(p) {
			return cancelled
		}
		return v
	}
	t.Add("second harmonic", pick(ac.HD2, DBc(e.HD2dBc())))
	t.Add("third harmonic", pick(ac.HD3, DBc(e.HD3dBc())))
	t.Add("DC shift", pick(ac.DC, si.Format(e.DCShift, "V", 4)))
	if e.Drive.SecondToneHz != 0 {
		t.Add("IM2 at |f2 - f1|", pick(ac.IM2Diff, DBc(e.IM2dBc())))
		t.Add("IM3 at 2f1 - f2", pick(ac.IM3, DBc(e.IM3dBc())))
		t.Add("input intercept IIP3", pick(ac.IM3, fmt.Sprintf("%.2f dBm", e.IIP3dBm())))
		if o, ok := e.OIP3dBm(); ok {
			t.Add("output intercept OIP3", pick(ac.IM3, fmt.Sprintf("%.2f dBm", o)))
		}
		t.Add("input intercept IIP2", pick(ac.IM2Diff, fmt.Sprintf("%.2f dBm", e.IIP2dBm())))
	}
	for _, p := range []ac.Product{ac.DC, ac.HD2, ac.HD3, ac.IM2Diff, ac.IM3} {
		if e.Balanced(p) {
			notes = append(notes, fmt.Sprintf("products marked %q balance out between matched diodes; in a built circuit they follow the parts' mismatch", cancelled))
			break
		}
	}
	return t, notes
}

// GainChange prints the third-order gain change at f1 with its sense.
func GainChange(db float64) string {
	switch {
	case math.IsNaN(db):
		return "—"
	case db < 0:
		return fmt.Sprintf("%+.3g dB (compression)", db)
	case db > 0:
		return fmt.Sprintf("%+.3g dB (expansion)", db)
	}
	return "0 dB"
}

// ContributionTable lists, for each product of the estimate, which diode
// and which nonlinearity (current or charge) supplies it and its share.
func ContributionTable(e *ac.Estimate) *Table {
	t := &Table{Caption: "Where the distortion comes from", Header: []string{"product", "diode", "nonlinearity", "phasor at output", "share"}}
	byProduct := map[ac.Product][]ac.Contribution{}
	var order []ac.Product
	for _, c := range e.Contributions {
		if _, ok := byProduct[c.Product]; !ok {
			order = append(order, c.Product)
		}
		byProduct[c.Product] = append(byProduct[c.Product], c)
	}
	label := map[ac.Product]string{ac.DC: "DC shift", ac.Gain3: "f1, 3rd order", ac.HD2: "HD2", ac.HD3: "HD3", ac.IM2Sum: "IM2 f1+f2", ac.IM2Diff: "IM2 f1-f2", ac.IM3: "IM3"}
	for _, p := range order {
		cs := byProduct[p]
		sort.SliceStable(cs, func(i, j int) bool { return cmplx.Abs(cs[i].Phasor) > cmplx.Abs(cs[j].Phasor) })
		for i, c := range cs {
			if c.Phasor == 0 {
				continue
			}
			name := ""
			if i == 0 {
				name = label[p]
			}
			share := fmt.Sprintf("%.1f %%", c.Percent)
			if math.IsNaN(c.Percent) {
				share = "cancels"
			}
			t.Add(name, c.Diode, string(c.Source), fmt.Sprintf("%s ∠%.0f°", si.Format(cmplx.Abs(c.Phasor), "V", 3), cmplx.Phase(c.Phasor)*180/math.Pi), share)
		}
	}
	return t
}

// StressTable gives every diode's extremes over the period: what its
// ratings, or the breakdown knee, are to be held against.
func StressTable(s *steady.State) *Table {
	t := &Table{Caption: "Diode extremes over the period (waveform)", Header: []string{"diode", "peak forward current", "peak reverse voltage", "mean power"}}
	for _, d := range s.Stress {
		t.Add(d.Name, si.Format(d.PeakCurrent, "A", 4), si.Format(d.PeakReverseVoltage, "V", 4), si.Format(d.MeanPower, "W", 4))
	}
	return t
}

// WaveformTable lists the waveform's harmonics at the output, and
// returns a note of its THD and the solver's iterations and residual.
func WaveformTable(s *steady.State) (*Table, string) {
	t := &Table{Caption: "Waveform (periodic steady state by " + MethodLine(s) + ")",
		Header: []string{"order", "amplitude", "relative", "phase"}}
	fund := s.Output[1].Amplitude
	isolated := fund <= s.NoiseFloor
	for _, h := range s.Output {
		rel, ph := "", ""
		if h.Order == 0 {
			t.Add("0 (DC shift)", si.Format(h.Amplitude, "V", 4), "", "")
			continue
		}
		rel = WaveDBc(20 * math.Log10(h.Amplitude/fund))
		if h.Order == 1 {
			rel = "0 dBc"
		}
		if isolated {
			rel = "—"
		}
		ph = fmt.Sprintf("%.1f°", h.PhaseDeg)
		t.Add(strconv.Itoa(h.Order), si.Format(h.Amplitude, "V", 4), rel, ph)
	}
	if isolated {
		return t, fmt.Sprintf("no signal above the solver's floor (%s) reaches this output: it is isolated from the input; %d Newton iterations",
			si.Format(s.NoiseFloor, "V", 2), s.Iterations)
	}
	return t, fmt.Sprintf("THD %.4g %%; %d Newton iterations; %s residual %.2g", s.THDPercent, s.Iterations, ResidualName(s), s.Residual)
}

// ComparisonTable sets the estimate beside the waveform product by
// product, with the difference, and returns a note on the validity limit.
func ComparisonTable(cs []steady.Comparison, v *steady.Validity) (*Table, string) {
	t := &Table{Caption: "Estimate beside waveform", Header: []string{"product", "estimate", "waveform", "difference"}}
	names := map[int]string{0: "DC shift", 1: "fundamental", 2: "2nd harmonic", 3: "3rd harmonic"}
	for _, c := range cs {
		diff := fmt.Sprintf("%+.3f dB", c.DiffDB)
		if !c.Trustable {
			diff = "below the solver's floor"
		}
		t.Add(names[c.Order], si.Format(c.Estimate, "V", 4), si.Format(c.Waveform, "V", 4), diff)
	}
	note := ""
	trusted := false
	for _, c := range cs {
		trusted = trusted || c.Trustable
	}
	if !trusted {
		return t, "nothing at this output lies above the solver's floor, so there is nothing to compare"
	}
	if v != nil {
		note = v.Note()
	}
	return t, note
}

// LevelSweepTable lists the waveform's fundamental, harmonics, DC shift
// and THD at each level of a sweep.
func LevelSweepTable(pts []steady.LevelPoint) *Table {
	t := &Table{Caption: "Level sweep (waveform)", Header: []string{"input", "fundamental", "2nd", "3rd", "DC shift", "THD"}}
	for _, p := range pts {
		o := p.Steady.Output
		floor := "< " + si.Format(p.Steady.NoiseFloor, "V", 2)
		cell := func(h steady.Harmonic, text string) string {
			if h.BelowFloor || o[1].BelowFloor {
				return "below floor"
			}
			return text
		}
		fund, shift := si.Format(o[1].Amplitude, "V", 4), si.Format(o[0].Amplitude, "V", 4)
		if o[1].BelowFloor {
			fund = floor
		}
		if o[0].BelowFloor {
			shift = "below floor"
		}
		thd := fmt.Sprintf("%.3g %%", p.Steady.THDPercent)
		switch {
		case p.Steady.THDBelowPercent > 0:
			thd = fmt.Sprintf("< %.2g %%", p.Steady.THDBelowPercent)
		case math.IsNaN(p.Steady.THDPercent):
			thd = "—"
		}
		t.Add(fmt.Sprintf("%.1f dBm", p.LevelDBm), fund,
			cell(o[2], WaveDBc(20*math.Log10(o[2].Amplitude/o[1].Amplitude))), cell(o[3], WaveDBc(20*math.Log10(o[3].Amplitude/o[1].Amplitude))),
			shift, thd)
	}
	return t
}

// MethodLine says which method found a steady state and, for the
// automatic choice, why.
func MethodLine(st *steady.State) string {
	line := st.Method
	if r, ok := st.State.(*balance.Result); ok {
		if r.Drive.SecondToneHz != 0 {
			line += fmt.Sprintf(" (%s truncation of order %d, %d products)", TruncationName(r), r.Stats.Harmonics, r.Stats.Products)
		} else {
			line += fmt.Sprintf(" (%d harmonics)", r.Stats.Harmonics)
		}
	} else if st.Method == steady.MethodShooting {
		line += fmt.Sprintf(" (%d and %d samples per period)", st.Samples, 2*st.Samples+1)
	}
	if st.Choice != "" {
		line += "; chosen: " + st.Choice
	}
	return line
}

// TruncationName names the two-tone truncation a balance kept.
func TruncationName(r *balance.Result) string { return r.Truncation().String() }

// ResidualName says what a steady state's residual measures.
func ResidualName(st *steady.State) string {
	if st.Method == steady.MethodHarmonicBalance {
		return "KCL"
	}
	return "periodicity"
}

// TwoToneTable lists the two-tone waveform's products, strongest first
// within each order, and sets IM2 and IM3 beside the Volterra estimate.
func TwoToneTable(st *steady.State, est *ac.Estimate) *Table {
	t := &Table{Caption: "Two-tone waveform (" + MethodLine(st) + ")",
		Header: []string{"product", "frequency", "amplitude", "relative to f1", "phase", "estimate"}}
	f1, _ := st.Product(1, 0)
	for _, p := range st.Products {
		if p.Orders == [2]int{0, 0} {
			v := si.Format(p.Amplitude, "V", 4)
			if math.Abs(p.Amplitude) <= st.NoiseFloor {
				v = "below floor"
			}
			t.Add("DC shift", "0 Hz", v, "", "", "")
			continue
		}
		rel := WaveDBc(20 * math.Log10(p.Amplitude/f1.Amplitude))
		if p.Amplitude <= st.NoiseFloor {
			rel = "below floor"
		}
		estimate := ""
		switch p.Orders {
		case [2]int{2, -1}:
			estimate = DBc(est.IM3dBc())
			if est.Balanced(ac.IM3) {
				estimate = "cancelled"
			}
		case [2]int{-1, 1}, [2]int{1, -1}:
			estimate = DBc(est.IM2dBc())
			if est.Balanced(ac.IM2Diff) {
				estimate = "cancelled"
			}
		case [2]int{1, 0}:
			estimate = si.Format(math.Hypot(real(est.Linear), imag(est.Linear)), "V", 4)
		}
		t.Add(balance.ProductName(p.Orders[0], p.Orders[1]), si.Format(p.FrequencyHz, "Hz", 6), si.Format(p.Amplitude, "V", 4),
			rel, strconv.FormatFloat(p.PhaseDeg, 'f', 1, 64)+"°", estimate)
	}
	return t
}

// TwoToneSweepTable lists a two-tone level sweep and the intercept read
// from it as a bench reads it, beside the estimate's.
func TwoToneSweepTable(pts []steady.LevelPoint) *Table {
	t := &Table{Caption: "Two-tone level sweep (waveform)", Header: []string{"input per tone", "fundamental", "IM2", "IM3"}}
	for _, p := range pts {
		f1, _ := p.Steady.Product(1, 0)
		t.Add(fmt.Sprintf("%.1f dBm", p.LevelDBm), si.Format(f1.Amplitude, "V", 4), WaveDBc(p.Steady.IM2dBc()), WaveDBc(p.Steady.IM3dBc()))
	}
	return t
}

// TruncationNote says, for a harmonic-balance solve that reached its
// largest truncation before its top products fell below the tolerance,
// how much the reported products still moved in the last growth: a bound
// on the truncation's error in them. Empty otherwise.
func TruncationNote(st *steady.State) string {
	r, ok := st.State.(*balance.Result)
	if !ok || r.Stats.Unsettled == 0 {
		return ""
	}
	what := fmt.Sprintf("%d harmonics", r.Stats.Harmonics)
	if r.Drive.SecondToneHz != 0 {
		what = fmt.Sprintf("order %d", r.Stats.Harmonics)
	}
	return fmt.Sprintf("harmonic balance stopped at %s with the spectrum still above 1e-10 of the largest signal: the reported values moved by up to %.2g %% (%.3f dB) in the last growth",
		what, 100*r.Stats.Unsettled, 20*math.Log10(1+r.Stats.Unsettled))
}
