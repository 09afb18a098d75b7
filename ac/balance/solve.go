package balance

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"time"

	"qpoint/ac"
	"qpoint/ac/steady"
	"qpoint/smallsignal"
)

// ErrNoConvergence reports a balance that Newton's method and source
// stepping could not solve; the error wrapping it says how far it got.
var ErrNoConvergence = errors.New("harmonic balance did not converge")

// ErrTruncation reports a waveform whose top harmonics (or products) do
// not fall below the tolerance within the largest truncation allowed.
var ErrTruncation = errors.New("harmonic balance: the spectrum does not fall off within the harmonics allowed")

// Solve finds the steady state of the network under the drive d by
// harmonic balance (Kundert and Sangiovanni-Vincentelli, "Simulation of
// nonlinear circuits in the frequency domain", IEEE Trans. CAD 5(4), 1986;
// Maas, "Nonlinear Microwave and RF Circuits", 2nd ed., 2003, ch. 3). The
// unknowns are the phasors of every unknown of the network at DC and at
// the harmonics of one tone, or at the mixing products of two tones under
// a box or diamond truncation mapped onto one artificial spectrum. The
// linear network enters as Y(jw) at each product's frequency; each
// junction's current and charge (package bias/diode) are evaluated on an
// oversampled time grid and transformed with go-dsp's FFT.
//
// Newton's method uses the exact Jacobian: the conversion matrices of
// g(t) = di/dv and c(t) = dq/dv, applied by FFT. Each step is solved by a
// dense LU for small problems and otherwise by GMRES (Saad and Schultz
// 1986) preconditioned with the network in which each junction is
// replaced by its time-averaged conductance and capacitance, which costs
// O(n·K·log K) per product with the Jacobian (Rizzoli et al., "Harmonic-
// balance simulation of strongly nonlinear very large-size microwave
// circuits by inexact Newton methods", IEEE MTT-S 1996). Steps are damped
// by the junction-voltage limiting of bias/diode applied at every sample.
// When the full drive does not converge from the DC point (or from
// Settings.Start) the drive is ramped up (source stepping). The harmonic
// count grows until the top products fall below the tolerance, or until
// growing it no longer moves any reported node voltage or junction current
// by more than 1e-6 of itself plus 1e-12 of the largest (a switching waveform's
// spectrum can fall off slowly beyond what it reports); the result is
// checked on a grid twice as fine.
//
// Converged means every KCL equation holds at every product within 1e-9
// of the magnitudes of the currents meeting there, with a floor of 1e-13
// of the largest such magnitude the node sees at any product.
func Solve(nw *smallsignal.Network, d ac.Drive, s Settings) (*Result, error) {
	begin := time.Now()
	s = s.withDefaults()
	sv := &solver{nw: nw, d: d, s: s, stats: Stats{Method: steady.MethodHarmonicBalance}}
	// Lines and measured blocks have no backward-difference form: the
	// time-domain preconditioner cannot hold them.
	sv.noTime = nw.HasElements()
	if s.Timeout > 0 {
		sv.deadline = begin.Add(s.Timeout)
	}
	if err := sv.check(); err != nil {
		return nil, err
	}
	spec, err := sv.initialSpectrum()
	if err != nil {
		return nil, err
	}
	sv.lin = newLinear(nw)
	sv.js = junctionsOf(nw)
	x, lam0 := sv.initial(spec)
	sys, x, err := sv.continuation(spec, x, lam0)
	if err != nil {
		return nil, err
	}
	var before *snapshot
	for !s.FixedHarmonics && !sv.truncationHolds(sys.spec, x) {
		now := sv.snapshot(sys.spec, x)
		if before != nil && settled(*before, now) {
			break
		}
		next, ok := sv.grow(sys.spec)
		if !ok {
			// At the limit: report what the last growth still moved, or
			// fail when it moved the answer by more than a tenth.
			change := math.Inf(1)
			if before != nil {
				change = unsettled(*before, now)
			}
			if change > maxUnsettled {
				return nil, fmt.Errorf("%w: with %s the top products still exceed %.2g of the largest signal and the reported products still move; lower the drive",
					ErrTruncation, describe(sys.spec), s.TruncationTolerance)
			}
			sv.stats.Unsettled = change
			break
		}
		before = &now
		sv.note("more harmonics")
		x = remap(sys.spec, next, x, nw.N)
		if sys, x, err = sv.continuation(next, x, 1); err != nil {
			return nil, err
		}
	}
	if !s.FixedHarmonics {
		if sys, x, err = sv.refineGrid(sys, x); err != nil {
			return nil, err
		}
	}
	res := sv.result(sys, x)
	res.Stats.Runtime = time.Since(begin)
	return res, nil
}

