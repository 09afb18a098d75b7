package plan

import (
	"errors"
	"fmt"
	"math"

	"qpoint/ac"
	"qpoint/ac/transient"
	"qpoint/bias/circuit"
)

// PulseRequest asks for a pulse analysis. Zero fields take the file's
// analysis.pulse (the carrier also the distortion frequency), else the
// policy's defaults; times in seconds.
type PulseRequest struct {
	Input, Output     string
	CarrierHz         float64
	Level             *circuit.Level
	Width, Rise, Fall float64
	Period            float64
	NoPeriod          bool // a single pulse, whatever the file says
	Pulses            int
	After             float64 // how long to watch after the last pulse; zero: the default
	Probe             *circuit.Level
	NoProbe           bool
	ProbeFrequencyHz  float64
	RelativeTolerance float64 // zero: 1e-3
	MaxSteps          int     // zero: 2e6
}

// Pulse is a resolved pulse analysis.
type Pulse struct {
	Settings              transient.PulseSettings
	InputName, OutputName string
	LevelDBm              float64 // the carrier's available power
	ProbeDBm              float64 // NaN for no probe, or the default probe
	// Sources names, for a setting taken from the file, the key it came
	// from ("analysis.pulse.width in FILE"); a front end names its own
	// input for the rest.
	Sources map[string]string
}

// Where names the file key a setting came from, or "" when the request
// gave it.
func (p *Pulse) Where(setting string) string { return p.Sources[setting] }

// RequestError returns the transient's refusal of a run it was given
// (*transient.RequestError), found only while running, as a *RequestError
// of the setting at fault: max-steps for the step budget, the file's key
// when the file gave the value, else the request's setting. Other errors
// pass unchanged.
func (p *Pulse) RequestError(err error) error {
	var re *transient.RequestError
	if !errors.As(err, &re) {
		return err
	}
	switch re.Field {
	case "steps":
		return &RequestError{Settings: []string{"max-steps"}, Err: errors.New(re.Message)}
	case "delay":
		return &RequestError{Err: fmt.Errorf("the pulse: %s", re.Message)}
	}
	if w := p.Where(re.Field); w != "" {
		return &RequestError{Err: fmt.Errorf("%s: %s", w, re.Message)}
	}
	return &RequestError{Settings: []string{re.Field}, Err: errors.New(re.Message)}
}

// levelDBmAt returns a level as available power behind z0: a peak voltage
// is what the generator delivers into a matched load, half its EMF.
func levelDBmAt(lv circuit.Level, z0 float64) float64 {
	if lv.IsPower {
		return lv.DBm
	}
	return ac.EMFToDBm(2*lv.PeakVolts, z0)
}

