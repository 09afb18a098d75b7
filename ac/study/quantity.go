package study

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strings"

	"qpoint/bias/circuit"
)

// A Measure names a figure read from a study step: what a target or an
// optimisation acts on. Its text form is NAME[.PART][@FREQUENCY]:
//
//	s11, s21, s12, s22          S-parameter magnitude in dB   (@f)
//	zin_re, zin_im, zin_mag     port 1's input impedance, ohm  (@f)
//	probe.NODE                  probe transfer in dB           (@f)
//	hd2, hd3                    distortion estimate in dBc
//	dc_shift                    rectified output shift, V
//	sensitivity                 output DC per available input power, V/W
//	current.D, voltage.D, dynamic_resistance.D, junction_capacitance.D,
//	video_resistance.D          a diode's Q point
//	current_sensitivity.D, voltage_sensitivity.D                   (@f)
type Measure struct {
	Text        string
	Name        string
	Part        string
	FrequencyHz float64 // zero: the study's first frequency
	Unit        string  // "dB", "dBc", "ohm", "V", "A", "F", "V/W", "A/W"
	quantity    circuit.Quantity
}

var measures = map[string]struct {
	unit     string
	q        circuit.Quantity
	needPart bool
	needFreq bool
}{
	"s11": {"dB", circuit.Dimensionless, false, true}, "s21": {"dB", circuit.Dimensionless, false, true},
	"s12": {"dB", circuit.Dimensionless, false, true}, "s22": {"dB", circuit.Dimensionless, false, true},
	"zin_re": {"ohm", circuit.Resistance, false, true}, "zin_im": {"ohm", circuit.Resistance, false, true},
	"zin_mag": {"ohm", circuit.Resistance, false, true}, "probe": {"dB", circuit.Dimensionless, true, true},
	"hd2": {"dBc", circuit.Dimensionless, false, false}, "hd3": {"dBc", circuit.Dimensionless, false, false},
	"dc_shift": {"V", circuit.Voltage, false, false}, "sensitivity": {"V/W", circuit.Dimensionless, false, false},
	"current": {"A", circuit.Current, true, false}, "voltage": {"V", circuit.Voltage, true, false},
	"dynamic_resistance": {"ohm", circuit.Resistance, true, false}, "junction_capacitance": {"F", circuit.Capacitance, true, false},
	"video_resistance":    {"ohm", circuit.Resistance, true, false},
	"current_sensitivity": {"A/W", circuit.Dimensionless, true, true}, "voltage_sensitivity": {"V/W", circuit.Dimensionless, true, true},
}

// MeasureNames lists the accepted measure names.
func MeasureNames() []string {
	var n []string
	for k := range measures {
		n = append(n, k)
	}
	sort.Strings(n)
	return n
}

// ParseMeasure reads NAME[.PART][@FREQUENCY].
func ParseMeasure(s string) (*Measure, error) {
	m := &Measure{Text: s}
	body := s
	if at := strings.IndexByte(s, '@'); at >= 0 {
		f, err := circuit.ParseBounded(s[at+1:], circuit.Frequency)
		if err != nil {
			return nil, fmt.Errorf("frequency of `%s`: %w", s, err)
		}
		m.FrequencyHz = f
		body = s[:at]
	}
	name, part, _ := strings.Cut(body, ".")
	spec, ok := measures[name]
	if !ok {
		return nil, fmt.Errorf("`%s` is not a measure; accepted: %s (with .PART for a diode or probe, @FREQUENCY where it depends on frequency)", name, strings.Join(MeasureNames(), ", "))
	}
	if spec.needPart && part == "" {
		return nil, fmt.Errorf("`%s` needs a diode or node: e.g. %s.D1", s, name)
	}
	if !spec.needPart && part != "" {
		return nil, fmt.Errorf("`%s` takes no part name", s)
	}
	if !spec.needFreq && m.FrequencyHz != 0 {
		return nil, fmt.Errorf("`%s` does not depend on a chosen frequency; drop @…", s)
	}
	m.Name, m.Part, m.Unit, m.quantity = name, part, spec.unit, spec.q
	return m, nil
}

