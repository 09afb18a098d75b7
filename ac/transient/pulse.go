package transient

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"

	"qpoint/ac"
	"qpoint/ac/steady"
	"qpoint/bias/si"
	"qpoint/smallsignal"
)

// Kind says which figures a pulse run reads at the output.
type Kind int

// The kinds of pulse run.
const (
	// AutoKind reads a detector's figures when the output's DC shift
	// outweighs its fundamental at a small level (ac.Detects), a
	// limiter's otherwise.
	AutoKind Kind = iota
	Limiter
	Detector
)

func (k Kind) String() string {
	switch k {
	case Limiter:
		return "limiter"
	case Detector:
		return "detector"
	}
	return "auto"
}

// Probe is a small tone at the input whose loss to the output, before and
// after the pulse, measures a limiter's recovery.
type Probe struct {
	FrequencyHz float64
	EMF         float64 // peak volts; zero for none
}

// DefaultProbeDBm is the available power of a limiter's probe when
// PulseSettings.Probe is nil: small enough to stay small-signal in a
// diode limiter, large enough to stand far above the integrator's error.
const DefaultProbeDBm = -30

// PulseSettings describe a pulse run. Zero values take the defaults in
// brackets.
type PulseSettings struct {
	Input  int       // the driven port
	Output ac.Output // the port or node observed
	// Pulse is the carrier's pulse; its probe fields are set from Probe.
	// A zero Delay means 16 periods of the slower of carrier and probe
	// (at least 4 probe windows), for the probe's reference before it.
	Pulse Pulse
	Kind  Kind
	// Probe is the limiter's probe tone [DefaultProbeDBm at the carrier's
	// frequency for a limiter, none for a detector]; a zero EMF is none.
	Probe *Probe
	// After is how long to follow the circuit after the last pulse's
	// fall [until a limiter's probe loss is back within 0.2 dB of its
	// value before, or a detector's video is back within 5 % of its
	// settled change, at most MaxAfter].
	After float64
	// MaxAfter bounds the automatic After [10 pulse lengths for a
	// limiter, 100 for a detector, whose steps grow once the carrier is
	// off].
	MaxAfter float64
	// Transient holds the tolerances and the step limit; its Input,
	// Source, Initial and Watch are set by RunPulse.
	Transient Settings
	// Steady are the settings of the detector's periodic steady state.
	Steady steady.Settings
}

// Window lengths, in periods of what they demodulate: the carrier's
// envelope and the probe's amplitude over one period each, so that a
// recovery time is resolved to about half a probe period. A longer
// window would not reject more of the video transient that follows a
// pulse: over whole periods a linear drift of slope β leaks 2β/ω into the
// phasor whatever the window's length.
const (
	probePeriods = 1
	// maxEnvelopePoints bounds the envelope grid.
	maxEnvelopePoints = 20000
)

// Figures are what one pulse did at the output. Times are absolute
// (from t = 0) unless named as durations; a figure that does not apply or
// could not be read is NaN, with a Caution saying why.
type Figures struct {
	Pulse int // 0-based
	// Start, RiseEnd, FallStart and End are the pulse's corners.
	Start, RiseEnd, FallStart, End float64

	// Limiter figures, powers into the output port's reference
	// impedance. SpikePeak is the highest envelope power (one carrier
	// period's window) from the pulse's start to the middle of its flat
	// top, at SpikeTime; SpikeEnergy the energy above the flat leakage
	// from the start until the power first falls back to within 1 dB of
	// the flat leakage after that peak (zero when the peak stays within
	// 1 dB of it: no spike). Flat is the mean power over the last quarter
	// (at most 20 carrier periods) of the flat top.
	SpikePeak, SpikeTime, SpikeEnergy, Flat float64
	// Recovery1dB and Recovery3dB are the durations from the pulse's end
	// until the probe's loss is back, for good, within 1 and 3 dB of its
	// value before the first pulse (common practice). When the loss was
	// already back at the first instant the probe could be read after
	// the pulse, half a probe period on, that instant is given and
	// its Bound is set: the figure is an upper bound.
	Recovery1dB, Recovery3dB           float64
	Recovery1dBBound, Recovery3dBBound bool

	// Detector figures: the change of the video output (the output's
	// mean over one carrier period) from its DC-point value. Settled is
	// the change at the end of the flat top; RiseTime the 10-90 % time of
	// the change towards the steady-state DC shift (or Settled when the
	// steady state could not be found); FallTime the 90-10 % time of the
	// fall from Settled after the flat top.
	Settled, RiseTime, FallTime float64
}

