package transient

import (
	"errors"
	"fmt"
	"math"
	"time"

	"qpoint/ac/nonlinear"
	"qpoint/bias/circuit"
	"qpoint/bias/si"
	"qpoint/smallsignal"
)

// Settings control a transient run. Zero values take the defaults in
// brackets.
type Settings struct {
	// Input is the port whose generator carries Source; -1 for none.
	Input  int
	Source Source
	// Initial is the state at t = 0 in the network's layout (see
	// smallsignal.Network); nil starts from the DC point, nw.Bias. The DC
	// blocks of AC-coupled ports hold their DC-point voltages either way.
	Initial []float64
	// RelativeTolerance bounds each step's local truncation error
	// relative to each unknown's recent excursion from its DC value
	// [1e-3].
	RelativeTolerance float64
	// VoltageTolerance and CurrentTolerance are the absolute floors of the
	// error bound for node voltages and branch currents [1 µV, 1 nA].
	VoltageTolerance, CurrentTolerance float64
	// MaxStep bounds the step beyond what the source asks [no bound].
	MaxStep float64
	// MaxSteps bounds the steps tried, accepted and rejected [2 000 000].
	MaxSteps int
	// Watch lists unknowns whose values are recorded at every point
	// (Result.Watched).
	Watch []int
	// Delayed lists elements whose currents depend on the circuit's past,
	// such as lines by the method of characteristics.
	Delayed []Delayed
}

// Delayed is an element that adds to the circuit a constant conductance
// and a current that depends only on the circuit's past, as a lossless
// line does in the method of characteristics (Branin 1967): each end is
// its characteristic admittance in parallel with a source carrying the
// wave that left the other end one delay earlier. Steps never exceed its
// delay, so that the past it needs is always known.
type Delayed interface {
	// Stamp adds the element's constant conductances to sys, once,
	// before the run.
	Stamp(sys *nonlinear.System)
	// Inject adds to r, at time t, the currents the element's past drives
	// out of each unknown's node (r enters the step's equations as f
	// does: a current leaving a node counts positive).
	Inject(t float64, r []float64)
	// Accept records the solution x at time t; times only rise. A point
	// that is a breakpoint (of the source or of a delayed element) is
	// flagged, so that the element can land later steps on its arrival:
	// a line's NextBreak is such a point plus its delay.
	Accept(t float64, x []float64, breakpoint bool)
	// NextBreak returns the first time strictly after t where the
	// element's currents have a kink, +Inf for none.
	NextBreak(t float64) float64
	// Delay returns the element's shortest delay.
	Delay() float64
	// Power returns the power the element draws from the circuit at time
	// t in state x (what it holds in flight, for the energy account).
	Power(t float64, x []float64) float64
}

// Stats says how a run went.
type Stats struct {
	// Method names the integration rule, and Damping its damping of
	// stiff modes.
	Method, Damping string
	// Accepted and Rejected count the steps; a rejected step was too
	// long for the error bound or its Newton solve failed.
	Accepted, Rejected int
	// NewtonIterations counts the iterations of every stage tried.
	NewtonIterations int
	// NewtonFailures counts the steps rejected because a stage's Newton
	// solve did not converge.
	NewtonFailures int
	// Fallbacks counts the backward-Euler steps taken after repeated
	// Newton failures (first order, L-stable, without error control).
	Fallbacks int
	// SmallestStep and LargestStep are the extremes of the accepted
	// steps, s.
	SmallestStep, LargestStep float64
	Runtime                   time.Duration
}

// DiodeTrace is one diode's junction current (A, anode to cathode),
// junction voltage and terminal voltage (V) at each point of a run.
type DiodeTrace struct {
	Name                        string
	Current, Junction, Terminal []float64
}

// Energy is a run's account, in joules from t = 0 to its end.
type Energy struct {
	// Source is the work of the input generator's EMF (Generator) and of
	// the circuit's DC sources.
	Source, Generator float64
	// Delivered is what the input port's generator delivered into the
	// circuit past its own reference impedance, ∫ v i dt at the port.
	Delivered float64
	// Dissipated is what the resistors (diodes' series resistances
	// included), every port's termination (the generator's own
	// included) and the junctions' conduction turned into heat.
	Dissipated float64
	// Stored is the change of what the capacitors, inductors and junction
	// charges hold, plus what entered the DC blocks and any delayed
	// element.
	Stored float64
	// Imbalance is |Source - Dissipated - Stored| over the largest of
	// the three: zero for an exact integration.
	Imbalance float64
}