// Check reports a request Solve cannot honour as asked, without solving
// anything: a frequency out of range, ports the network lacks, tones that
// coincide or whose products collide, a truncation too small for the
// products asked, a problem too large. Solve makes the same checks; a
// front end calls Check to tell a bad request from a failed analysis.
func Check(nw *smallsignal.Network, d ac.Drive, s Settings) error {
	sv := &solver{nw: nw, d: d, s: s.withDefaults()}
	if err := sv.check(); err != nil {
		return err
	}
	_, err := sv.initialSpectrum()
	return err
}

// A time-domain preconditioner is set up again after maxTimeAge Newton
// steps, or after a step whose GMRES took more than lagIterations with it.
// On the mixer demo's pump (BenchmarkDemo, one core) setting it up at
// every step took 224-226 ms, every third step or past 12 iterations
// 202-205 ms, these values 192-193 ms, and no age limit 191-194 ms.
const (
	maxTimeAge    = 8
	lagIterations = 20
)

// solver carries one Solve.
type solver struct {
	nw       *smallsignal.Network
	d        ac.Drive
	s        Settings
	lin      *linear
	js       []*junction
	stats    Stats
	deadline time.Time
	width    int  // product width of the band preconditioner
	noTime   bool // the period needs too many segments for the time-domain preconditioner

	lastNorm, lastEta float64 // of the last Newton step, for the forcing term
}

func (sv *solver) note(what string) {
	for _, f := range sv.stats.Fallbacks {
		if f == what {
			return
		}
	}
	sv.stats.Fallbacks = append(sv.stats.Fallbacks, what)
}

// check refuses a request that cannot be solved as asked.
func (sv *solver) check() error {
	d, s, nw := sv.d, sv.s, sv.nw
	if err := ac.CheckFrequency(d.FrequencyHz); err != nil {
		return err
	}
	if d.Input < 0 || d.Input >= len(nw.Ports) {
		return fmt.Errorf("input port %d: the circuit has %d ports", d.Input+1, len(nw.Ports))
	}
	if _, err := ac.OutputVector[float64](nw, d.Output); err != nil {
		return err
	}
	if !(d.EMF >= 0) || math.IsInf(d.EMF, 0) {
		return fmt.Errorf("the drive's EMF must be a finite non-negative voltage; got %g", d.EMF)
	}
	if d.SecondToneHz != 0 {
		if err := ac.CheckFrequency(d.SecondToneHz); err != nil {
			return err
		}
		if d.SecondToneHz == d.FrequencyHz {
			return fmt.Errorf("the second tone must differ from the first (%g Hz)", d.FrequencyHz)
		}
		if s.Order < 1 || s.Order > 60 {
			return fmt.Errorf("truncation order %d; accepted: 1 to 60", s.Order)
		}
		report := s.Report
		if report == 0 {
			report = 3
		}
		if report > s.Order {
			return fmt.Errorf("a %s truncation of order %d does not hold the order-%d products asked for (such as %s); use an order of at least %d",
				s.Truncation, s.Order, report, productName(report-1, -1), report)
		}
		if s.Truncation == Diamond && s.Order < 3 {
			return fmt.Errorf("a diamond truncation of order %d does not hold the third-order product 2f1 - f2; use an order of at least 3", s.Order)
		}
		if s.Truncation == Box && s.Order < 2 {
			return fmt.Errorf("a box truncation of order %d does not hold the third-order product 2f1 - f2; use an order of at least 2", s.Order)
		}
	} else {
		if s.Harmonics < 1 || s.Harmonics > 4096 {
			return fmt.Errorf("harmonics %d; accepted: 1 to 4096", s.Harmonics)
		}
		report := s.Report
		if report == 0 {
			report = 5
		}
		if report > s.Harmonics && s.FixedHarmonics {
			return fmt.Errorf("%d harmonics do not hold the %d reported; solve with at least %d", s.Harmonics, report, report)
		}
	}
	if err := checkGenerators(nw, d, s); err != nil {
		return err
	}
	if s.Oversample < 1 || s.Oversample > 64 {
		return fmt.Errorf("oversampling %d; accepted: 1 to 64", s.Oversample)
	}
	if s.Truncation != Diamond && s.Truncation != Box {
		return fmt.Errorf("unknown truncation %d", s.Truncation)
	}
	return nil
}

