package band

import (
	"fmt"
	"math/cmplx"
)

// Complex is the complex counterpart of Matrix: a square complex matrix
// of order n with lower bandwidth KL and upper bandwidth KU in a permuted
// order, addressed by the original indices, with room for the fill of
// row interchanges. It factors the admittance matrices Y(jw) of a sparse
// network at one frequency each, as harmonic balance needs them.
type Complex struct {
	n, kl, ku int
	w         int
	pos       []int
	perm      []int
	a         []complex128
	piv       []int
	factored  bool
	work      []complex128
}

// NewComplex returns a zero complex matrix of order n with the given
// permutation and bandwidths (as from Order and Widths).
func NewComplex(perm []int, kl, ku int) *Complex {
	n := len(perm)
	m := &Complex{n: n, kl: kl, ku: ku, w: 2*kl + ku + 1, perm: perm}
	m.pos = make([]int, n)
	for k, u := range perm {
		m.pos[u] = k
	}
	m.a = make([]complex128, n*m.w)
	m.piv = make([]int, n)
	m.work = make([]complex128, n)
	return m
}

// N returns the order of the matrix.
func (m *Complex) N() int { return m.n }

// Zero clears every entry, ready for a new assembly.
func (m *Complex) Zero() {
	clear(m.a)
	m.factored = false
}

func (m *Complex) at(i, j int) int { return i*m.w + j - i + m.kl }

// Add adds v to entry (i, j), in original indices. It panics when the
// entry lies outside the band: that is a bug in the caller's structure.
func (m *Complex) Add(i, j int, v complex128) {
	pi, pj := m.pos[i], m.pos[j]
	if pj-pi > m.ku || pi-pj > m.kl {
		panic(fmt.Sprintf("band: entry (%d, %d) outside the band", i, j))
	}
	m.a[m.at(pi, pj)] += v
}

// Factor computes the LU factorisation with partial pivoting (on |a|) in
// place, as Matrix.Factor does. It returns ErrSingular when a column has
// no nonzero pivot.
func (m *Complex) Factor() error {
	n, kl := m.n, m.kl
	uw := m.kl + m.ku
	for k := 0; k < n; k++ {
		last := min(n-1, k+kl)
		p, big := k, cmplx.Abs(m.a[m.at(k, k)])
		for i := k + 1; i <= last; i++ {
			if v := cmplx.Abs(m.a[m.at(i, k)]); v > big {
				p, big = i, v
			}
		}
		m.piv[k] = p
		if big == 0 {
			return ErrSingular
		}
		right := min(n-1, k+uw)
		if p != k {
			for j := k; j <= right; j++ {
				ik, ip := m.at(k, j), m.at(p, j)
				m.a[ik], m.a[ip] = m.a[ip], m.a[ik]
			}
		}
		inv := 1 / m.a[m.at(k, k)]
		rowK := m.at(k, 0)
		for i := k + 1; i <= last; i++ {
			ik := m.at(i, k)
			l := m.a[ik] * inv
			m.a[ik] = l
			if l == 0 {
				continue
			}
			rowI := m.at(i, 0)
			for j := k + 1; j <= right; j++ {
				m.a[rowI+j] -= l * m.a[rowK+j]
			}
		}
	}
	m.factored = true
	return nil
}

// Solve overwrites b (in original indices) with the solution of A x = b.
// Factor must have succeeded.
func (m *Complex) Solve(b []complex128) {
	if !m.factored {
		panic("band: Solve before Factor")
	}
	n, kl := m.n, m.kl
	uw := m.kl + m.ku
	x := m.work
	for k, u := range m.perm {
		x[k] = b[u]
	}
	for k := 0; k < n; k++ {
		if p := m.piv[k]; p != k {
			x[k], x[p] = x[p], x[k]
		}
		last := min(n-1, k+kl)
		for i := k + 1; i <= last; i++ {
			x[i] -= m.a[m.at(i, k)] * x[k]
		}
	}
	for k := n - 1; k >= 0; k-- {
		right := min(n-1, k+uw)
		row := m.at(k, 0)
		s := x[k]
		for j := k + 1; j <= right; j++ {
			s -= m.a[row+j] * x[j]
		}
		x[k] = s / m.a[row+k]
	}
	for k, u := range m.perm {
		b[u] = x[k]
	}
}
