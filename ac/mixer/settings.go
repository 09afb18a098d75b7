package mixer

import (
	"fmt"
	"math"

	"qpoint/ac"
	"qpoint/ac/balance"
	"qpoint/bias/si"
	"qpoint/smallsignal"
)

// Settings describe a mixer and how to analyse it.
type Settings struct {
	// LO, RF and IF are the indices of the ports the local oscillator
	// drives, the signal enters and the intermediate frequency leaves;
	// three different ports.
	LO, RF, IF int
	// LOFrequencyHz and RFFrequencyHz are the two frequencies; the IF is
	// |f_RF - f_LO|, which must neither vanish nor fall on a multiple of
	// f_LO/2 (then the sidebands of the IF and of its mirror coincide).
	LOFrequencyHz, RFFrequencyHz float64
	// LOEMF is the LO generator's EMF, peak volts, behind its port's
	// reference impedance (ac.DBmToEMF gives it from an available power).
	LOEMF float64
	// Sidebands is the K of the sidebands -K..K the conversion starts
	// with; zero means 4. It doubles until the conversion losses, the
	// noise figure and the port impedances move by less than 0.001 dB
	// (1e-4 relative), up to MaxSidebands (zero: 128). FixedSidebands
	// keeps it as given.
	Sidebands, MaxSidebands int
	FixedSidebands          bool
	// Balance sets the pump's harmonic balance (its Start is taken from
	// Start below).
	Balance balance.Settings
	// CheckShooting also solves the pump by shooting and reports how far
	// the junction currents of the two methods differ (Stats.Shooting).
	CheckShooting bool
	// AllowBreakdown analyses a pump that drives a junction past its
	// breakdown knee instead of refusing it (BreakdownError).
	AllowBreakdown bool
	// Start, when not nil, is the analysis of the same mixer at a nearby
	// LO level: the pump continues from its steady state.
	Start *Result
}

const (
	defaultSidebands = 4
	maxSidebands     = 128
)

func (s Settings) withDefaults() Settings {
	if s.Sidebands == 0 {
		s.Sidebands = defaultSidebands
	}
	if s.MaxSidebands == 0 {
		s.MaxSidebands = maxSidebands
	}
	return s
}

// SettingError is a request the analysis cannot honour as asked: Setting
// names it ("lo", "rf", "if", "lo-frequency", "rf-frequency", "lo-level",
// "sidebands").
type SettingError struct {
	Setting string
	Message string
}

func (e *SettingError) Error() string { return e.Setting + ": " + e.Message }

func settingErr(setting, format string, args ...any) error {
	return &SettingError{Setting: setting, Message: fmt.Sprintf(format, args...)}
}

// collisionRel is how close, relative to the higher of f_LO and f_RF, the
// IF may come to a multiple of f_LO/2 before the sidebands are taken to
// coincide.
const collisionRel = 1e-9

// IFHz returns the intermediate frequency |f_RF - f_LO|.
func (s Settings) IFHz() float64 { return math.Abs(s.RFFrequencyHz - s.LOFrequencyHz) }

// Check reports a request Analyze cannot honour, without solving
// anything: ports the network lacks or that coincide, a frequency out of
// range, an IF of zero or on a multiple of f_LO/2, sideband counts out of
// range.
func Check(nw *smallsignal.Network, s Settings) error {
	names := make([]string, len(nw.Ports))
	for i, p := range nw.Ports {
		names[i] = p.Name
	}
	return CheckRequest(s, names)
}

// CheckRequest is Check for a circuit whose ports are named ports, before
// any network is built: what a front end checks to tell a bad request
// from a failed analysis.
func CheckRequest(s Settings, ports []string) error {
	s = s.withDefaults()
	for _, p := range []struct {
		name string
		i    int
	}{{"lo", s.LO}, {"rf", s.RF}, {"if", s.IF}} {
		if p.i < 0 || p.i >= len(ports) {
			return settingErr(p.name, "port %d: the circuit has %d ports", p.i+1, len(ports))
		}
	}
	if s.LO == s.RF {
		return settingErr("rf", "the RF and the LO are both on port %s; accepted: two different ports (a diplexer belongs in the circuit)", ports[s.LO])
	}
	if s.IF == s.LO || s.IF == s.RF {
		other := "LO"
		if s.IF == s.RF {
			other = "RF"
		}
		return settingErr("if", "the IF and the %s are both on port %s; accepted: a port of its own for the IF", other, ports[s.IF])
	}
	if err := ac.CheckFrequency(s.LOFrequencyHz); err != nil {
		return settingErr("lo-frequency", "%v", err)
	}
	if err := ac.CheckFrequency(s.RFFrequencyHz); err != nil {
		return settingErr("rf-frequency", "%v", err)
	}
	if !(s.LOEMF >= 0) || math.IsInf(s.LOEMF, 0) {
		return settingErr("lo-level", "the LO's EMF must be finite and not negative; got %g V", s.LOEMF)
	}
	fIF := s.IFHz()
	tol := collisionRel * math.Max(s.LOFrequencyHz, s.RFFrequencyHz)
	if fIF <= tol {
		return settingErr("rf-frequency", "the RF (%s) equals the LO: the IF would be 0 Hz; accepted: an RF away from the LO by the IF", si.Format(s.RFFrequencyHz, "Hz", 9))
	}
	if m := math.Round(2 * fIF / s.LOFrequencyHz); m >= 1 && math.Abs(fIF-m*s.LOFrequencyHz/2) <= tol {
		what := fmt.Sprintf("%g times the LO frequency", m/2)
		if int(m)%2 == 0 {
			what = fmt.Sprintf("the LO's harmonic %d", int(m)/2)
		}
		return settingErr("rf-frequency", "the IF (%s) falls on %s, so that the IF and its mirror share every sideband; accepted: an IF that is no multiple of half the LO frequency", si.Format(fIF, "Hz", 9), what)
	}
	if s.Sidebands < 1 || s.Sidebands > s.MaxSidebands || s.MaxSidebands > 512 {
		return settingErr("sidebands", "%d sidebands each side, at most %d; accepted: 1 to 512", s.Sidebands, s.MaxSidebands)
	}
	return nil
}