func (sv *solver) report() int {
	if sv.s.Report != 0 {
		return sv.s.Report
	}
	if sv.d.SecondToneHz != 0 {
		return 3
	}
	return 5
}

func (sv *solver) maxOrder() int {
	if sv.s.MaxHarmonics != 0 {
		return sv.s.MaxHarmonics
	}
	if sv.d.SecondToneHz != 0 {
		return 23
	}
	return 2048
}

// initialSpectrum is the spectrum of the settings, or of the start
// solution when that one holds more.
func (sv *solver) initialSpectrum() (*spectrum, error) {
	d, s := sv.d, sv.s
	if d.SecondToneHz == 0 {
		k := max(s.Harmonics, sv.report(), highestGenerator(s.Generators))
		if st := sv.start(); st != nil && !s.FixedHarmonics {
			k = max(k, st.spec.order)
		}
		spec := oneTone(k, d.FrequencyHz, s.Oversample)
		return spec, sv.checkSize(spec)
	}
	order := s.Order
	if st := sv.start(); st != nil && !s.FixedHarmonics {
		order = max(order, st.spec.order)
	}
	spec, err := twoTones(order, s.Truncation, d.FrequencyHz, d.SecondToneHz, s.Oversample)
	if err != nil {
		return nil, err
	}
	return spec, sv.checkSize(spec)
}

func (sv *solver) checkSize(spec *spectrum) error {
	if u := len(spec.products) * sv.nw.N; u > maxUnknowns {
		return fmt.Errorf("%s of a circuit with %d unknowns makes %d complex unknowns; at most %d are taken: lower the harmonics or the order",
			describe(spec), sv.nw.N, u, maxUnknowns)
	}
	return nil
}

// start returns Settings.Start when it is a solution of this circuit
// under the same tones.
func (sv *solver) start() *Result {
	st := sv.s.Start
	if st == nil || st.n != sv.nw.N || st.Drive.FrequencyHz != sv.d.FrequencyHz || st.Drive.SecondToneHz != sv.d.SecondToneHz ||
		st.Drive.Input != sv.d.Input {
		return nil
	}
	if sv.d.SecondToneHz != 0 && st.spec.trunc != sv.s.Truncation {
		return nil
	}
	if !sameGenerators(st.generators, sv.s.Generators) {
		return nil
	}
	return st
}

// initial returns the starting phasors and the drive fraction λ they
// solve: the DC point at λ = 0, or the start solution at its own level.
func (sv *solver) initial(spec *spectrum) ([]complex128, float64) {
	n := sv.nw.N
	if st := sv.start(); st != nil && sv.d.EMF > 0 {
		return remap(st.spec, spec, st.x, n), st.emf / sv.d.EMF
	}
	x := make([]complex128, n*len(spec.products))
	for i, v := range sv.nw.Bias {
		x[i] = complex(v, 0)
	}
	return x, 0
}

// remap carries phasors from one spectrum to another, product by product;
// products the old spectrum lacks start at zero.
func remap(from, to *spectrum, x []complex128, n int) []complex128 {
	out := make([]complex128, n*len(to.products))
	for k, p := range to.products {
		i, mirrored := from.index(p.m, p.n)
		if i < 0 {
			continue
		}
		for u := 0; u < n; u++ {
			v := x[i*n+u]
			if mirrored {
				v = cmplx.Conj(v)
			}
			out[k*n+u] = v
		}
	}
	return out
}

