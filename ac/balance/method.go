package balance

import (
	"fmt"
	"strings"

	"qpoint/ac"
	"qpoint/ac/steady"
	"qpoint/smallsignal"
)

// Choice selects a steady-state method.
type Choice int

const (
	// Auto takes harmonic balance for two tones and for circuits of more
	// than AutoShootingLimit unknowns, and shooting for smaller lumped
	// circuits under one tone, where its dense period map is cheap and
	// exact to its time step; when the method chosen fails, it tries the
	// other where that one applies.
	Auto Choice = iota
	// HarmonicBalance always solves by Solve.
	HarmonicBalance
	// Shooting always solves by ac's shooting (one tone only).
	Shooting
)

func (c Choice) String() string {
	switch c {
	case HarmonicBalance:
		return "hb"
	case Shooting:
		return "shooting"
	}
	return "auto"
}

// ParseChoice reads "auto", "hb" or "shooting".
func ParseChoice(s string) (Choice, error) {
	switch s {
	case "auto":
		return Auto, nil
	case "hb", "harmonic-balance":
		return HarmonicBalance, nil
	case "shooting":
		return Shooting, nil
	}
	return Auto, fmt.Errorf("unknown steady-state method %q; accepted: auto, hb, shooting", s)
}

// AutoShootingLimit is the largest circuit (unknowns) for which Auto
// takes shooting under one tone. Above it harmonic balance is the faster
// of the two (BENCHMARKS.md).
const AutoShootingLimit = 30

// Method is a steady.Method: set it as steady.Settings.Method and
// steady.Solve (and so steady.LevelSweep and steady.ValidityLimit) solves by
// the method chosen. Settings are harmonic balance's; Settings.Report and
// Settings.Start are taken from the steady.Settings instead (Harmonics,
// and Start when it holds a harmonic-balance solution).
type Method struct {
	Choice   Choice
	Settings Settings
	// Reason, when not empty, says why the caller chose this method; it
	// becomes the steady state's Choice.
	Reason string
}

// choose returns the method Auto takes.
func choose(nw *smallsignal.Network, d ac.Drive) Choice {
	if d.SecondToneHz != 0 || nw.N > AutoShootingLimit || nw.HasElements() {
		return HarmonicBalance
	}
	return Shooting
}

// SolveSteady solves by the method chosen and returns the steady state
// with Method naming what ran.
func (m Method) SolveSteady(nw *smallsignal.Network, d ac.Drive, s steady.Settings) (*steady.State, error) {
	st, err := m.solve(nw, d, s)
	if err == nil && m.Reason != "" {
		st.Choice = m.Reason
	}
	return st, err
}

func (m Method) solve(nw *smallsignal.Network, d ac.Drive, s steady.Settings) (*steady.State, error) {
	choice := m.Choice
	if choice == Auto {
		choice = choose(nw, d)
	}
	switch choice {
	case Shooting:
		if d.SecondToneHz != 0 {
			return nil, fmt.Errorf("shooting solves one tone; a second tone needs harmonic balance")
		}
		st, err := m.shoot(nw, d, s)
		if err != nil && m.Choice == Auto {
			if hb, err2 := m.balance(nw, d, s); err2 == nil {
				hb.Choice = fmt.Sprintf("harmonic balance, after shooting failed (%v)", err)
				return hb, nil
			}
		}
		if err == nil && m.Choice == Auto {
			st.Choice = fmt.Sprintf("shooting, for a lumped circuit of %d unknowns", nw.N)
		}
		return st, err
	default:
		st, err := m.balance(nw, d, s)
		if err != nil && m.Choice == Auto && d.SecondToneHz == 0 && nw.N <= steady.MaxUnknowns && !nw.HasElements() {
			if sh, err2 := m.shoot(nw, d, s); err2 == nil {
				sh.Choice = fmt.Sprintf("shooting, after harmonic balance failed (%v)", err)
				return sh, nil
			}
		}
		if err == nil && m.Choice == Auto {
			if d.SecondToneHz != 0 {
				st.Choice = "harmonic balance, for two tones"
			} else if nw.HasElements() {
				st.Choice = "harmonic balance, for lines and measured blocks (" + strings.Join(nw.ElementNames(), ", ") + ")"
			} else {
				st.Choice = fmt.Sprintf("harmonic balance, for a circuit of %d unknowns", nw.N)
			}
		}
		return st, err
	}
}

func (m Method) shoot(nw *smallsignal.Network, d ac.Drive, s steady.Settings) (*steady.State, error) {
	s.Method = nil
	if s.Start != nil && s.Start.Method != steady.MethodShooting {
		s.Start = nil
	}
	return steady.Solve(nw, d, s)
}

func (m Method) balance(nw *smallsignal.Network, d ac.Drive, s steady.Settings) (*steady.State, error) {
	hs := m.Settings
	if d.SecondToneHz == 0 {
		hs.Report = s.Harmonics
	}
	hs.Start = nil
	if s.Start != nil {
		if r, ok := s.Start.State.(*Result); ok {
			hs.Start = r
		}
	}
	r, err := Solve(nw, d, hs)
	if err != nil {
		return nil, err
	}
	return r.Steady(), nil
}
