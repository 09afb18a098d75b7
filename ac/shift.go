package ac

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// minShiftRcond is the reciprocal condition number of the balanced
// K = G + σC below which the shifted form is not tried: every product
// with K⁻¹ would lose more than twelve of the sixteen digits, far beyond
// what the accuracy check lets through.
const minShiftRcond = 1e-12

// reduceShifted reduces G + sC through a real shift σ = wRef, the
// geometric middle of the sweep's angular frequencies:
//
//	Dr (G + sC) Dc = K (I + (s - σ) M),  K = Dr (G + σC) Dc,  M = K⁻¹ Dr C Dc
//
// with Dr, Dc the balancing of |G| + σ|C| (balance). At a real positive
// σ capacitors and inductors become conductances σC and resistances σL,
// so for the passive networks linearised here K is regular and well
// balanced. M = U Hm Uᵀ by Householder reflections (gonum lapack Dgehrd,
// blocked), so that
//
//	(G + sC)⁻¹ = Dc U (I - σHm + s Hm)⁻¹ Uᵀ K⁻¹ Dr
//
// a pencil H + sT with H = I - σHm and T = Hm, both upper Hessenberg.
// Only the columns of C that have an entry are solved for in M (the
// others are zero), U is kept as its reflectors and K as its LU
// factors. Cost: an n×n LU, n×r solves for the r columns of C with an
// entry, and the Hessenberg reduction, O(n³) once.
func reduceShifted(g, c *mat.Dense, wRef float64, schur bool) (*reduction, error) {
	n, err := checkFinite(g, c)
	if err != nil {
		return nil, err
	}
	gr, cr := g.RawMatrix(), c.RawMatrix()
	sparse := newPencil(gr, cr, n)
	r := &reduction{n: n, form: formShifted, pencil: sparse}
	if n == 0 {
		r.basis = &shiftedBasis{}
		r.alloc()
		return r, nil
	}
	dr, dc := balance(sparse, wRef)
	sigma := wRef
	k := make([]float64, n*n) // Dr (G + σC) Dc, then its LU factors
	m := make([]float64, n*n) // M = K⁻¹ Dr C Dc, then Hm and the reflectors
	var cols []int            // the columns of C with an entry
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			if cr.Data[i*cr.Stride+j] != 0 {
				cols = append(cols, j)
				break
			}
		}
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			gij, cij := gr.Data[i*gr.Stride+j], cr.Data[i*cr.Stride+j]
			k[i*n+j] = dr[i] * (gij + sigma*cij) * dc[j]
		}
	}
	var impl gonum.Implementation
	work := make([]float64, 4*n)
	iwork := make([]int, n)
	norm := impl.Dlange(lapack.MaxColumnSum, n, n, k, n, work)
	ipiv := make([]int, n)
	if !impl.Dgetrf(n, n, k, n, ipiv) {
		return nil, fmt.Errorf("reduction: G + σC is singular at σ = %g rad/s: %w", sigma, errReduction)
	}
	rc := impl.Dgecon(lapack.MaxColumnSum, n, k, n, norm, work, iwork)
	if !(rc >= minShiftRcond) {
		return nil, fmt.Errorf("reduction: G + σC is ill-conditioned at σ = %g rad/s (reciprocal condition %g): %w", sigma, rc, errReduction)
	}
	if nr := len(cols); nr > 0 {
		b := make([]float64, n*nr)
		for i := 0; i < n; i++ {
			for p, j := range cols {
				b[i*nr+p] = dr[i] * cr.Data[i*cr.Stride+j] * dc[j]
			}
		}
		impl.Dgetrs(blas.NoTrans, n, nr, k, n, ipiv, b, nr)
		for i := 0; i < n; i++ {
			for p, j := range cols {
				m[i*n+j] = b[i*nr+p]
			}
		}
	}
	tau := make([]float64, n-1) // Dgehrd wants exactly n-1
	impl.Dgehrd(n, 0, n-1, m, n, tau, work, -1)
	if need := int(work[0]); need > len(work) {
		work = make([]float64, need)
	}
	impl.Dgehrd(n, 0, n-1, m, n, tau, work, len(work))
	for _, v := range m {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("reduction: non-finite Hessenberg form: %w", errReduction)
		}
	}

	h, t := make([]float64, n*n), make([]float64, n*n)
	for i := 0; i < n; i++ {
		for j := max(i-1, 0); j < n; j++ {
			t[i*n+j] = m[i*n+j]
			h[i*n+j] = -sigma * m[i*n+j]
		}
		h[i*n+i]++
	}
	sb := &shiftedBasis{n: n, lu: k, ipiv: ipiv, rcond: rc, dr: dr, dc: dc, tau: tau,
		re: make([]float64, n), im: make([]float64, n)}
	r.h, r.t, r.basis, r.shift = h, t, sb, sigma
	if schur {
		if err := schurSetup(r, m, tau); err != nil {
			return nil, err
		}
		r.alloc()
		return r, nil
	}
	// Reflector i (Dgehrd's H_i) acts on entries i+1 to n-1: v = (1,
	// m[i+2][i], ..., m[n-1][i]), kept contiguous for the products.
	sb.roff = make([]int, n)
	for i := 0; i < n-1; i++ {
		sb.roff[i+1] = sb.roff[i] + n - i - 1
	}
	sb.refl = make([]float64, sb.roff[n-1])
	for i := 0; i < n-1; i++ {
		v := sb.refl[sb.roff[i]:sb.roff[i+1]]
		v[0] = 1
		for p := 1; p < len(v); p++ {
			v[p] = m[(i+1+p)*n+i]
		}
	}
	r.alloc()
	return r, nil
}

