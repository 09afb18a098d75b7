package main

import (
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/spf13/pflag"

	"qpoint/ac"
	"qpoint/ac/balance"
	"qpoint/ac/steady"
	"qpoint/plots"
	"qpoint/plots/report"
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

// steadyMethods resolves the flags into the methods steady.Solve runs,
// checking the request against the network and drive: search for the
// validity limit and the one-tone level sweep, wave for the waveforms
// reported beside the estimate. They differ only under auto with a second
// tone: the two-tone waveform needs harmonic balance, and the one-tone
// waveform beside it is solved the same way so that the waveform the
// output reports has one method.
func (fl *steadyFlags) steadyMethods(s *distortionSetup) (search, wave steady.Method, err error) {
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

func writeTwoTone(w io.Writer, st *steady.State, est *ac.Estimate) {
	report.TwoToneTable(st, est).WriteText(w)
	if note := report.TruncationNote(st); note != "" {
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
	report.TwoToneSweepTable(pts).WriteText(w)
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

// twoToneFigures is the two-tone spectrum, when there is a second tone.
func twoToneFigures(two *steady.State, est *ac.Estimate) []*plots.Figure {
	if two == nil {
		return nil
	}
	return []*plots.Figure{plots.TwoToneSpectrum(two, est)}
}