// ParseValue reads a target value for this measure: dB figures as plain
// numbers with an optional dB/dBc, the rest as circuit-file values.
func (m *Measure) ParseValue(s string) (float64, error) {
	t := strings.TrimSpace(s)
	switch m.Unit {
	case "dB", "dBc":
		t = strings.TrimSuffix(strings.TrimSuffix(t, "dBc"), "dB")
	case "V/W", "A/W":
		t = strings.TrimSuffix(t, m.Unit)
	}
	v, err := circuit.ParseValue(t, m.quantity)
	if err != nil {
		return 0, fmt.Errorf("target value of %s: %w", m.Text, err)
	}
	return v, nil
}

// NeedsDrive reports whether the measure needs a distortion drive.
func (m *Measure) NeedsDrive() bool {
	switch m.Name {
	case "hd2", "hd3", "dc_shift", "sensitivity":
		return true
	}
	return false
}

// Of reads the measure from a step; freqs are the study's frequencies.
func (m *Measure) Of(st *Step, freqs []float64, probes []string) (float64, error) {
	if st.Err != nil {
		return math.NaN(), st.Err
	}
	fi := 0
	if m.FrequencyHz != 0 {
		fi = -1
		for i, f := range freqs {
			if f == m.FrequencyHz {
				fi = i
			}
		}
		if fi < 0 {
			return math.NaN(), fmt.Errorf("%s: %g Hz is not among the study's frequencies", m.Text, m.FrequencyHz)
		}
	}
	resp := func() (*Response, error) {
		if fi >= len(st.Responses) {
			return nil, fmt.Errorf("%s: the circuit has no ports or no study frequency", m.Text)
		}
		return &st.Responses[fi], nil
	}
	sdb := func(i, j int) (float64, error) {
		r, err := resp()
		if err != nil {
			return math.NaN(), err
		}
		if i >= len(r.S) || j >= len(r.S) {
			return math.NaN(), fmt.Errorf("%s: the circuit has %d ports", m.Text, len(r.S))
		}
		return 20 * math.Log10(cmplx.Abs(r.S[i][j])), nil
	}
	diode := func() (*Diode, error) {
		for k := range st.Diodes {
			if st.Diodes[k].Name == m.Part {
				return &st.Diodes[k], nil
			}
		}
		var names []string
		for _, d := range st.Diodes {
			names = append(names, d.Name)
		}
		return nil, fmt.Errorf("%s: no diode `%s`; accepted: %s", m.Text, m.Part, strings.Join(names, ", "))
	}
	switch m.Name {
	case "s11":
		return sdb(0, 0)
	case "s21":
		return sdb(1, 0)
	case "s12":
		return sdb(0, 1)
	case "s22":
		return sdb(1, 1)
	case "zin_re", "zin_im", "zin_mag":
		r, err := resp()
		if err != nil {
			return math.NaN(), err
		}
		z := r.InputImpedance[0]
		switch m.Name {
		case "zin_re":
			return real(z), nil
		case "zin_im":
			return imag(z), nil
		}
		return cmplx.Abs(z), nil
	case "probe":
		r, err := resp()
		if err != nil {
			return math.NaN(), err
		}
		for k, p := range probes {
			if p == m.Part && k < len(r.Probes) {
				return 20 * math.Log10(cmplx.Abs(r.Probes[k])), nil
			}
		}
		return math.NaN(), fmt.Errorf("%s: `%s` is not a probe of the circuit; accepted: %s", m.Text, m.Part, strings.Join(probes, ", "))
	case "hd2":
		return st.HD2dBc, nil
	case "hd3":
		return st.HD3dBc, nil
	case "dc_shift":
		return st.DCShift, nil
	case "sensitivity":
		return st.DetectorSensitivity, nil
	}
	d, err := diode()
	if err != nil {
		return math.NaN(), err
	}
	switch m.Name {
	case "current":
		return d.Current, nil
	case "voltage":
		return d.Voltage, nil
	case "dynamic_resistance":
		return d.DynamicResistance, nil
	case "junction_capacitance":
		return d.JunctionCapacitance, nil
	case "video_resistance":
		return d.VideoResistance, nil
	case "current_sensitivity":
		return d.CurrentSensitivity[fi], nil
	case "voltage_sensitivity":
		return d.VoltageSensitivity[fi], nil
	}
	return math.NaN(), fmt.Errorf("unknown measure %s", m.Text)
}
