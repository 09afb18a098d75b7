package study

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"

	"qpoint/ac"
	"qpoint/ac/mixer"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// chainLength is the number of consecutive steps one worker solves by
// continuation. It is fixed, not derived from the worker count, so that
// every step starts from the same point however many workers run.
const chainLength = 8

// Axis is one varied quantity and its values.
type Axis struct {
	Vary   *circuit.Vary
	Values []float64
}

// Grid returns n values from from to to, evenly or (log) geometrically
// spaced.
func Grid(from, to float64, n int, log bool) ([]float64, error) {
	if n < 1 {
		return nil, fmt.Errorf("a study needs at least one step, got %d", n)
	}
	if from == to && n > 1 {
		return nil, fmt.Errorf("the range is empty: from and to are both %g", from)
	}
	if log && (from <= 0) != (to <= 0) || log && (from == 0 || to == 0) {
		return nil, fmt.Errorf("a logarithmic range needs both ends non-zero and of one sign, got %g to %g", from, to)
	}
	v := make([]float64, n)
	for i := range v {
		f := 0.0
		if n > 1 {
			f = float64(i) / float64(n-1)
		}
		if log {
			v[i] = from * math.Pow(to/from, f)
		} else {
			v[i] = from + (to-from)*f
		}
	}
	if n > 1 {
		v[n-1] = to
	}
	return v, nil
}

// Settings describe a study.
type Settings struct {
	Axis Axis
	// Second, when not nil, is a second varied quantity: the study then
	// covers the grid Axis × Second.
	Second *Axis
	// FrequenciesHz are where the response is reported. With
	// SecondIsFrequency the second axis is frequency instead.
	FrequenciesHz     []float64
	SecondIsFrequency bool
	// Distortion: when Drive.EMF > 0, each step estimates the
	// fundamental, HD2, HD3 and the DC shift for this drive at each of
	// DistortionHz (at Drive.FrequencyHz alone when DistortionHz is
	// empty). Drive's input and output also set the signal path of the
	// noise figure and the detector figures.
	Drive        ac.Drive
	DistortionHz []float64
	// NoiseFigure, when true, computes each step's noise figure at each
	// study frequency (FrequenciesHz) from Drive.Input to Drive.Output.
	NoiseFigure bool
	// Detector, when not nil, computes each step's noise-equivalent power
	// and tangential sensitivity (ac.Detector) with the carrier at the
	// first distortion frequency.
	Detector *DetectorSettings
	// Mixer, when not nil, analyses the mixer under its LO at each step
	// (ac/mixer): conversion loss, noise figure and the LO power it
	// takes, so that the bias that suits a given LO drive is a study.
	Mixer *mixer.Settings
	// Workers running steps in parallel; zero means all cores. No more
	// run than there are chains of steps to share out.
	Workers int
	// Progress, when not nil, is called after each step with the count
	// done; calls come from one goroutine at a time.
	Progress func(done, total int)
}

// DetectorSettings give the video band over which a detector's output
// noise is counted for its tangential sensitivity; its noise-equivalent
// power is taken at the band's geometric centre (ac.Detector).
type DetectorSettings struct {
	VideoFromHz, VideoToHz float64
}

// Total is the number of steps the settings make: the first axis's
// values, times the second's when there is one.
func (s *Settings) Total() int {
	n := len(s.Axis.Values)
	if s.Second != nil {
		n *= len(s.Second.Values)
	}
	return n
}

// DistortionFrequencies returns the frequencies at which the study
// estimates distortion: DistortionHz, else the drive's frequency; none
// without a drive.
func (s *Settings) DistortionFrequencies() []float64 {
	if s.Drive.EMF <= 0 {
		return nil
	}
	if len(s.DistortionHz) > 0 {
		return s.DistortionHz
	}
	return []float64{s.Drive.FrequencyHz}
}

// Detection is a detector's sensitivity limit at one step (ac.Detector).
type Detection struct {
	// Detects is false where the carrier does not move the output's DC
	// level: the output is not a detector's, and the figures are zero.
	Detects       bool
	NEP           float64 // noise-equivalent power, W/√Hz, at the video band's centre
	TangentialDBm float64 // tangential sensitivity, dBm of available power
}

