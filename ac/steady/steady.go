package steady

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/mjibson/go-dsp/fft"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"

	"qpoint/ac"
	"qpoint/ac/nonlinear"
	"qpoint/smallsignal"
)

// Settings control the periodic steady-state solve.
type Settings struct {
	// Samples per period; zero means 255. An even count is raised by
	// one (the trapezoidal rule needs an odd count here, see
	// Solve). The solve also runs at 2N+1 and combines the two by
	// Richardson extrapolation.
	Samples int
	// Harmonics is the highest order reported; zero means 5.
	Harmonics int
	// MaxIterations bounds the shooting-Newton iterations; zero means 15.
	MaxIterations int
	// Start, when not nil, is a steady state of the same circuit at a
	// nearby level to start from (continuation over level).
	Start *State
	// Method solves for the steady state; nil is shooting (see
	// Method).
	Method Method
}

// Harmonic is one harmonic of a periodic waveform.
type Harmonic struct {
	Order     int
	Amplitude float64 // peak volts (amperes for diode currents); order 0: the mean
	PhaseDeg  float64 // of the cosine phasor; zero for order 0
	Phasor    complex128
	// BelowFloor is true where the amplitude lies below the steady
	// state's NoiseFloor: the solver's rounding, not the circuit. Set on
	// a State's Output.
	BelowFloor bool
}

// State is the periodic steady state of the circuit under a one-tone
// drive, and the harmonics of its output.
type State struct {
	Drive ac.Drive
	// Output holds the output's harmonics: order 0 is the change of its DC
	// level caused by the signal (the DC shift), orders 1..K its phasors.
	Output []Harmonic
	// THDPercent is sqrt(sum_k>=2 A_k²) / A_1 in percent over the
	// harmonics above NoiseFloor; NaN where the fundamental is below the
	// floor (or zero), for which THD is undefined, and where every
	// harmonic from the 2nd up is below it: then THDBelowPercent bounds
	// it.
	THDPercent float64
	// THDBelowPercent is 100 sqrt(K-1) NoiseFloor / A_1 where every
	// harmonic from the 2nd up lies below the floor (THD is less than
	// this); zero otherwise.
	THDBelowPercent float64
	// DiodeCurrents[k] holds the harmonics of diode k's junction current
	// (order 0 is its mean, not its change).
	DiodeCurrents [][]Harmonic
	// Samples of the output over one period (at the finer step), and the
	// times they are taken at.
	Times, Waveform []float64

	// Stress holds each diode's extremes over the period, for comparison
	// with its ratings and breakdown (see Cautions).
	Stress []DiodeStress

	// NoiseFloor is the amplitude below which a harmonic is the solver's
	// rounding, not the circuit: 1e-12 of the largest of the drive's EMF
	// and the DC node voltages.
	NoiseFloor float64

	Iterations int     // Newton iterations (shooting: both step sizes)
	Residual   float64 // final residual: shooting's periodicity, max |x(T) - x(0)| scaled; harmonic balance's KCL error relative to the node's currents
	Samples    int     // samples per period of the coarser solve (shooting)

	// Outside lists the blocks and microstrips that some frequency the
	// method solved at lies outside the data or models of (a caution).
	Outside []smallsignal.OutsideRange

	// Method names the method that found this steady state:
	// MethodShooting or MethodHarmonicBalance; Choice, when the method was
	// chosen automatically, says why.
	Method string
	Choice string
	// Products holds, for a two-tone drive, the output at every mixing
	// product m·f1 + n·f2 the method solved for; nil for one tone.
	Products []ToneProduct
	// State is the solving method's own record of the solution, which a
	// method other than shooting reads back from Settings.Start to
	// continue from it (harmonic balance keeps its *balance.Result here).
	State any

	x0 []float64 // the periodic state, for continuation
	p  []float64
}

// floorRel is the steady state's rounding level relative to the circuit's
// voltage scale: the shooting and time-step tolerances stop near 1e-13 of
// the node voltages, and the FFT adds its own rounding.
const floorRel = 1e-12