// shiftedBasis is L = Uᵀ K⁻¹ Dr and R = Dc U of the shifted form: K by
// its LU factors (row-major, with gonum's pivots), U = H_0 H_1 ... H_(n-2)
// by its Householder reflectors H_i = I - tau_i v_i v_iᵀ, v_i acting on
// entries i+1 to n-1, or, in the Schur form, U Zs explicitly (z). Every
// product works on the real and imaginary parts of a vector apart, with
// gonum's level-1 and level-2 kernels (all the matrices here are real).
type shiftedBasis struct {
	n      int
	lu     []float64
	ipiv   []int
	rcond  float64 // K's reciprocal condition number in the 1-norm (Dgecon)
	dr, dc []float64
	refl   []float64 // v_i at refl[roff[i]:roff[i+1]]
	roff   []int
	tau    []float64
	re, im []float64 // the parts of the vector being worked on
	z      []float64 // U Zs, n×n row-major, in the Schur form (nil otherwise)
	tmp    []float64 // n, for products with z
}

// split loads d ⊙ x (d nil: x) into re, im; join stores d ⊙ (re + j im)
// into x.
func (u *shiftedBasis) split(x []complex128, d []float64) {
	for i, v := range x[:u.n] {
		if d != nil {
			v *= complex(d[i], 0)
		}
		u.re[i], u.im[i] = real(v), imag(v)
	}
}

func (u *shiftedBasis) join(x []complex128, d []float64) {
	for i := range x[:u.n] {
		v := complex(u.re[i], u.im[i])
		if d != nil {
			v *= complex(d[i], 0)
		}
		x[i] = v
	}
}

// reflect applies H_i to both parts.
func (u *shiftedBasis) reflect(i int) {
	tau := u.tau[i]
	if tau == 0 {
		return
	}
	v := u.refl[u.roff[i]:u.roff[i+1]]
	m := len(v)
	for _, part := range [2][]float64{u.re[i+1 : u.n], u.im[i+1 : u.n]} {
		s := tau * blasImpl.Ddot(m, v, 1, part, 1)
		blasImpl.Daxpy(m, -s, v, 1, part, 1)
	}
}

// applyU multiplies the parts by U (U Zs in the Schur form), applyUT by
// its transpose.
func (u *shiftedBasis) applyU() {
	if u.z != nil {
		u.applyZ(false)
		return
	}
	for i := u.n - 2; i >= 0; i-- {
		u.reflect(i)
	}
}

func (u *shiftedBasis) applyUT() {
	if u.z != nil {
		u.applyZ(true)
		return
	}
	for i := 0; i < u.n-1; i++ {
		u.reflect(i)
	}
}

// solveK replaces the parts by K⁻¹ (trans false) or K⁻ᵀ (trans true)
// times them: the row interchanges of Dgetrf and two triangular solves per
// part, each row a dot product or an axpy with gonum's assembly kernels
// (the row-major factors make the plain solves dots and the transposed
// ones axpys).
func (u *shiftedBasis) solveK(trans bool) {
	n, lu := u.n, u.lu
	for _, x := range [2][]float64{u.re, u.im} {
		if !trans {
			for i, p := range u.ipiv {
				x[i], x[p] = x[p], x[i]
			}
			// L y = x, L unit lower triangular.
			for i := 1; i < n; i++ {
				x[i] -= blasImpl.Ddot(i, lu[i*n:i*n+i], 1, x[:i], 1)
			}
			// U z = y.
			for i := n - 1; i >= 0; i-- {
				if m := n - i - 1; m > 0 {
					x[i] -= blasImpl.Ddot(m, lu[i*n+i+1:i*n+n], 1, x[i+1:], 1)
				}
				x[i] /= lu[i*n+i]
			}
			continue
		}
		// Uᵀ y = x: row i of U spreads y_i over the entries after i.
		for i := 0; i < n; i++ {
			x[i] /= lu[i*n+i]
			if m := n - i - 1; m > 0 && x[i] != 0 {
				blasImpl.Daxpy(m, -x[i], lu[i*n+i+1:i*n+n], 1, x[i+1:], 1)
			}
		}
		// Lᵀ z = y: row i of L spreads z_i over the entries before i.
		for i := n - 1; i > 0; i-- {
			if x[i] != 0 {
				blasImpl.Daxpy(i, -x[i], lu[i*n:i*n+i], 1, x[:i], 1)
			}
		}
		for i := n - 1; i >= 0; i-- {
			p := u.ipiv[i]
			x[i], x[p] = x[p], x[i]
		}
	}
}

func (u *shiftedBasis) left(b, y []complex128) {
	u.split(b, u.dr)
	u.solveK(false)
	u.applyUT()
	u.join(y, nil)
}

func (u *shiftedBasis) leftT(v, b []complex128) {
	u.split(v, nil)
	u.applyU()
	u.solveK(true)
	u.join(b, u.dr)
}

func (u *shiftedBasis) right(y, x []complex128) {
	u.split(y, nil)
	u.applyU()
	u.join(x, u.dc)
}

func (u *shiftedBasis) rightT(b, v []complex128) {
	u.split(b, u.dc)
	u.applyUT()
	u.join(v, nil)
}

// rightRow sets row to row i of Dc U: dc_i (Uᵀ e_i)ᵀ.
func (u *shiftedBasis) rightRow(i int, row []float64) {
	if u.z != nil {
		for j, v := range u.z[i*u.n : i*u.n+u.n] {
			row[j] = u.dc[i] * v
		}
		return
	}
	clear(u.re)
	clear(u.im)
	u.re[i] = u.dc[i]
	u.applyUT()
	copy(row[:u.n], u.re)
}