// Distortion is the Volterra estimate at one step and one frequency.
type Distortion struct {
	FrequencyHz    float64
	Fundamental    float64 // output at f1 to third order, V peak
	HD2dBc, HD3dBc float64
	DCShift        float64 // V
	// Sensitivity is the DC shift at the output per available input
	// power, V/W: the whole circuit's voltage sensitivity including its
	// match. Its sign is the detector's polarity.
	Sensitivity float64
}

// DiodeState is a diode's state at one step.
type DiodeState struct {
	Name                 string
	Current              float64 // A
	Voltage              float64 // V, terminal
	DynamicResistance    float64 // ohm, junction
	JunctionCapacitance  float64 // F
	DiffusionCapacitance float64 // F
	// Detector figures at each study frequency (Cowley and Sorensen):
	// current sensitivity β in A/W of power absorbed by the chip, the
	// open-circuit voltage sensitivity γ = β R_v in V/W, and the video
	// resistance R_v = r_j + R_S.
	CurrentSensitivity []float64
	VoltageSensitivity []float64
	VideoResistance    float64
	Warnings           int
}

// Spot is the small-signal response at one frequency.
type Spot struct {
	FrequencyHz    float64
	S              [][]complex128
	InputImpedance []complex128
	Probes         []complex128
}

// Step is the study's result at one grid point.
type Step struct {
	Index  [2]int     // position on the axes
	Values [2]float64 // the varied values (the second is zero for one axis)

	Iterations int           // Newton iterations of the bias solve
	Strategy   bias.Strategy // how the bias converged
	Diodes     []DiodeState
	Responses  []Spot // one per study frequency
	Warnings   []bias.Warning

	// Distortion holds the estimates at each distortion frequency
	// (Settings.DistortionFrequencies), when asked for.
	Distortion []Distortion
	// NoiseFigureDB is the noise figure at each study frequency, when
	// asked for.
	NoiseFigureDB []float64
	// Detection holds the detector figures, when asked for
	// (Settings.Detector).
	Detection *Detection
	// Mixer holds the mixer's figures, when asked for (Settings.Mixer).
	Mixer *MixerFigures

	Err error // non-nil when this step could not be solved

	// sensitivities holds every diode's two sensitivities at each
	// frequency, in one block (Diode.CurrentSensitivity and
	// VoltageSensitivity are its slices).
	sensitivities []float64
}

// Result is a whole study.
type Result struct {
	Settings Settings
	Circuit  *circuit.Circuit
	Ports    []ac.PortInfo
	Probes   []string
	Steps    []Step // row-major: second axis outer, first axis inner
	Shape    [2]int // steps along the first and second axes
	Newton   int    // total Newton iterations
}

// At returns the step at (i, j).
func (r *Result) At(i, j int) *Step { return &r.Steps[j*r.Shape[0]+i] }

// Failed counts the steps that could not be solved.
func (r *Result) Failed() int {
	n := 0
	for _, st := range r.Steps {
		if st.Err != nil {
			n++
		}
	}
	return n
}

// FirstSolved returns the first step, in grid order, that solved, or nil
// if none did.
func (r *Result) FirstSolved() *Step {
	for i := range r.Steps {
		if r.Steps[i].Err == nil {
			return &r.Steps[i]
		}
	}
	return nil
}