// continuation solves the balance on spec at the full drive, starting
// from x, which solves it at the drive fraction lam0. It tries the full
// drive at once; when Newton fails there, it steps the drive from lam0 to
// 1, halving a step that fails and doubling one that succeeds, each start
// predicted by the secant through the last two solutions.
func (sv *solver) continuation(spec *spectrum, x []complex128, lam0 float64) (*system, []complex128, error) {
	sys := newSystem(sv.nw, sv.lin, spec, sv.js, sv.d.Input, sv.d.EMF, sv.s.Generators)
	sys.lambda = 1
	try := append([]complex128(nil), x...)
	ok, err := sv.newton(sys, try)
	if err != nil {
		return nil, nil, err
	}
	if ok {
		return sys, try, nil
	}
	if lam0 == 1 {
		// A start at the full drive that fails (a grown spectrum): go
		// back to the DC point.
		lam0 = 0
		x = make([]complex128, len(x))
		for i, v := range sv.nw.Bias {
			x[i] = complex(v, 0)
		}
	}
	sv.note("source stepping")
	lam, step := lam0, (1-lam0)/4
	var prev []complex128
	lamPrev := math.NaN()
	minStep := 1e-4 * math.Abs(1-lam0)
	for tries := 0; lam != 1; tries++ {
		if tries == maxContinuation {
			return nil, nil, sv.failure(lam)
		}
		target := lam + step
		if (step > 0 && target > 1) || (step < 0 && target < 1) {
			target = 1
		}
		copy(try, x)
		if prev != nil {
			f := complex((target-lam)/(lam-lamPrev), 0)
			for i := range try {
				try[i] += f * (x[i] - prev[i])
			}
		}
		sys.lambda = target
		ok, err := sv.newton(sys, try)
		if err != nil {
			return nil, nil, err
		}
		if ok {
			sv.stats.ContinuationSteps++
			prev = append(prev[:0], x...)
			lamPrev = lam
			copy(x, try)
			lam = target
			step *= 2
			continue
		}
		step /= 4
		if math.Abs(step) < minStep {
			return nil, nil, sv.failure(lam)
		}
	}
	return sys, x, nil
}

// outsideFloor is the size, relative to the largest signal phasor, below
// which a product outside a block's data or a microstrip's models is not
// cautioned (Result.Outside): -100 dB.
const outsideFloor = 1e-5

// maxContinuation bounds the drive levels one source stepping tries.
const maxContinuation = 120

// failure says how far the source stepping got.
func (sv *solver) failure(lam float64) error {
	z0 := sv.nw.Ports[sv.d.Input].Impedance
	got := lam * sv.d.EMF
	if got <= 0 {
		return fmt.Errorf("%w at any drive level (%d Newton iterations, last residual %.3g of the node currents)",
			ErrNoConvergence, sv.stats.Iterations, sv.stats.Residual)
	}
	return fmt.Errorf("%w: source stepping reached %.2f dBm (%.3g of the %.2f dBm asked) and could not go on (%d Newton iterations, residual %.3g of the node currents)",
		ErrNoConvergence, ac.EMFToDBm(got, z0), lam, ac.EMFToDBm(sv.d.EMF, z0), sv.stats.Iterations, sv.stats.Residual)
}

// newton runs damped Newton on sys from x (overwritten) and reports
// whether it converged. Its error is for a timeout only.
func (sv *solver) newton(sys *system, x []complex128) (bool, error) {
	f := make([]complex128, len(x))
	dx := make([]complex128, len(x))
	last := [2]float64{math.Inf(1), math.Inf(1)}
	sv.lastNorm, sv.lastEta = 0, 0
	for it := 0; ; it++ {
		if !sv.deadline.IsZero() && time.Now().After(sv.deadline) {
			return false, fmt.Errorf("%w within %v (%d Newton iterations, residual %.3g of the node currents)",
				ErrNoConvergence, sv.s.Timeout, sv.stats.Iterations, sv.stats.Residual)
		}
		worst, ok := sys.residual(x, f)
		if !ok {
			return false, nil
		}
		sv.stats.Residual = worst * relTol
		if worst <= 1 {
			return true, nil
		}
		// Newton converges quadratically until rounding stops it: an
		// error within 100 tolerances that no longer halves is at the
		// rounding level of the equations (a 10 nΩ part beside a
		// junction, say).
		if worst <= 100 && last[0] <= 100 && worst > last[0]/2 && last[1] <= 100 && last[0] > last[1]/2 {
			return true, nil
		}
		last[1], last[0] = last[0], worst
		if it == sv.s.MaxIterations {
			return false, nil
		}
		sv.stats.Iterations++
		if err := sv.step(sys, f, dx, worst); err != nil {
			return false, nil
		}
		alpha := sys.limit(dx)
		for i := range x {
			x[i] += complex(alpha, 0) * dx[i]
		}
	}
}

