package ac

import (
	"fmt"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"
)

// quasi is the shifted form carried on to the real Schur form of Hm
// (gonum lapack Dhseqr): Hm = Zs S Zsᵀ with Zs orthogonal and S upper
// quasi-triangular, 1×1 diagonal blocks for real eigenvalues and 2×2 for
// complex pairs. Then H + jwT = I + μS in the coordinates of U Zs, and the
// matrix solved at each frequency, S - νI, is triangular but for its 2×2
// blocks: a point needs no elimination, only a back substitution (and a
// forward one for the adjoint), and S being real, each of those is two
// real dot products or axpys per row on the parts of the vector (gonum's
// Ddot and Daxpy). That halves a point's cost against the Hessenberg
// elimination; the Schur form costs about three times the Hessenberg
// reduction, so it is taken for long sweeps only (schurPointsPerUnknown).
type quasi struct {
	n    int
	s    []float64    // S, n×n row-major, zero below the 2×2 blocks
	size []int        // size of the diagonal block starting at row i: 1 or 2; 0 inside a 2×2 block
	inv  []complex128 // per 1×1 block at row i: 1/(S_ii - ν)
	inv2 []complex128 // per 2×2 block B at row i: (B - νI)⁻¹ at inv2[4i : 4i+4], row by row
	re   []float64    // parts of the vector being solved
	im   []float64
	yr   []float64 // and of products with S
	yi   []float64
}

// schurSetup turns the shifted reduction r (U by its reflectors in m, Hm
// in t) into the Schur form: U formed explicitly (Dorghr), then
// Hm = Zs S Zsᵀ with U Zs accumulated (Dhseqr), and the basis's R and L
// now by the explicit U Zs. It fails if the QR iteration does not
// converge.
func schurSetup(r *reduction, m, tau []float64) error {
	n := r.n
	var impl gonum.Implementation
	work := make([]float64, 1)
	impl.Dorghr(n, 0, n-1, m, n, tau, work, -1)
	need := int(work[0])
	h := make([]float64, n*n)
	for i := 0; i < n; i++ {
		for j := max(i-1, 0); j < n; j++ {
			h[i*n+j] = r.t[i*n+j]
		}
	}
	wr, wi := make([]float64, n), make([]float64, n)
	impl.Dhseqr(lapack.EigenvaluesAndSchur, lapack.SchurOrig, n, 0, n-1, h, n, wr, wi, m, n, work, -1)
	need = max(need, int(work[0]), n)
	work = make([]float64, need)
	impl.Dorghr(n, 0, n-1, m, n, tau, work, need)
	if unconverged := impl.Dhseqr(lapack.EigenvaluesAndSchur, lapack.SchurOrig, n, 0, n-1, h, n, wr, wi, m, n, work, need); unconverged > 0 {
		return fmt.Errorf("reduction: the Schur form did not converge (%d eigenvalues left): %w", unconverged, errReduction)
	}
	q := &quasi{n: n, s: h, size: make([]int, n), inv: make([]complex128, n), inv2: make([]complex128, 4*n),
		re: make([]float64, n), im: make([]float64, n), yr: make([]float64, n), yi: make([]float64, n)}
	for i := 0; i < n; i++ {
		for j := 0; j < i-1; j++ {
			h[i*n+j] = 0
		}
	}
	for i := 0; i < n; {
		if i+1 < n && h[(i+1)*n+i] != 0 {
			q.size[i], q.size[i+1] = 2, 0
			i += 2
			continue
		}
		if i > 0 && q.size[i-1] != 2 {
			h[i*n+i-1] = 0
		}
		q.size[i] = 1
		i++
	}
	sb := r.basis.(*shiftedBasis)
	sb.z = m
	sb.tmp = make([]float64, n)
	r.quasi = q
	r.form = formSchur
	// H + jwT = I + (jw - σ) S: H = I - σS, T = S.
	copy(r.t, h)
	for i, v := range h {
		r.h[i] = -r.shift * v
	}
	for i := 0; i < n; i++ {
		r.h[i*n+i]++
	}
	return nil
}

