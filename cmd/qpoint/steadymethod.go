package main

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"qpoint/ac"
	"qpoint/ac/balance"
	"qpoint/bias/si"
	"qpoint/plots"
)

// steadyFlags choose how distortion solves the steady state.
type steadyFlags struct {
	method          string
	truncation      string
	truncationOrder int
}

func addSteadyFlags(f *pflag.FlagSet, fl *steadyFlags) {
	f.StringVar(&fl.method, "method", "auto", "steady-state method: auto, hb (harmonic balance) or shooting; auto takes harmonic balance for two tones and large circuits")
	f.StringVar(&fl.truncation, "truncation", "diamond", "two-tone products harmonic balance keeps: diamond (|m|+|n| ≤ order) or box (|m| ≤ order and |n| ≤ order)")
	f.IntVar(&fl.truncationOrder, "truncation-order", 7, "starting order of the two-tone truncation (3 to 60); it grows until the top products fall below 1e-10")
}

// steadyMethods resolves the flags into the methods ac.SteadyState runs,
// checking the request against the network and drive: search for the
// validity limit and the one-tone level sweep, wave for the waveforms
// reported beside the estimate. They differ only under auto with a second
// tone: the two-tone waveform needs harmonic balance, and the one-tone
// waveform beside it is solved the same way so that the waveform the
// output reports has one method.
func (fl *steadyFlags) steadyMethods(s *distortionSetup) (search, wave ac.SteadyMethod, err error) {
	choice, err := balance.ParseChoice(fl.method)
	if err != nil {
		return nil, nil, inputError(fmt.Errorf("flag --method: %w", err))
	}
	var tr balance.Truncation
	switch fl.truncation {
	case "diamond":
		tr = balance.Diamond
	case "box":
		tr = balance.Box
	default:
		return nil, nil, inputError(fmt.Errorf("flag --truncation: %q; accepted: diamond, box", fl.truncation))
	}
	if fl.truncationOrder < 2 || fl.truncationOrder > 60 {
		return nil, nil, inputError(fmt.Errorf("flag --truncation-order: %d; accepted: 2 to 60 (3 or more for the diamond)", fl.truncationOrder))
	}
	if choice == balance.Shooting && s.nw.HasElements() {
		return nil, nil, inputError(fmt.Errorf("flag --method: shooting solves the circuit in time and cannot carry %s, known by S-matrices in frequency; accepted: hb or auto (harmonic balance takes them)", strings.Join(s.nw.ElementNames(), ", ")))
	}
	m := balance.Method{Choice: choice, Settings: balance.Settings{Truncation: tr, Order: fl.truncationOrder}}
	w := m
	if s.drive.SecondToneHz != 0 {
		if choice == balance.Shooting {
			return nil, nil, inputError(fmt.Errorf("flag --method: shooting solves one tone; with --second-tone use auto or hb"))
		}
		if choice == balance.Auto {
			w.Choice, w.Reason = balance.HarmonicBalance, "harmonic balance, for two tones"
		}
		if err := balance.Check(s.nw, s.drive, m.Settings); err != nil {
			return nil, nil, inputError(fmt.Errorf("flag --second-tone: %w", err))
		}
	}
	return m, w, nil
}

// methodLine says which method found a steady state and, for the
// automatic choice, why.
func methodLine(st *ac.Steady) string {
	line := st.Method
	if r, ok := st.State.(*balance.Result); ok {
		if r.Drive.SecondToneHz != 0 {
			line += fmt.Sprintf(" (%s truncation of order %d, %d products)", truncationName(r), r.Stats.Harmonics, r.Stats.Products)
		} else {
			line += fmt.Sprintf(" (%d harmonics)", r.Stats.Harmonics)
		}
	} else if st.Method == ac.MethodShooting {
		line += fmt.Sprintf(" (%d and %d samples per period)", st.Samples, 2*st.Samples+1)
	}
	if st.Choice != "" {
		line += "; chosen: " + st.Choice
	}
	return line
}

func truncationName(r *balance.Result) string { return r.Truncation().String() }

// productJSON is one mixing product of the two-tone waveform.
type productJSON struct {
	Orders    [2]int `json:"orders"`
	Frequency number `json:"frequency"`
	Amplitude number `json:"amplitude"`
	Phase     number `json:"phase"`
}

// addTwoTone puts the two-tone steady state's products into the waveform
// document.
func (j *waveformJSON) addTwoTone(st *ac.Steady) {
	j.IM2dBc = ptr(st.IM2dBc())
	j.IM3dBc = ptr(st.IM3dBc())
	j.Products = []productJSON{}
	for _, p := range st.Products {
		j.Products = append(j.Products, productJSON{p.Orders, number(p.FrequencyHz), number(p.Amplitude), number(p.PhaseDeg)})
	}
}