// DiodeStress is a diode's worst case over a pulse run.
type DiodeStress struct {
	Name string
	// PeakCurrent is the largest forward junction current, A, at
	// PeakCurrentTime.
	PeakCurrent, PeakCurrentTime float64
	// PeakReverseVoltage is the largest reverse terminal voltage, V (a
	// positive number).
	PeakReverseVoltage float64
	// PulsePower is the mean dissipation (junction conduction and series
	// resistance) over the pulse that dissipated most, W.
	PulsePower float64
	// PastKnee is the time the junction spent past its breakdown knee, s.
	PastKnee float64
}

// CautionKind classifies a Caution.
type CautionKind int

// The kinds of caution.
const (
	CurrentRating      CautionKind = iota // peak junction current above the rating
	ReverseRating                         // peak reverse voltage above the rating
	PowerRating                           // mean dissipation over a pulse above the (continuous) rating
	PastKnee                              // a junction driven past its breakdown knee
	SmallJunction                         // no current rating; the current overdrives a junction of its capacitance
	NotRecovered                          // the probe's loss had not come back by the end of the run
	RecoveryUnresolved                    // back within the limit at the first instant the probe could be read: the figure is an upper bound
	NotSettled                            // flat leakage or video still changing at the end of the flat top
	SteadyMismatch                        // a detector's settled video differs from the steady-state shift
	ProbeMismatch                         // the probe's loss before the pulse differs from the small-signal loss
	EnergyImbalance                       // the run's energy account is off: its tolerance is loose for these figures
	NodeOutput                            // the output is a node: no output powers
	PulseToPulse                          // the last two pulses' figures differ: the train had not settled
	BlockCharging                         // a DC block passed a mean current: a real blocking capacitor would charge
)

func (k CautionKind) String() string {
	switch k {
	case CurrentRating:
		return "current-rating"
	case ReverseRating:
		return "reverse-rating"
	case PowerRating:
		return "power-rating"
	case PastKnee:
		return "past-knee"
	case SmallJunction:
		return "small-junction"
	case NotRecovered:
		return "not-recovered"
	case RecoveryUnresolved:
		return "recovery-unresolved"
	case NotSettled:
		return "not-settled"
	case SteadyMismatch:
		return "steady-mismatch"
	case ProbeMismatch:
		return "probe-mismatch"
	case EnergyImbalance:
		return "energy-imbalance"
	case NodeOutput:
		return "node-output"
	case PulseToPulse:
		return "pulse-to-pulse"
	case BlockCharging:
		return "block-charging"
	}
	return "unknown"
}

// Caution is one typed remark on a pulse run: Part names the diode where
// it concerns one, Value the figure seen and Limit what it was held to.
type Caution struct {
	Kind         CautionKind
	Part         string
	Value, Limit float64
	Message      string
}

// PulseResult is a pulse run and what it did.
type PulseResult struct {
	Settings PulseSettings // as run, defaults filled in
	Kind     Kind
	Run      *Result
	// Output is the output's voltage at each of Run.Times.
	Output []float64
	// EnvelopeTimes is a uniform grid; Envelope the output's peak
	// amplitude at the carrier over one carrier period centred there,
	// Video its mean over the same window, and LossChange the probe's
	// loss there less its loss before the first pulse, dB (NaN where a
	// pulse overlaps the probe's window, or without a probe).
	EnvelopeTimes, Envelope, Video, LossChange []float64

	// LossBefore is the probe's insertion loss before the first pulse as
	// the run measured it, and SmallSignalLoss the same from the
	// linearised network, dB: -20 log10 |2 (V_out/E_p) sqrt(Z_in/Z_out)|
	// (Pozar, ch. 4), or of 2 V_out/E_p at a node output.
	LossBefore, SmallSignalLoss float64
	// Baseline is the output's DC-point value, V; SteadyShift the change
	// of its DC level under the continuous carrier from steady.Solve
	// (detector; NaN otherwise or when the steady state failed).
	Baseline, SteadyShift float64

	Pulses   []Figures // one per pulse
	Figures  Figures   // the last pulse's
	Diodes   []DiodeStress
	Cautions []Caution
}

