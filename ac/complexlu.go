package ac

// ComplexLU is the dense complex LU factorisation with partial pivoting
// the sweeps use (Golub and Van Loan, "Matrix Computations", 4th ed.,
// 2013, algorithm 3.4.1), for other packages' dense complex systems: fill
// Matrix, Factor, then Solve or SolveT as often as needed.
type ComplexLU struct{ f *lu }

// NewComplexLU returns a factorisation for n×n matrices.
func NewComplexLU(n int) *ComplexLU { return &ComplexLU{newLU(n)} }

// Matrix returns the row-major n×n storage to fill before Factor; Factor
// overwrites it with the factors.
func (c *ComplexLU) Matrix() []complex128 { return c.f.a }

// Factor factors the matrix in place; it fails on a zero pivot.
func (c *ComplexLU) Factor() error { return c.f.factor() }

// Solve overwrites b with the solution of A x = b.
func (c *ComplexLU) Solve(b []complex128) { c.f.solve(b) }

// SolveT overwrites b with the solution of Aᵀ z = b (the plain
// transpose).
func (c *ComplexLU) SolveT(b []complex128) { c.f.solveT(b) }