// dcFloorRel is the same for the DC shift (order 0).
const dcFloorRel = 1e-10

// MaxUnknowns bounds the size of a circuit Solve takes.
const MaxUnknowns = 300

// ElementsError is the refusal of a method that solves the circuit in
// time (shooting, the transient) to take lines or measured blocks, which
// are known by their behaviour in frequency: harmonic balance takes them.
type ElementsError struct {
	Method   string
	Elements []string
}

func (e *ElementsError) Error() string {
	return fmt.Sprintf("%s solves the circuit in time and cannot carry %s, known by %s S-matrices in frequency; harmonic balance takes them",
		e.Method, strings.Join(e.Elements, ", "), map[bool]string{true: "its", false: "their"}[len(e.Elements) == 1])
}

// ErrNotFound reports a shooting solve that did not converge.
var ErrNotFound = errors.New("no periodic steady state found")

// Solve solves the full nonlinear circuit driven by the input port's
// generator, d.EMF cos(2π f t) behind its reference impedance, for its
// periodic steady state, by Newton's method on the period map (shooting:
// Aprille and Trick, "Steady-state analysis of nonlinear circuits with
// periodic inputs", Proc. IEEE 60(1), 1972). The period is integrated by
// the charge-conserving trapezoidal rule; the sensitivity of the state at
// the period's end to the state at its start is the product of the
// per-step maps the Newton steps already factor, so convergence does not
// depend on how slow the circuit's own time constants are. An AC-coupled
// port's DC block is an unknown constant voltage, fixed by requiring zero
// mean current through it.
//
// One period is sampled at N and at 2N+1 points (odd counts, so that the
// trapezoidal rule's (-1)^n ringing mode cannot be periodic), each
// transformed with go-dsp's FFT, and the harmonic phasors combined by
// Richardson's extrapolation for the rule's error in (ωh)².
//
// With s.Method set, the method given solves instead (see Method):
// this is the one entry point for every steady-state method, so that
// LevelSweep and ValidityLimit continue from level to level whichever
// method runs.
func Solve(nw *smallsignal.Network, d ac.Drive, s Settings) (*State, error) {
	if s.Method != nil {
		return s.Method.SolveSteady(nw, d, s)
	}
	if d.SecondToneHz != 0 {
		return nil, fmt.Errorf("the steady-state solve takes one tone")
	}
	if nw.HasElements() {
		return nil, &ElementsError{Method: MethodShooting, Elements: nw.ElementNames()}
	}
	if err := ac.CheckFrequency(d.FrequencyHz); err != nil {
		return nil, err
	}
	// Each time step factors a dense n×n matrix and carries an n×n
	// sensitivity: O(n³) per step, about 770 steps per solve. Past a few
	// hundred unknowns one solve takes minutes; say so instead.
	if nw.N > MaxUnknowns {
		return nil, fmt.Errorf("the circuit has %d unknowns; the steady-state solver is dense and takes at most %d", nw.N, MaxUnknowns)
	}
	if d.Input < 0 || d.Input >= len(nw.Ports) {
		return nil, fmt.Errorf("input port %d: the circuit has %d ports", d.Input+1, len(nw.Ports))
	}
	n := s.Samples
	if n == 0 {
		n = 255
	}
	if n < 15 || n > 1<<16 {
		return nil, fmt.Errorf("samples per period must lie between 15 and 65536; got %d", n)
	}
	n |= 1 // odd: see integrate
	k := s.Harmonics
	if k == 0 {
		k = 5
	}
	if k >= n/4 {
		return nil, fmt.Errorf("%d harmonics need more than %d samples per period", k, n)
	}
	maxIter := s.MaxIterations
	if maxIter == 0 {
		maxIter = 15
	}
	out, err := ac.OutputVector[complex128](nw, d.Output)
	if err != nil {
		return nil, err
	}
	sh := newShooter(nw, d, out)
	x0, p := sh.initial(s.Start)

	coarse, err := sh.solve(x0, p, n, maxIter)
	if err != nil {
		return nil, err
	}
	fine, err := sh.solve(coarse.x0, coarse.p, 2*n+1, maxIter)
	if err != nil {
		return nil, err
	}
	res := &State{
		Drive:      d,
		Iterations: coarse.iterations + fine.iterations,
		Residual:   math.Max(coarse.residual, fine.residual),
		Samples:    n,
		Times:      fine.times,
		Waveform:   fine.output,
		x0:         fine.x0,
		p:          fine.p,
		Method:     MethodShooting,
	}
	res.Stress = Stress(nw, fine.currents, fine.terminals, fine.junctions)
	scale := d.EMF
	for _, v := range nw.Bias[:nw.NodeUnknowns] {
		scale = math.Max(scale, math.Abs(v))
	}
	res.NoiseFloor = floorRel * scale
	dcOut := 0.0
	for i, e := range out {
		dcOut += real(e) * nw.Bias[i]
	}
	hc, hf := harmonics(coarse.output, k), harmonics(fine.output, k)
	res.Output = richardson(hc, hf, n, 2*n+1)
	res.Output[0].Amplitude -= dcOut
	res.Output[0].Phasor -= complex(dcOut, 0)
	res.FinishHarmonics(scale)
	for j := range nw.Diodes {
		res.DiodeCurrents = append(res.DiodeCurrents, richardson(harmonics(coarse.currents[j], k), harmonics(fine.currents[j], k), n, 2*n+1))
	}
	return res, nil
}