// factor prepares S - νI, ν = -1/μ: the inverses of its diagonal blocks.
func (q *quasi) factor(nu complex128) error {
	n, s := q.n, q.s
	for i := 0; i < n; i++ {
		switch q.size[i] {
		case 1:
			inv, ok := reciprocal(complex(s[i*n+i], 0) - nu)
			if !ok {
				return errSingular
			}
			q.inv[i] = inv
		case 2:
			a, b := complex(s[i*n+i], 0)-nu, complex(s[i*n+i+1], 0)
			c, d := complex(s[(i+1)*n+i], 0), complex(s[(i+1)*n+i+1], 0)-nu
			rdet, ok := reciprocal(a*d - b*c)
			if !ok {
				return errSingular
			}
			q.inv2[4*i], q.inv2[4*i+1] = d*rdet, -b*rdet
			q.inv2[4*i+2], q.inv2[4*i+3] = -c*rdet, a*rdet
		}
	}
	return nil
}

// load and store move a complex vector into and out of the parts.
func (q *quasi) load(x []complex128) {
	for i, v := range x[:q.n] {
		q.re[i], q.im[i] = real(v), imag(v)
	}
}

func (q *quasi) store(x []complex128) {
	for i := range x[:q.n] {
		x[i] = complex(q.re[i], q.im[i])
	}
}

// solve overwrites c with (S - νI)⁻¹ c: back substitution, block by
// block from the bottom, each row's sum two real dot products.
func (q *quasi) solve(c []complex128) {
	n, s, re, im := q.n, q.s, q.re, q.im
	q.load(c)
	rowSum := func(i, from int) complex128 {
		if from >= n {
			return complex(re[i], im[i])
		}
		row := s[i*n+from : i*n+n]
		m := n - from
		return complex(re[i]-blasImpl.Ddot(m, row, 1, re[from:], 1), im[i]-blasImpl.Ddot(m, row, 1, im[from:], 1))
	}
	for i := n - 1; i >= 0; i-- {
		switch q.size[i] {
		case 1:
			v := rowSum(i, i+1) * q.inv[i]
			re[i], im[i] = real(v), imag(v)
		case 2:
			r0, r1 := rowSum(i, i+2), rowSum(i+1, i+2)
			g := q.inv2[4*i : 4*i+4]
			v0, v1 := g[0]*r0+g[1]*r1, g[2]*r0+g[3]*r1
			re[i], im[i], re[i+1], im[i+1] = real(v0), imag(v0), real(v1), imag(v1)
		}
	}
	q.store(c)
}

// solveT overwrites b with (S - νI)⁻ᵀ b: forward substitution, block by
// block from the top, each row of S an axpy into the rest (two real
// axpys on the parts).
func (q *quasi) solveT(b []complex128) {
	n, s, re, im := q.n, q.s, q.re, q.im
	q.load(b)
	spread := func(i, from int, v complex128) {
		if m := n - from; m > 0 && v != 0 {
			row := s[i*n+from : i*n+n]
			blasImpl.Daxpy(m, -real(v), row, 1, re[from:], 1)
			blasImpl.Daxpy(m, -imag(v), row, 1, im[from:], 1)
		}
	}
	for i := 0; i < n; i++ {
		switch q.size[i] {
		case 1:
			v := complex(re[i], im[i]) * q.inv[i]
			re[i], im[i] = real(v), imag(v)
			spread(i, i+1, v)
		case 2:
			// (B - νI)ᵀ v = r: the transposed inverse.
			r0, r1 := complex(re[i], im[i]), complex(re[i+1], im[i+1])
			g := q.inv2[4*i : 4*i+4]
			v0, v1 := g[0]*r0+g[2]*r1, g[1]*r0+g[3]*r1
			re[i], im[i], re[i+1], im[i+1] = real(v0), imag(v0), real(v1), imag(v1)
			spread(i, i+2, v0)
			spread(i+1, i+2, v1)
		}
	}
	q.store(b)
}

// mul sets d = S y.
func (q *quasi) mul(y, d []complex128) {
	n := q.n
	for i, v := range y[:n] {
		q.yr[i], q.yi[i] = real(v), imag(v)
	}
	for i := range d[:n] {
		lo := max(i-1, 0)
		row := q.s[i*n+lo : i*n+n]
		d[i] = complex(blasImpl.Ddot(n-lo, row, 1, q.yr[lo:], 1), blasImpl.Ddot(n-lo, row, 1, q.yi[lo:], 1))
	}
}

// applyZ multiplies the parts of u by the explicit Z (trans false) or Zᵀ.
func (u *shiftedBasis) applyZ(trans bool) {
	t := blas.NoTrans
	if trans {
		t = blas.Trans
	}
	for _, x := range [2][]float64{u.re, u.im} {
		blasImpl.Dgemv(t, u.n, u.n, 1, u.z, u.n, x, 1, 0, u.tmp, 1)
		copy(x, u.tmp)
	}
}
