package yield

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"
	"time"

	"qpoint/ac/study"
	"qpoint/bias"
	"qpoint/bias/circuit"
)

// MaxRuns bounds Settings.Runs: a million runs keep every run's values
// and readings in a few hundred megabytes at most.
const MaxRuns = 1_000_000

// blockSize is how many consecutive runs a worker takes at a time. Runs
// do not depend on one another, so it only trades scheduling cost against
// the balance of the last blocks.
const blockSize = 16

// maxRedraws bounds the draws of one run whose values must all lie in
// their fields' accepted ranges (circuit.Tolerance.Accepts).
const maxRedraws = 1000

// Settings describe a yield analysis.
type Settings struct {
	// Targets are the conditions a run must meet (all of them, at every
	// temperature) to pass; Observe targets are only reported.
	Targets []Target
	// Runs is the number of circuits drawn, 1 to MaxRuns.
	Runs int
	// Seed keys the random streams; the same seed gives the same runs.
	Seed uint64
	// TemperaturesK are the temperatures at which every run must meet
	// its targets, in kelvin; empty means the circuit's own.
	TemperaturesK []float64
	// Analysis says what each run computes besides the targets' needs:
	// the signal drive for distortion measures (Drive, DistortionHz), the
	// video band of detector measures (Detector), and the frequency a
	// measure without @F is read at (the first of FrequenciesHz). Its
	// axes, Workers and Progress are not used. Run adds each target's
	// own frequency and what it needs (noise figure, detector figures).
	Analysis study.Settings
	// Workers running in parallel; zero means all cores.
	Workers int
	// Progress, when not nil, is called after each run with the count
	// done; calls come from one goroutine at a time.
	Progress func(done, total int)
}

// Sample is one drawn circuit: one Monte Carlo run.
type Sample struct {
	Index int
	// Values holds the drawn value of each of Circuit.Tolerances.
	Values []float64
	// Readings holds each target's measure at each temperature:
	// Readings[t*len(TemperaturesK)+k] for target t at temperature k;
	// NaN where it could not be taken.
	Readings []float64
	// Worst holds each target's worst reading over the temperatures (the
	// reading at the first temperature for an Observe target).
	Worst  []float64
	Passed bool
	// Redrawn counts the draws refused because a value left its field's
	// accepted range (the tolerance's distribution is truncated there).
	Redrawn int
	// Warnings are the bias cautions of this run (rating exceeded,
	// breakdown, ...), at any temperature, each part and kind once.
	Warnings []bias.Warning
	Err      error // the run could not be drawn or solved; it does not pass
}

// Result is a whole yield analysis.
type Result struct {
	Settings Settings
	Circuit  *circuit.Circuit
	// Plan is what each run computed (frequencies, drive, noise,
	// detector), Settings.Analysis completed for the targets.
	Plan study.Settings
	// TemperaturesK are the temperatures every run was analysed at.
	TemperaturesK []float64
	Runs          []Sample
	// Passed counts the runs meeting every target; Yield is Passed/Runs
	// and Interval its 95 % Wilson score interval.
	Passed   int
	Yield    float64
	Interval [2]float64
	// Targets summarise each target's worst reading over the runs.
	Targets []TargetStats
	// Nominal holds each target's worst reading over the temperatures
	// for the nominal circuit.
	Nominal []float64
	// Sensitivities hold, for each target and toleranced value, the
	// first-order coefficient and the value's share of the variance;
	// Groups the same summed over each tolerance group.
	Sensitivities []Sensitivity
	Groups        []GroupShare
	// Corners are the worst-case corners, one per target with a limit.
	Corners  []Corner
	Cautions []Caution
	Stats    Stats
}

// Stats say what ran.
type Stats struct {
	Runs, Failed int
	// Redrawn counts draws refused over all runs (Sample.Redrawn).
	Redrawn int
	// Evaluations counts circuit analyses (runs × temperatures, plus the
	// nominal circuits, sensitivities and corners); NewtonIterations
	// their bias iterations.
	Evaluations, NewtonIterations int
	Workers                       int
	// Generator and Sensitivity name the methods.
	Generator, Sensitivity string
	Runtime                time.Duration
}

// Generator names the random streams.
const Generator = "ChaCha8 stream per run, keyed by (seed, run index); normal scores by the ziggurat method (math/rand/v2)"

// CautionKind classifies a Caution.
type CautionKind int