// step solves J dx = -F at the last evaluated point: by a dense LU when
// the problem is small, else by GMRES, preconditioned in the time domain
// for one tone on a modest circuit (see timePreconditioner) and otherwise
// with the band of the Jacobian (see preconditioner), widened while GMRES
// needs many iterations and the band's factors stay cheap.
func (sv *solver) step(sys *system, f, dx []complex128, worst float64) error {
	L := 2 * len(f)
	direct := sv.s.Linear == Direct || (sv.s.Linear == Automatic && L <= directLimit)
	if direct {
		sv.stats.Linear = "direct"
		return sys.solveDirect(f, dx)
	}
	sv.stats.Linear = "gmres"
	// Weighted system: W J M⁻¹ W⁻¹ y = -W F, dx = M⁻¹ W⁻¹ y, so that the
	// preconditioned operator is near the identity and GMRES's norm
	// counts each equation in units of its tolerance.
	b := make([]complex128, len(f))
	var bn float64
	for e, v := range f {
		b[e] = -v * complex(sys.weight[e], 0)
		bn += real(b[e])*real(b[e]) + imag(b[e])*imag(b[e])
	}
	bn = math.Sqrt(bn)
	eta := sv.forcing(bn)
	t := make([]complex128, len(f))
	unweigh := func(v []complex128) {
		for e := range v {
			v[e] /= complex(sys.weight[e], 0)
		}
	}
	var prec func([]complex128)
	op := func(v, out []complex128) {
		copy(t, v)
		unweigh(t)
		prec(t)
		sys.jacobian(t, out)
		for e := range out {
			out[e] *= complex(sys.weight[e], 0)
		}
	}
	restart := min(60, max(10, 20_000_000/len(f)-1))
	fallback := func() error {
		sv.note("direct solve")
		return sys.solveDirect(f, dx)
	}
	canFallBack := sv.s.Linear == Automatic && L <= 6*directLimit
	if sys.n <= timeDomainLimit && !sv.noTime {
		// One tone, a modest circuit: the time-domain preconditioner
		// holds the junctions' switching exactly.
		// The factors of an earlier step on this grid serve again while
		// GMRES needs few iterations with them (a lagged preconditioner:
		// GMRES still solves the current step to eta); a step they no
		// longer serve is solved again with fresh ones.
		fresh := sys.tpre == nil || sys.tpreAge >= maxTimeAge || sys.tpreIters > lagIterations
		var err error
		if fresh {
			err = sys.factorTime()
			sys.tpreAge = 0
		} else {
			sys.tpreAge++
		}
		if err == nil {
			prec = sys.preconditionTime
			start := append([]complex128(nil), dx...)
			n, rel := gmres(op, b, dx, restart, 300, eta)
			sv.stats.LinearIterations += n
			if !fresh && rel > eta {
				copy(dx, start)
				if err = sys.factorTime(); err == nil {
					sys.tpreAge = 0
					var m int
					m, rel = gmres(op, b, dx, restart, 300, eta)
					sv.stats.LinearIterations += m
					n = m
				}
			}
			sys.tpreIters = n
			if err == nil && rel <= 0.5 {
				unweigh(dx)
				prec(dx)
				return nil
			}
		}
		if err != nil {
			// The period needs more segments than the dense cycle
			// takes: no use trying again on this circuit.
			sv.noTime = true
		}
		// The backward differences stray too far from the balance here
		// (a resonance, a capacitance that jumps by decades within a
		// step): this step goes on in the frequency domain.
		sv.note("frequency-domain preconditioner")
	}
	prec = sys.precondition
	for {
		if err := sys.factorPreconditioner(sv.width); err != nil {
			return err
		}
		n, rel := gmres(op, b, dx, restart, 120, eta)
		sv.stats.LinearIterations += n
		wider, ok := sv.wider(sys)
		if rel <= eta {
			if n > 40 && ok {
				sv.width = wider // cheaper for the next steps
			}
			break
		}
		if ok {
			sv.width = wider
			sv.note("wider preconditioner")
			continue
		}
		if canFallBack {
			return fallback()
		}
		break // an inexact step; Newton judges it
	}
	unweigh(dx)
	prec(dx)
	return nil
}