// Run performs the study.
func Run(c *circuit.Circuit, s Settings) (*Result, error) {
	if s.Axis.Vary == nil || len(s.Axis.Values) == 0 {
		return nil, errors.New("study: nothing to vary")
	}
	for _, v := range s.Axis.Values {
		if err := s.Axis.Vary.Check(v); err != nil {
			return nil, err
		}
	}
	n0, n1 := len(s.Axis.Values), 1
	if s.Second != nil {
		n1 = len(s.Second.Values)
		if !s.SecondIsFrequency {
			for _, v := range s.Second.Values {
				if err := s.Second.Vary.Check(v); err != nil {
					return nil, err
				}
			}
		}
	}
	res := &Result{Settings: s, Circuit: c, Shape: [2]int{n0, n1}, Steps: make([]Step, n0*n1)}
	for _, p := range c.Ports {
		res.Ports = append(res.Ports, ac.PortInfo{Name: p.Name, Impedance: p.Impedance})
	}
	res.Probes = c.Probes

	// Chains run along the first axis, for each value of the second.
	type chain struct{ j, from, to int }
	var chains []chain
	for j := 0; j < n1; j++ {
		for i := 0; i < n0; i += chainLength {
			chains = append(chains, chain{j, i, min(i+chainLength, n0)})
		}
	}
	workers := s.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	// More workers than chains would only wait: each holds a workspace,
	// so a huge count costs memory and time for nothing.
	workers = min(workers, len(chains))
	// Workers take the next chain by an atomic counter: no goroutine hands
	// chains out, so a worker never waits for one to be scheduled.
	var next atomic.Int64
	var wg sync.WaitGroup
	var mu sync.Mutex
	done := 0
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var ws workspace
			for {
				k := int(next.Add(1)) - 1
				if k >= len(chains) {
					return
				}
				ch := chains[k]
				var prev *bias.Point
				for i := ch.from; i < ch.to; i++ {
					st := res.At(i, ch.j)
					prev = runStep(c, s, i, ch.j, prev, st, &ws)
					if s.Progress != nil {
						mu.Lock()
						done++
						s.Progress(done, len(res.Steps))
						mu.Unlock()
					}
				}
			}
		}()
	}
	wg.Wait()
	for i := range res.Steps {
		res.Newton += res.Steps[i].Iterations
	}
	return res, nil
}

// workspace is the storage one worker's steps reuse: the circuit with the
// step's values applied, the bias system and point, the linearised
// network, and the factorisations and vectors of the sweep and the
// distortion estimate. Each step overwrites what the last one left there
// but for the results it copied into its Step, so a step allocates little
// beyond its results. It changes no result: every step computes from the
// circuit, its values and the previous step's point alone.
type workspace struct {
	first     circuit.Variant // the circuit at the first axis's value
	second    circuit.Variant // and at the second's, when it varies the circuit
	frequency [1]float64      // the step's frequency, when the second axis is frequency
	bias      bias.Workspace
	network   smallsignal.Workspace
	ac        ac.Workspace
}

// runStep solves one grid point starting from prev (nil for a cold start)
// and fills st, in the storage of ws. It returns the bias point for the
// next step of the chain; the point lives in ws, which the next step
// overwrites once it has started from it.
func runStep(c *circuit.Circuit, s Settings, i, j int, prev *bias.Point, st *Step, ws *workspace) *bias.Point {
	st.Index = [2]int{i, j}
	st.Values[0] = s.Axis.Values[i]
	temp := s.Axis.Vary.ApplyTo(&ws.first, c, s.Axis.Values[i])
	cc := &ws.first.Circuit
	freqs := s.FrequenciesHz
	if s.Second != nil {
		st.Values[1] = s.Second.Values[j]
		if s.SecondIsFrequency {
			ws.frequency[0] = s.Second.Values[j]
			freqs = ws.frequency[:]
		} else {
			t2 := s.Second.Vary.ApplyTo(&ws.second, cc, s.Second.Values[j])
			cc = &ws.second.Circuit
			if s.Second.Vary.Kind == circuit.VaryTemperature {
				temp = t2
			}
		}
	}
	return analyse(cc, temp, freqs, s, prev, st, ws)
}

