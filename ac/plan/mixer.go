package plan

import (
	"errors"
	"fmt"
	"strings"

	"qpoint/ac"
	"qpoint/ac/mixer"
	"qpoint/bias/circuit"
	"qpoint/bias/si"
)

// MixerRequest asks for a mixer analysis. Zero fields take the file's
// analysis.mixer; the LO, RF and IF ports, both frequencies and the LO
// level are needed from one or the other.
type MixerRequest struct {
	LO, RF, IF    string // port names
	LOFrequencyHz float64
	RFFrequencyHz float64
	LOLevel       *circuit.Level
	// Sidebands, when not zero, fixes the sidebands each side.
	Sidebands int
	// CheckShooting also solves the pump by shooting, as a check.
	CheckShooting bool
	// AllowBreakdown analyses a drive past a breakdown knee instead of
	// refusing it.
	AllowBreakdown bool
}

// Mixer is a resolved mixer analysis.
type Mixer struct {
	Settings               mixer.Settings
	LOName, RFName, IFName string
	LOLevelDBm             float64 // the LO generator's available power
}

// mixerKeys names each setting of the request after the file's key.
var mixerKeys = map[string]string{"lo": "lo", "rf": "rf", "if": "if", "lo-frequency": "lo_frequency", "rf-frequency": "rf_frequency", "lo-level": "lo_level"}

// ResolveMixer resolves a mixer analysis: the request's values first,
// then the file's analysis.mixer. A problem with a value is a
// *RequestError naming the setting (lo, rf, if, lo-frequency,
// rf-frequency, lo-level, sidebands), placed at its key in the file when
// the file gave it.
func ResolveMixer(c *circuit.Circuit, r MixerRequest) (*Mixer, error) {
	def := c.Analysis.Mixer
	given := map[string]bool{}
	// where makes the error for a setting, at the file's key when the
	// request did not give it.
	where := func(setting string, err error) error {
		if given[setting] || !def.Set {
			return &RequestError{Settings: []string{setting}, Err: err}
		}
		pos, ok := def.KeyPos[mixerKeys[setting]]
		if !ok {
			pos = def.Pos
		}
		return &RequestError{Settings: []string{setting}, File: c.File, Pos: pos, Key: "analysis.mixer." + mixerKeys[setting], Err: err}
	}
	pick := func(setting, asked, fromFile string) (string, error) {
		if asked != "" {
			given[setting] = true
			return asked, nil
		}
		if def.Set {
			return fromFile, nil
		}
		return "", requestErr(setting, "no %s port: name one (e.g. %s) or give analysis.mixer in the file (%s)", strings.ToUpper(setting), setting, mixerExample)
	}
	var names []string
	for _, p := range c.Ports {
		names = append(names, p.Name)
	}
	if len(c.Ports) < 3 {
		return nil, requestErr("lo,rf,if", "%s has %d ports; a mixer needs three, for the LO, the RF and the IF", c.File, len(c.Ports))
	}
	m := &Mixer{}
	var err error
	if m.LOName, err = pick("lo", r.LO, def.LO); err != nil {
		return nil, err
	}
	if m.RFName, err = pick("rf", r.RF, def.RF); err != nil {
		return nil, err
	}
	if m.IFName, err = pick("if", r.IF, def.IF); err != nil {
		return nil, err
	}
	s := mixer.Settings{CheckShooting: r.CheckShooting, AllowBreakdown: r.AllowBreakdown}
	for _, p := range []struct {
		setting, name string
		index         *int
	}{{"lo", m.LOName, &s.LO}, {"rf", m.RFName, &s.RF}, {"if", m.IFName, &s.IF}} {
		if *p.index = portIndex(c, p.name); *p.index < 0 {
			return nil, where(p.setting, fmt.Errorf("`%s` is not a port; accepted: %s", p.name, strings.Join(names, ", ")))
		}
	}
	s.LOFrequencyHz, s.RFFrequencyHz = def.LOFrequencyHz, def.RFFrequencyHz
	if r.LOFrequencyHz != 0 {
		s.LOFrequencyHz, given["lo-frequency"] = r.LOFrequencyHz, true
	}
	if r.RFFrequencyHz != 0 {
		s.RFFrequencyHz, given["rf-frequency"] = r.RFFrequencyHz, true
	}
	if s.LOFrequencyHz == 0 {
		return nil, requestErr("lo-frequency", "no LO frequency: give one (e.g. 2.4GHz) or analysis.mixer in the file (%s)", mixerExample)
	}
	if s.RFFrequencyHz == 0 {
		return nil, requestErr("rf-frequency", "no RF frequency: give one (e.g. 2.45GHz) or analysis.mixer in the file (%s)", mixerExample)
	}
	var lv circuit.Level
	switch {
	case r.LOLevel != nil:
		lv, given["lo-level"] = *r.LOLevel, true
	case def.Set:
		lv = def.LOLevel
	default:
		return nil, requestErr("lo-level", "no LO level: give the LO's available power (e.g. 7dBm) or analysis.mixer in the file (%s)", mixerExample)
	}
	z0 := c.Ports[s.LO].Impedance
	m.LOLevelDBm = lv.DBm
	if !lv.IsPower {
		m.LOLevelDBm = ac.EMFToDBm(2*lv.PeakVolts, z0)
	}
	if !(m.LOLevelDBm >= circuit.MinLevelDBm && m.LOLevelDBm <= circuit.MaxLevelDBm) {
		return nil, where("lo-level", fmt.Errorf("%s at port %s's %s is %.4g dBm; accepted: %g dBm to %+g dBm of available power (a peak voltage into a matched load of that port)",
			levelText(lv), m.LOName, si.Format(z0, "Ω", 4), m.LOLevelDBm, float64(circuit.MinLevelDBm), float64(circuit.MaxLevelDBm)))
	}
	s.LOEMF = ac.DBmToEMF(m.LOLevelDBm, z0)
	if r.Sidebands != 0 {
		s.Sidebands, s.FixedSidebands = r.Sidebands, true
		s.MaxSidebands = max(r.Sidebands, 1)
	}
	if err := mixer.CheckRequest(s, names); err != nil {
		var se *mixer.SettingError
		if errors.As(err, &se) {
			setting := se.Setting
			// Two ports on one: blame the one the request named, when
			// the other came from the file.
			others := map[string][]string{"rf": {"lo"}, "if": {"lo", "rf"}}[setting]
			for _, o := range others {
				if !given[setting] && given[o] {
					setting = o
				}
			}
			return nil, where(setting, errors.New(se.Message))
		}
		return nil, err
	}
	m.Settings = s
	return m, nil
}