// Result is a run from t = 0: the points it reached (every stage of every
// step), the generator's EMF and the watched unknowns there, each diode's
// trace, the energy account and the run's statistics.
type Result struct {
	Times   []float64
	EMF     []float64
	Watched [][]float64 // Watched[k][i] is unknown Settings.Watch[k] at Times[i]
	Diodes  []DiodeTrace
	// Blocks lists the AC-coupled ports (indices into the network's
	// ports) and BlockCurrents[k] the current through port Blocks[k]'s DC
	// block into the circuit at each point. The run holds each block at
	// its DC-point voltage, as an ideal block of infinite capacitance
	// would; the periodic steady state instead charges it until it
	// carries no mean current.
	Blocks        []int
	BlockCurrents [][]float64
	Energy        Energy
	Stats         Stats
}

// Stopped reports a run that ended before the time asked for: At is how
// far it got, Want where it was going.
type Stopped struct {
	At, Want float64
	Reason   error
}

func (e *Stopped) Error() string {
	return fmt.Sprintf("stopped at t = %s of %s (%.1f %%): %v", si.Format(e.At, "s", 4), si.Format(e.Want, "s", 4), 100*e.At/e.Want, e.Reason)
}

func (e *Stopped) Unwrap() error { return e.Reason }

// ErrStepLimit is the reason of a run stopped by Settings.MaxSteps.
var ErrStepLimit = errors.New("the step limit was reached")

// TR-BDF2's constants: γ = 2 - √2, the error constant k and the second
// stage's coefficients (Bank et al. 1985; Hosea and Shampine 1996).
var (
	gamma    = 2 - math.Sqrt2
	lteConst = (-3*gamma*gamma + 4*gamma - 2) / (12 * (2 - gamma))
)

// Defaults of Settings.
const (
	defaultRelative = 1e-3
	defaultVoltage  = 1e-6
	defaultCurrent  = 1e-9
	defaultMaxSteps = 2_000_000
	maxNewton       = 40
	// capacitanceFloor is the smallest charge derivative a dynamic row's
	// error is divided by: a junction's diffusion capacitance under
	// reverse bias can underflow.
	capacitanceFloor = 1e-16
	// memoryPeriods is how many of the source's periods an unknown's
	// excursion is remembered for by the error bound.
	memoryPeriods = 4
	// newtonShare is the Newton solve's bound as a share of the error
	// bound.
	newtonShare = 1e-3
)

// Check refuses a circuit holding a part the transient cannot follow.
// Every lumped part of the circuit file is followed; a measured
// S-parameter block, whose data are samples in frequency, has no
// time-domain model here.
func Check(c *circuit.Circuit) error {
	for _, p := range c.Parts {
		switch p.Kind {
		case circuit.Resistor, circuit.Capacitor, circuit.Inductor, circuit.VoltageSource, circuit.CurrentSource, circuit.Diode:
		default:
			return fmt.Errorf("part %s (%s): the transient analysis has no time-domain model for it; accepted: resistors, capacitors, inductors, DC sources and diodes (an S-parameter block is data in frequency: replace it with lumped parts)", p.Name, p.Kind)
		}
	}
	if len(c.Distributed) > 0 {
		d := c.Distributed[0]
		return fmt.Errorf("part %s (%s): the transient analysis has no time-domain model for it (it is known by its S-matrix in frequency); accepted: resistors, capacitors, inductors, DC sources and diodes; harmonic balance takes lines and blocks for a periodic drive", d.Name, d.Type)
	}
	return nil
}

// Simulation is a transient run in progress; Advance carries it forward.
type Simulation struct {
	nw  *smallsignal.Network
	sys *nonlinear.System
	s   Settings
	w   *nonlinear.Work

	t     float64
	x, q  []float64
	qd    []float64 // dq/dt on dynamic rows
	p     []float64 // DC-block voltages
	dc    []float64 // the DC point
	scale []float64 // each unknown's recent excursion from dc
	h     float64   // the next step to try
	fails int       // consecutive Newton failures
	// The step controller's memory: the last accepted step and its
	// error, and whether the last try was rejected.
	hAcc, errAcc float64
	rejected     bool
	// landing says whether the step being tried ends on a breakpoint.
	landing bool

	// glin is the linear conductance matrix without any delayed
	// element's stamps, for the dissipation.
	glin []float64

	// The two points before x, for the predictor: hist of them are
	// known, xPrev the later.
	tPrev, tPrev2 float64
	xPrev, xPrev2 []float64
	hist          int

	// Each junction's current at the stage point and at the end.
	ig, i1 []float64

	// Work vectors.
	xg, x1, qg, qdg, qd1, extra []float64

	// The energy account: the last point's powers and the integrals.
	last       powers
	integrated powers
	stored0    float64

	res   *Result
	start time.Time
}

