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
//	noise_figure                noise figure in dB             (@f)
//	hd2, hd3                    distortion estimate in dBc     (@f of the distortion)
//	dc_shift                    rectified output shift, V      (@f of the distortion)
//	sensitivity                 output DC per available input power, V/W (@f of the distortion)
//	nep                         detector noise-equivalent power, W/√Hz
//	tss                         detector tangential sensitivity, dBm
//	conversion_loss             a mixer's conversion loss under its LO, dB
//	mixer_noise_figure          a mixer's noise figure (single sideband), dB
//	lo_power                    the LO power a mixer absorbs, dBm
//	current.D, voltage.D, dynamic_resistance.D, junction_capacitance.D,
//	video_resistance.D          a diode's Q point
//	current_sensitivity.D, voltage_sensitivity.D                   (@f)
//
// A frequency marked (@f) is one of the study's frequencies, the first
// when none is given; one marked (@f of the distortion) is one of the
// distortion frequencies, the first when none is given.
type Measure struct {
	Text        string
	Name        string
	Part        string
	FrequencyHz float64 // zero: the first study (or distortion) frequency
	Unit        string  // "dB", "dBc", "dBm", "ohm", "V", "A", "F", "V/W", "A/W", "W/√Hz"
	// Signed, for a measure whose sign is only a polarity (Polar), makes
	// Optimize act on the signed value instead of the magnitude.
	Signed   bool
	quantity circuit.Quantity
	spec     measureSpec
}

// frequencyUse says which frequencies a measure's @F picks among.
type frequencyUse int

const (
	noFrequency frequencyUse = iota
	studyFrequency
	distortionFrequency
)

type measureSpec struct {
	unit     string
	q        circuit.Quantity
	needPart bool
	freq     frequencyUse
	// polar: the sign only says which way the output moves (a detector's
	// polarity), so the best value is the largest magnitude.
	polar bool
	// needs is what the step must compute for the measure.
	needs need
}

type need int

const (
	needNothing need = iota
	needDrive
	needNoise
	needDetector
	needMixer
)

var measures = map[string]measureSpec{
	"s11":                  {unit: "dB", q: circuit.Dimensionless, freq: studyFrequency},
	"s21":                  {unit: "dB", q: circuit.Dimensionless, freq: studyFrequency},
	"s12":                  {unit: "dB", q: circuit.Dimensionless, freq: studyFrequency},
	"s22":                  {unit: "dB", q: circuit.Dimensionless, freq: studyFrequency},
	"zin_re":               {unit: "ohm", q: circuit.Resistance, freq: studyFrequency},
	"zin_im":               {unit: "ohm", q: circuit.Resistance, freq: studyFrequency},
	"zin_mag":              {unit: "ohm", q: circuit.Resistance, freq: studyFrequency},
	"probe":                {unit: "dB", q: circuit.Dimensionless, needPart: true, freq: studyFrequency},
	"noise_figure":         {unit: "dB", q: circuit.Dimensionless, freq: studyFrequency, needs: needNoise},
	"hd2":                  {unit: "dBc", q: circuit.Dimensionless, freq: distortionFrequency, needs: needDrive},
	"hd3":                  {unit: "dBc", q: circuit.Dimensionless, freq: distortionFrequency, needs: needDrive},
	"dc_shift":             {unit: "V", q: circuit.Voltage, freq: distortionFrequency, polar: true, needs: needDrive},
	"sensitivity":          {unit: "V/W", q: circuit.Dimensionless, freq: distortionFrequency, polar: true, needs: needDrive},
	"nep":                  {unit: "W/√Hz", q: circuit.Dimensionless, needs: needDetector},
	"tss":                  {unit: "dBm", q: circuit.Dimensionless, needs: needDetector},
	"conversion_loss":      {unit: "dB", q: circuit.Dimensionless, needs: needMixer},
	"mixer_noise_figure":   {unit: "dB", q: circuit.Dimensionless, needs: needMixer},
	"lo_power":             {unit: "dBm", q: circuit.Dimensionless, needs: needMixer},
	"current":              {unit: "A", q: circuit.Current, needPart: true},
	"voltage":              {unit: "V", q: circuit.Voltage, needPart: true},
	"dynamic_resistance":   {unit: "ohm", q: circuit.Resistance, needPart: true},
	"junction_capacitance": {unit: "F", q: circuit.Capacitance, needPart: true},
	"video_resistance":     {unit: "ohm", q: circuit.Resistance, needPart: true},
	"current_sensitivity":  {unit: "A/W", q: circuit.Dimensionless, needPart: true, freq: studyFrequency, polar: true},
	"voltage_sensitivity":  {unit: "V/W", q: circuit.Dimensionless, needPart: true, freq: studyFrequency, polar: true},
}