const mixerExample = "analysis: {mixer: {lo: lo, lo_frequency: 2.4GHz, lo_level: 7dBm, rf: rf, rf_frequency: 2.45GHz, if: if}}"

// ParseMixerLevels reads a sweep of LO levels FROM:TO:STEP given to
// setting (ParseLevelRange) and lists them (MixerLevels). A level in
// volts is read behind the LO port's impedance: the port lo names, else
// the file's analysis.mixer, else 50 Ω.
func ParseMixerLevels(c *circuit.Circuit, setting, lo, s string) ([]float64, error) {
	if lo == "" {
		lo = c.Analysis.Mixer.LO
	}
	z0 := 50.0
	for _, p := range c.Ports {
		if p.Name == lo {
			z0 = p.Impedance
			break
		}
	}
	from, to, step, err := ParseLevelRange(setting, s, z0)
	if err != nil {
		return nil, err
	}
	return MixerLevels(from, to, step)
}

// MixerLevels returns the LO levels of a sweep from fromDBm to toDBm in
// steps of stepDBm, the ends included; at most 200.
func MixerLevels(fromDBm, toDBm, stepDBm float64) ([]float64, error) {
	if !(stepDBm > 0) || !(toDBm >= fromDBm) {
		return nil, requestErr("sweep-lo-level", "%g dBm to %g dBm in steps of %g dB is not a rising sweep; accepted: FROM:TO:STEP with FROM ≤ TO and a positive step, e.g. -10dBm:13dBm:1dB", fromDBm, toDBm, stepDBm)
	}
	n := int((toDBm-fromDBm)/stepDBm+1e-9) + 1
	if n > 200 {
		return nil, requestErr("sweep-lo-level", "%d levels; accepted: at most 200", n)
	}
	for _, l := range []float64{fromDBm, toDBm} {
		if !(l >= circuit.MinLevelDBm && l <= circuit.MaxLevelDBm) {
			return nil, requestErr("sweep-lo-level", "%g dBm; accepted: %g dBm to %+g dBm", l, float64(circuit.MinLevelDBm), float64(circuit.MaxLevelDBm))
		}
	}
	out := make([]float64, n)
	for i := range out {
		out[i] = fromDBm + float64(i)*stepDBm
	}
	return out, nil
}

// DefaultMixerLevels are the LO levels a figure of the mixer against its
// drive takes when none are asked for: from 16 dB below the nominal level
// to 6 dB above it, in 2 dB steps.
func DefaultMixerLevels(nominalDBm float64) []float64 {
	var out []float64
	for l := nominalDBm - 16; l <= nominalDBm+6+1e-9; l += 2 {
		out = append(out, l)
	}
	return out
}