// powers are the instantaneous powers at one point, W.
type powers struct {
	generator, dcSources, delivered, dissipated, blocks, delayed float64
}

// Start sets up a run of nw under s at t = 0.
func Start(nw *smallsignal.Network, s Settings) (*Simulation, error) {
	if err := Check(nw.Point.Circuit); err != nil {
		return nil, err
	}
	if s.Source == nil {
		s.Source = PiecewiseLinear{}
	}
	if pl, ok := s.Source.(PiecewiseLinear); ok {
		if err := pl.check(); err != nil {
			return nil, fmt.Errorf("transient: source: %w", err)
		}
	}
	if pu, ok := s.Source.(Pulse); ok {
		if err := pu.Check(); err != nil {
			return nil, err
		}
	}
	if s.Input >= len(nw.Ports) || s.Input < -1 {
		return nil, fmt.Errorf("transient: input port %d: the circuit has %d ports", s.Input+1, len(nw.Ports))
	}
	if s.RelativeTolerance == 0 {
		s.RelativeTolerance = defaultRelative
	}
	if s.VoltageTolerance == 0 {
		s.VoltageTolerance = defaultVoltage
	}
	if s.CurrentTolerance == 0 {
		s.CurrentTolerance = defaultCurrent
	}
	if s.MaxSteps == 0 {
		s.MaxSteps = defaultMaxSteps
	}
	if s.MaxStep == 0 {
		s.MaxStep = math.Inf(1)
	}
	if !(s.RelativeTolerance > 0 && s.RelativeTolerance < 1) || !(s.VoltageTolerance > 0) || !(s.CurrentTolerance > 0) || !(s.MaxStep > 0) || s.MaxSteps < 0 {
		return nil, fmt.Errorf("transient: tolerances and step limits must be positive (relative below 1)")
	}
	n := nw.N
	for _, i := range s.Watch {
		if i < 0 || i >= n {
			return nil, fmt.Errorf("transient: watched unknown %d: the network has %d", i, n)
		}
	}
	sys := nonlinear.New(nw, s.Input)
	for _, d := range s.Delayed {
		d.Stamp(sys)
		s.MaxStep = math.Min(s.MaxStep, d.Delay())
	}
	sim := &Simulation{nw: nw, sys: sys, s: s, w: sys.NewWork(), start: time.Now(), glin: nw.GLinear.RawMatrix().Data}
	sim.dc = append([]float64(nil), nw.Bias...)
	sim.p = sys.BlockVoltages(sim.dc)
	sim.x = append([]float64(nil), nw.Bias...)
	if s.Initial != nil {
		if len(s.Initial) != n {
			return nil, fmt.Errorf("transient: initial state has %d values; the network has %d unknowns", len(s.Initial), n)
		}
		copy(sim.x, s.Initial)
	}
	mk := func() []float64 { return make([]float64, n) }
	sim.q, sim.qd, sim.scale = mk(), mk(), mk()
	sim.xg, sim.x1, sim.qg, sim.qdg, sim.qd1, sim.extra = mk(), mk(), mk(), mk(), mk(), mk()
	sim.xPrev = append([]float64(nil), sim.x...)
	sim.xPrev2 = append([]float64(nil), sim.x...)
	sim.ig = make([]float64, len(nw.Diodes))
	sim.i1 = make([]float64, len(nw.Diodes))
	sim.w.Bound = make([]float64, n)
	e0 := s.Source.EMF(0)
	sys.Eval(sim.x, e0, sim.p, sim.w.F, sim.q, nil, nil, nil)
	for i := 0; i < n; i++ {
		if sys.Dynamic[i] {
			sim.qd[i] = -sim.w.F[i]
		}
		sim.scale[i] = math.Abs(sim.x[i] - sim.dc[i])
	}
	for _, d := range s.Delayed {
		for i := range sim.extra {
			sim.extra[i] = 0
		}
		d.Inject(0, sim.extra)
		for i := 0; i < n; i++ {
			if sys.Dynamic[i] {
				sim.qd[i] -= sim.extra[i]
			}
		}
	}
	sim.res = &Result{Watched: make([][]float64, len(s.Watch)), Blocks: sys.Blocked, BlockCurrents: make([][]float64, len(sys.Blocked)), Stats: Stats{
		Method:       "TR-BDF2 (γ = 2 - √2)",
		Damping:      "L-stable: stiff modes decay to zero in one step (R(∞) = 0)",
		SmallestStep: math.Inf(1),
	}}
	for _, d := range nw.Diodes {
		sim.res.Diodes = append(sim.res.Diodes, DiodeTrace{Name: d.Name})
	}
	sim.stored0 = sim.storedEnergy(sim.x)
	sim.last = sim.powersAt(0, sim.x, e0, nil)
	sim.record(0, sim.x, e0, nil)
	for _, d := range s.Delayed {
		d.Accept(0, sim.x, true)
	}
	return sim, nil
}

