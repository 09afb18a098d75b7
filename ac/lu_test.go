package ac

import (
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// TestSolveTranspose: the adjoint solve satisfies Aᵀ z = b.
func TestSolveTranspose(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := 0; trial < 30; trial++ {
		n := 1 + rng.IntN(12)
		f := newLU(n)
		orig := make([]complex128, n*n)
		for i := range orig {
			orig[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		copy(f.a, orig)
		if f.factor() != nil {
			continue
		}
		b := make([]complex128, n)
		for i := range b {
			b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		z := append([]complex128(nil), b...)
		f.solveT(z)
		for i := 0; i < n; i++ {
			var s complex128
			for j := 0; j < n; j++ {
				s += orig[j*n+i] * z[j]
			}
			if cmplx.Abs(s-b[i]) > 1e-10*(1+cmplx.Abs(b[i])) {
				t.Fatalf("trial %d: (Aᵀ z)[%d] = %v, want %v", trial, i, s, b[i])
			}
		}
	}
}