// harmonics returns orders 0..k of one period of samples.
func harmonics(x []float64, k int) []Harmonic {
	spec := fft.FFTReal(x)
	n := float64(len(x))
	h := make([]Harmonic, k+1)
	for i := 0; i <= k; i++ {
		p := spec[i] / complex(n, 0)
		if i > 0 {
			p *= 2
		}
		h[i] = Harmonic{Order: i, Phasor: p}
	}
	return h
}

// richardson combines harmonics from n1 and n2 samples per period,
// removing the trapezoidal rule's leading error, proportional to h², and
// fills amplitude and phase: H = (n2² H_2 - n1² H_1) / (n2² - n1²).
func richardson(coarse, fine []Harmonic, n1, n2 int) []Harmonic {
	a, b := float64(n1)*float64(n1), float64(n2)*float64(n2)
	out := make([]Harmonic, len(fine))
	for i := range fine {
		p := (complex(b, 0)*fine[i].Phasor - complex(a, 0)*coarse[i].Phasor) / complex(b-a, 0)
		out[i] = Harmonic{Order: i, Phasor: p}
		if i == 0 {
			out[i].Phasor = complex(real(p), 0)
			out[i].Amplitude = real(p)
			continue
		}
		out[i].Amplitude = math.Hypot(real(p), imag(p))
		out[i].PhaseDeg = math.Atan2(imag(p), real(p)) * 180 / math.Pi
	}
	return out
}

// shooter integrates the circuit over one period and solves for the
// periodic state.
type shooter struct {
	nw    *smallsignal.Network
	sys   *nonlinear.System
	d     ac.Drive
	out   []complex128
	n     int
	ports []int // indices of AC-coupled ports: each has a DC-block voltage
	dyn   []bool
}

func newShooter(nw *smallsignal.Network, d ac.Drive, out []complex128) *shooter {
	sys := nonlinear.New(nw, d.Input)
	return &shooter{nw: nw, sys: sys, d: d, out: out, n: nw.N, ports: sys.Blocked, dyn: sys.Dynamic}
}

// initial returns the starting state: the DC point, with each DC block
// holding its port's DC voltage, or a given nearby steady state.
func (sh *shooter) initial(start *State) ([]float64, []float64) {
	if start != nil && len(start.x0) == sh.n && len(start.p) == len(sh.ports) {
		return append([]float64(nil), start.x0...), append([]float64(nil), start.p...)
	}
	x0 := append([]float64(nil), sh.nw.Bias...)
	return x0, sh.sys.BlockVoltages(x0)
}