// Time returns how far the run has got.
func (sim *Simulation) Time() float64 { return sim.t }

// State returns the state at Time (the caller must not change it).
func (sim *Simulation) State() []float64 { return sim.x }

// Result returns the run so far. Its slices grow as the run advances.
func (sim *Simulation) Result() *Result {
	r := sim.res
	r.Stats.Runtime = time.Since(sim.start)
	in := sim.integrated
	e := Energy{
		Generator:  in.generator,
		Source:     in.generator + in.dcSources,
		Delivered:  in.delivered,
		Dissipated: in.dissipated,
		Stored:     sim.storedEnergy(sim.x) - sim.stored0 + in.blocks + in.delayed,
	}
	big := math.Max(math.Abs(e.Source), math.Max(math.Abs(e.Dissipated), math.Abs(e.Stored)))
	if big > 0 {
		e.Imbalance = math.Abs(e.Source-e.Dissipated-e.Stored) / big
	}
	r.Energy = e
	return r
}

// Run runs nw under s from t = 0 to stop. A run that ends early returns
// what it reached with a *Stopped error.
func Run(nw *smallsignal.Network, s Settings, stop float64) (*Result, error) {
	sim, err := Start(nw, s)
	if err != nil {
		return nil, err
	}
	err = sim.Advance(stop)
	return sim.Result(), err
}