// analyse solves circuit cc at temperature temp (kelvin) from prev, and
// fills st with what s asks for at the frequencies freqs, in the storage
// of ws. It returns the bias point, as runStep does.
func analyse(cc *circuit.Circuit, temp float64, freqs []float64, s Settings, prev *bias.Point, st *Step, ws *workspace) *bias.Point {
	p, err := ws.bias.Solve(cc, bias.Settings{TemperatureK: temp, Start: prev})
	if err != nil {
		st.Err = err
		return prev
	}
	st.Iterations = p.Stats.Iterations
	st.Strategy = p.Stats.Strategy
	st.Warnings = p.Warnings
	nw, err := ws.network.New(p)
	if err != nil {
		st.Err = err
		return p
	}
	if len(p.Diodes) > 0 {
		st.Diodes = slices.Grow(st.Diodes[:0], len(p.Diodes))
	}
	// Every diode's two sensitivities at each frequency, in one block.
	nf := len(freqs)
	var sensitivities []float64
	if nf > 0 {
		st.sensitivities = slices.Grow(st.sensitivities[:0], 2*nf*len(p.Diodes))[:2*nf*len(p.Diodes)]
		sensitivities = st.sensitivities
	}
	for k, d := range p.Diodes {
		sd := nw.Diodes[k]
		dd := DiodeState{
			Name: d.Name, Current: d.Current, Voltage: d.Voltage,
			DynamicResistance: d.DynamicResistance, JunctionCapacitance: d.JunctionCapacitance,
			DiffusionCapacitance: d.DiffusionCapacitance,
			VideoResistance:      d.DynamicResistance + sd.SeriesResistance,
		}
		if nf > 0 {
			block := sensitivities[2*nf*k : 2*nf*(k+1)]
			dd.CurrentSensitivity, dd.VoltageSensitivity = block[:nf:nf], block[nf:2*nf:2*nf]
			for fi, f := range freqs {
				b := sd.CurrentSensitivity(f)
				dd.CurrentSensitivity[fi] = b
				dd.VoltageSensitivity[fi] = b * dd.VideoResistance
			}
		}
		for _, w := range p.Warnings {
			if w.Part == d.Name {
				dd.Warnings++
			}
		}
		st.Diodes = append(st.Diodes, dd)
	}
	if len(nw.Ports) > 0 && len(freqs) > 0 {
		st.Responses = slices.Grow(st.Responses[:0], len(freqs))
		ws.ac.ReservePoints(len(freqs), len(nw.Ports), len(nw.Point.Circuit.Probes))
		_, _, err := ws.ac.Sweep(nw, freqs, ac.Settings{}, func(pt ac.Point) error {
			st.Responses = append(st.Responses, Spot{pt.FrequencyHz, pt.S, pt.InputImpedance, pt.Probes})
			return nil
		})
		if err != nil {
			st.Err = err
			return p
		}
	}
	if df := s.DistortionFrequencies(); len(df) > 0 && len(nw.Ports) > 0 {
		st.Distortion = slices.Grow(st.Distortion[:0], len(df))
		for _, f := range df {
			d := s.Drive
			d.SecondToneHz = 0
			d.FrequencyHz = f
			e, err := ws.ac.Volterra(nw, d)
			if err != nil {
				st.Err = err
				return p
			}
			pin := ac.AvailablePower(d.EMF, nw.Ports[d.Input].Impedance)
			st.Distortion = append(st.Distortion, Distortion{FrequencyHz: f,
				Fundamental: cmplx.Abs(e.Fundamental), HD2dBc: e.HD2dBc(), HD3dBc: e.HD3dBc(),
				DCShift: e.DCShift, Sensitivity: e.DCShift / pin})
		}
	}
	path := ac.NoiseSettings{Input: s.Drive.Input, Output: s.Drive.Output}
	if s.NoiseFigure && len(nw.Ports) > 0 && len(freqs) > 0 {
		r, err := ac.Noise(nw, freqs, path)
		if err != nil {
			st.Err = err
			return p
		}
		st.NoiseFigureDB = slices.Grow(st.NoiseFigureDB[:0], len(freqs))[:len(freqs)]
		for i, pt := range r.Points {
			st.NoiseFigureDB[i] = pt.FigureDB()
		}
	}
	if s.Detector != nil && len(nw.Ports) > 0 {
		if st.Detection == nil {
			st.Detection = new(Detection)
		}
		*st.Detection = Detection{}
		carrier := s.Drive.FrequencyHz
		if df := s.DistortionHz; len(df) > 0 {
			carrier = df[0]
		}
		det, err := ac.Detector(nw, path, carrier, s.Detector.VideoFromHz, s.Detector.VideoToHz)
		switch {
		case errors.Is(err, ac.ErrNoRectification):
			// Not a detector at this step: the figures stay NaN.
		case err != nil:
			st.Err = err
			return p
		default:
			*st.Detection = Detection{Detects: true, NEP: det.NEP, TangentialDBm: det.TangentialDBm()}
		}
	}
	if s.Mixer != nil {
		st.Mixer = mixerFigures(nw, *s.Mixer) // mixer.go
	}
	return p
}