// emf is the input generator's EMF at time t.
func (sh *shooter) emf(t float64) float64 {
	return sh.d.EMF * math.Cos(2*math.Pi*sh.d.FrequencyHz*t)
}

// period is the result of integrating one period.
type period struct {
	x0, p      []float64
	iterations int
	residual   float64
	times      []float64
	output     []float64   // samples 0..N-1 of the output
	currents   [][]float64 // per diode, samples 0..N-1 of the junction current
	terminals  [][]float64 // per diode, samples 0..N-1 of the terminal voltage
	junctions  [][]float64 // per diode, samples 0..N-1 of the junction voltage
}

// solve runs shooting-Newton with steps samples per period.
func (sh *shooter) solve(x0, p []float64, steps, maxIter int) (*period, error) {
	n, m := sh.n, len(sh.ports)
	nz := n + m
	x0 = append([]float64(nil), x0...)
	p = append([]float64(nil), p...)
	var lastRes float64
	prevStep := math.Inf(1)
	// The start the last step was taken from, and that step, so that a
	// step which carries the period somewhere the time steps cannot follow
	// can be retraced in halves.
	var from, fromP, taken []float64
	lambda, halvings := 1.0, 0
	for it := 1; it <= maxIter; it++ {
		tr, err := sh.integrate(x0, p, steps, true)
		if err != nil {
			// A full Newton step on the period map, taken from far off
			// (the DC point of a charge pump, say), can land where a
			// junction sits volts past its knee and a time step's Newton
			// cannot find its way back. Damped Newton: go back along the
			// step, halving it, and go on from the first start the
			// period can be integrated from.
			if taken == nil || halvings >= maxHalvings {
				return nil, fmt.Errorf("%w: %v", ErrNotFound, err)
			}
			lambda /= 2
			halvings++
			for i := range x0 {
				x0[i] = from[i] - lambda*taken[i]
			}
			for k := range p {
				p[k] = fromP[k] - lambda*taken[n+k]
			}
			it--
			continue
		}
		lambda = 1
		// Residual: x_N - x_0 and, per DC block, p + mean port voltage.
		r := make([]float64, nz)
		scale := 0.0
		for i := 0; i < n; i++ {
			r[i] = tr.xN[i] - x0[i]
			scale = math.Max(scale, math.Abs(x0[i]))
		}
		for k := range sh.ports {
			r[n+k] = p[k] + tr.meanPort[k]
		}
		res := 0.0
		for i := range r {
			res = math.Max(res, math.Abs(r[i]))
		}
		lastRes = res / math.Max(scale, 1e-3)
		// Jacobian [S_N - [I 0]; dmean/dz + [0 I]].
		jac := mat.NewDense(nz, nz, nil)
		for i := 0; i < n; i++ {
			for j := 0; j < nz; j++ {
				jac.Set(i, j, tr.sN[i*nz+j])
			}
			jac.Set(i, i, jac.At(i, i)-1)
		}
		for k := range sh.ports {
			for j := 0; j < nz; j++ {
				jac.Set(n+k, j, tr.dMean[k*nz+j])
			}
			jac.Set(n+k, n+k, jac.At(n+k, n+k)+1)
		}
		var lu mat.LU
		lu.Factorize(jac)
		dz := mat.NewVecDense(nz, nil)
		if err := lu.SolveVecTo(dz, false, mat.NewVecDense(nz, r)); !solved(err) {
			return nil, fmt.Errorf("%w: the period map's Jacobian is singular", ErrNotFound)
		}
		// Converged when the voltages move by less than 1e-9 relative (or
		// 1e-12 of the largest voltage, the rounding level); branch
		// currents follow from them and can carry the rounding of a
		// milliohm part. Newton converges quadratically until rounding
		// stops it: a step that no longer shrinks while the residual is at
		// the rounding level is converged too.
		from, fromP = append(from[:0], x0...), append(fromP[:0], p...)
		taken = append(taken[:0], dz.RawVector().Data...)
		vmax := 0.0
		for i := 0; i < sh.nw.NodeUnknowns; i++ {
			vmax = math.Max(vmax, math.Abs(x0[i]))
		}
		abs := 1e-12 * math.Max(vmax, 1e-3)
		step := 0.0
		for i := 0; i < n; i++ {
			x0[i] -= dz.AtVec(i)
			if i < sh.nw.NodeUnknowns {
				step = math.Max(step, math.Abs(dz.AtVec(i))/(1e-9*math.Abs(x0[i])+abs))
			}
		}
		for k := range sh.ports {
			p[k] -= dz.AtVec(n + k)
			step = math.Max(step, math.Abs(dz.AtVec(n+k))/(1e-9*math.Abs(p[k])+abs))
		}
		stalled := lastRes <= 1e-10 && step < 1e3 && step > prevStep/4
		prevStep = step
		if step <= 1 || stalled {
			// The update is below 1e-9 relative: integrate the final
			// period once more for the samples.
			final, err := sh.integrate(x0, p, steps, false)
			if err != nil {
				return nil, fmt.Errorf("%w: %v", ErrNotFound, err)
			}
			return &period{x0: x0, p: p, iterations: it, residual: lastRes,
				times: final.times, output: final.output, currents: final.currents, terminals: final.terminals, junctions: final.junctions}, nil
		}
	}
	return nil, fmt.Errorf("%w in %d shooting iterations (residual %.3g)", ErrNotFound, maxIter, lastRes)
}

