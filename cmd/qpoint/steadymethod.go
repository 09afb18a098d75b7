package main

import (
	"fmt"
	"strings"

	"github.com/spf13/pflag"

	"qpoint/ac/balance"
	"qpoint/ac/steady"
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