const (
	// RunsFailed: some runs could not be solved; they count as failing.
	RunsFailed CautionKind = iota
	// Redrawn: some draws left a value's accepted range and were drawn
	// again, truncating its distribution there.
	Redrawn
	// PartStress: some runs put a part past a rating or into breakdown.
	PartStress
	// Nonlinear: the Monte Carlo spread of a measure differs from its
	// first-order (linear) estimate by more than a fifth, so the
	// sensitivities and corners describe it only roughly.
	Nonlinear
	// NoSensitivity: a measure's sensitivity could not be taken.
	NoSensitivity
)

// String names the kind as JSON prints it.
func (k CautionKind) String() string {
	return [...]string{"runs-failed", "redrawn", "part-stress", "nonlinear", "no-sensitivity"}[k]
}

// Caution is something the results' reader must know.
type Caution struct {
	Kind    CautionKind
	Part    string // the part, value or target concerned, if any
	Count   int    // runs concerned, where that applies
	Message string
}

// plan completes the analysis settings for the targets: each target's
// frequency among the study or distortion frequencies, and the noise
// figure or detector figures where a target needs them.
func plan(s *Settings) (study.Settings, error) {
	p := s.Analysis
	p.Axis, p.Second, p.SecondIsFrequency, p.Progress, p.Workers = study.Axis{}, nil, false, nil, 0
	p.FrequenciesHz = slices.Clone(p.FrequenciesHz)
	p.DistortionHz = slices.Clone(p.DistortionHz)
	for i := range s.Targets {
		m := s.Targets[i].Measure
		if m == nil {
			return p, fmt.Errorf("target %d has no measure", i+1)
		}
		switch {
		case m.NeedsDrive() && p.Drive.EMF <= 0:
			return p, fmt.Errorf("target %s needs a signal level for its distortion estimate", m.Text)
		case m.AtDistortion() && m.FrequencyHz != 0:
			if len(p.DistortionHz) == 0 && p.Drive.FrequencyHz != 0 {
				p.DistortionHz = []float64{p.Drive.FrequencyHz}
			}
			if !slices.Contains(p.DistortionHz, m.FrequencyHz) {
				p.DistortionHz = append(p.DistortionHz, m.FrequencyHz)
			}
		case !m.AtDistortion() && m.FrequencyHz != 0:
			if !slices.Contains(p.FrequenciesHz, m.FrequencyHz) {
				p.FrequenciesHz = append(p.FrequenciesHz, m.FrequencyHz)
			}
		}
		if m.NeedsNoise() {
			p.NoiseFigure = true
		}
		if m.NeedsDetector() && p.Detector == nil {
			return p, fmt.Errorf("target %s needs the detector's video band (Analysis.Detector)", m.Text)
		}
		if m.NeedsMixer() && p.Mixer == nil {
			return p, fmt.Errorf("target %s needs the mixer's settings (Analysis.Mixer)", m.Text)
		}
	}
	return p, nil
}