// Polar reports whether the measure's sign is only a polarity (a
// detector's voltage sensitivity, a DC shift): Optimize then seeks the
// largest or smallest magnitude unless Signed is set.
func (m *Measure) Polar() bool { return m.spec.polar }

// OnMagnitude reports whether Optimize acts on |value|.
func (m *Measure) OnMagnitude() bool { return m.spec.polar && !m.Signed }

// objective is what Optimize compares.
func (m *Measure) objective(v float64) float64 {
	if m.OnMagnitude() {
		return math.Abs(v)
	}
	return v
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
	if spec.freq == noFrequency && m.FrequencyHz != 0 {
		return nil, fmt.Errorf("`%s` does not depend on a chosen frequency; drop @…", s)
	}
	m.Name, m.Part, m.Unit, m.quantity, m.spec = name, part, spec.unit, spec.q, spec
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

// NeedsDrive reports whether the measure needs a distortion drive (a
// signal level).
func (m *Measure) NeedsDrive() bool { return m.spec.needs == needDrive }

// NeedsNoise reports whether the measure needs the noise figure
// (Settings.NoiseFigure).
func (m *Measure) NeedsNoise() bool { return m.spec.needs == needNoise }

// NeedsDetector reports whether the measure needs the detector figures
// (Settings.Detector).
func (m *Measure) NeedsDetector() bool { return m.spec.needs == needDetector }

// NeedsMixer reports whether the measure needs the mixer analysis
// (Settings.Mixer).
func (m *Measure) NeedsMixer() bool { return m.spec.needs == needMixer }

// AtDistortion reports whether the measure's @F picks a distortion
// frequency rather than a study frequency.
func (m *Measure) AtDistortion() bool { return m.spec.freq == distortionFrequency }

// Of reads the measure from a step; freqs are the study's frequencies.
func (m *Measure) Of(st *Step, freqs []float64, probes []string) (float64, error) {
	if st.Err != nil {
		return math.NaN(), st.Err
	}
	fi := 0
	if m.FrequencyHz != 0 && m.spec.freq == studyFrequency {
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
	resp := func() (*Spot, error) {
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
	diode := func() (*DiodeState, error) {
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
	case "hd2", "hd3", "dc_shift", "sensitivity":
		if len(st.Distortion) == 0 {
			return math.NaN(), fmt.Errorf("%s: the study estimates no distortion; give a signal level", m.Text)
		}
		d := &st.Distortion[0]
		if m.FrequencyHz != 0 {
			d = nil
			var have []string
			for k := range st.Distortion {
				if st.Distortion[k].FrequencyHz == m.FrequencyHz {
					d = &st.Distortion[k]
				}
				have = append(have, fmt.Sprintf("%g Hz", st.Distortion[k].FrequencyHz))
			}
			if d == nil {
				return math.NaN(), fmt.Errorf("%s: %g Hz is not a distortion frequency of the study; accepted: %s", m.Text, m.FrequencyHz, strings.Join(have, ", "))
			}
		}
		switch m.Name {
		case "hd2":
			return d.HD2dBc, nil
		case "hd3":
			return d.HD3dBc, nil
		case "dc_shift":
			return d.DCShift, nil
		}
		return d.Sensitivity, nil
	case "noise_figure":
		if fi >= len(st.NoiseFigureDB) {
			return math.NaN(), fmt.Errorf("%s: the study computes no noise figure", m.Text)
		}
		return st.NoiseFigureDB[fi], nil
	case "conversion_loss", "mixer_noise_figure", "lo_power":
		switch {
		case st.Mixer == nil:
			return math.NaN(), fmt.Errorf("%s: the study analyses no mixer; give the file an analysis.mixer", m.Text)
		case st.Mixer.Err != nil:
			return math.NaN(), fmt.Errorf("%s: %w", m.Text, st.Mixer.Err)
		case st.Mixer.Breakdown:
			return math.NaN(), fmt.Errorf("%s: the LO drive takes a diode past its breakdown knee at this step", m.Text)
		case m.Name == "conversion_loss":
			return st.Mixer.ConversionLossDB, nil
		case m.Name == "mixer_noise_figure":
			return st.Mixer.NoiseFigureSSBDB, nil
		}
		return st.Mixer.LOAbsorbedDBm, nil
	case "nep", "tss":
		switch {
		case st.Detection == nil:
			return math.NaN(), fmt.Errorf("%s: the study computes no detector figures", m.Text)
		case !st.Detection.Detects:
			return math.NaN(), fmt.Errorf("%s: the output does not detect the carrier (its DC level does not move)", m.Text)
		case m.Name == "tss":
			return st.Detection.TangentialDBm, nil
		}
		return st.Detection.NEP, nil
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
