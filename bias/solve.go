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
	// JunctionOnly lists the nodes whose every DC connection is a diode
	// terminal. Between reverse-biased junctions such a node is held only
	// by leakage currents e^(-|v|/nV_T) below I_S, and with series
	// resistances beside them those balances fall below the rounding of
	// the resistances' currents: float64 cannot place the node.
	JunctionOnly []string
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
	if n := len(f.JunctionOnly); n > 0 {
		list := f.JunctionOnly
		if n > 8 {
			list = list[:8]
		}
		subject, verb, its := "node", "connects", "its voltage rests"
		if n > 1 {
			subject, verb, its = "nodes", "connect", "their voltages rest"
		}
		fmt.Fprintf(&b, "; %s %s %s only to junctions: where those are reverse biased %s on leakage balances below the rounding of the currents beside them, which float64 cannot resolve; add a resistance that sets each (1 GΩ to gnd or a neighbour changes the currents by no more than the node's voltage over 1 GΩ)",
			subject, strings.Join(quoteAll(list), ", "), verb, its)
		if n > 8 {
			fmt.Fprintf(&b, " (and %d more)", n-8)
		}
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
// until they stall below 1e-6 relative. A strategy's point counts only
// when the values it reports pass an independent check of KCL (verify);
// a point that converged but fails it is recorded as that attempt's
// error. When every strategy fails the error is a *Failure.
func Solve(c *circuit.Circuit, s Settings) (*Point, error) {
	return new(Workspace).Solve(c, s)
}

// Workspace keeps Solve's storage from one call to the next: the modified
// nodal system, its band ordering and matrix, the Newton iterates and work
// vectors, the diode devices and the returned Point. Solving a sequence of
// related circuits in one workspace, as a study does when it steps a part
// value, a model parameter or the temperature, allocates little after the
// first call. The band ordering is computed again only when the matrix's
// structure changes (a diode's series resistance becoming zero or non-zero
// adds or removes an unknown), and a diode model's device only when its
// parameters or the temperature change. The results are those of Solve.
//
// The zero value is ready to use. A Workspace is not safe for concurrent
// use: give each goroutine its own.
type Workspace struct {
	sys          system
	start, state state
	scratch      scratch
	attempts     []Attempt
	point        *Point
}

// Solve is the package's Solve in the workspace's storage. The Point it
// returns, but for its Warnings, is overwritten by the workspace's next
// successful Solve: pass it as that call's Settings.Start to continue from
// it, and copy whatever must outlive that call. An error is the caller's
// to keep.
func (ws *Workspace) Solve(c *circuit.Circuit, s Settings) (*Point, error) {
	begin := time.Now()
	tempK := c.TemperatureK
	if s.TemperatureK > 0 {
		tempK = s.TemperatureK
	}
	sys := &ws.sys
	if err := sys.build(c, tempK); err != nil {
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

	start, st, w := &ws.start, &ws.state, &ws.scratch
	start.reset(sys)
	if s.Start != nil && s.Start.shape == sys.n {
		copy(start.x, s.Start.x)
		copy(start.vl, s.Start.vl)
	}
	st.reset(sys)
	w.reset(sys)
	var stats Stats
	stats.Attempts = ws.attempts[:0]
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
		if ws.point == nil {
			ws.point = new(Point)
		}
		p := ws.point
		// The point takes the attempts' storage, the workspace the
		// point's old list for the next call.
		old := p.Stats.Attempts[:0]
		sys.point(st, p)
		// Converged on its own terms is not enough: the point as
		// reported must pass an independent check of KCL.
		if err := sys.verify(p); err != nil {
			stats.Attempts[len(stats.Attempts)-1].Err = err
			continue
		}
		stats.Strategy = strategy
		stats.ResidualRatio, stats.Residual = sys.kclRatio(st.x, w)
		ws.attempts = old
		stats.Runtime = time.Since(begin)
		p.Stats = stats
		return p, nil
	}
	ws.attempts = nil // the error keeps the list
	return nil, &Failure{Circuit: c.File, Attempts: stats.Attempts, JunctionOnly: junctionOnly(c)}
}

// junctionOnly returns the named nodes whose every DC connection is a
// diode terminal.
func junctionOnly(c *circuit.Circuit) []string {
	other := map[string]bool{}
	touched := map[string]bool{}
	for _, p := range c.Parts {
		for _, n := range p.Nodes {
			touched[n] = true
			if p.Kind != circuit.Diode && p.Kind != circuit.Capacitor {
				other[n] = true
			}
		}
	}
	for _, p := range c.Ports {
		if !p.ACCoupled {
			other[p.Node] = true
			other[p.Return] = true
		}
	}
	for _, d := range c.Distributed {
		for _, n := range d.Nodes() {
			other[n] = true
		}
	}
	var nodes []string
	for _, n := range c.Nodes {
		if touched[n] && !other[n] {
			nodes = append(nodes, n)
		}
	}
	return nodes
}

func quoteAll(s []string) []string {
	q := make([]string, len(s))
	for i, x := range s {
		q[i] = "`" + x + "`"
	}
	return q
}
