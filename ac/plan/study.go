package plan

import (
	"errors"
	"slices"
	"strings"

	"qpoint/ac"
	"qpoint/ac/study"
	"qpoint/bias/circuit"
)

// AxisRequest asks for a varied quantity: Vary in the grammar of
// circuit.ResolveVary (`temperature`, `PART.value`, `MODEL.KEY`), or
// "frequency" for a second axis of frequency. From and To are as the user
// wrote them, read in the quantity Vary names (`0V`, `47k`, `-40C`); a
// range written as numbers in SI units goes in FromSI and ToSI instead
// (FromSet, ToSet say which are given).
type AxisRequest struct {
	Vary             string
	From, To         string
	FromSI, ToSI     float64
	FromSet, ToSet   bool
	Steps            int
	Log              bool
	settingsSuffix   string // "" for the first axis, "2" for the second
	fromFile, toFile bool
}

// GoalKind says what a study searches for.
type GoalKind int

// The goals of a study.
const (
	NoGoal GoalKind = iota
	Target          // where a measure meets a value
	Maximize
	Minimize
)

// StudyRequest asks for a study. Zero fields take the file's
// analysis.study and analysis.distortion, else the policy's defaults.
type StudyRequest struct {
	Axis   AxisRequest
	Second *AxisRequest // nil: one axis
	// FrequenciesHz are the response frequencies; nil: the distortion
	// frequency, else the middle of the response range, else 1 GHz.
	FrequenciesHz []float64
	// DistortionHz are the distortion frequencies; nil: the file's
	// distortion frequency, else the first response frequency.
	DistortionHz  []float64
	Level         *circuit.Level
	Input, Output string
	// Goal, with its measure text (`s21@900MHz`) and, for a target, the
	// value written after `=`.
	Goal        GoalKind
	MeasureText string
	TargetText  string
	Signed      bool       // optimise a polarity measure on its sign
	VideoBandHz [2]float64 // for nep and tss; zero: the default band
	Workers     int
}

// Study is a resolved study.
type Study struct {
	Settings study.Settings
	Goal     GoalKind
	Measure  *study.Measure // nil without a goal
	Value    float64        // a target's value
}

// Solve finds the study's goal in r, to tolerance relative to the range:
// where the measure meets the target's value, or its maximum or minimum;
// nil without a goal. A target the measure never meets is a
// *RequestError of the target.
func (s *Study) Solve(r *study.Result, tolerance float64) (*study.Solution, error) {
	switch s.Goal {
	case Target:
		sol, err := study.FindTarget(r, s.Measure, s.Value, tolerance)
		if errors.Is(err, study.ErrNoCrossing) {
			return nil, &RequestError{Settings: []string{"target"}, Err: err}
		}
		return sol, err
	case Maximize, Minimize:
		return study.Optimize(r, s.Measure, s.Goal == Maximize, tolerance)
	}
	return nil, nil
}

// maxGridPoints bounds a two-axis study's grid.
const maxGridPoints = 1_000_000