// Advance carries the run to time to. When it cannot (a Newton solve that
// fails however short the step, the step limit) it stops where it got to
// and returns a *Stopped error.
func (sim *Simulation) Advance(to float64) error {
	if !(to > sim.t) {
		return nil
	}
	src := sim.s.Source
	st := &sim.res.Stats
	if sim.h == 0 {
		sim.h = math.Min(math.Min(sim.s.MaxStep, src.MaxStep(sim.t))/4, (to-sim.t)/100)
		if ts := src.Timescale(); ts > 0 {
			sim.h = math.Min(sim.h, ts/50)
		}
	}
	// A step shorter than this is rounding, not progress.
	hMin := 1e-12 * to
	for sim.t < to {
		if st.Accepted+st.Rejected >= sim.s.MaxSteps {
			return &Stopped{At: sim.t, Want: to, Reason: fmt.Errorf("%w (%d steps)", ErrStepLimit, sim.s.MaxSteps)}
		}
		h := math.Min(sim.h, math.Min(sim.s.MaxStep, src.MaxStep(sim.t)))
		// Land on the next breakpoint, and do not leave a sliver before
		// it or before the end.
		next := src.NextBreak(sim.t)
		for _, d := range sim.s.Delayed {
			next = math.Min(next, d.NextBreak(sim.t))
		}
		sim.landing = false
		for k, edge := range []float64{next, to} {
			switch left := edge - sim.t; {
			case left <= h*(1+1e-9):
				h = left
				sim.landing = k == 0
			case left < 1.5*h:
				h = left / 2
			}
		}
		if h < hMin {
			return &Stopped{At: sim.t, Want: to, Reason: fmt.Errorf("the step fell to %s", si.Format(h, "s", 3))}
		}
		var err error
		var lte float64
		if sim.fails >= 3 {
			err = sim.backwardEuler(h)
			if err == nil {
				st.Fallbacks++
				sim.fails = 0
				sim.accept(h, false)
				sim.h = h
				continue
			}
		} else {
			lte, err = sim.trbdf2(h)
		}
		if err != nil {
			st.Rejected++
			st.NewtonFailures++
			sim.fails++
			sim.h = h / 4
			if sim.h < hMin {
				return &Stopped{At: sim.t, Want: to, Reason: fmt.Errorf("%v at t = %s, however short the step", err, si.Format(sim.t+h, "s", 4))}
			}
			continue
		}
		sim.fails = 0
		// Step-size proposal for a second-order rule, whose error scales
		// as h³: the elementary 0.9 (1/err)^(1/3), and after an accepted
		// step the smaller of it and Gustafsson's predictive controller,
		// which also follows the error's trend from the last accepted
		// step, (h/h_acc) 0.9 (1/err)^(1/3) (err_acc/err)^(1/3), so that a
		// rising error shrinks the step before a rejection does
		// (Gustafsson, "Control-theoretic techniques for stepsize selection
		// in implicit Runge-Kutta methods", ACM TOMS 20(4), 1994; Hairer
		// and Wanner, "Solving Ordinary Differential Equations II", 2nd
		// ed., 1996, sec. IV.8).
		e := math.Max(lte, 1e-10)
		m := 0.9 * math.Cbrt(1/e)
		if lte > 1 {
			st.Rejected++
			sim.rejected = true
			sim.h = h * math.Min(0.9, math.Max(0.1, m))
			continue
		}
		if sim.hAcc > 0 {
			m = math.Min(m, (h/sim.hAcc)*m*math.Cbrt(sim.errAcc/e))
		}
		m = math.Min(2, math.Max(0.2, m))
		if sim.rejected {
			m = math.Min(m, 1)
		}
		sim.hAcc, sim.errAcc, sim.rejected = h, math.Max(e, 1e-4), false
		sim.accept(h, true)
		sim.h = h * m
	}
	return nil
}

// newtonTolerance is the Newton solve's relative bound: far below the
// error bound, so the integration's error is the rule's.
func (sim *Simulation) newtonTolerance() float64 {
	return math.Max(1e-3*sim.s.RelativeTolerance, 1e-12)
}

// inject fills extra with the delayed elements' currents at t.
func (sim *Simulation) inject(t float64, extra []float64) {
	for _, d := range sim.s.Delayed {
		d.Inject(t, extra)
	}
}

// trbdf2 tries one step of length h from sim.t, leaving the stage point
// in xg and the end in x1, and returns its error relative to the bound
// (at most 1 to accept).
func (sim *Simulation) trbdf2(h float64) (float64, error) {
	n, sys, w := sim.nw.N, sim.sys, sim.w
	src := sim.s.Source
	tol := sim.newtonTolerance()
	st := &sim.res.Stats
	tg, t1 := sim.t+gamma*h, sim.t+h

	// Stage 1, trapezoidal to t + γh:
	// f(x_γ) + a1 (q(x_γ) - q_n) - q'_n = 0, a1 = 2/(γh).
	a1 := 2 / (gamma * h)
	sim.bounds()
	sim.predict(sim.xg, tg, sim.tPrev2, sim.xPrev2, sim.tPrev, sim.xPrev, sim.hist)
	for i := 0; i < n; i++ {
		sim.extra[i] = -sim.qd[i]
	}
	sim.inject(tg, sim.extra)
	it, err := sys.Step(sim.xg, a1, sim.q, sim.extra, src.EMF(tg), sim.p, tol, maxNewton, w)
	st.NewtonIterations += it
	if err != nil {
		return 0, err
	}
	copy(sim.qg, w.Q)
	copy(sim.ig, w.Currents)
	for i := 0; i < n; i++ {
		if sys.Dynamic[i] {
			sim.qdg[i] = a1*(sim.qg[i]-sim.q[i]) - sim.qd[i]
		}
	}
	// Stage 2, second-order backward difference over t, t + γh, t + h:
	// f(x_1) + a2 (q_1 - q_n) + cγ (q_γ - q_n) = 0,
	// a2 = (2 - γ)/((1 - γ) h), cγ = -1/(γ (1 - γ) h).
	a2 := (2 - gamma) / ((1 - gamma) * h)
	cg := -1 / (gamma * (1 - gamma) * h)
	sim.predictFromStage(t1, tg)
	for i := 0; i < n; i++ {
		sim.extra[i] = 0
		if sys.Dynamic[i] {
			sim.extra[i] = cg * (sim.qg[i] - sim.q[i])
		}
	}
	sim.inject(t1, sim.extra)
	it, err = sys.Step(sim.x1, a2, sim.q, sim.extra, src.EMF(t1), sim.p, tol, maxNewton, w)
	st.NewtonIterations += it
	if err != nil {
		return 0, err
	}
	copy(sim.i1, w.Currents)
	// The local truncation error of each dynamic row's charge, in the
	// row's own unit, against its bound.
	worst := 0.0
	nodes := sim.nw.NodeUnknowns
	decay := sim.decay(h)
	for i := 0; i < n; i++ {
		if !sys.Dynamic[i] {
			continue
		}
		sim.qd1[i] = a2*(w.Q[i]-sim.q[i]) + cg*(sim.qg[i]-sim.q[i])
		lte := 2 * lteConst * h * (sim.qd[i]/gamma - sim.qdg[i]/(gamma*(1-gamma)) + sim.qd1[i]/(1-gamma))
		c := math.Max(math.Abs(w.JC[i*n+i]), capacitanceFloor)
		abs := sim.s.VoltageTolerance
		if i >= nodes {
			abs = sim.s.CurrentTolerance
		}
		scale := math.Max(sim.scale[i]*decay, math.Max(math.Abs(sim.x1[i]-sim.dc[i]), math.Abs(sim.xg[i]-sim.dc[i])))
		worst = math.Max(worst, math.Abs(lte)/c/(sim.s.RelativeTolerance*scale+abs))
	}
	return worst, nil
}