// forcing returns the relative accuracy GMRES solves a Newton step to,
// given the weighted residual's norm: the second choice of Eisenstat and
// Walker ("Choosing the forcing terms in an inexact Newton method", SIAM
// J. Sci. Comput. 17(1), 1996), 0.9 (|F_k|/|F_(k-1)|)², kept from falling
// faster than the last term squared and at most 0.1, and no tighter than
// what brings the residual to a third of its tolerance.
func (sv *solver) forcing(norm float64) float64 {
	eta := 0.1
	if sv.lastNorm > 0 {
		r := norm / sv.lastNorm
		eta = 0.9 * r * r
		if safe := 0.9 * sv.lastEta * sv.lastEta; safe > 0.1 {
			eta = math.Max(eta, safe)
		}
		eta = math.Min(eta, 0.1)
	}
	eta = math.Max(eta, math.Min(0.1, 0.3/norm))
	eta = math.Max(eta, 1e-12)
	sv.lastNorm, sv.lastEta = norm, eta
	return eta
}

// preconditionerBudget bounds the work of factoring the band
// preconditioner, about L·w² for L unknowns and half-width w.
const preconditionerBudget = 4e8

// wider returns the next product width of the band preconditioner, and
// false when it would hold the whole spectrum already or cost more than
// the budget.
func (sv *solver) wider(sys *system) (int, bool) {
	amax := sys.spec.products[len(sys.spec.products)-1].a
	if sv.width >= amax {
		return sv.width, false
	}
	next := min(max(2, 2*sv.width), amax)
	_, nodeWidth := sys.nodeOrder()
	w := float64(sys.preconditionerWidth(next, nodeWidth))
	L := float64(2 * sys.n * len(sys.spec.products))
	if L*w*w > preconditionerBudget {
		return sv.width, false
	}
	return next, true
}

// limit returns the fraction of the step dx to take: the largest at
// which no junction's voltage, at any sample, moves further than the
// junction-voltage limiting of bias/diode allows (Device.Limit).
func (sys *system) limit(dx []complex128) float64 {
	n, P, S := sys.n, len(sys.spec.products), sys.spec.samples
	vp := make([]complex128, P)
	dv := make([]float64, S)
	alpha := 1.0
	for _, j := range sys.js {
		for k := range vp {
			vp[k] = j.voltage(dx, k, n)
		}
		sys.grid.toTime(vp, nil, dv, nil)
		for s, d := range dv {
			if d == 0 {
				continue
			}
			old := j.v[s]
			lim, changed := j.dev.Limit(old+d, old)
			if changed {
				alpha = math.Min(alpha, (lim-old)/d)
			}
		}
	}
	return math.Max(alpha, 1e-6)
}

// truncationHolds reports whether the top products lie below the
// tolerance: of every node voltage relative to the largest signal phasor
// of any node voltage, and of every junction current relative to its own
// largest signal phasor. The currents matter for two tones, whose
// products beyond the truncation fold onto kept ones on the artificial
// grid; a voltage-driven junction has a truncated voltage and an
// untruncated current.
func (sv *solver) truncationHolds(spec *spectrum, x []complex128) bool {
	n := sv.nw.N
	var scale, top float64
	for k := 1; k < len(spec.products); k++ {
		isTop := spec.top(k)
		for i := 0; i < sv.nw.NodeUnknowns; i++ {
			a := cmplx.Abs(x[k*n+i])
			scale = math.Max(scale, a)
			if isTop {
				top = math.Max(top, a)
			}
		}
	}
	if top > sv.s.TruncationTolerance*scale {
		return false
	}
	for _, j := range sv.js {
		var scale, top float64
		for k := 1; k < len(spec.products); k++ {
			a := cmplx.Abs(j.i[k])
			scale = math.Max(scale, a)
			if spec.top(k) {
				top = math.Max(top, a)
			}
		}
		if top > sv.s.TruncationTolerance*scale {
			return false
		}
	}
	return true
}

// snapshot holds what a solve reports: the node voltages and the
// junction currents at the products reported, each list keyed by the
// product's orders.
type snapshot struct {
	voltages, currents map[[2]int][]complex128
}