// LevelDBm returns the carrier's available power at full amplitude.
func (r *PulseResult) LevelDBm(nw *smallsignal.Network) float64 {
	return ac.EMFToDBm(r.Settings.Pulse.CarrierEMF, nw.Ports[r.Settings.Input].Impedance)
}

// RunPulse drives the input port with a pulsed carrier (and, for a
// limiter, a small probe tone), follows the circuit from its DC point
// through the pulses and after them, and reads the figures. A run that
// stops early (the step limit, a step that cannot be solved) returns the
// figures of what it reached with a *Stopped error; a request that cannot
// be run returns a *RequestError.
func RunPulse(nw *smallsignal.Network, s PulseSettings) (*PulseResult, error) {
	if err := Check(nw.Point.Circuit); err != nil {
		return nil, err
	}
	if s.Input < 0 || s.Input >= len(nw.Ports) {
		return nil, fmt.Errorf("transient: input port %d: the circuit has %d ports", s.Input+1, len(nw.Ports))
	}
	outNode, outReturn, err := outputNodes(nw, s.Output)
	if err != nil {
		return nil, err
	}
	p := &s.Pulse
	if err := p.Check(); err != nil {
		return nil, err
	}
	kind := s.Kind
	if kind == AutoKind {
		kind = Limiter
		if ac.Detects(nw, ac.NoiseSettings{Input: s.Input, Output: s.Output}, p.CarrierHz) {
			kind = Detector
		}
	}
	z0 := nw.Ports[s.Input].Impedance
	if s.Probe == nil {
		pr := Probe{}
		if kind == Limiter {
			pr = Probe{FrequencyHz: p.CarrierHz, EMF: ac.DBmToEMF(DefaultProbeDBm, z0)}
		}
		s.Probe = &pr
	}
	p.ProbeHz, p.ProbeEMF = s.Probe.FrequencyHz, s.Probe.EMF
	tc := 1 / p.CarrierHz
	probeWindow := 0.0
	if p.ProbeEMF != 0 {
		probeWindow = probePeriods / p.ProbeHz
	}
	if p.Delay == 0 {
		p.Delay = math.Max(16*math.Max(tc, probeWindow/probePeriods), 4*probeWindow)
	}
	if err := p.Check(); err != nil {
		return nil, err
	}
	if s.MaxAfter == 0 {
		s.MaxAfter = 10 * p.length()
		if kind == Detector {
			s.MaxAfter = 100 * p.length()
		}
	}
	if s.After < 0 || math.IsNaN(s.After) || math.IsInf(s.After, 0) {
		return nil, requestf("after", "%g s; accepted: a finite time, not negative", s.After)
	}
	ts := s.Transient
	ts.Input, ts.Source = s.Input, newPulseSource(*p)
	ts.Watch = []int{outNode}
	if outReturn >= 0 {
		ts.Watch = append(ts.Watch, outReturn)
	}
	if ts.MaxSteps == 0 {
		ts.MaxSteps = defaultMaxSteps
	}
	// The fewest steps the run can take: the carrier and the probe each
	// hold the step to 1/minStepsPerPeriod of their period while on.
	after := s.After
	if after == 0 {
		after = math.Max(8*probeWindow, 8*tc)
	}
	stop := p.End() + after
	least := float64(p.count()) * p.length() * p.CarrierHz * minStepsPerPeriod
	if p.ProbeEMF != 0 {
		least += stop * p.ProbeHz * minStepsPerPeriod
	}
	if least > float64(ts.MaxSteps) {
		return nil, requestf("steps", "the run needs at least %.3g steps (%s of carrier and probe at %d steps per period); accepted: at most %d steps: shorten the pulse or the run, or raise the step limit",
			least, si.Format(stop, "s", 3), minStepsPerPeriod, ts.MaxSteps)
	}

	res := &PulseResult{Kind: kind, SteadyShift: math.NaN(), LossBefore: math.NaN(), SmallSignalLoss: math.NaN()}
	out := make([]complex128, nw.N)
	out[outNode] = 1
	if outReturn >= 0 {
		out[outReturn] = -1
	}
	for i, e := range out {
		res.Baseline += real(e) * nw.Bias[i]
	}
	if p.ProbeEMF != 0 {
		x0, vout, err := probeStart(nw, s.Input, p.ProbeHz, p.ProbeEMF, out)
		if err != nil {
			return nil, err
		}
		ts.Initial = x0
		res.SmallSignalLoss = lossDB(nw, s.Input, s.Output, vout, p.ProbeEMF)
	}
	if kind == Detector {
		st, err := steady.Solve(nw, ac.Drive{Input: s.Input, Output: s.Output, FrequencyHz: p.CarrierHz, EMF: p.CarrierEMF}, s.Steady)
		if err == nil {
			res.SteadyShift = st.Output[0].Amplitude
		} else {
			res.Cautions = append(res.Cautions, Caution{Kind: SteadyMismatch, Value: math.NaN(), Limit: math.NaN(),
				Message: "the periodic steady state under the continuous carrier could not be found (" + err.Error() + "); the rise time is read against the settled value instead"})
		}
	}
	s.Transient = ts
	res.Settings = s

	sim, err := Start(nw, ts)
	if err != nil {
		return nil, err
	}
	runErr := sim.Advance(p.End())
	if runErr == nil {
		runErr = res.follow(sim, nw, outNode, outReturn)
	}
	res.read(nw, sim.Result(), outNode, outReturn)
	return res, runErr
}