// backwardEuler tries one backward-Euler step of length h, leaving the
// end in x1: f(x_1) + (q_1 - q_n)/h = 0.
func (sim *Simulation) backwardEuler(h float64) error {
	n, sys, w := sim.nw.N, sim.sys, sim.w
	t1 := sim.t + h
	copy(sim.x1, sim.x)
	clear(sim.extra)
	sim.inject(t1, sim.extra)
	it, err := sys.Step(sim.x1, 1/h, sim.q, sim.extra, sim.s.Source.EMF(t1), sim.p, sim.newtonTolerance(), maxNewton, w)
	sim.res.Stats.NewtonIterations += it
	if err != nil {
		return err
	}
	for i := 0; i < n; i++ {
		if sys.Dynamic[i] {
			sim.qd1[i] = (w.Q[i] - sim.q[i]) / h
		}
	}
	copy(sim.i1, w.Currents)
	return nil
}

// bounds sets the Newton solve's bound on each unknown's last update: a
// thousandth of the error bound, so that the integration's error is the
// rule's.
func (sim *Simulation) bounds() {
	nodes := sim.nw.NodeUnknowns
	for i := range sim.w.Bound {
		abs := sim.s.VoltageTolerance
		if i >= nodes {
			abs = sim.s.CurrentTolerance
		}
		sim.w.Bound[i] = newtonShare * (sim.s.RelativeTolerance*sim.scale[i] + abs)
	}
}

// predict sets dst to the state at time t extrapolated through the
// points (ta, xa), (tb, xb) and the present (sim.t, sim.x): the parabola
// through the three when known > 1, the line through the last two when
// known = 1, the present otherwise. It is Newton's starting guess.
func (sim *Simulation) predict(dst []float64, t, ta float64, xa []float64, tb float64, xb []float64, known int) {
	tc, xc := sim.t, sim.x
	switch {
	case known >= 2 && ta < tb && tb < tc:
		la := (t - tb) * (t - tc) / ((ta - tb) * (ta - tc))
		lb := (t - ta) * (t - tc) / ((tb - ta) * (tb - tc))
		lc := (t - ta) * (t - tb) / ((tc - ta) * (tc - tb))
		for i := range dst {
			dst[i] = la*xa[i] + lb*xb[i] + lc*xc[i]
		}
	case known >= 1 && tb < tc:
		r := (t - tc) / (tc - tb)
		for i := range dst {
			dst[i] = xc[i] + r*(xc[i]-xb[i])
		}
	default:
		copy(dst, xc)
	}
}