func (sv *solver) snapshot(spec *spectrum, x []complex128) snapshot {
	n, report := sv.nw.N, sv.report()
	out := snapshot{map[[2]int][]complex128{}, map[[2]int][]complex128{}}
	for k, p := range spec.products {
		if !spec.reported(p, report) {
			continue
		}
		o := [2]int{p.m, p.n}
		out.voltages[o] = append([]complex128(nil), x[k*n:k*n+sv.nw.NodeUnknowns]...)
		for _, j := range sv.js {
			out.currents[o] = append(out.currents[o], j.i[k])
		}
	}
	return out
}

// settleRel is how little, relative to itself, a reported value may
// still move when the harmonic count grows for the growth to stop: 1e-6,
// about 1e-5 dB.
const settleRel = 1e-6

// settled reports whether every reported node voltage and junction
// current moved by at most settleRel of itself, plus 1e-12 of the largest
// signal of its kind, between two spectra: the harmonic count has stopped
// mattering to what is reported, though the waveform's spectrum (a
// switching edge, a stored-charge snap) may fall off slowly beyond it.
func settled(before, now snapshot) bool {
	return settledList(before.voltages, now.voltages) && settledList(before.currents, now.currents)
}

func settledList(before, now map[[2]int][]complex128) bool {
	scale := 0.0
	for o, v := range now {
		if o == [2]int{0, 0} {
			continue
		}
		for _, z := range v {
			scale = math.Max(scale, cmplx.Abs(z))
		}
	}
	for o, v := range now {
		old, ok := before[o]
		if !ok || len(old) != len(v) {
			return false
		}
		for i, z := range v {
			if cmplx.Abs(z-old[i]) > settleRel*cmplx.Abs(z)+1e-12*scale {
				return false
			}
		}
	}
	return true
}

// maxUnsettled is the largest change of the reported products, in the
// last growth of the spectrum, that a solve at its harmonic limit reports
// (with Stats.Unsettled) rather than fails.
const maxUnsettled = 0.1

// unsettled returns the largest change of a reported value between two
// spectra relative to itself, values below 1e-6 of the largest of their
// kind (-120 dB) measured against that floor.
func unsettled(before, now snapshot) float64 {
	w := 0.0
	for _, pair := range [2][2]map[[2]int][]complex128{{before.voltages, now.voltages}, {before.currents, now.currents}} {
		scale := 0.0
		for o, v := range pair[1] {
			if o == [2]int{0, 0} {
				continue
			}
			for _, z := range v {
				scale = math.Max(scale, cmplx.Abs(z))
			}
		}
		for o, v := range pair[1] {
			old, ok := pair[0][o]
			if !ok || len(old) != len(v) {
				return math.Inf(1)
			}
			for i, z := range v {
				w = math.Max(w, cmplx.Abs(z-old[i])/(cmplx.Abs(z)+1e-6*scale))
			}
		}
	}
	return w
}

// grow returns the next larger spectrum, or false at the limit.
func (sv *solver) grow(s *spectrum) (*spectrum, bool) {
	limit := sv.maxOrder()
	if s.order >= limit {
		return nil, false
	}
	if !s.twoTone {
		next := oneTone(min(2*s.order, limit), sv.d.FrequencyHz, sv.s.Oversample)
		next.samples = max(next.samples, s.samples)
		return next, sv.checkSize(next) == nil
	}
	next, err := twoTones(min(s.order+4, limit), s.trunc, sv.d.FrequencyHz, sv.d.SecondToneHz, sv.s.Oversample)
	if err != nil || sv.checkSize(next) != nil {
		return nil, false
	}
	return next, true
}

// refineGrid checks the solution on a grid twice as fine, where the
// junction laws' own spectra (which an exponential has without end) alias
// less, and solves again there until the check holds.
func (sv *solver) refineGrid(sys *system, x []complex128) (*system, []complex128, error) {
	for range 3 {
		finer := *sys.spec
		finer.samples *= 2
		check := newSystem(sv.nw, sv.lin, &finer, sv.js, sv.d.Input, sv.d.EMF, sv.s.Generators)
		check.lambda = 1
		f := make([]complex128, len(x))
		here, _ := sys.residual(x, f)
		worst, ok := check.residual(x, f)
		// The solve may have stopped at its rounding level above the
		// tolerance (see newton): the finer grid must hold it as well.
		if ok && worst <= math.Max(1, 2*here) {
			// Evaluate once more on the solve's own grid, for the result.
			sys.residual(x, f)
			return sys, x, nil
		}
		sv.note("finer grid")
		var err error
		if sys, x, err = sv.continuation(&finer, x, 1); err != nil {
			return nil, nil, err
		}
	}
	return sys, x, nil
}