// follow carries the run on after the last pulse: for Settings.After, or
// until the limiter has recovered or the detector's video has fallen.
func (res *PulseResult) follow(sim *Simulation, nw *smallsignal.Network, outNode, outReturn int) error {
	s := res.Settings
	p := s.Pulse
	end := p.End()
	if s.After > 0 {
		return sim.Advance(end + s.After)
	}
	tc := 1 / p.CarrierHz
	probeWindow := 0.0
	if p.ProbeEMF != 0 {
		probeWindow = probePeriods / p.ProbeHz
	}
	chunk := math.Max(8*math.Max(tc, probeWindow), 0.05*p.length())
	var before float64
	if res.Kind == Limiter && p.ProbeEMF != 0 {
		if err := sim.Advance(end + probeWindow); err != nil {
			return err
		}
		r := sim.Result()
		y := outputOf(r, outReturn >= 0)
		w := newWaveform(r.Times, y, 2*math.Pi*p.ProbeHz)
		_, ph := w.window(p.Start(0)-probeWindow, p.Start(0))
		before = cmplx.Abs(ph)
	}
	calm := 0
	for sim.Time() < end+s.MaxAfter {
		to := math.Min(sim.Time()+chunk, end+s.MaxAfter)
		if err := sim.Advance(to); err != nil {
			return err
		}
		chunk *= 1.5
		r := sim.Result()
		n := len(r.Times)
		y := outputOf(r, outReturn >= 0)
		tEnd := r.Times[n-1]
		settled := false
		switch {
		case res.Kind == Limiter && p.ProbeEMF != 0:
			_, ph := tailWindow(r.Times, y, 2*math.Pi*p.ProbeHz, tEnd-probeWindow, tEnd)
			settled = math.Abs(20*math.Log10(cmplx.Abs(ph)/before)) <= 0.2
		case res.Kind == Detector:
			mean, _ := tailWindow(r.Times, y, 0, tEnd-tc, tEnd)
			flatMean, _ := tailWindow(r.Times, y, 0, p.Corners(p.count() - 1)[2]-tc, p.Corners(p.count() - 1)[2])
			settled = math.Abs(mean-res.Baseline) <= 0.05*math.Abs(flatMean-res.Baseline)
		default:
			return nil
		}
		if settled {
			calm++
		} else {
			calm = 0
		}
		if calm >= 2 {
			return nil
		}
	}
	return nil
}