// predictFromStage sets x1, the second stage's guess at t1, through the
// last point, the present and the stage point at tg.
func (sim *Simulation) predictFromStage(t1, tg float64) {
	ta, xa := sim.tPrev, sim.xPrev
	if sim.hist < 1 {
		ta, xa = sim.t, sim.x
	}
	tb, xb, tc, xc := sim.t, sim.x, tg, sim.xg
	if sim.hist >= 1 && ta < tb {
		la := (t1 - tb) * (t1 - tc) / ((ta - tb) * (ta - tc))
		lb := (t1 - ta) * (t1 - tc) / ((tb - ta) * (tb - tc))
		lc := (t1 - ta) * (t1 - tb) / ((tc - ta) * (tc - tb))
		for i := range sim.x1 {
			sim.x1[i] = la*xa[i] + lb*xb[i] + lc*xc[i]
		}
		return
	}
	r := (t1 - tb) / (tc - tb)
	for i := range sim.x1 {
		sim.x1[i] = xb[i] + r*(xc[i]-xb[i])
	}
}

// decay is the factor by which an unknown's remembered excursion fades
// over a step of h.
func (sim *Simulation) decay(h float64) float64 {
	ts := sim.s.Source.Timescale()
	if ts == 0 {
		return 1
	}
	return math.Exp(-h / (memoryPeriods * ts))
}

// accept moves the run to the end of the step just taken (x1, with the
// stage point xg when staged), recording both points.
func (sim *Simulation) accept(h float64, staged bool) {
	st := &sim.res.Stats
	st.Accepted++
	st.SmallestStep = math.Min(st.SmallestStep, h)
	st.LargestStep = math.Max(st.LargestStep, h)
	src := sim.s.Source
	t1 := sim.t + h
	e1 := src.EMF(t1)
	p1 := sim.powersAt(t1, sim.x1, e1, sim.i1)
	if staged {
		tg := sim.t + gamma*h
		eg := src.EMF(tg)
		pg := sim.powersAt(tg, sim.xg, eg, sim.ig)
		sim.integrate(h, [3]float64{quadratureStart, quadratureStage, quadratureEnd}, sim.last, pg, p1)
		sim.record(tg, sim.xg, eg, sim.ig)
		for _, d := range sim.s.Delayed {
			d.Accept(tg, sim.xg, false)
		}
		// History for the predictor: the step's start and its stage
		// point.
		sim.tPrev2, sim.tPrev = sim.t, tg
		copy(sim.xPrev2, sim.x)
		copy(sim.xPrev, sim.xg)
		sim.hist = 2
	} else {
		sim.integrate(h, [3]float64{0.5, 0, 0.5}, sim.last, powers{}, p1)
		sim.tPrev2, sim.tPrev = sim.tPrev, sim.t
		sim.xPrev2, sim.xPrev = sim.xPrev, sim.xPrev2
		copy(sim.xPrev, sim.x)
		sim.hist = min(sim.hist+1, 2)
	}
	sim.last = p1
	sim.record(t1, sim.x1, e1, sim.i1)
	for _, d := range sim.s.Delayed {
		d.Accept(t1, sim.x1, sim.landing)
	}
	decay := sim.decay(h)
	for i := range sim.x {
		sim.scale[i] = math.Max(sim.scale[i]*decay, math.Abs(sim.x1[i]-sim.dc[i]))
	}
	sim.t = t1
	copy(sim.x, sim.x1)
	copy(sim.q, sim.w.Q)
	copy(sim.qd, sim.qd1)
}

// record appends the point (t, x) to the result, with the junctions'
// currents there (nil: evaluate them).
func (sim *Simulation) record(t float64, x []float64, emf float64, currents []float64) {
	r := sim.res
	r.Times = append(r.Times, t)
	r.EMF = append(r.EMF, emf)
	for k, i := range sim.s.Watch {
		r.Watched[k] = append(r.Watched[k], x[i])
	}
	for k, b := range sim.sys.Blocked {
		r.BlockCurrents[k] = append(r.BlockCurrents[k], sim.sys.PortCurrent(b, x, emf, sim.p))
	}
	for k, d := range sim.nw.Diodes {
		v := nonlinear.JunctionVoltage(x, d)
		tr := &r.Diodes[k]
		i := 0.0
		if currents != nil {
			i = currents[k]
		} else {
			i = d.Device.Current(v).Value
		}
		tr.Current = append(tr.Current, i)
		tr.Junction = append(tr.Junction, v)
		tr.Terminal = append(tr.Terminal, nonlinear.TerminalVoltage(x, d))
	}
}

