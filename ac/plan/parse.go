package plan

// The texts a front end takes for ranges, bands, lists and reference
// impedances, read into numbers. A problem is a *RequestError naming the
// setting the text was given to.

import (
	"math"
	"strings"

	"qpoint/ac"
	"qpoint/bias/circuit"
)

// ParseRange reads FROM:TO:STEP.
func ParseRange(setting, s string, q circuit.Quantity, stepQ circuit.Quantity) (from, to, step float64, err error) {
	parts := strings.Split(s, ":")
	if len(parts) != 3 {
		return 0, 0, 0, requestErr(setting, "`%s` is not FROM:TO:STEP; e.g. -50dBm:0dBm:1dB", s)
	}
	read := func(t string, q circuit.Quantity) (float64, error) {
		if q == circuit.Dimensionless {
			t = strings.TrimSuffix(strings.TrimSuffix(t, "dBm"), "dB")
		}
		return circuit.ParseBounded(strings.TrimSpace(t), q)
	}
	if from, err = read(parts[0], q); err == nil {
		if to, err = read(parts[1], q); err == nil {
			step, err = read(parts[2], stepQ)
		}
	}
	if err != nil {
		return 0, 0, 0, requestErr(setting, "%w", err)
	}
	if !(step > 0) || !(to > from) {
		return 0, 0, 0, requestErr(setting, "`%s` must rise from FROM to TO with a positive STEP", s)
	}
	return from, to, step, nil
}

// ParseLevelRange reads a level sweep FROM:TO:STEP: each end a power
// (-50dBm, or a bare number in dBm) or a peak voltage into a matched load
// (10mV, as --level takes it), the step in dB. It returns the ends in dBm
// of available power behind z0.
func ParseLevelRange(setting, s string, z0 float64) (from, to, step float64, err error) {
	const example = "e.g. -50dBm:0dBm:1dB or 1mV:300mV:1dB"
	parts := strings.Split(s, ":")
	if len(parts) != 3 {
		return 0, 0, 0, requestErr(setting, "`%s` is not FROM:TO:STEP; %s", s, example)
	}
	level := func(t string) (float64, error) {
		t = strings.TrimSpace(t)
		if v, err := circuit.ParseBounded(t, circuit.Dimensionless); err == nil {
			return v, nil // a bare number is dBm
		}
		lv, err := circuit.ParseLevel(t)
		if err != nil {
			return 0, err
		}
		if lv.IsPower {
			return lv.DBm, nil
		}
		return ac.EMFToDBm(2*lv.PeakVolts, z0), nil
	}
	if from, err = level(parts[0]); err == nil {
		if to, err = level(parts[1]); err == nil {
			step, err = circuit.ParseBounded(strings.TrimSpace(strings.TrimSuffix(strings.TrimSpace(parts[2]), "dB")), circuit.Dimensionless)
		}
	}
	if err != nil {
		return 0, 0, 0, requestErr(setting, "%w; %s", err, example)
	}
	if !(step > 0) || !(to > from) {
		return 0, 0, 0, requestErr(setting, "`%s` must rise from FROM to TO with a positive STEP in dB; %s", s, example)
	}
	if from < -200 || to > 90 {
		return 0, 0, 0, requestErr(setting, "`%s` spans %.1f to %.1f dBm; accepted: levels within -200 to +90 dBm", s, from, to)
	}
	return from, to, step, nil
}

// ParseLevels reads a level sweep as ParseLevelRange does and lists its
// levels in dBm, from FROM by STEP up to TO; more than most levels is
// refused.
func ParseLevels(setting, s string, z0 float64, most int) ([]float64, error) {
	from, to, step, err := ParseLevelRange(setting, s, z0)
	if err != nil {
		return nil, err
	}
	n := int(math.Floor((to-from)/step+1e-9)) + 1
	if n > most {
		return nil, requestErr(setting, "%d levels; accepted: at most %d", n, most)
	}
	levels := make([]float64, n)
	for i := range levels {
		levels[i] = from + float64(i)*step
	}
	return levels, nil
}

