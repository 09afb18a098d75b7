package bias

import (
	"errors"
	"fmt"
	"math"
)

// Convergence tolerances. Our circuits are small, so the solution is driven
// to near machine precision: loose tolerances buy nothing.
const (
	relTol      = 1e-9  // relative change of a node voltage or branch current
	voltAbsTol  = 1e-12 // V
	currAbsTol  = 1e-15 // A, branch currents
	kclAbsTol   = 1e-12 // A
	kclRelTol   = 1e-9  // of the sum of current magnitudes at the node
	branchTol   = 1e-9  // relative voltage error on source branches
	stepRelTol  = 1e-7  // intermediate steps of a homotopy need less
	stallTol    = 1e-6  // relative update accepted when rounding stalls Newton and KCL holds
	maxVoltStep = 1e6   // V: an iterate beyond this has diverged
)

var (
	errSingular   = errors.New("the Jacobian is singular")
	errDiverged   = errors.New("the iterate diverged")
	errIterations = errors.New("iteration limit reached")
)

// state is one Newton iterate: the unknowns and the junction voltages the
// device laws were last linearised at.
type state struct {
	x  []float64
	vl []float64
}

// reset sizes st for s, keeping its storage where it is large enough, and
// sets it to zero.
func (st *state) reset(s *system) {
	st.x = resize(st.x, s.n)
	st.vl = resize(st.vl, len(s.junctions))
}

func (st *state) copyFrom(o *state) {
	copy(st.x, o.x)
	copy(st.vl, o.vl)
}

// scratch holds work vectors reused across iterations.
type scratch struct {
	b, junction, r, scale, floor []float64
	save                         []float64 // an iterate kept while refine tries a step
	good                         state     // the last iterate a homotopy reached, sized when one runs
}

// reset sizes w for s, keeping its storage where it is large enough.
func (w *scratch) reset(s *system) {
	w.b = resize(w.b, s.n)
	w.junction = resize(w.junction, len(s.junctions))
	w.r = resize(w.r, s.n)
	w.scale = resize(w.scale, s.n)
	w.floor = resize(w.floor, s.n)
	w.save = resize(w.save, s.n)
}

// resize returns a zero vector of length n, in v's storage when it has
// room.
func resize(v []float64, n int) []float64 {
	if cap(v) < n {
		return make([]float64, n)
	}
	v = v[:n]
	clear(v)
	return v
}

// newton iterates from st with sources scaled by lambda and a conductance
// gmin from every node to ground. With lambda = 1 and gmin = 0 it stops only
// when the update is below relTol and the KCL residual of the circuit as
// described is within tolerance; for an aided system the update alone must
// be below stepRelTol. It returns the iterations used.
func (s *system) newton(st *state, lambda, gmin float64, maxIter int, w *scratch) (int, error) {
	final := lambda == 1 && gmin == 0
	rel := relTol
	if !final {
		rel = stepRelTol
	}
	prevWorst := math.Inf(1)
	for it := 1; it <= maxIter; it++ {
		s.junctionVoltages(st.x, w.junction)
		limited := false
		for k, j := range s.junctions {
			v, lim := j.dev.Limit(w.junction[k], st.vl[k])
			st.vl[k] = v
			limited = limited || lim
		}
		s.assemble(st.vl, lambda, gmin, w.b)
		if err := s.mat.Factor(); err != nil {
			return it, errSingular
		}
		s.mat.Solve(w.b)
		small := true
		worst := 0.0 // the largest update over its tolerance
		for i, xn := range w.b {
			if math.IsNaN(xn) || math.IsInf(xn, 0) || (i < s.nNodes && math.Abs(xn) > maxVoltStep) {
				return it, errDiverged
			}
			tol := rel * math.Abs(xn)
			if i < s.nNodes {
				tol += voltAbsTol
			} else {
				tol += currAbsTol
			}
			if d := math.Abs(xn - st.x[i]); d > tol {
				small = false
				worst = math.Max(worst, d/tol)
			}
		}
		copy(st.x, w.b)
		if limited {
			prevWorst = math.Inf(1)
			continue
		}
		if !small {
			// Rounding can keep the updates from shrinking below relTol:
			// a node held only by microsiemens beside a branch of
			// kiloamperes moves by that branch's rounding, divided by its
			// own small conductance. Once the updates stall below
			// stallTol and KCL holds, the iterate is as good as float64
			// allows.
			//
			// A node held only by the picosiemens of junctions beside
			// the siemens of a series resistance stalls far above
			// stallTol: its voltage moves by the resistance's rounding
			// over the junctions' conductance. Such an iterate is as
			// good as float64 allows when every node balances to the
			// rounding floor and 1e-9 of its currents alone, without
			// the absolute 1e-12 A that would let a leakage node sit
			// anywhere.
			stalled := final && worst > prevWorst/4 && (worst <= stallTol/relTol || s.roundingLimited(st.x, w))
			prevWorst = worst
			if !stalled {
				continue
			}
			if ratio, _ := s.kclRatio(st.x, w); ratio > 1 && !s.refine(st.x, w) {
				continue
			}
			return it, nil
		}
		if !final {
			return it, nil
		}
		if ratio, _ := s.kclRatio(st.x, w); ratio <= 1 || s.refine(st.x, w) {
			return it, nil
		}
	}
	return maxIter, errIterations
}

