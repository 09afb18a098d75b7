package band

import (
	"errors"
	"fmt"
	"math"
)

// ErrSingular is returned when elimination meets a zero pivot column.
var ErrSingular = errors.New("band: matrix is singular")

// Matrix is a square matrix with lower bandwidth KL and upper bandwidth KU
// in a permuted order, addressed by the original (unpermuted) indices. It
// holds room for the fill that row interchanges bring (KL more diagonals
// above), so it can be factored in place.
type Matrix struct {
	n, kl, ku int
	w         int   // stored width of a row: 2 kl + ku + 1
	pos       []int // pos[original index] = permuted index
	perm      []int // perm[permuted index] = original index
	a         []float64
	piv       []int
	factored  bool
	work      []float64
}

// New returns a zero matrix of order n with the given permutation and
// bandwidths (as from Order and Widths).
func New(perm []int, kl, ku int) *Matrix {
	n := len(perm)
	m := &Matrix{n: n, kl: kl, ku: ku, w: 2*kl + ku + 1, perm: perm}
	m.pos = make([]int, n)
	for k, u := range perm {
		m.pos[u] = k
	}
	m.a = make([]float64, n*m.w)
	m.piv = make([]int, n)
	m.work = make([]float64, n)
	return m
}

// N returns the order of the matrix.
func (m *Matrix) N() int { return m.n }

// Zero clears every entry, ready for a new assembly.
func (m *Matrix) Zero() {
	clear(m.a)
	m.factored = false
}

// at returns the storage index of permuted entry (i, j).
func (m *Matrix) at(i, j int) int { return i*m.w + j - i + m.kl }

// Add adds v to entry (i, j), in original indices. It panics when the entry
// lies outside the band: that is a bug in the caller's structure.
func (m *Matrix) Add(i, j int, v float64) {
	pi, pj := m.pos[i], m.pos[j]
	if pj-pi > m.ku || pi-pj > m.kl {
		panic(fmt.Sprintf("band: entry (%d, %d) outside the band", i, j))
	}
	m.a[m.at(pi, pj)] += v
}

// Factor computes the LU factorisation with partial pivoting in place.
// It returns ErrSingular when a column has no nonzero pivot.
func (m *Matrix) Factor() error {
	n, kl := m.n, m.kl
	uw := m.kl + m.ku // upper width of U after interchanges
	for k := 0; k < n; k++ {
		last := min(n-1, k+kl)
		p, big := k, math.Abs(m.a[m.at(k, k)])
		for i := k + 1; i <= last; i++ {
			if v := math.Abs(m.a[m.at(i, k)]); v > big {
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
		pivot := m.a[m.at(k, k)]
		for i := k + 1; i <= last; i++ {
			ik := m.at(i, k)
			l := m.a[ik] / pivot
			m.a[ik] = l // the multiplier is kept where the zero would be
			if l == 0 {
				continue
			}
			rowI := m.at(i, 0)
			rowK := m.at(k, 0)
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
func (m *Matrix) Solve(b []float64) {
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

// PivotRatio returns the smallest over the largest absolute pivot of the
// last factorisation, a cheap indicator of near-singularity.
func (m *Matrix) PivotRatio() float64 {
	lo, hi := math.Inf(1), 0.0
	for k := 0; k < m.n; k++ {
		v := math.Abs(m.a[m.at(k, k)])
		lo = math.Min(lo, v)
		hi = math.Max(hi, v)
	}
	if hi == 0 {
		return 0
	}
	return lo / hi
}