// ParseTemperatureRange reads an operating range LOW:HIGH, each end a
// temperature (-40C, 358K), rising; it returns the ends in kelvin.
func ParseTemperatureRange(setting, s string) (lo, hi float64, err error) {
	const accepted = "LOW:HIGH, e.g. -40C:85C"
	a, b, ok := strings.Cut(s, ":")
	if !ok {
		return 0, 0, requestErr(setting, "`%s` is not LOW:HIGH; accepted: %s", s, accepted)
	}
	if lo, err = circuit.ParseBounded(strings.TrimSpace(a), circuit.Temperature); err == nil {
		hi, err = circuit.ParseBounded(strings.TrimSpace(b), circuit.Temperature)
	}
	if err != nil {
		return 0, 0, requestErr(setting, "%w", err)
	}
	if !(lo < hi) {
		return 0, 0, requestErr(setting, "`%s` does not rise; accepted: %s", s, accepted)
	}
	return lo, hi, nil
}

// ParseBand reads LOW:HIGH, or HIGH alone when lowDefault is positive.
func ParseBand(setting, s string, lowDefault float64) (lo, hi float64, err error) {
	parts := strings.Split(s, ":")
	example := "LOW:HIGH, e.g. 800MHz:1GHz"
	if lowDefault > 0 {
		example = "HIGH or LOW:HIGH, e.g. 2MHz or 10Hz:2MHz"
	}
	bad := func(e error) (float64, float64, error) {
		if e != nil {
			return 0, 0, requestErr(setting, "%w; accepted: %s", e, example)
		}
		return 0, 0, requestErr(setting, "`%s` is not a rising band; accepted: %s within 1 mHz to 1 THz", s, example)
	}
	switch {
	case len(parts) == 1 && lowDefault > 0:
		lo = lowDefault
		if hi, err = circuit.ParseBounded(strings.TrimSpace(parts[0]), circuit.Frequency); err != nil {
			return bad(err)
		}
	case len(parts) == 2:
		if lo, err = circuit.ParseBounded(strings.TrimSpace(parts[0]), circuit.Frequency); err != nil {
			return bad(err)
		}
		if hi, err = circuit.ParseBounded(strings.TrimSpace(parts[1]), circuit.Frequency); err != nil {
			return bad(err)
		}
	default:
		return bad(nil)
	}
	if !(hi > lo) || ac.CheckFrequency(lo) != nil || ac.CheckFrequency(hi) != nil {
		return bad(nil)
	}
	return lo, hi, nil
}

// ParseFrequencies reads a comma-separated list of frequencies given to setting;
// nil for none.
func ParseFrequencies(setting, text string) ([]float64, error) {
	if text == "" {
		return nil, nil
	}
	var out []float64
	for _, t := range strings.Split(text, ",") {
		f, err := circuit.ParseBounded(strings.TrimSpace(t), circuit.Frequency)
		if err == nil {
			err = ac.CheckFrequency(f)
		}
		if err != nil {
			return nil, requestErr(setting, "%w", err)
		}
		out = append(out, f)
	}
	return out, nil
}

// ParseReference reads the reference impedances of a response: one
// resistance for every port, or one per port; nil for "".
func ParseReference(s string, ports int) ([]float64, error) {
	if s == "" {
		return nil, nil
	}
	parts := strings.Split(s, ",")
	var z []float64
	for _, p := range parts {
		v, err := circuit.ParseBounded(strings.TrimSpace(p), circuit.Resistance)
		if err != nil || !(v > 0) {
			return nil, requestErr("reference", "`%s` is not a positive resistance; accepted: ohms, one value or one per port, e.g. 50 or 50,75", p)
		}
		z = append(z, v)
	}
	if len(z) == 1 {
		for len(z) < ports {
			z = append(z, z[0])
		}
	}
	if len(z) != ports {
		return nil, requestErr("reference", "%d impedances for %d ports; accepted: one value for all ports or one per port", len(z), ports)
	}
	return z, nil
}