func describe(s *spectrum) string {
	if !s.twoTone {
		return fmt.Sprintf("%d harmonics", s.order)
	}
	return fmt.Sprintf("a %s truncation of order %d", s.trunc, s.order)
}

// result assembles the Result from the converged phasors (the junctions
// hold their last evaluation, at x).
func (sv *solver) result(sys *system, x []complex128) *Result {
	nw, spec, n := sv.nw, sys.spec, sv.nw.N
	e, _ := ac.OutputVector[float64](nw, sv.d.Output)
	r := &Result{Drive: sv.d, spec: spec, x: x, emf: sv.d.EMF, n: n, generators: sv.s.Generators}
	report := sv.report()
	dcOut := 0.0
	for i, v := range e {
		dcOut += v * nw.Bias[i]
	}
	outPh := make([]complex128, len(spec.products))
	for k, p := range spec.products {
		var v complex128
		for i, c := range e {
			if c != 0 {
				v += complex(c, 0) * x[k*n+i]
			}
		}
		outPh[k] = v
		if k == 0 {
			v -= complex(dcOut, 0)
		}
		if spec.reported(p, report) {
			r.Output = append(r.Output, newProduct(p, v, sv.d.FrequencyHz, sv.d.SecondToneHz))
		}
	}
	sortProducts(r.Output)
	for _, j := range sv.js {
		var list []Product
		for k, p := range spec.products {
			if spec.reported(p, report) {
				list = append(list, newProduct(p, j.i[k], sv.d.FrequencyHz, sv.d.SecondToneHz))
			}
		}
		sortProducts(list)
		r.DiodeCurrents = append(r.DiodeCurrents, list)
	}
	S := spec.samples
	if !spec.twoTone {
		r.Times = make([]float64, S)
		r.Waveform = make([]float64, S)
		sys.grid.toTime(outPh, nil, r.Waveform, nil)
		for s := range r.Times {
			r.Times[s] = float64(s) / (float64(S) * sv.d.FrequencyHz)
		}
	}
	currents, terminals, junctions := make([][]float64, len(sv.js)), make([][]float64, len(sv.js)), make([][]float64, len(sv.js))
	tp := make([]complex128, len(spec.products))
	for d, j := range sv.js {
		currents[d] = make([]float64, S)
		for s, v := range j.v {
			currents[d][s] = j.dev.Current(v).Value
		}
		dd := nw.Diodes[d]
		for k := range spec.products {
			var v complex128
			if dd.Anode >= 0 {
				v += x[k*n+dd.Anode]
			}
			if dd.Cathode >= 0 {
				v -= x[k*n+dd.Cathode]
			}
			tp[k] = v
		}
		terminals[d] = make([]float64, S)
		sys.grid.toTime(tp, nil, terminals[d], nil)
		junctions[d] = append([]float64(nil), j.v...)
	}
	r.Stress = steady.Stress(nw, currents, terminals, junctions)
	scale := math.Max(sv.d.EMF, largestGenerator(sv.s.Generators))
	for _, v := range nw.Bias[:nw.NodeUnknowns] {
		scale = math.Max(scale, math.Abs(v))
	}
	r.NoiseFloor = floorRel * scale
	r.Stats = sv.stats
	r.Stats.Harmonics = spec.order
	r.Stats.Products = len(spec.products)
	r.Stats.Samples = S
	if nw.HasElements() {
		// Products the lines and blocks hold a stake in: those whose
		// largest node phasor reaches outsideFloor of the largest signal
		// phasor. A top harmonic 200 dB down past a block's data is no
		// reason for a caution.
		var big float64
		for k := 1; k < len(spec.products); k++ {
			for i := 0; i < nw.NodeUnknowns; i++ {
				big = math.Max(big, cmplx.Abs(x[k*n+i]))
			}
		}
		var freqs []float64
		for k, p := range spec.products {
			top := 0.0
			for i := 0; i < nw.NodeUnknowns; i++ {
				top = math.Max(top, cmplx.Abs(x[k*n+i]))
			}
			if k == 0 || top >= outsideFloor*big {
				freqs = append(freqs, p.omega/(2*math.Pi))
			}
		}
		r.Outside = nw.Outside(freqs)
	}
	return r
}
