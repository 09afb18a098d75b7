package band

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestComplexSolveResidual factors random sparse complex systems, with
// zero diagonals that need row interchanges as MNA branch rows have, and
// checks the solution against the matrix itself: the residual A x - b is
// at the rounding level of A's entries times x (backward stability of
// Gaussian elimination with partial pivoting, Golub and Van Loan, 4th
// ed., 2013, sec. 3.4.6).
func TestComplexSolveResidual(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := 0; trial < 200; trial++ {
		n := 1 + rng.IntN(40)
		type entry struct {
			i, j int
			v    complex128
		}
		var entries []entry
		var edges [][2]int
		for i := 0; i < n; i++ {
			if rng.Float64() < 0.8 {
				entries = append(entries, entry{i, i, complex(rng.NormFloat64()*3, rng.NormFloat64())})
			}
		}
		for e := 0; e < 2*n; e++ {
			i, j := rng.IntN(n), rng.IntN(n)
			entries = append(entries, entry{i, j, complex(rng.NormFloat64(), rng.NormFloat64())})
			edges = append(edges, [2]int{i, j})
		}
		perm := Order(n, edges)
		kl, ku := Widths(perm, edges)
		m := NewComplex(perm, kl, ku)
		for _, e := range entries {
			m.Add(e.i, e.j, e.v)
		}
		b := make([]complex128, n)
		for i := range b {
			b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		// The real form [[Re, -Im], [Im, Re]] has the same condition.
		embed := mat.NewDense(2*n, 2*n, nil)
		for _, e := range entries {
			for _, q := range [][3]float64{{0, 0, real(e.v)}, {1, 1, real(e.v)}, {0, 1, -imag(e.v)}, {1, 0, imag(e.v)}} {
				i, j := e.i+int(q[0])*n, e.j+int(q[1])*n
				embed.Set(i, j, embed.At(i, j)+q[2])
			}
		}
		if err := m.Factor(); err != nil || mat.Cond(embed, 1) > 1e10 {
			continue // a singular draw says nothing about accuracy
		}
		x := append([]complex128(nil), b...)
		m.Solve(x)
		r := append([]complex128(nil), b...)
		scale := make([]float64, n)
		for _, e := range entries {
			r[e.i] -= e.v * x[e.j]
			scale[e.i] += cmplx.Abs(e.v) * cmplx.Abs(x[e.j])
		}
		for i := range r {
			if cmplx.Abs(r[i]) > 1e-11*(scale[i]+cmplx.Abs(b[i])) {
				t.Fatalf("trial %d n=%d: residual %g in row %d (scale %g)", trial, n, cmplx.Abs(r[i]), i, scale[i])
			}
		}
	}
}

// TestComplexMatchesReal: a real system solved as a complex one gives the
// real solver's answer.
func TestComplexMatchesReal(t *testing.T) {
	n := 30
	var edges [][2]int
	for i := 0; i+1 < n; i++ {
		edges = append(edges, [2]int{i, i + 1})
	}
	perm := Order(n, edges)
	kl, ku := Widths(perm, edges)
	r, c := New(perm, kl, ku), NewComplex(perm, kl, ku)
	for i := 0; i < n; i++ {
		r.Add(i, i, 2+float64(i%3))
		c.Add(i, i, complex(2+float64(i%3), 0))
		if i+1 < n {
			r.Add(i, i+1, -1)
			r.Add(i+1, i, -1)
			c.Add(i, i+1, -1)
			c.Add(i+1, i, -1)
		}
	}
	if err := r.Factor(); err != nil {
		t.Fatal(err)
	}
	if err := c.Factor(); err != nil {
		t.Fatal(err)
	}
	b, z := make([]float64, n), make([]complex128, n)
	for i := range b {
		b[i] = math.Sin(float64(i))
		z[i] = complex(b[i], 0)
	}
	r.Solve(b)
	c.Solve(z)
	for i := range b {
		if math.Abs(real(z[i])-b[i]) > 1e-14*(1+math.Abs(b[i])) || imag(z[i]) != 0 {
			t.Fatalf("x[%d]: complex %v, real %g", i, z[i], b[i])
		}
	}
}
