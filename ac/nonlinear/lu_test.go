package nonlinear

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestFactorSmall solves random systems, some with zero entries as a
// circuit's are, and compares with gonum's dense LU (a general-purpose
// library) to 1e-12 relative.
func TestFactorSmall(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for _, n := range []int{1, 2, 3, 5, 8, 13, 24} {
		for trial := 0; trial < 20; trial++ {
			a := make([]float64, n*n)
			for i := range a {
				if rng.Float64() < 0.4 {
					a[i] = rng.NormFloat64() * math.Pow(10, 6*rng.Float64()-3)
				}
			}
			for i := 0; i < n; i++ {
				a[i*n+i] += 1e-3 * (1 + rng.Float64())
			}
			const cols = 3
			b := make([]float64, n*cols)
			for i := range b {
				b[i] = rng.NormFloat64()
			}
			var lu mat.LU
			lu.Factorize(mat.NewDense(n, n, append([]float64(nil), a...)))
			var want mat.Dense
			if err := lu.SolveTo(&want, false, mat.NewDense(n, cols, append([]float64(nil), b...))); err != nil {
				continue // too ill-conditioned to compare
			}
			ipiv := make([]int, n)
			if !factorSmall(a, n, ipiv) {
				t.Fatalf("n = %d: zero pivot", n)
			}
			solveSmall(a, n, ipiv, b, cols, cols)
			for i := 0; i < n; i++ {
				for c := 0; c < cols; c++ {
					w := want.At(i, c)
					if math.Abs(b[i*cols+c]-w) > 1e-9*(math.Abs(w)+1) {
						t.Errorf("n = %d: x[%d][%d] = %.15g, gonum's LU gives %.15g", n, i, c, b[i*cols+c], w)
					}
				}
			}
		}
	}
}
