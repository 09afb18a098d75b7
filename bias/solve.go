package bias

import (
	"fmt"
	"strings"
	"time"

	"qpoint/bias/circuit"
)

// Failure is the error Solve returns when no strategy converged. It says
// what was tried and how each attempt ended.
type Failure struct {
	Circuit  string
	Attempts []Attempt
}

func (f *Failure) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s: no DC operating point found; tried", f.Circuit)
	for i, a := range f.Attempts {
		sep := ","
		if i == 0 {
			sep = ""
		}
		fmt.Fprintf(&b, "%s %s (%d iterations: %v)", sep, a.Strategy, a.Iterations, a.Err)
	}
	return b.String()
}

// Solve finds the DC operating point of c.
//
// It tries the strategies of s in order (by default Newton, conductance
// stepping, source stepping), each from the start point, and returns the
// first that converges with every aid removed. The returned point satisfies
// KCL at every node to 1e-12 A + 1e-9 × (sum of current magnitudes at the
// node) and has node voltages converged to 1e-9 relative, or, where the
// rounding of large currents keeps the updates from shrinking that far,
// until they stall below 1e-6 relative. When every strategy fails the
// error is a *Failure.
func Solve(c *circuit.Circuit, s Settings) (*Point, error) {
	begin := time.Now()
	tempK := c.TemperatureK
	if s.TemperatureK > 0 {
		tempK = s.TemperatureK
	}
	sys, err := newSystem(c, tempK)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", c.File, err)
	}
	maxIter := s.MaxIterations
	if maxIter <= 0 {
		maxIter = 150
	}
	strategies := s.Strategies
	if len(strategies) == 0 {
		strategies = []Strategy{Newton, ConductanceStepping, SourceStepping}
	}

	start := sys.newState()
	if s.Start != nil && s.Start.shape == sys.n {
		copy(start.x, s.Start.x)
		copy(start.vl, s.Start.vl)
	}
	st := sys.newState()
	w := sys.newScratch()
	var stats Stats
	for _, strategy := range strategies {
		st.copyFrom(start)
		var n int
		var err error
		switch strategy {
		case Newton:
			n, err = sys.newton(st, 1, 0, maxIter, w)
		case ConductanceStepping:
			n, err = sys.conductanceStepping(st, maxIter, w)
		case SourceStepping:
			n, err = sys.sourceStepping(st, maxIter, w)
		default:
			err = fmt.Errorf("unknown strategy %d", strategy)
		}
		stats.Iterations += n
		stats.Attempts = append(stats.Attempts, Attempt{strategy, n, err})
		if err != nil {
			continue
		}
		stats.Strategy = strategy
		stats.ResidualRatio, stats.Residual = sys.kclRatio(st.x, w)
		p := sys.point(st)
		stats.Runtime = time.Since(begin)
		p.Stats = stats
		return p, nil
	}
	return nil, &Failure{Circuit: c.File, Attempts: stats.Attempts}
}