// Run performs the yield analysis of c, whose Tolerances say how its
// values spread.
func Run(c *circuit.Circuit, s Settings) (*Result, error) {
	begin := time.Now()
	if len(c.Tolerances) == 0 {
		return nil, errors.New("the circuit has no tolerances: give parts a `tolerance` or diode models a `spread`")
	}
	if s.Runs < 1 || s.Runs > MaxRuns {
		return nil, fmt.Errorf("%d runs; accepted: 1 to %d", s.Runs, MaxRuns)
	}
	if len(s.Targets) == 0 {
		return nil, errors.New("no targets: give at least one measure to follow")
	}
	p, err := plan(&s)
	if err != nil {
		return nil, err
	}
	temps := slices.Clone(s.TemperaturesK)
	if len(temps) == 0 {
		temps = []float64{c.TemperatureK}
	}
	for _, t := range temps {
		if !(t > 0) {
			return nil, fmt.Errorf("temperature %g K; accepted: above 0 K", t)
		}
	}
	workers := s.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	r := &Result{Settings: s, Circuit: c, Plan: p, TemperaturesK: temps, Runs: make([]Sample, s.Runs)}
	r.Stats.Runs, r.Stats.Workers = s.Runs, workers
	r.Stats.Generator, r.Stats.Sensitivity = Generator, SensitivityMethod

	// The nominal circuit at each temperature: its readings, and the
	// bias point every run starts from there.
	nominal := make([]float64, len(c.Tolerances))
	for k := range c.Tolerances {
		nominal[k] = c.Tolerances[k].Nominal
	}
	ev := newEvaluator(c, r)
	starts := make([]*bias.Point, len(temps))
	r.Nominal = make([]float64, len(s.Targets))
	{
		readings := make([]float64, len(s.Targets)*len(temps))
		var warnings []bias.Warning
		for k := range temps {
			// A workspace of its own, so that the point outlives it.
			var w study.Workspace
			pt, err := ev.at(&w, nominal, k, nil, readings, &warnings)
			if err != nil {
				return nil, fmt.Errorf("the nominal circuit at %.2f K: %w", temps[k], err)
			}
			starts[k] = pt
		}
		r.Nominal = worstOf(s.Targets, readings, len(temps), r.Nominal)
		ev.starts = starts
	}

	// The runs.
	nt, nk := len(s.Targets), len(temps)
	values := make([]float64, s.Runs*len(c.Tolerances))
	readings := make([]float64, s.Runs*nt*nk)
	worst := make([]float64, s.Runs*nt)
	blocks := (s.Runs + blockSize - 1) / blockSize
	var next atomic.Int64
	var wg sync.WaitGroup
	var mu sync.Mutex
	var evaluations, newton int
	done := 0
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			wk := worker{ev: ev, src: rand.NewChaCha8([32]byte{})}
			wk.rng = rand.New(wk.src)
			for {
				b := int(next.Add(1)) - 1
				if b >= blocks {
					break
				}
				for i := b * blockSize; i < min((b+1)*blockSize, s.Runs); i++ {
					run := &r.Runs[i]
					run.Index = i
					run.Values = values[i*len(c.Tolerances) : (i+1)*len(c.Tolerances) : (i+1)*len(c.Tolerances)]
					run.Readings = readings[i*nt*nk : (i+1)*nt*nk : (i+1)*nt*nk]
					run.Worst = worst[i*nt : (i+1)*nt : (i+1)*nt]
					wk.run(s.Seed, run)
					if s.Progress != nil {
						mu.Lock()
						done++
						s.Progress(done, s.Runs)
						mu.Unlock()
					}
				}
			}
			mu.Lock()
			evaluations += wk.evaluations
			newton += wk.newton
			mu.Unlock()
		}()
	}
	wg.Wait()

	r.summarise()
	r.sensitivities(ev, nominal)
	r.corners(ev, nominal)
	r.Stats.Evaluations, r.Stats.NewtonIterations = evaluations+ev.evaluations, newton+ev.newton
	r.cautions()
	r.Stats.Runtime = time.Since(begin)
	return r, nil
}

// evaluator analyses the circuit with given values at one of the
// temperatures and reads the targets' measures.
type evaluator struct {
	c      *circuit.Circuit
	r      *Result
	starts []*bias.Point // the nominal point at each temperature
	// Counts of the evaluations done outside the workers (nominal,
	// sensitivities, corners).
	evaluations, newton int
	inst                circuit.Instance
	step                study.Step
}

func newEvaluator(c *circuit.Circuit, r *Result) *evaluator { return &evaluator{c: c, r: r} }

// at analyses the circuit with values at temperature k, from the nominal
// point there (or cold before it is known), and writes each target's
// reading into readings[t*len(temperatures)+k]. It returns the bias
// point (in w) and an error when the circuit could not be solved.
func (e *evaluator) at(w *study.Workspace, values []float64, k int, inst *circuit.Instance, readings []float64, warnings *[]bias.Warning) (*bias.Point, error) {
	return evaluate(e.c, e.r, e.starts, w, values, k, inst, &e.step, readings, warnings, &e.evaluations, &e.newton)
}