// twoToneTable lists the two-tone waveform's products, strongest first
// within each order, and sets IM2 and IM3 beside the Volterra estimate.
func twoToneTable(st *ac.Steady, est *ac.Estimate) *table {
	t := &table{title: "Two-tone waveform (" + methodLine(st) + ")",
		header: []string{"product", "frequency", "amplitude", "relative to f1", "phase", "estimate"}}
	f1, _ := st.Product(1, 0)
	for _, p := range st.Products {
		if p.Orders == [2]int{0, 0} {
			v := si.Format(p.Amplitude, "V", 4)
			if math.Abs(p.Amplitude) <= st.NoiseFloor {
				v = "below floor"
			}
			t.add("DC shift", "0 Hz", v, "", "", "")
			continue
		}
		rel := waveDBc(20 * math.Log10(p.Amplitude/f1.Amplitude))
		if p.Amplitude <= st.NoiseFloor {
			rel = "below floor"
		}
		estimate := ""
		switch p.Orders {
		case [2]int{2, -1}:
			estimate = dbc(est.IM3dBc())
			if est.Balanced(ac.IM3) {
				estimate = "cancelled"
			}
		case [2]int{-1, 1}, [2]int{1, -1}:
			estimate = dbc(est.IM2dBc())
			if est.Balanced(ac.IM2Diff) {
				estimate = "cancelled"
			}
		case [2]int{1, 0}:
			estimate = si.Format(math.Hypot(real(est.Linear), imag(est.Linear)), "V", 4)
		}
		t.add(balance.ProductName(p.Orders[0], p.Orders[1]), si.Format(p.FrequencyHz, "Hz", 6), si.Format(p.Amplitude, "V", 4),
			rel, strconv.FormatFloat(p.PhaseDeg, 'f', 1, 64)+"°", estimate)
	}
	return t
}

func writeTwoTone(w io.Writer, st *ac.Steady, est *ac.Estimate) {
	twoToneTable(st, est).write(w)
	if note := truncationNote(st); note != "" {
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

// twoToneSweepTable lists a two-tone level sweep and the intercept read
// from it as a bench reads it, beside the estimate's.
func twoToneSweepTable(pts []ac.LevelPoint) *table {
	t := &table{title: "Two-tone level sweep (waveform)", header: []string{"input per tone", "fundamental", "IM2", "IM3"}}
	for _, p := range pts {
		f1, _ := p.Steady.Product(1, 0)
		t.add(fmt.Sprintf("%.1f dBm", p.LevelDBm), si.Format(f1.Amplitude, "V", 4), waveDBc(p.Steady.IM2dBc()), waveDBc(p.Steady.IM3dBc()))
	}
	return t
}

func writeTwoToneSweep(w io.Writer, pts []ac.LevelPoint, ip *ac.Intercept, ipErr error, est *ac.Estimate) {
	twoToneSweepTable(pts).write(w)
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

// interceptJSON is the measured-style intercept of a two-tone sweep.
type interceptJSON struct {
	IIP3DBm     number  `json:"iip3_dbm"`
	OIP3DBm     *number `json:"oip3_dbm"`
	Slope       number  `json:"im3_slope_db_per_db"`
	FromDBm     number  `json:"from_dbm"`
	ToDBm       number  `json:"to_dbm"`
	LevelsFound int     `json:"levels_used"`
}

func interceptJSONOf(ip *ac.Intercept) *interceptJSON {
	j := &interceptJSON{IIP3DBm: number(ip.IIP3DBm), Slope: number(ip.Slope), FromDBm: number(ip.FromDBm), ToDBm: number(ip.ToDBm), LevelsFound: ip.Levels}
	if !math.IsNaN(ip.OIP3DBm) {
		j.OIP3DBm = ptr(ip.OIP3DBm)
	}
	return j
}

// residualName says what a steady state's residual measures.
func residualName(st *ac.Steady) string {
	if st.Method == ac.MethodHarmonicBalance {
		return "KCL"
	}
	return "periodicity"
}

// twoToneLevelSweep solves the two-tone waveform at each level, each
// from the last, and reads the intercept from it as a bench would.
func twoToneLevelSweep(cmd interface{ ErrOrStderr() io.Writer }, s *distortionSetup, settings ac.SteadySettings,
	levels []float64, doc *distortionJSON) ([]ac.LevelPoint, *ac.Intercept, error) {
	bar := newProgress(cmd.ErrOrStderr(), "two-tone sweep", len(levels))
	pts, err := ac.LevelSweep(s.nw, s.drive, levels, settings, bar.update)
	bar.done()
	if err != nil {
		fmt.Fprintf(cmd.ErrOrStderr(), "qpoint: two-tone level sweep stopped: %v\n", err)
	}
	z0 := 0.0
	if s.drive.Output.Port >= 0 {
		z0 = s.nw.Ports[s.drive.Output.Port].Impedance
	}
	ip, ipErr := ac.MeasuredIntercept(pts, z0)
	for _, p := range pts {
		w := waveformJSONOf(p.Steady)
		w.addTwoTone(p.Steady)
		doc.TwoToneSweep = append(doc.TwoToneSweep, levelJSON{number(p.LevelDBm), w})
	}
	if ipErr == nil {
		doc.MeasuredIntercept = interceptJSONOf(ip)
	}
	return pts, ip, ipErr
}

// truncationNote says, for a harmonic-balance solve that reached its
// largest truncation before its top products fell below the tolerance,
// how much the reported products still moved in the last growth: a bound
// on the truncation's error in them. Empty otherwise.
func truncationNote(st *ac.Steady) string {
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

// twoToneFigures is the two-tone spectrum, when there is a second tone.
func twoToneFigures(two *ac.Steady, est *ac.Estimate) []*plots.Figure {
	if two == nil {
		return nil
	}
	return []*plots.Figure{plots.TwoToneSpectrum(two, est)}
}