// maxHalvings bounds how often one solve halves a shooting step whose
// period could not be integrated.
const maxHalvings = 20

// trajectory is one integrated period.
type trajectory struct {
	xN        []float64
	sN        []float64 // dx_N/dz, n × (n+m)
	meanPort  []float64
	dMean     []float64 // d mean/dz, m × (n+m)
	times     []float64
	output    []float64
	currents  [][]float64
	terminals [][]float64
	junctions [][]float64

	scratch, scratch2 []float64 // the sensitivity products' storage
}

// sNextScratch returns *buf resized to n, reusing its storage.
func sNextScratch(buf *[]float64, n int) []float64 {
	if cap(*buf) < n {
		*buf = make([]float64, n)
	}
	*buf = (*buf)[:n]
	return *buf
}

// sparseRows holds the nonzeros of the dynamic rows of a dense n×n matrix
// (the charge Jacobian C), row by row.
type sparseRows struct {
	start []int // row i's entries are col[start[i]:start[i+1]]
	col   []int
	val   []float64
}

// load takes the nonzeros of the rows of dense (n×n, row-major) that dyn
// marks; the other rows are left empty.
func (s *sparseRows) load(dense []float64, n int, dyn []bool) {
	s.start = append(s.start[:0], 0)
	s.col, s.val = s.col[:0], s.val[:0]
	for i := 0; i < n; i++ {
		if dyn[i] {
			for j, v := range dense[i*n : (i+1)*n] {
				if v != 0 {
					s.col = append(s.col, j)
					s.val = append(s.val, v)
				}
			}
		}
		s.start = append(s.start, len(s.col))
	}
}

// mulTo sets dst (n×w, row-major) to the matrix times x (n×w).
func (s *sparseRows) mulTo(dst, x []float64, w int) {
	n := len(s.start) - 1
	for i := 0; i < n; i++ {
		row := dst[i*w : (i+1)*w]
		clear(row)
		for e := s.start[i]; e < s.start[i+1]; e++ {
			c, xr := s.val[e], x[s.col[e]*w:(s.col[e]+1)*w]
			for j, v := range xr {
				row[j] += c * v
			}
		}
	}
}

