package main

import (
	"github.com/spf13/pflag"

	"qpoint/ac/plan"
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

// steadyMethods resolves the flags on the plan (plan.SteadyMethods):
// search for the validity limit and the level sweep, wave for the
// waveforms beside the estimate.
func (fl *steadyFlags) steadyMethods(s *distortionSetup) (search, wave steady.Method, err error) {
	search, wave, err = plan.SteadyMethods(s.nw, s.drive, plan.MethodRequest{Method: fl.method, Truncation: fl.truncation, Order: fl.truncationOrder})
	if err != nil {
		return nil, nil, planError(err)
	}
	return search, wave, nil
}
