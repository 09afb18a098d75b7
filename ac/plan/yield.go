package plan

import (
	"math"
	"slices"
	"strings"

	"qpoint/ac/study"
	"qpoint/ac/yield"
	"qpoint/bias/circuit"
)

// DefaultRuns is the run count when neither the request nor the file gives
// one: enough that a yield near 95 % has a 95 % interval about ±1.4 %
// wide (Wilson 1927).
const DefaultRuns = 1000

// YieldRequest asks for a yield analysis. Zero fields take the file's
// analysis.yield, else the policy's defaults.
type YieldRequest struct {
	Targets []string // MEASURE>VALUE@F texts
	Runs    int
	Seed    *uint64
	Workers int
	// TemperatureRangeK, when not nil, is the operating range [low, high].
	TemperatureRangeK *[2]float64
	// The drive of distortion targets, and the path of noise and
	// detector targets.
	FrequencyHz   float64
	Level         *circuit.Level
	Input, Output string
	VideoBandHz   [2]float64
	// Observe, when neither the request nor the file names a target,
	// follows the main figures without limits (the report's spread)
	// instead of failing.
	Observe bool
}

// ResolveYield turns a request and the file's defaults into the yield
// settings.
func ResolveYield(c *circuit.Circuit, r YieldRequest) (*yield.Settings, error) {
	if len(c.Tolerances) == 0 {
		return nil, requestErr("tolerances", "%s: the circuit has no tolerances; accepted: a `tolerance:` on a part (e.g. tolerance: 1%%) or a `spread:` on a diode model (e.g. spread: {saturation_current: {log_sigma: 0.3}})", c.File)
	}
	def := c.Analysis.Yield
	s := &yield.Settings{Runs: DefaultRuns, Seed: 1, Workers: r.Workers}
	if def.Runs > 0 {
		s.Runs = def.Runs
	}
	if r.Runs != 0 {
		if r.Runs < 0 || r.Runs > yield.MaxRuns {
			return nil, requestErr("runs", "%d; accepted: 1 to %d", r.Runs, yield.MaxRuns)
		}
		s.Runs = r.Runs
	}
	if def.SeedSet {
		s.Seed = def.Seed
	}
	if r.Seed != nil {
		s.Seed = *r.Seed
	}
	if r.Workers < 0 {
		return nil, requestErr("workers", "%d; accepted: 0 (all cores) or more", r.Workers)
	}
	switch {
	case len(r.Targets) > 0:
		for _, text := range r.Targets {
			t, err := yield.ParseTarget(strings.TrimSpace(text))
			if err != nil {
				return nil, requestErr("target", "%w", err)
			}
			s.Targets = append(s.Targets, t)
		}
	case len(def.Targets) > 0:
		for i, text := range def.Targets {
			t, err := yield.ParseTarget(text)
			if err != nil {
				return nil, &RequestError{Settings: []string{"target"}, File: c.File, Pos: def.TargetPos[i], Key: "target of the yield analysis", Err: err}
			}
			s.Targets = append(s.Targets, t)
		}
	case r.Observe:
		s.Targets = ObserveTargets(c)
	default:
		return nil, requestErr("target", `is missing and the file has no analysis.yield targets; e.g. "s21>-6.2dB@900MHz" and "hd3<-50dBc"`)
	}

	// A measure naming a diode or probe must find it.
	var diodes []string
	for _, p := range c.Parts {
		if p.Kind == circuit.Diode {
			diodes = append(diodes, p.Name)
		}
	}
	for _, t := range s.Targets {
		m := t.Measure
		switch {
		case m.Part == "":
		case m.Name == "probe" && !slices.Contains(c.Probes, m.Part):
			return nil, requestErr("target", "%s: `%s` is not a probe of the circuit; accepted: %s", t.Text, m.Part, nameOrNone(c.Probes))
		case m.Name != "probe" && !slices.Contains(diodes, m.Part):
			return nil, requestErr("target", "%s: `%s` is not a diode of the circuit; accepted: %s", t.Text, m.Part, nameOrNone(diodes))
		}
	}

	// Temperatures: the range's ends and the circuit's own between them.
	var rng *[2]float64
	switch {
	case r.TemperatureRangeK != nil:
		if !(r.TemperatureRangeK[0] < r.TemperatureRangeK[1]) {
			return nil, requestErr("temperature-range", "does not rise; accepted: LOW:HIGH, e.g. -40C:85C")
		}
		rng = r.TemperatureRangeK
	case def.TemperatureRangeSet:
		rng = &def.TemperatureRangeK
	}
	if rng != nil {
		lo, hi := rng[0], rng[1]
		s.TemperaturesK = []float64{lo}
		if lo < c.TemperatureK && c.TemperatureK < hi {
			s.TemperaturesK = append(s.TemperaturesK, c.TemperatureK)
		}
		s.TemperaturesK = append(s.TemperaturesK, hi)
	}

	// The study frequency a measure without @F is read at: the file's
	// distortion frequency, else the middle of its response range.
	a := &s.Analysis
	switch {
	case c.Analysis.Distortion.Set:
		a.FrequenciesHz = []float64{c.Analysis.Distortion.FrequencyHz}
	case c.Analysis.Response.Set:
		a.FrequenciesHz = []float64{math.Sqrt(c.Analysis.Response.FromHz * c.Analysis.Response.ToHz)}
	default:
		a.FrequenciesHz = []float64{1e9}
	}
	needDrive, needPath := false, false
	for _, t := range s.Targets {
		needDrive = needDrive || t.Measure.NeedsDrive()
		needPath = needPath || t.Measure.NeedsNoise() || t.Measure.NeedsDetector()
	}
	dist := c.Analysis.Distortion
	if r.Level != nil || needDrive || needPath || r.FrequencyHz != 0 {
		freq := r.FrequencyHz
		if freq == 0 && !dist.Set {
			freq = a.FrequenciesHz[0]
		}
		d, err := ResolveDrive(c, DriveRequest{Input: r.Input, Output: r.Output, FrequencyHz: freq, Level: r.Level})
		if err != nil {
			return nil, err
		}
		drive := d.OneTone()
		if r.Level == nil && !dist.Set {
			drive.EMF = 0 // the path alone: no level was asked for
		}
		a.Drive = drive
		a.DistortionHz = []float64{drive.FrequencyHz}
	}
	for _, t := range s.Targets {
		if t.Measure.NeedsDrive() && a.Drive.EMF == 0 {
			return nil, requestErr("level", "target %s needs a signal level (e.g. -30dBm)", t.Text)
		}
	}
	for _, t := range s.Targets {
		if t.Measure.NeedsMixer() && a.Mixer == nil {
			m, err := ResolveMixer(c, MixerRequest{})
			if err != nil {
				return nil, err
			}
			a.Mixer = &m.Settings
		}
	}
	if needPath || r.VideoBandHz != [2]float64{} {
		band := r.VideoBandHz
		if band == [2]float64{} {
			band = [2]float64{DefaultVideoFromHz, DefaultVideoToHz}
		}
		a.Detector = &study.DetectorSettings{VideoFromHz: band[0], VideoToHz: band[1]}
	}
	return s, nil
}

// nameOrNone lists names for a message.
func nameOrNone(names []string) string {
	if len(names) == 0 {
		return "none in this circuit"
	}
	return strings.Join(names, ", ")
}

// ObserveTargets are the figures the report follows when the file names
// no yield targets: the transmission (or the input impedance of a
// one-port) at the design frequency, and HD3 when the file gives a drive.
func ObserveTargets(c *circuit.Circuit) []yield.Target {
	var texts []string
	if len(c.Ports) >= 2 {
		texts = append(texts, "s21")
	} else if len(c.Ports) == 1 {
		texts = append(texts, "zin_mag")
	}
	if c.Analysis.Distortion.Set && len(c.Ports) > 0 {
		texts = append(texts, "hd3")
	}
	var ts []yield.Target
	for _, text := range texts {
		m, err := study.ParseMeasure(text)
		if err == nil {
			ts = append(ts, yield.Target{Text: text, Measure: m, Bound: yield.Observe, Limit: math.NaN()})
		}
	}
	return ts
}
