package ac

import (
	"errors"
	"math"
)

// errSingular reports a singular network matrix at some frequency.
var errSingular = errors.New("the network matrix is singular")

// lu is a dense complex LU factorisation with partial pivoting, row-major,
// reused across frequencies (Golub and Van Loan, "Matrix Computations",
// 4th ed., 2013, algorithm 3.4.1).
type lu struct {
	n   int
	a   []complex128
	piv []int
	inv []complex128 // 1/U[k][k]: solves multiply, as complex division is slow
}

func newLU(n int) *lu {
	return &lu{n: n, a: make([]complex128, n*n), piv: make([]int, n), inv: make([]complex128, n)}
}

// factor factors the matrix held in f.a in place.
func (f *lu) factor() error {
	n, a := f.n, f.a
	for k := 0; k < n; k++ {
		// Pivot on |re| + |im|, as LAPACK's izamax does: as good a size
		// measure for pivoting as the modulus, without a square root.
		p, big := k, cabs1(a[k*n+k])
		for i := k + 1; i < n; i++ {
			if v := cabs1(a[i*n+k]); v > big {
				p, big = i, v
			}
		}
		f.piv[k] = p
		if big == 0 {
			return errSingular
		}
		if p != k {
			rk, rp := a[k*n:(k+1)*n], a[p*n:(p+1)*n]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
		}
		inv := 1 / a[k*n+k]
		f.inv[k] = inv
		rowK := a[k*n : (k+1)*n]
		for i := k + 1; i < n; i++ {
			rowI := a[i*n : (i+1)*n]
			l := rowI[k] * inv
			rowI[k] = l
			if l == 0 {
				continue
			}
			for j := k + 1; j < n; j++ {
				rowI[j] -= l * rowK[j]
			}
		}
	}
	return nil
}

func cabs1(z complex128) float64 { return math.Abs(real(z)) + math.Abs(imag(z)) }

// solve overwrites b with the solution of A x = b.
func (f *lu) solve(b []complex128) {
	n, a := f.n, f.a
	for k := 0; k < n; k++ {
		if p := f.piv[k]; p != k {
			b[k], b[p] = b[p], b[k]
		}
	}
	for i := 1; i < n; i++ {
		row := a[i*n : i*n+i]
		s := b[i]
		for j, l := range row {
			s -= l * b[j]
		}
		b[i] = s
	}
	for i := n - 1; i >= 0; i-- {
		row := a[i*n : (i+1)*n]
		s := b[i]
		for j := i + 1; j < n; j++ {
			s -= row[j] * b[j]
		}
		b[i] = s * f.inv[i]
	}
}

// solveT overwrites b with the solution of Aᵀ z = b (plain transpose, not
// conjugate), the adjoint solve that gives every source's transfer to one
// output at once.
func (f *lu) solveT(b []complex128) {
	n, a := f.n, f.a
	// A = Pᵀ L U, so Aᵀ = Uᵀ Lᵀ P: solve Uᵀ w = b, Lᵀ y = w, z = Pᵀ y.
	for i := 0; i < n; i++ {
		s := b[i]
		for j := 0; j < i; j++ {
			s -= a[j*n+i] * b[j]
		}
		b[i] = s * f.inv[i]
	}
	for i := n - 1; i >= 0; i-- {
		s := b[i]
		for j := i + 1; j < n; j++ {
			s -= a[j*n+i] * b[j]
		}
		b[i] = s
	}
	for k := n - 1; k >= 0; k-- {
		if p := f.piv[k]; p != k {
			b[k], b[p] = b[p], b[k]
		}
	}
}

// load fills the factorisation's matrix with G + jwC (row-major raw data of
// two n×n matrices).
func (f *lu) load(g, c []float64, gs, cs int, w float64) {
	n := f.n
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			f.a[i*n+j] = complex(g[i*gs+j], w*c[i*cs+j])
		}
	}
}

// loadReal fills the factorisation's matrix with the real matrix g
// (row-major raw data of an n×n matrix of stride gs): Y(0) = G.
func (f *lu) loadReal(g []float64, gs int) {
	n := f.n
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			f.a[i*n+j] = complex(g[i*gs+j], 0)
		}
	}
}