// ResolveStudy resolves a study: the file's analysis.study fills what the
// request leaves out when the request varies the same thing (or nothing),
// as numbers, never as text read again.
func ResolveStudy(c *circuit.Circuit, r StudyRequest) (*Study, error) {
	def := c.Analysis.Study
	ax := r.Axis
	if ax.Vary == "" && def.Set {
		ax.Vary = def.Vary
		if ax.Steps == 0 {
			ax.Steps = def.Steps
		}
		ax.Log = ax.Log || def.Log
		if !ax.FromSet && ax.From == "" {
			ax.FromSI, ax.FromSet, ax.fromFile = def.From, true, true
		}
		if !ax.ToSet && ax.To == "" {
			ax.ToSI, ax.ToSet, ax.toFile = def.To, true, true
		}
	}
	if ax.Vary == "" {
		return nil, requestErr("vary", "is missing and the file has no analysis.study; e.g. vary Vcc.value from 0V to 3.3V in 34 steps")
	}
	if ax.Steps == 0 {
		ax.Steps = DefaultStudySteps
	}
	first, err := resolveAxis(c, ax)
	if err != nil {
		return nil, err
	}
	st := &Study{Settings: study.Settings{Axis: *first}}

	freqs := r.FrequenciesHz
	for _, f := range freqs {
		if err := ac.CheckFrequency(f); err != nil {
			return nil, requestErr("frequencies", "%w", err)
		}
	}
	if freqs == nil {
		freqs = []float64{SignalFrequency(c)}
	}

	if r.Second != nil {
		b := *r.Second
		b.settingsSuffix = "2"
		if b.Steps == 0 {
			return nil, requestErr("steps2", "is missing: a second quantity needs its own from, to and steps")
		}
		if b.Vary == "frequency" {
			lo, hi, err := frequencyRange(b)
			if err != nil {
				return nil, err
			}
			vals, err := study.Grid(lo, hi, b.Steps, b.Log)
			if err != nil {
				return nil, requestErr("from2,to2", "%w", err)
			}
			st.Settings.Second = &study.Axis{Values: vals}
			st.Settings.SecondIsFrequency = true
			freqs = nil
		} else {
			second, err := resolveAxis(c, b)
			if err != nil {
				return nil, err
			}
			if second.Vary.Text == first.Vary.Text {
				return nil, requestErr("vary,vary2", "both vary %s; choose two different quantities", first.Vary.Text)
			}
			st.Settings.Second = second
		}
		if len(st.Settings.Axis.Values)*len(st.Settings.Second.Values) > maxGridPoints {
			return nil, requestErr("steps,steps2", "more than a million grid points")
		}
	}

	// The goal.
	st.Goal = r.Goal
	if r.Goal != NoGoal && st.Settings.Second != nil {
		return nil, requestErr("target,maximize,minimize", "need a study of one quantity; drop the second")
	}
	if r.Goal != NoGoal {
		setting := map[GoalKind]string{Target: "target", Maximize: "maximize", Minimize: "minimize"}[r.Goal]
		if st.Measure, err = study.ParseMeasure(strings.TrimSpace(r.MeasureText)); err != nil {
			return nil, requestErr(setting, "%w", err)
		}
		if r.Goal == Target {
			if st.Value, err = st.Measure.ParseValue(r.TargetText); err != nil {
				return nil, requestErr("target", "%w", err)
			}
		}
		st.Measure.Signed = r.Signed
	}
	if m := st.Measure; m != nil && m.FrequencyHz != 0 && !m.AtDistortion() && !slices.Contains(freqs, m.FrequencyHz) && !st.Settings.SecondIsFrequency {
		freqs = append(freqs, m.FrequencyHz)
	}
	st.Settings.FrequenciesHz = freqs

	// Distortion frequencies: the request, else the file's distortion
	// frequency, else the first study frequency.
	dist := c.Analysis.Distortion
	dfreqs := r.DistortionHz
	for _, f := range dfreqs {
		if err := ac.CheckFrequency(f); err != nil {
			return nil, requestErr("frequency", "%w", err)
		}
	}
	if dfreqs == nil {
		switch {
		case dist.Set && dist.FrequencyHz > 0:
			dfreqs = []float64{dist.FrequencyHz}
		case len(freqs) > 0:
			dfreqs = []float64{freqs[0]}
		}
	}
	if m := st.Measure; m != nil && m.AtDistortion() && m.FrequencyHz != 0 && !slices.Contains(dfreqs, m.FrequencyHz) {
		dfreqs = append(dfreqs, m.FrequencyHz)
	}
	// The signal path (and, with a level, the drive): when a level is
	// asked for, the file has one, or a measure needs the path.
	needPath := st.Measure != nil && (st.Measure.NeedsNoise() || st.Measure.NeedsDetector())
	if r.Level != nil || dist.Set || needPath {
		if len(dfreqs) == 0 {
			return nil, requestErr("frequency", "no distortion frequency: give one (e.g. 2.45GHz)")
		}
		d, err := ResolveDrive(c, DriveRequest{Input: r.Input, Output: r.Output, FrequencyHz: dfreqs[0], Level: r.Level})
		if err != nil {
			return nil, err
		}
		drive := d.OneTone()
		if r.Level == nil && !dist.Set {
			drive.EMF = 0 // the path alone: no level was asked for
		}
		st.Settings.Drive = drive
		st.Settings.DistortionHz = dfreqs
	}
	if m := st.Measure; m != nil && m.NeedsDrive() && st.Settings.Drive.EMF == 0 {
		return nil, requestErr("level", "measure %s needs a signal level (e.g. -30dBm)", m.Text)
	}
	if m := st.Measure; m != nil {
		st.Settings.NoiseFigure = m.NeedsNoise()
	}
	if m := st.Measure; m != nil && m.NeedsDetector() || r.VideoBandHz != [2]float64{} {
		band := r.VideoBandHz
		if band == [2]float64{} {
			band = [2]float64{DefaultVideoFromHz, DefaultVideoToHz}
		}
		st.Settings.Detector = &study.DetectorSettings{VideoFromHz: band[0], VideoToHz: band[1]}
	}
	// The mixer, when a measure needs it or the file has one: its figures
	// at each step, at the file's LO drive.
	if m := st.Measure; m != nil && m.NeedsMixer() || c.Analysis.Mixer.Set {
		mx, err := ResolveMixer(c, MixerRequest{})
		switch {
		case err == nil:
			st.Settings.Mixer = &mx.Settings
		case st.Measure != nil && st.Measure.NeedsMixer():
			return nil, err
		}
	}
	st.Settings.Workers = r.Workers
	return st, nil
}

