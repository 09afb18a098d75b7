package balance

import "time"

// Settings control a harmonic-balance solve. The zero value asks for the
// defaults.
type Settings struct {
	// Harmonics is the highest harmonic of one tone the solve starts
	// with; zero means 16. It grows (doubling) until the top quarter of
	// the harmonics of every node voltage lies below TruncationTolerance.
	Harmonics int
	// Order is the truncation order two tones start with; zero means 7.
	// It grows by four until the products of the highest order lie below
	// TruncationTolerance (or stop moving what is reported).
	Order int
	// Truncation chooses the two-tone products kept: Diamond (the
	// default) or Box.
	Truncation Truncation
	// Report is the highest harmonic (one tone) or order (two tones) the
	// result lists; zero means 5 (one tone) or 3 (two tones). It must not
	// exceed what the truncation holds.
	Report int
	// MaxHarmonics bounds the growth: zero means 2048 harmonics for one
	// tone, order 23 for two.
	MaxHarmonics int
	// FixedHarmonics keeps Harmonics (or Order) as given: no growth and no
	// truncation check. For benchmarks and tests of the truncation itself.
	FixedHarmonics bool
	// Oversample sets the time grid: at least Oversample·(2·A + 1)
	// samples for a highest artificial frequency A, rounded up to a power
	// of two; zero means 2. The solve checks its result on a grid twice
	// as fine and refines it there if it does not hold.
	Oversample int
	// TruncationTolerance is the size, relative to the largest signal
	// phasor of any node voltage, below which the top products must lie;
	// zero means 1e-10.
	TruncationTolerance float64
	// MaxIterations bounds the Newton iterations of one continuation
	// step; zero means 30.
	MaxIterations int
	// Linear chooses the Newton step's linear solver: Automatic (the
	// default: a dense direct solve for small problems, else GMRES),
	// Krylov or Direct.
	Linear LinearSolver
	// Timeout bounds the whole solve; zero means none. A solve that runs
	// out of time fails with how far it got.
	Timeout time.Duration
	// Start, when not nil, is a solution of the same circuit and tones at
	// a nearby level: the solve continues from it instead of from the DC
	// point.
	Start *Result
	// Generators adds, for one tone, further sinusoidal generators at
	// harmonics of the drive's frequency, each behind its port's
	// reference impedance (generators.go): a local oscillator and a
	// signal at commensurate frequencies solved as one periodic steady
	// state.
	Generators []Generator
}

// LinearSolver chooses how each Newton step is solved.
type LinearSolver int

const (
	// Automatic takes the direct solve while the real Jacobian has at
	// most directLimit rows, GMRES above.
	Automatic LinearSolver = iota
	// Krylov is GMRES with the block preconditioner.
	Krylov
	// Direct is a dense LU of the whole Jacobian.
	Direct
)

func (l LinearSolver) String() string {
	switch l {
	case Krylov:
		return "gmres"
	case Direct:
		return "direct"
	}
	return "automatic"
}

// directLimit is the largest real Jacobian (rows) the automatic choice
// solves by dense LU: 600 rows factor in a few milliseconds.
const directLimit = 600

// maxUnknowns bounds the complex unknowns (products times network
// unknowns) of one solve, so that a request far beyond what memory holds
// fails at once.
const maxUnknowns = 2_000_000

func (s Settings) withDefaults() Settings {
	if s.Harmonics == 0 {
		s.Harmonics = 16
	}
	if s.Order == 0 {
		s.Order = 7
	}
	if s.Oversample == 0 {
		s.Oversample = 2
	}
	if s.TruncationTolerance == 0 {
		s.TruncationTolerance = 1e-10
	}
	if s.MaxIterations == 0 {
		s.MaxIterations = 30
	}
	return s
}