// outputOf returns the output's voltage at each point of r from the
// watched node (and return).
func outputOf(r *Result, hasReturn bool) []float64 {
	y := append([]float64(nil), r.Watched[0]...)
	if hasReturn {
		for i, v := range r.Watched[1] {
			y[i] -= v
		}
	}
	return y
}

// tailWindow is waveform.window for a window near the end of the run,
// built from the points it needs alone.
func tailWindow(t, y []float64, omega, a, b float64) (float64, complex128) {
	i := len(t) - 1
	for i > 0 && t[i] > a {
		i--
	}
	return newWaveform(t[i:], y[i:], omega).window(a, b)
}

// outputNodes returns the unknowns the output is read across (-1 for the
// reference node).
func outputNodes(nw *smallsignal.Network, o ac.Output) (int, int, error) {
	plus, minus, err := o.Unknowns(nw)
	if err != nil {
		return 0, 0, fmt.Errorf("transient: %w", err)
	}
	if o.Port >= 0 && plus < 0 {
		return 0, 0, fmt.Errorf("transient: output port %s sits on the reference node", nw.Ports[o.Port].Name)
	}
	return plus, minus, nil
}

// probeStart returns the state at t = 0 with the probe E_p cos(ωt) on in
// the linearised network's steady state, x = x_DC + Re X with
// (G + jωC) X = b_p, and the output's phasor e_outᵀ X. The transient
// then starts on the probe's own steady state, but for its second-order
// terms, instead of switching it on.
func probeStart(nw *smallsignal.Network, input int, freqHz, emf float64, out []complex128) ([]float64, complex128, error) {
	n := nw.N
	w := 2 * math.Pi * freqHz
	// [G -wC; wC G] [Xr; Xi] = [b; 0].
	a := mat.NewDense(2*n, 2*n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			g, c := nw.G.At(i, j), w*nw.C.At(i, j)
			a.Set(i, j, g)
			a.Set(i, n+j, -c)
			a.Set(n+i, j, c)
			a.Set(n+i, n+j, g)
		}
	}
	bc := make([]complex128, n)
	nw.Excitation(input, complex(emf, 0), bc)
	b := mat.NewVecDense(2*n, nil)
	for i, v := range bc {
		b.SetVec(i, real(v))
		b.SetVec(n+i, imag(v))
	}
	var lu mat.LU
	lu.Factorize(a)
	var x mat.VecDense
	if err := lu.SolveVecTo(&x, false, b); err != nil {
		var c mat.Condition
		if !errors.As(err, &c) || math.IsInf(float64(c), 0) {
			return nil, 0, fmt.Errorf("transient: the network is singular at the probe's %s", si.Format(freqHz, "Hz", 4))
		}
	}
	x0 := append([]float64(nil), nw.Bias...)
	var vout complex128
	for i := 0; i < n; i++ {
		x0[i] += x.AtVec(i)
		vout += out[i] * complex(x.AtVec(i), x.AtVec(n+i))
	}
	return x0, vout, nil
}

// lossDB returns the insertion loss of an output phasor vout for a
// generator EMF emf: -20 log10 |S21| with S21 = 2 (V_out/E) sqrt(Z_in/Z_out)
// at a port output (Pozar, "Microwave Engineering", 4th ed., 2012,
// ch. 4), -20 log10 |2 V_out/E| at a node.
func lossDB(nw *smallsignal.Network, input int, o ac.Output, vout complex128, emf float64) float64 {
	s := 2 * cmplx.Abs(vout) / emf
	if o.Port >= 0 {
		s *= math.Sqrt(nw.Ports[input].Impedance / nw.Ports[o.Port].Impedance)
	}
	return -20 * math.Log10(s)
}
