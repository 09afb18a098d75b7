package bias

import "time"

// Settings control Solve. The zero value is ready to use.
type Settings struct {
	// TemperatureK overrides the circuit's temperature when positive.
	TemperatureK float64
	// MaxIterations bounds each Newton run (plain Newton, and each step of
	// conductance or source stepping). Zero means 150.
	MaxIterations int
	// Start, when not nil, is a solution of the same circuit (at another
	// parameter value or temperature) to start Newton from: continuation.
	Start *Point
	// Strategies lists the strategies to try, in order. Empty means all:
	// Newton, then ConductanceStepping, then SourceStepping.
	Strategies []Strategy
}

// Strategy is a way of reaching the operating point.
type Strategy int

const (
	// Newton is Newton's method with junction-voltage limiting from the
	// starting point.
	Newton Strategy = iota
	// ConductanceStepping adds a conductance from every node to ground,
	// large enough that Newton converges, and steps it down to zero, each
	// solution starting the next.
	ConductanceStepping
	// SourceStepping ramps every independent source from zero to its
	// value, each solution starting the next.
	SourceStepping
)

// String names the strategy as reports print it.
func (s Strategy) String() string {
	switch s {
	case Newton:
		return "newton"
	case ConductanceStepping:
		return "conductance-stepping"
	case SourceStepping:
		return "source-stepping"
	}
	return "unknown"
}

// Stats describe how the operating point was reached.
type Stats struct {
	Strategy   Strategy // the strategy that converged
	Iterations int      // Newton iterations over every strategy tried
	// Residual is the largest KCL residual over all nodes in amperes, and
	// ResidualRatio the largest ratio of a node's residual to its
	// tolerance 1e-12 A + 1e-9 × (sum of current magnitudes at the node),
	// plus the rounding floor of those currents (16 ε g (|v_a| + |v_b|)
	// per part, which only milliohm parts at volts make noticeable);
	// converged points have a ratio at most 1.
	Residual      float64
	ResidualRatio float64
	// Attempts lists every strategy tried, in order, with its outcome.
	Attempts []Attempt
	Runtime  time.Duration
}

// Attempt is the outcome of one strategy.
type Attempt struct {
	Strategy   Strategy
	Iterations int
	Err        error // nil when it converged
}