// resolveAxis resolves a varied quantity and its grid.
func resolveAxis(c *circuit.Circuit, a AxisRequest) (*study.Axis, error) {
	sfx := a.settingsSuffix
	v, err := c.ResolveVary(a.Vary)
	if err != nil {
		if a.fromFile || a.toFile {
			return nil, fileErr(c, "vary", "study", c.Analysis.Study.Pos, "%w", err)
		}
		return nil, requestErr("vary"+sfx, "%w", err)
	}
	read := func(name, text string, si float64, set, fromFile bool) (float64, error) {
		setting := name + sfx
		if !set && text == "" {
			return 0, requestErr(setting, "is missing; give the %s of %s as a %s, e.g. %s", name, a.Vary, v.Quantity, exampleOf(v.Quantity))
		}
		x := si
		if text != "" {
			if x, err = circuit.ParseBounded(text, v.Quantity); err != nil {
				return 0, requestErr(setting, "%w", err)
			}
		}
		if err := v.Check(x); err != nil {
			if fromFile {
				return 0, fileErr(c, name, "study", c.Analysis.Study.Pos, "%w", err)
			}
			return 0, requestErr(setting, "%w", err)
		}
		return x, nil
	}
	from, err := read("from", a.From, a.FromSI, a.FromSet, a.fromFile)
	if err != nil {
		return nil, err
	}
	to, err := read("to", a.To, a.ToSI, a.ToSet, a.toFile)
	if err != nil {
		return nil, err
	}
	if a.Steps < 1 || a.Steps > 100000 {
		return nil, requestErr("steps"+sfx, "%d; accepted: 1 to 100000", a.Steps)
	}
	vals, err := study.Grid(from, to, a.Steps, a.Log)
	if err != nil {
		return nil, requestErr("from"+sfx+",to"+sfx, "%w", err)
	}
	return &study.Axis{Vary: v, Values: vals}, nil
}

// frequencyRange reads a second axis of frequency.
func frequencyRange(a AxisRequest) (lo, hi float64, err error) {
	read := func(name, text string, si float64, set bool) (float64, error) {
		x := si
		if text != "" {
			if x, err = circuit.ParseBounded(text, circuit.Frequency); err != nil {
				return 0, requestErr(name+"2", "%w", err)
			}
		} else if !set {
			return 0, requestErr(name+"2", "is missing; give the %s frequency, e.g. 1GHz", name)
		}
		if err := ac.CheckFrequency(x); err != nil {
			return 0, requestErr("from2,to2", "%w", err)
		}
		return x, nil
	}
	if lo, err = read("from", a.From, a.FromSI, a.FromSet); err != nil {
		return 0, 0, err
	}
	hi, err = read("to", a.To, a.ToSI, a.ToSet)
	return lo, hi, err
}

// exampleOf gives an example value of a quantity for messages.
func exampleOf(q circuit.Quantity) string {
	switch q {
	case circuit.Temperature:
		return "-40C"
	case circuit.Voltage:
		return "3.3V"
	case circuit.Resistance:
		return "47k"
	case circuit.Current:
		return "1mA"
	}
	return "1.5"
}

// ParseGoal reads a study's goal from the three ways of asking for one,
// at most one of them given: a target MEASURE=VALUE (see ParseTarget), a
// measure to maximize, or one to minimize. It fills r's Goal, MeasureText
// and TargetText; with none given r is left without a goal.
func ParseGoal(r *StudyRequest, target, maximize, minimize string) error {
	given := 0
	for _, g := range []string{target, maximize, minimize} {
		if g != "" {
			given++
		}
	}
	if given > 1 {
		return requestErr("target,maximize,minimize", "give one at a time")
	}
	var err error
	switch {
	case target != "":
		r.Goal = Target
		r.MeasureText, r.TargetText, err = ParseTarget(target)
	case maximize != "":
		r.Goal, r.MeasureText = Maximize, maximize
	case minimize != "":
		r.Goal, r.MeasureText = Minimize, minimize
	}
	return err
}

// ParseTarget splits a target written MEASURE=VALUE into the measure and
// the value; a frequency may follow the value (`s21=-10dB@900MHz`) and
// then belongs to the measure (`s21@900MHz`, `-10dB`).
func ParseTarget(s string) (measure, value string, err error) {
	m, v, ok := strings.Cut(s, "=")
	if !ok {
		return "", "", requestErr("target", "`%s` is not MEASURE=VALUE; e.g. s21=-10dB@900MHz", s)
	}
	if at := strings.IndexByte(v, '@'); at >= 0 {
		m, v = m+v[at:], v[:at]
	}
	return strings.TrimSpace(m), strings.TrimSpace(v), nil
}