// evaluate is at for any worker's storage.
func evaluate(c *circuit.Circuit, r *Result, starts []*bias.Point, w *study.Workspace, values []float64, k int,
	inst *circuit.Instance, st *study.Step, readings []float64, warnings *[]bias.Warning, evaluations, newton *int) (*bias.Point, error) {
	if inst == nil {
		inst = new(circuit.Instance)
	}
	c.Instance(inst, values)
	cc := &inst.Circuit
	cc.TemperatureK = r.TemperaturesK[k]
	var start *bias.Point
	if starts != nil {
		start = starts[k]
	}
	pt := w.Evaluate(cc, &r.Plan, start, st)
	*evaluations++
	*newton += st.Iterations
	nk := len(r.TemperaturesK)
	for t := range r.Settings.Targets {
		readings[t*nk+k] = math.NaN()
	}
	if st.Err != nil {
		return nil, st.Err
	}
	for _, x := range st.Warnings {
		if x.Kind == bias.Model {
			continue // a temperature note on the model, not a stress
		}
		if !slices.ContainsFunc(*warnings, func(y bias.Warning) bool { return y.Part == x.Part && y.Kind == x.Kind }) {
			*warnings = append(*warnings, x)
		}
	}
	var firstErr error
	for t := range r.Settings.Targets {
		v, err := r.Settings.Targets[t].Measure.Of(st, r.Plan.FrequenciesHz, cc.Probes)
		if err != nil && firstErr == nil {
			firstErr = err
		}
		readings[t*nk+k] = v
	}
	return pt, firstErr
}

// worstOf writes each target's worst reading over the nk temperatures
// into dst.
func worstOf(targets []Target, readings []float64, nk int, dst []float64) []float64 {
	for t := range targets {
		v := readings[t*nk]
		for k := 1; k < nk; k++ {
			v = targets[t].worse(v, readings[t*nk+k])
		}
		dst[t] = v
	}
	return dst
}

// worker is one goroutine's storage.
type worker struct {
	ev                  *evaluator
	src                 *rand.ChaCha8
	rng                 *rand.Rand
	ws                  study.Workspace
	inst                circuit.Instance
	step                study.Step
	scores              []float64
	evaluations, newton int
}

// streamKey is the ChaCha8 key of run i: the seed and the run's index,
// so that each run has its own stream whoever draws it.
func streamKey(seed uint64, i int) [32]byte {
	var key [32]byte
	binary.LittleEndian.PutUint64(key[0:], seed)
	binary.LittleEndian.PutUint64(key[8:], uint64(i))
	copy(key[16:], "qpoint yield run")
	return key
}

// run draws and analyses one circuit.
func (wk *worker) run(seed uint64, run *Sample) {
	ev := wk.ev
	c, r := ev.c, ev.r
	wk.src.Seed(streamKey(seed, run.Index))
	if err := draw(c, wk.rng, run.Values, &wk.scores, &run.Redrawn); err != nil {
		run.Err = err
		for i := range run.Readings {
			run.Readings[i] = math.NaN()
		}
		worstOf(r.Settings.Targets, run.Readings, len(r.TemperaturesK), run.Worst)
		return
	}
	for k := range r.TemperaturesK {
		_, err := evaluate(c, r, ev.starts, &wk.ws, run.Values, k, &wk.inst, &wk.step, run.Readings, &run.Warnings, &wk.evaluations, &wk.newton)
		if err != nil && run.Err == nil {
			run.Err = fmt.Errorf("at %.2f K: %w", r.TemperaturesK[k], err)
		}
	}
	worstOf(r.Settings.Targets, run.Readings, len(r.TemperaturesK), run.Worst)
	run.Passed = run.Err == nil
	for t := range r.Settings.Targets {
		run.Passed = run.Passed && r.Settings.Targets[t].Passes(run.Worst[t])
	}
}

// draw fills values with one draw of every toleranced value: a normal
// score for each tolerance group, then one for each value, combined as
// z = √ρ z_g + √(1-ρ) e for a group's members and mapped through the
// value's distribution (Tolerance.At). A draw with a value outside its
// field's accepted range is drawn again, whole.
func draw(c *circuit.Circuit, rng *rand.Rand, values []float64, scratch *[]float64, redrawn *int) error {
	ng := len(c.ToleranceGroups)
	for try := 0; try < maxRedraws; try++ {
		*scratch = slices.Grow((*scratch)[:0], ng)[:ng]
		groups := *scratch
		for g := range groups {
			groups[g] = rng.NormFloat64()
		}
		ok := true
		for k := range c.Tolerances {
			t := &c.Tolerances[k]
			z := rng.NormFloat64()
			if t.Group >= 0 {
				rho := c.ToleranceGroups[t.Group].Correlation
				z = math.Sqrt(rho)*groups[t.Group] + math.Sqrt(1-rho)*z
			}
			values[k] = t.At(z)
			ok = ok && t.Accepts(values[k])
		}
		if ok {
			return nil
		}
		*redrawn++
	}
	return fmt.Errorf("no draw in %d kept every value in its accepted range", maxRedraws)
}