// integrate runs the trapezoidal rule over one period from (x0, p). With
// sens it also propagates the sensitivity to (x0, p).
func (sh *shooter) integrate(x0, p []float64, steps int, sens bool) (*trajectory, error) {
	n, m := sh.n, len(sh.ports)
	nz := n + m
	h := 1 / (sh.d.FrequencyHz * float64(steps))
	tr := &trajectory{meanPort: make([]float64, m)}
	x := append([]float64(nil), x0...)
	// w holds f, q and their Jacobians at the last converged point, and
	// the factored step matrix.
	w := sh.sys.NewWork()
	f, q, jg, jc := w.F, w.Q, w.JG, w.JC
	sh.sys.Eval(x, sh.emf(0), p, f, q, jg, jc, nil)
	// qd holds dq/dt on dynamic rows: the trapezoidal rule's memory.
	qd := make([]float64, n)
	for i := range qd {
		if sh.dyn[i] {
			qd[i] = -f[i]
		}
	}
	// dfdp: the DC blocks enter f as +p/Z0 at the port node.
	dfdp := make([]float64, n*m)
	for k, i := range sh.ports {
		pt := sh.nw.Ports[i]
		if pt.Node >= 0 {
			dfdp[pt.Node*m+k] += 1 / pt.Impedance
		}
		if pt.Return >= 0 {
			dfdp[pt.Return*m+k] -= 1 / pt.Impedance
		}
	}
	var S, Qd []float64
	if sens {
		S = make([]float64, n*nz)
		for i := 0; i < n; i++ {
			S[i*nz+i] = 1
		}
		// Qd_0 = -(G S_0 + df/dp) on dynamic rows.
		Qd = make([]float64, n*nz)
		for i := 0; i < n; i++ {
			if !sh.dyn[i] {
				continue
			}
			for j := 0; j < n; j++ {
				Qd[i*nz+j] = -jg[i*n+j]
			}
			for k := 0; k < m; k++ {
				Qd[i*nz+n+k] = -dfdp[i*m+k]
			}
		}
		tr.dMean = make([]float64, m*nz)
	}
	record := func(x []float64, t float64) {
		tr.times = append(tr.times, t)
		var o float64
		for i, e := range sh.out {
			o += real(e) * x[i]
		}
		tr.output = append(tr.output, o)
		if tr.currents == nil {
			tr.currents = make([][]float64, len(sh.nw.Diodes))
			tr.terminals = make([][]float64, len(sh.nw.Diodes))
			tr.junctions = make([][]float64, len(sh.nw.Diodes))
		}
		for k, d := range sh.nw.Diodes {
			v, vt := 0.0, 0.0
			if d.Junction >= 0 {
				v += x[d.Junction]
			}
			if d.Anode >= 0 {
				vt += x[d.Anode]
			}
			if d.Cathode >= 0 {
				v -= x[d.Cathode]
				vt -= x[d.Cathode]
			}
			tr.currents[k] = append(tr.currents[k], d.Device.Current(v).Value)
			tr.terminals[k] = append(tr.terminals[k], vt)
			tr.junctions[k] = append(tr.junctions[k], v)
		}
	}
	record(x, 0)

	qPrev := append([]float64(nil), q...)
	var cPrev, cNow sparseRows
	cPrev.load(jc, n, sh.dyn)
	xn := append([]float64(nil), x...)
	// extra = -mem qd_n: the rule's memory in the step's equations.
	extra := make([]float64, n)
	// Work storage reused by every step: the sensitivity system's right
	// side, solved in place, and S's spare (the two alternate).
	var b blas64.General
	var sSpare []float64
	if sens {
		b = blas64.General{Rows: n, Cols: nz, Stride: nz, Data: make([]float64, n*nz)}
		sSpare = make([]float64, n*nz)
	}
	for step := 1; step <= steps; step++ {
		t := float64(step) * h
		// Trapezoidal: a = 2/h with memory qd_n. The rule carries an
		// inconsistent start (or a mode far faster than the step) as a
		// ring of factor -1 per step; over an odd number of steps that
		// ring maps to its negative, so the periodic solution holds none
		// of it and the period map keeps no neutral direction. Hence the
		// odd step counts.
		a, mem := 2/h, 1.0
		// Newton for x_{n+1}: F = f + a (q - q_n) - mem qd_n on dynamic
		// rows, f on algebraic rows. The step matrix is factored in
		// place by LAPACK's dgetrf, without the condition estimate a
		// mat.LU makes (dgecon, which cost 40 % of a small circuit's
		// solve and which nothing here reads): an exactly zero pivot is
		// the only failure, as solved allows for mat.LU.
		for i := range extra {
			extra[i] = -mem * qd[i]
		}
		if _, err := sh.sys.Step(xn, a, qPrev, extra, sh.emf(t), p, 1e-13, 100, w); err != nil {
			return nil, fmt.Errorf("%w at t = %g s", err, t)
		}
		// Step left f, q and the Jacobians at the converged point.
		// Re-evaluate at the converged point for the memory and Jacobians.
		cNow.load(jc, n, sh.dyn)
		if sens {
			// J S_{n+1} = a C_n S_n + mem Qd_n - df/dp  (dynamic rows)
			// J S_{n+1} = -df/dp                        (algebraic rows)
			// C is sparse (capacitors and junction charges): its products
			// cost O(nnz (n+m)) through its rows' nonzeros, not O(n² (n+m)).
			if !sh.sys.Factor(a, w) {
				return nil, fmt.Errorf("%w at t = %g s", nonlinear.ErrSingular, t)
			}
			// cs = C_n S_n on dynamic rows, kept for Qd below.
			cs := sNextScratch(&tr.scratch, n*nz)
			cPrev.mulTo(cs, S, nz)
			for i := 0; i < n; i++ {
				row := b.Data[i*nz : (i+1)*nz]
				if sh.dyn[i] {
					for j := range row {
						row[j] = a*cs[i*nz+j] + mem*Qd[i*nz+j]
					}
				} else {
					clear(row)
				}
				for k := 0; k < m; k++ {
					row[n+k] -= dfdp[i*m+k]
				}
			}
			sh.sys.Solve(b, w)
			newS := sSpare
			copy(newS, b.Data)
			// Qd_{n+1} = a (C_{n+1} S_{n+1} - C_n S_n) - mem Qd_n.
			cn := sNextScratch(&tr.scratch2, n*nz)
			cNow.mulTo(cn, newS, nz)
			for i := 0; i < n; i++ {
				if !sh.dyn[i] {
					continue
				}
				for j := 0; j < nz; j++ {
					Qd[i*nz+j] = a*(cn[i*nz+j]-cs[i*nz+j]) - mem*Qd[i*nz+j]
				}
			}
			S, sSpare = newS, S
			for k, i := range sh.ports {
				pt := sh.nw.Ports[i]
				for j := 0; j < nz; j++ {
					var v float64
					if pt.Node >= 0 {
						v += S[pt.Node*nz+j]
					}
					if pt.Return >= 0 {
						v -= S[pt.Return*nz+j]
					}
					tr.dMean[k*nz+j] += v / float64(steps)
				}
			}
		}
		for i := 0; i < n; i++ {
			if sh.dyn[i] {
				qd[i] = a*(q[i]-qPrev[i]) - mem*qd[i]
			}
		}
		copy(qPrev, q)
		cPrev, cNow = cNow, cPrev
		copy(x, xn)
		for k, i := range sh.ports {
			tr.meanPort[k] += sh.sys.PortVoltage(i, x) / float64(steps)
		}
		if step < steps {
			record(x, t)
		}
	}
	tr.xN = x
	tr.sN = S
	return tr, nil
}

// solved tells whether an LU solve gave a usable solution. gonum reports an
// estimated condition number above 1e16 as an error, yet solves; a circuit's
// step matrix, whose rows mix the siemens of a junction in hard conduction
// with the nanosiemens of a bias resistor, estimates that high while
// partial pivoting solves it well, and the Newton iterations check the
// result anyway. Only an exactly singular matrix fails.
func solved(err error) bool {
	var c mat.Condition
	if errors.As(err, &c) {
		return !math.IsInf(float64(c), 0) && !math.IsNaN(float64(c))
	}
	return err == nil
}