// ResolvePulse resolves a pulse analysis of c.
func ResolvePulse(c *circuit.Circuit, r PulseRequest) (*Pulse, error) {
	if len(c.Ports) == 0 {
		return nil, &RequestError{Err: fmt.Errorf("%s: the circuit has no ports; a pulse needs an input port (add a `ports:` list)", c.File)}
	}
	if err := transient.Check(c); err != nil {
		return nil, &RequestError{Err: fmt.Errorf("%s: %w", c.File, err)}
	}
	def := c.Analysis.Pulse
	s := &Pulse{Sources: map[string]string{}, ProbeDBm: math.NaN()}
	fileKey := func(key string) string { return "analysis.pulse." + key + " in " + c.File }
	input, output := r.Input, r.Output
	if input == "" && def.Set {
		input = def.Input
	}
	if output == "" && def.Set {
		output = def.Output
	}
	sp, err := SignalPath(c, input, output)
	if err != nil {
		return nil, err
	}
	s.InputName, s.OutputName = sp.InputName, sp.OutputName
	z0 := c.Ports[sp.Input].Impedance

	// Each time setting: the request's, else the file's value.
	readTime := func(setting string, given, fromFile float64, required bool) (float64, error) {
		if given != 0 {
			return given, nil
		}
		if def.Set && fromFile != 0 {
			s.Sources[setting] = fileKey(setting)
			return fromFile, nil
		}
		if required {
			return 0, requestErr(setting, "no pulse %s: give one (e.g. 1us) or analysis.pulse.%s in the file", setting, setting)
		}
		return 0, nil
	}
	carrier := r.CarrierHz
	switch {
	case carrier != 0:
	case def.Set:
		carrier, s.Sources["carrier"] = def.CarrierHz, fileKey("carrier")
	case c.Analysis.Distortion.Set:
		carrier, s.Sources["carrier"] = c.Analysis.Distortion.FrequencyHz, "analysis.distortion.frequency in "+c.File
	default:
		return nil, requestErr("carrier", "no carrier frequency: give one (e.g. 3GHz) or analysis.pulse.carrier in the file")
	}
	var lv circuit.Level
	switch {
	case r.Level != nil:
		lv = *r.Level
	case def.Set:
		lv, s.Sources["level"] = def.Level, fileKey("level")
	default:
		return nil, requestErr("level", "no pulse level: give one (e.g. 40dBm) or analysis.pulse.level in the file")
	}
	s.LevelDBm = levelDBmAt(lv, z0)
	width, err := readTime("width", r.Width, def.Width, true)
	if err != nil {
		return nil, err
	}
	rise, err := readTime("rise", r.Rise, def.Rise, false)
	if err != nil {
		return nil, err
	}
	fall, err := readTime("fall", r.Fall, def.Fall, false)
	if err != nil {
		return nil, err
	}
	period := 0.0
	if !r.NoPeriod {
		if period, err = readTime("period", r.Period, def.Period, false); err != nil {
			return nil, err
		}
	}
	// Edges default to a twentieth of the width, at least a carrier
	// period.
	edge := math.Max(width/20, 1/carrier)
	if rise == 0 {
		rise = math.Min(edge, width)
	}
	if fall == 0 {
		fall = math.Min(edge, width)
	}
	count := r.Pulses
	switch {
	case count < 0:
		return nil, requestErr("pulses", "%d; accepted: 1 to 1000", count)
	case count == 0 && def.Set && def.Pulses > 0 && period != 0:
		count, s.Sources["count"] = def.Pulses, fileKey("pulses")
	case count == 0 && period != 0:
		count = 2
	case count == 0:
		count = 1
	}
	if count > 1 && period == 0 {
		return nil, requestErr("pulses", "%d pulses need a period; give one", count)
	}
	tol, maxSteps := r.RelativeTolerance, r.MaxSteps
	if tol == 0 {
		tol = 1e-3
	}
	if maxSteps == 0 {
		maxSteps = 2_000_000
	}
	if !(tol > 0 && tol <= 0.1) {
		return nil, requestErr("tolerance", "%g; accepted: above 0, at most 0.1 (1e-3 is the default)", tol)
	}
	if maxSteps < 1000 || maxSteps > 1_000_000_000 {
		return nil, requestErr("max-steps", "%d; accepted: 1000 to 1e9", maxSteps)
	}
	set := transient.PulseSettings{
		Input: sp.Input, Output: sp.Output,
		Pulse: transient.Pulse{CarrierHz: carrier, CarrierEMF: ac.DBmToEMF(s.LevelDBm, z0),
			Width: width, Rise: rise, Fall: fall, Period: period, Count: count},
		Transient: transient.Settings{RelativeTolerance: tol, MaxSteps: maxSteps},
	}
	if r.After < 0 {
		return nil, requestErr("after", "%g s; accepted: a positive time", r.After)
	}
	set.After = r.After
	// The probe: none, a level, and a frequency.
	probeHz := carrier
	if r.ProbeFrequencyHz != 0 {
		probeHz = r.ProbeFrequencyHz
	}
	switch {
	case r.NoProbe:
		set.Probe = &transient.Probe{}
	case r.Probe != nil:
		s.ProbeDBm = levelDBmAt(*r.Probe, z0)
		set.Probe = &transient.Probe{FrequencyHz: probeHz, EMF: ac.DBmToEMF(s.ProbeDBm, z0)}
	case r.ProbeFrequencyHz != 0:
		s.ProbeDBm = transient.DefaultProbeDBm
		set.Probe = &transient.Probe{FrequencyHz: probeHz, EMF: ac.DBmToEMF(s.ProbeDBm, z0)}
	}
	if err := set.Pulse.Check(); err != nil {
		var re *transient.RequestError
		if !errors.As(err, &re) {
			return nil, err
		}
		switch re.Field {
		case "steps":
			return nil, requestErr("max-steps", "%s", re.Message)
		case "delay":
			return nil, &RequestError{Err: fmt.Errorf("the pulse: %s", re.Message)}
		}
		if w := s.Sources[re.Field]; w != "" {
			return nil, &RequestError{Err: fmt.Errorf("%s: %s", w, re.Message)}
		}
		return nil, requestErr(re.Field, "%s", re.Message)
	}
	s.Settings = set
	return s, nil
}