// refine takes one step of iterative refinement from x, which Newton has
// converged to: it solves J d = r with the factors of the last Newton
// matrix, r the residual of the circuit as described at x, and keeps x - d
// if that meets the KCL tolerance. Elimination with partial pivoting bounds
// each row's residual only by the largest entries of the whole matrix, so
// a node of microamperes beside a branch of amperes can miss its own
// tolerance by their rounding; one step of refinement in the same
// precision bounds each row's residual by that row's own entries (Skeel,
// "Iterative refinement implies numerical stability for Gaussian
// elimination", Math. Comp. 35(151), 1980). It reports whether x was
// replaced.
func (s *system) refine(x []float64, w *scratch) bool {
	copy(w.save, x)
	s.residual(x, w.r, w.scale, w.floor)
	copy(w.b, w.r)
	s.mat.Solve(w.b)
	for i := range x {
		x[i] -= w.b[i]
	}
	if ratio, _ := s.kclRatio(x, w); ratio <= 1 {
		return true
	}
	copy(x, w.save)
	return false
}

// kclRatio returns the largest ratio of residual to tolerance over all rows
// at x, and the largest node residual in amperes. A node's tolerance is
// 1e-12 A + 1e-9 × (sum of current magnitudes at the node), raised to the
// rounding floor of its currents where that is larger.
func (s *system) kclRatio(x []float64, w *scratch) (ratio, worst float64) {
	s.residual(x, w.r, w.scale, w.floor)
	for i := range w.r {
		var tol float64
		if i < s.nNodes {
			tol = kclAbsTol + kclRelTol*w.scale[i] + w.floor[i]
			worst = math.Max(worst, math.Abs(w.r[i]))
		} else {
			tol = branchTol*w.scale[i] + voltAbsTol
		}
		ratio = math.Max(ratio, math.Abs(w.r[i])/tol)
	}
	return ratio, worst
}

// roundingLimited reports whether every node's residual at x is within
// 1e-9 of the current magnitudes there plus the rounding floor of its
// currents, with no absolute allowance.
func (s *system) roundingLimited(x []float64, w *scratch) bool {
	s.residual(x, w.r, w.scale, w.floor)
	for i := 0; i < s.nNodes; i++ {
		if !(math.Abs(w.r[i]) <= kclRelTol*w.scale[i]+w.floor[i]) {
			return false
		}
	}
	return true
}

// conductanceStepping solves with a large gmin and steps it down to zero,
// shrinking the step when a solve fails.
func (s *system) conductanceStepping(st *state, maxIter int, w *scratch) (int, error) {
	total := 0
	gmin, factor := 1e-2, 10.0
	good := &w.good
	good.reset(s)
	// First find a solution at the largest gmin, from the given start.
	n, err := s.newton(st, 1, gmin, maxIter, w)
	total += n
	if err != nil {
		return total, fmt.Errorf("no solution even with %g S from every node to ground: %w", gmin, err)
	}
	good.copyFrom(st)
	for gmin > 0 {
		next := gmin / factor
		if next < 1e-14 {
			next = 0
		}
		n, err := s.newton(st, 1, next, maxIter, w)
		total += n
		if err == nil {
			good.copyFrom(st)
			gmin = next
			factor = math.Min(factor*2, 100)
			continue
		}
		st.copyFrom(good)
		factor = math.Sqrt(factor)
		if factor < 1.05 {
			return total, fmt.Errorf("stalled at %g S from every node to ground: %w", gmin, err)
		}
	}
	return total, nil
}

// sourceStepping ramps every source from zero, where the solution is all
// zeros, to full value.
func (s *system) sourceStepping(st *state, maxIter int, w *scratch) (int, error) {
	total := 0
	clear(st.x)
	clear(st.vl)
	good := &w.good
	good.reset(s) // zero, as st
	lambda, step := 0.0, 0.05
	for lambda < 1 {
		next := math.Min(1, lambda+step)
		n, err := s.newton(st, next, 0, maxIter, w)
		total += n
		if err == nil {
			good.copyFrom(st)
			lambda = next
			step = math.Min(step*2, 0.25)
			continue
		}
		st.copyFrom(good)
		step /= 4
		if step < 1e-7 {
			return total, fmt.Errorf("stalled with sources at %.3g%% of their values: %w", 100*lambda, err)
		}
	}
	// The last step ran at stepRelTol; finish at full precision.
	n, err := s.newton(st, 1, 0, maxIter, w)
	return total + n, err
}