// The weights of the quadrature over a step [t, t + h] through its three
// points t, t + γh, t + h, exact for quadratics:
// w_γ = 1/(6γ(1-γ)), w_1 = 1/2 - 1/(6(1-γ)), w_0 = 1 - w_γ - w_1.
var (
	quadratureStage = 1 / (6 * gamma * (1 - gamma))
	quadratureEnd   = 0.5 - 1/(6*(1-gamma))
	quadratureStart = 1 - quadratureStage - quadratureEnd
)

// integrate adds to the energy account the integral of the powers over a
// step of length h, from their values at its start, stage point and end
// with weights w.
func (sim *Simulation) integrate(h float64, w [3]float64, p0, pg, p1 powers) {
	in := &sim.integrated
	add := func(sum *float64, a, b, c float64) { *sum += h * (w[0]*a + w[1]*b + w[2]*c) }
	add(&in.generator, p0.generator, pg.generator, p1.generator)
	add(&in.dcSources, p0.dcSources, pg.dcSources, p1.dcSources)
	add(&in.delivered, p0.delivered, pg.delivered, p1.delivered)
	add(&in.dissipated, p0.dissipated, pg.dissipated, p1.dissipated)
	add(&in.blocks, p0.blocks, pg.blocks, p1.blocks)
	add(&in.delayed, p0.delayed, pg.delayed, p1.delayed)
}

// powersAt returns the instantaneous powers at (t, x):
//   - the generator's e i_in, and e i_in less its own termination's
//     loss, v i_in, delivered into the circuit;
//   - the DC sources': Σ I (v_to - v_from) over current sources and
//     -Σ V i over voltage sources (i from plus to minus through it);
//   - dissipation: v_nᵀ G_nn v_n over the node block of the linear
//     conductances, less each port termination's stamp v_k²/Z0, plus
//     every termination's i_k² Z0, plus Σ v_j i(v_j) over the junctions;
//   - the DC blocks' p_k i_k and the delayed elements' draw.
func (sim *Simulation) powersAt(t float64, x []float64, emf float64, currents []float64) powers {
	var pw powers
	nw, sys := sim.nw, sim.sys
	n, nodes := nw.N, nw.NodeUnknowns
	for i := 0; i < n; i++ {
		if i < nodes {
			pw.dcSources += nw.Sources[i] * x[i]
			row := sim.glin[i*n : i*n+nodes]
			s := 0.0
			for j, g := range row {
				s += g * x[j]
			}
			pw.dissipated += x[i] * s
		} else {
			pw.dcSources -= nw.Sources[i] * x[i]
		}
	}
	for _, d := range sim.s.Delayed {
		pw.delayed += d.Power(t, x)
	}
	for k, port := range nw.Ports {
		v := sys.PortVoltage(k, x)
		i := sys.PortCurrent(k, x, emf, sim.p)
		pw.dissipated += i*i*port.Impedance - v*v/port.Impedance
		if k == sys.Input {
			pw.generator = emf * i
			pw.delivered = v * i
		}
	}
	for k, b := range sys.Blocked {
		pw.blocks += sim.p[k] * sys.PortCurrent(b, x, emf, sim.p)
	}
	for k, d := range nw.Diodes {
		v := nonlinear.JunctionVoltage(x, d)
		if currents != nil {
			pw.dissipated += v * currents[k]
		} else {
			pw.dissipated += v * d.Device.Current(v).Value
		}
	}
	return pw
}

// storedEnergy returns what state x holds: ½ v_nᵀ C_nn v_n in the
// capacitors, ½ L i² in each inductor (whose flux row carries -L) and
// each junction charge's ChargeEnergy.
func (sim *Simulation) storedEnergy(x []float64) float64 {
	nw, sys := sim.nw, sim.sys
	n, nodes := nw.N, nw.NodeUnknowns
	e := 0.0
	for i := 0; i < nodes; i++ {
		s := 0.0
		for j := 0; j < nodes; j++ {
			s += sys.C[i*n+j] * x[j]
		}
		e += x[i] * s / 2
	}
	for k := nodes; k < n; k++ {
		e += -sys.C[k*n+k] * x[k] * x[k] / 2
	}
	for _, d := range nw.Diodes {
		e += d.Device.ChargeEnergy(nonlinear.JunctionVoltage(x, d))
	}
	return e
}
