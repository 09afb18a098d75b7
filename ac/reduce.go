package ac

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	blasgonum "gonum.org/v1/gonum/blas/gonum"
	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// reduction is the pencil G + sC reduced once to a pair of upper
// Hessenberg matrices, so that each frequency costs O(n²) instead of the
// O(n³) of a dense LU (Laub, "Efficient multivariable frequency response
// computations", IEEE Trans. Automatic Control 26(2), 1981):
//
//	L (G + sC) R = H + sT,   (G + sC)⁻¹ = R (H + sT)⁻¹ L
//
// H + jwT stays upper Hessenberg at every w: Gaussian elimination with
// partial pivoting only ever swaps adjacent rows, so factoring it costs
// n²/2 complex multiply-adds and each solve about as much.
//
// Three forms (reduceFor; reduceAccurate tries them in an order set by
// the sweep's length and width):
//
//   - shifted (reduceShifted): with a real shift σ at which K = G + σC is
//     regular, G + sC = K (I + (s-σ) K⁻¹C); the Hessenberg form of
//     M = K⁻¹C by orthogonal similarity, M = U Hm Uᵀ (gonum's blocked
//     Dgehrd), gives H = I - σHm, T = Hm, L = Uᵀ K⁻¹, R = U. This is
//     Laub's own route, the state matrix replaced by K⁻¹C; its setup
//     costs about a third of the other forms' (BENCHMARKS.md).
//   - shifted Schur (schurSetup): the same, carried on to the real Schur
//     form of Hm, so that a point needs only substitutions (quasi).
//   - Hessenberg-triangular (reduceTriangular): Q, Z orthogonal from a
//     QR factorisation of C and gonum's Dgghrd (Moler and Stewart 1973),
//     H upper Hessenberg, T upper triangular, L = Qᵀ, R = Z. It needs no
//     regular K, and takes over where a shifted form fails its check.
//
// All balance first: G and C become Dr G Dc and Dr C Dc, with Dr, Dc
// diagonal powers of two (exact), folded into L and R.
//
// A reduction holds O(n²) numbers (H, T, the basis and one
// factorisation) and nothing per frequency.
type reduction struct {
	n      int
	form   reductionForm
	pencil *pencil // G and C themselves, for the accuracy check's residuals
	// H and T, n×n row-major, upper Hessenberg (T upper triangular in
	// the Hessenberg-triangular form).
	h, t []float64
	// basis maps between the network's unknowns and the reduced
	// coordinates: Y(s)⁻¹ = R (H + sT)⁻¹ L.
	basis basis

	// ht packs H + jT by rows, row i from column max(i-1, 0) at
	// ht[hoff[i]:hoff[i+1]]: the upper Hessenberg part, one stream for
	// the elimination to read. In the shifted form it packs T = Hm alone
	// (as complex numbers with no imaginary part), see shift.
	ht   []complex128
	hoff []int

	// shift is σ > 0 in the shifted form, where H + jwT = I + μ Hm with
	// μ = jw - σ, which is μ (Hm - νI) with ν = -1/μ. There factor
	// eliminates Hm - νI instead, whose rows are Hm's but for the diagonal:
	// a row is formed by a copy and one subtraction, not a pass of
	// arithmetic, and the solves take the factor 1/μ (scale) at the end.
	shift float64
	scale complex128 // 1/μ at the factored frequency; 1 in the other form
	// quasi, in the Schur form, replaces the Hessenberg elimination: T is
	// S, upper quasi-triangular, and the solves are substitutions.
	quasi *quasi

	// The factorisation of H + jwT at the last frequency factored:
	// P_k swaps rows k and k+1 where swap[k], then row k+1 loses l[k]
	// times row k; U is upper triangular, urow[k] its row k from the
	// diagonal on. The rows live in pool, pool[j] holding n - j + 1
	// entries from column max(j-1, 0): when the pivoting swaps, rows
	// change places instead of values.
	urow   [][]complex128
	pool   [][]complex128
	inv    []complex128 // 1/U_kk
	l      []complex128
	swap   []bool
	work   []complex128
	yr, yi []float64 // real and imaginary parts for products with T

	// adjRHS, when set, is a right-hand side c whose adjoint solution
	// v = (H + jwT)⁻ᵀ c factor leaves in adj: the forward substitution
	// with Uᵀ runs on each row of U as the elimination makes it, while
	// the row is in cache.
	adjRHS []float64
	adj    []complex128
}

// blasImpl is gonum's native BLAS, for its assembly kernels.
var blasImpl blasgonum.Implementation

// errReduction reports a reduction that cannot be used.
var errReduction = errors.New("reduction unusable")

// checkFinite returns an error for a non-finite entry of G or C.
func checkFinite(g, c *mat.Dense) (n int, err error) {
	n, nc := g.Dims()
	if r, cc := c.Dims(); n != nc || r != n || cc != n {
		return 0, fmt.Errorf("reduction: G and C must be square and alike")
	}
	gr, cr := g.RawMatrix(), c.RawMatrix()
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if v, u := gr.Data[i*gr.Stride+j], cr.Data[i*cr.Stride+j]; math.IsNaN(v+u) || math.IsInf(v+u, 0) {
				return 0, fmt.Errorf("reduction: non-finite matrix entry at (%d, %d): %w", i, j, errReduction)
			}
		}
	}
	return n, nil
}

// reduceTriangular computes the Hessenberg-triangular form of G + sC: a
// balancing of |G| + wRef|C| (Ruiz's iterated row and column
// equilibration, rounded to powers of two), a QR factorisation with column
// pivoting of the balanced C (gonum lapack Dgeqp3, Dorgqr), then the
// reduction of (Q1ᵀ G P, R) by Givens rotations (Dgghrd; Moler and
// Stewart, "An algorithm for generalized matrix eigenvalue problems", SIAM
// J. Numer. Anal. 10(2), 1973). Cost O(n³), once.
func reduceTriangular(g, c *mat.Dense, wRef float64) (*reduction, error) {
	n, err := checkFinite(g, c)
	if err != nil {
		return nil, err
	}
	gr, cr := g.RawMatrix(), c.RawMatrix()
	sparse := newPencil(gr, cr, n)
	dr, dc := balance(sparse, wRef)

	a := make([]float64, n*n) // Dr G Dc, then Q1ᵀ Dr G Dc P, then H
	b := make([]float64, n*n) // Dr C Dc, then its QR factors, then T
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			a[i*n+j] = dr[i] * gr.Data[i*gr.Stride+j] * dc[j]
			b[i*n+j] = dr[i] * cr.Data[i*cr.Stride+j] * dc[j]
		}
	}
	r := &reduction{n: n, form: formTriangular, pencil: sparse}
	if n == 0 {
		r.basis = &explicitBasis{}
		r.alloc()
		return r, nil
	}
	var impl gonum.Implementation
	jpvt := make([]int, n)
	for j := range jpvt {
		jpvt[j] = -1
	}
	tau := make([]float64, n)
	work := make([]float64, 1)
	impl.Dgeqp3(n, n, b, n, jpvt, tau, work, -1)
	lwork := int(work[0])
	impl.Dorgqr(n, n, n, b, n, tau, work, -1)
	lwork = max(lwork, int(work[0]), 1)
	work = make([]float64, lwork)

	impl.Dgeqp3(n, n, b, n, jpvt, tau, work, lwork)
	t := make([]float64, n*n) // R, then T
	for i := 0; i < n; i++ {
		copy(t[i*n+i:i*n+n], b[i*n+i:i*n+n])
	}
	q := b // Q1 explicitly, in place of its reflectors
	impl.Dorgqr(n, n, n, q, n, tau, work, lwork)
	// Q1ᵀ A P, with P applied first: column j of A P is column jpvt[j] of
	// A. (Q1ᵀ is applied from the explicit Q1 rather than by Dormqr from
	// the reflectors: gonum v0.17.0's blocked Dormqr returned a wrong
	// product on balanced network matrices whose unblocked path and
	// Dorgqr agreed; see TestReductionReconstructs.)
	ap := make([]float64, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			ap[i*n+j] = a[i*n+jpvt[j]]
		}
	}
	blas64.Gemm(blas.Trans, blas.NoTrans, 1,
		blas64.General{Rows: n, Cols: n, Data: q, Stride: n},
		blas64.General{Rows: n, Cols: n, Data: ap, Stride: n},
		0, blas64.General{Rows: n, Cols: n, Data: a, Stride: n})
	z := make([]float64, n*n) // the permutation P as a matrix
	for j, p := range jpvt {
		z[p*n+j] = 1
	}
	// Q1ᵀ A P = Q2 H Z2ᵀ and R = Q2 T Z2ᵀ; Dgghrd post-multiplies Q1 by
	// Q2 and P by Z2.
	impl.Dgghrd(lapack.OrthoPostmul, lapack.OrthoPostmul, n, 0, n-1, a, n, t, n, q, n, z, n)
	for i := 2; i < n; i++ {
		clear(a[i*n : i*n+i-1])
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			q[i*n+j] *= dr[i]
			z[i*n+j] *= dc[i]
		}
	}
	r.h, r.t, r.basis = a, t, &explicitBasis{n: n, qs: q, zs: z}
	r.form = formTriangular
	r.alloc()
	return r, nil
}

// alloc packs H + jT and makes the factorisation's storage: O(n²),
// once.
func (r *reduction) alloc() {
	n := r.n
	r.work = make([]complex128, n)
	r.adj = make([]complex128, n)
	r.yr, r.yi = make([]float64, n), make([]float64, n)
	if r.quasi != nil {
		return
	}
	r.urow = make([][]complex128, n)
	r.pool = make([][]complex128, n)
	for j := range r.pool {
		r.pool[j] = make([]complex128, n-max(j-1, 0))
	}
	r.hoff = make([]int, n+1)
	for i := 0; i < n; i++ {
		r.hoff[i+1] = r.hoff[i] + n - max(i-1, 0)
	}
	r.ht = make([]complex128, r.hoff[n])
	for i := 0; i < n; i++ {
		lo := max(i-1, 0)
		row := r.ht[r.hoff[i]:r.hoff[i+1]]
		for j := range row {
			if r.shift > 0 {
				row[j] = complex(r.t[i*n+lo+j], 0)
			} else {
				row[j] = complex(r.h[i*n+lo+j], r.t[i*n+lo+j])
			}
		}
	}
	r.inv = make([]complex128, n)
	r.l = make([]complex128, n)
	r.swap = make([]bool, n)
}

// balance returns power-of-two row and column scalings dr, dc that bring
// every row and column of M = |G| + wRef |C| to a largest entry near one
// (Ruiz, "A scaling algorithm to equilibrate both rows and columns norms
// in matrices", RAL-TR-2001-034, 2001). Orthogonal reductions bound errors
// by the norm of the whole matrix; equilibration keeps rows of small
// admittances (a teraohm bias resistor, a femtofarad) from drowning in the
// rounding of large ones.
func balance(p *pencil, wRef float64) (dr, dc []float64) {
	n := p.n
	m := make([]float64, len(p.col)) // |G| + wRef |C| at the pencil's entries
	for k := range m {
		m[k] = math.Abs(p.g[k]) + wRef*math.Abs(p.c[k])
	}
	dr, dc = make([]float64, n), make([]float64, n)
	for i := range dr {
		dr[i], dc[i] = 1, 1
	}
	colMax := make([]float64, n)
	for iter := 0; iter < 10; iter++ {
		clear(colMax)
		done := true
		for i := 0; i < n; i++ {
			rowMax := 0.0
			for k := p.start[i]; k < p.start[i+1]; k++ {
				j := p.col[k]
				v := dr[i] * m[k] * dc[j]
				rowMax = math.Max(rowMax, v)
				colMax[j] = math.Max(colMax[j], v)
			}
			if rowMax > 0 {
				dr[i] /= math.Sqrt(rowMax)
				done = done && math.Abs(rowMax-1) < 0.5
			}
		}
		for j := 0; j < n; j++ {
			if colMax[j] > 0 {
				dc[j] /= math.Sqrt(colMax[j])
				done = done && math.Abs(colMax[j]-1) < 0.5
			}
		}
		if done {
			break
		}
	}
	pow2 := func(x float64) float64 {
		if x == 0 || math.IsInf(x, 0) || math.IsNaN(x) {
			return 1
		}
		return math.Exp2(math.Round(math.Log2(x)))
	}
	for i := range dr {
		dr[i], dc[i] = pow2(dr[i]), pow2(dc[i])
	}
	return dr, dc
}

// pencil holds the entries of G and C that are not both zero, by rows
// (compressed sparse rows): network matrices have a few entries per row,
// and the balancing and the accuracy check's residuals need only these.
type pencil struct {
	n     int
	start []int // row i's entries are start[i] to start[i+1]-1
	col   []int
	g, c  []float64
}

func newPencil(g, c blas64.General, n int) *pencil {
	p := &pencil{n: n, start: make([]int, n+1)}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if gij, cij := g.Data[i*g.Stride+j], c.Data[i*c.Stride+j]; gij != 0 || cij != 0 {
				p.col = append(p.col, j)
				p.g = append(p.g, gij)
				p.c = append(p.c, cij)
			}
		}
		p.start[i+1] = len(p.col)
	}
	return p
}

// residual sets d = b - (G + jwC) x.
func (p *pencil) residual(w float64, b, x, d []complex128) {
	for i := 0; i < p.n; i++ {
		s := b[i]
		for k := p.start[i]; k < p.start[i+1]; k++ {
			s -= complex(p.g[k], w*p.c[k]) * x[p.col[k]]
		}
		d[i] = s
	}
}

// residualT sets d = b - (G + jwC)ᵀ x.
func (p *pencil) residualT(w float64, b, x, d []complex128) {
	copy(d[:p.n], b)
	for i := 0; i < p.n; i++ {
		xi := x[i]
		for k := p.start[i]; k < p.start[i+1]; k++ {
			d[p.col[k]] -= complex(p.g[k], w*p.c[k]) * xi
		}
	}
}

// mulC sets d = C x.
func (p *pencil) mulC(x, d []complex128) {
	for i := 0; i < p.n; i++ {
		var s complex128
		for k := p.start[i]; k < p.start[i+1]; k++ {
			s += complex(p.c[k], 0) * x[p.col[k]]
		}
		d[i] = s
	}
}

// factor factors H + jwT by Gaussian elimination with partial pivoting,
// which on an upper Hessenberg matrix eliminates one subdiagonal entry per
// step (Laub 1981). Row k+1 of H + jwT is untouched until step k, so it is
// formed as the elimination reaches it: one pass over H and T (in the
// shifted form a copy of Hm's row, see shift), and one axpy per step
// (gonum's Zaxpy).
func (r *reduction) factor(w float64) error {
	n := r.n
	r.scale = 1
	if n == 0 {
		return nil
	}
	var nu complex128
	if r.shift > 0 {
		mu := complex(-r.shift, w)
		nu = -1 / mu
		r.scale = 1 / mu
	}
	if r.quasi != nil {
		if err := r.quasi.factor(nu); err != nil {
			return err
		}
		if r.adjRHS != nil {
			for i, v := range r.adjRHS[:n] {
				r.adj[i] = complex(v, 0)
			}
			r.quasi.solveT(r.adj)
			r.rescale(r.adj)
		}
		return nil
	}
	// carried is row k, from column k on, after the steps before k; the
	// fresh row k+1 goes into pool[k+1], which starts at column k.
	carried := r.pool[0]
	r.formRow(0, carried, w, nu)
	adj := r.adj
	if r.adjRHS != nil {
		for i, v := range r.adjRHS[:n] {
			adj[i] = complex(v, 0)
		}
	}
	for k := 0; k < n-1; k++ {
		fresh := r.pool[k+1]
		r.formRow(k+1, fresh, w, nu)
		p, f := carried[0], fresh[0]
		pivot, other := carried, fresh
		r.swap[k] = abs1(f) > abs1(p)
		if r.swap[k] {
			pivot, other, p, f = fresh, carried, f, p
		}
		inv, ok := reciprocal(p)
		if !ok {
			return errSingular
		}
		r.inv[k] = inv
		l := f * inv
		r.l[k] = l
		if m := n - k - 1; m > 0 {
			axpy(-l, pivot[1:n-k], other[1:n-k])
		}
		r.urow[k] = pivot[:n-k]
		carried = other[1:]
		if r.adjRHS != nil {
			// Uᵀ w = c, row k of U is column k of Uᵀ.
			wk := adj[k] * inv
			adj[k] = wk
			if m := n - k - 1; m > 0 && wk != 0 {
				axpy(-wk, pivot[1:n-k], adj[k+1:n])
			}
		}
	}
	r.urow[n-1] = carried[:1]
	inv, ok := reciprocal(carried[0])
	if !ok {
		return errSingular
	}
	r.inv[n-1] = inv
	if r.adjRHS != nil {
		// v = M_0ᵀ ... M_(n-2)ᵀ w, as in solveYT.
		adj[n-1] *= r.inv[n-1]
		for k := n - 2; k >= 0; k-- {
			adj[k] -= r.l[k] * adj[k+1]
			if r.swap[k] {
				adj[k], adj[k+1] = adj[k+1], adj[k]
			}
		}
		r.rescale(adj)
	}
	return nil
}

// rescale multiplies a solution of the matrix factor eliminated by scale,
// making it one of H + jwT.
func (r *reduction) rescale(y []complex128) {
	if r.scale != 1 {
		for i := range y[:r.n] {
			y[i] *= r.scale
		}
	}
}

// formRow writes row i of the matrix factor eliminates, from column
// max(i-1, 0) on, into v: H + jwT, or in the shifted form Hm - νI.
func (r *reduction) formRow(i int, v []complex128, w float64, nu complex128) {
	src := r.ht[r.hoff[i]:r.hoff[i+1]]
	if r.shift > 0 {
		copy(v, src)
		v[min(i, 1)] -= nu // the diagonal: column i is entry i - max(i-1, 0)
		return
	}
	v = v[:len(src)]
	for j, x := range src {
		v[j] = complex(real(x), w*imag(x))
	}
}

// reciprocal returns 1/z, scaled so that no square overflows or
// underflows, and false if z is zero or 1/z is not finite: a pivot that
// cannot be used.
func reciprocal(z complex128) (complex128, bool) {
	s := math.Max(math.Abs(real(z)), math.Abs(imag(z)))
	if s == 0 || math.IsNaN(s) || math.IsInf(s, 0) {
		return 0, false
	}
	a, b := real(z)/s, imag(z)/s
	d := (a*a + b*b) * s
	inv := complex(a/d, -b/d)
	return inv, !isNaNInf(inv)
}

func abs1(z complex128) float64 { return math.Abs(real(z)) + math.Abs(imag(z)) }

func isNaNInf(z complex128) bool {
	s := real(z) + imag(z)
	return math.IsNaN(s) || math.IsInf(s, 0)
}

// solveY overwrites c with the solution of (H + jwT) y = c.
func (r *reduction) solveY(c []complex128) {
	n := r.n
	if r.quasi != nil {
		r.quasi.solve(c)
		r.rescale(c)
		return
	}
	for k := 0; k < n-1; k++ {
		if r.swap[k] {
			c[k], c[k+1] = c[k+1], c[k]
		}
		c[k+1] -= r.l[k] * c[k]
	}
	for i := n - 1; i >= 0; i-- {
		c[i] = (c[i] - dotu(r.urow[i][1:], c[i+1:n])) * r.inv[i]
	}
	r.rescale(c)
}

// solveY2 solves (H + jwT) y = c for two right-hand sides at once, in
// place.
func (r *reduction) solveY2(c, d []complex128) {
	n := r.n
	if r.quasi != nil {
		r.solveY(c)
		r.solveY(d)
		return
	}
	for k := 0; k < n-1; k++ {
		if r.swap[k] {
			c[k], c[k+1] = c[k+1], c[k]
			d[k], d[k+1] = d[k+1], d[k]
		}
		c[k+1] -= r.l[k] * c[k]
		d[k+1] -= r.l[k] * d[k]
	}
	for i := n - 1; i >= 0; i-- {
		row := r.urow[i][1:]
		c[i] = (c[i] - dotu(row, c[i+1:n])) * r.inv[i]
		d[i] = (d[i] - dotu(row, d[i+1:n])) * r.inv[i]
	}
	r.rescale(c)
	r.rescale(d)
}

// solveYT overwrites c with the solution of (H + jwT)ᵀ v = c (plain
// transpose). With M_k = L_k P_k and M_(n-2)...M_0 A = U, Aᵀ v = c is
// Uᵀ w = c followed by v = M_0ᵀ ... M_(n-2)ᵀ w.
func (r *reduction) solveYT(c []complex128) {
	n := r.n
	if r.quasi != nil {
		r.quasi.solveT(c)
		r.rescale(c)
		return
	}
	for j := 0; j < n; j++ {
		solved := c[j] * r.inv[j]
		c[j] = solved
		if solved != 0 && j+1 < n {
			axpy(-solved, r.urow[j][1:], c[j+1:n])
		}
	}
	for k := n - 2; k >= 0; k-- {
		c[k] -= r.l[k] * c[k+1]
		if r.swap[k] {
			c[k], c[k+1] = c[k+1], c[k]
		}
	}
	r.rescale(c)
}

// dotu returns Σ a_j y_j (no conjugate): gonum's Zdotu, whose assembly
// kernel outruns Go's scalar complex arithmetic on all but short rows.
func dotu(a, y []complex128) complex128 {
	if len(a) < shortRow {
		var s complex128
		y = y[:len(a)]
		for j, v := range a {
			s += v * y[j]
		}
		return s
	}
	return blasImpl.Zdotu(len(a), a, 1, y, 1)
}

// shortRow is the length below which Go loops beat the call into
// gonum's assembly kernels.
const shortRow = 24

// axpy sets y += alpha x: gonum's Zaxpy but on short rows.
func axpy(alpha complex128, x, y []complex128) {
	if len(x) < shortRow {
		y = y[:len(x)]
		for j, v := range x {
			y[j] += alpha * v
		}
		return
	}
	blasImpl.Zaxpy(len(x), alpha, x, 1, y, 1)
}

// mulT sets d = T y for the upper Hessenberg T: per row, two real dot
// products (gonum's Ddot) with the parts of y.
func (r *reduction) mulT(y, d []complex128) {
	n := r.n
	if r.quasi != nil {
		r.quasi.mul(y, d)
		return
	}
	yr, yi := r.yr, r.yi
	for i, v := range y[:n] {
		yr[i], yi[i] = real(v), imag(v)
	}
	for i := range d[:n] {
		lo := max(i-1, 0)
		row := r.t[i*n+lo : i*n+n]
		d[i] = complex(blasImpl.Ddot(n-lo, row, 1, yr[lo:], 1), blasImpl.Ddot(n-lo, row, 1, yi[lo:], 1))
	}
}

// solve overwrites b with the solution x of Y(jw) x = b, Y factored by
// factor(w): x = R (H + jwT)⁻¹ L b. O(n²).
func (r *reduction) solve(b []complex128) {
	y := r.work
	r.basis.left(b, y)
	r.solveY(y)
	r.basis.right(y, b)
}

// solveT overwrites b with the solution z of Y(jw)ᵀ z = b (plain
// transpose, the adjoint solve): z = Lᵀ (H + jwT)⁻ᵀ Rᵀ b. O(n²).
func (r *reduction) solveT(b []complex128) {
	v := r.work
	r.basis.rightT(b, v)
	r.solveYT(v)
	r.basis.leftT(v, b)
}

// basis holds the maps L and R of a reduction, L (G + sC) R = H + sT,
// and applies them to vectors in O(n²). Vectors of the network's unknowns
// and of reduced coordinates both have n entries; no method keeps its
// arguments, and in and out never share storage.
type basis interface {
	left(b, y []complex128)   // y = L b
	leftT(v, b []complex128)  // b = Lᵀ v
	right(y, x []complex128)  // x = R y
	rightT(b, v []complex128) // v = Rᵀ b
	// rightRow sets row to row i of R, real.
	rightRow(i int, row []float64)
}

// explicitBasis is L = Qᵀ Dr and R = Dc Z held as matrices: qs = Dr Q and
// zs = Dc Z, n×n row-major.
type explicitBasis struct {
	n      int
	qs, zs []float64
}

func (e *explicitBasis) left(b, y []complex128)   { mulTransposed(e.qs, e.n, b, y) }
func (e *explicitBasis) rightT(b, v []complex128) { mulTransposed(e.zs, e.n, b, v) }
func (e *explicitBasis) right(y, x []complex128)  { mulReal(e.zs, e.n, y, x) }
func (e *explicitBasis) leftT(v, b []complex128)  { mulReal(e.qs, e.n, v, b) }
func (e *explicitBasis) rightRow(i int, row []float64) {
	copy(row, e.zs[i*e.n:i*e.n+e.n])
}

// mulTransposed sets y = Aᵀ b for the real n×n row-major A, skipping the
// zero entries of b (excitations touch a node or two).
func mulTransposed(a []float64, n int, b, y []complex128) {
	clear(y[:n])
	for i, bi := range b[:n] {
		if bi == 0 {
			continue
		}
		for j, q := range a[i*n : i*n+n] {
			y[j] += complex(q, 0) * bi
		}
	}
}

// mulReal sets x = A y for the real n×n row-major A.
func mulReal(a []float64, n int, y, x []complex128) {
	for i := range x[:n] {
		x[i] = dotReal(a[i*n:i*n+n], y)
	}
}

// dotReal returns Σ a_j y_j for real a.
func dotReal(a []float64, y []complex128) complex128 {
	var r0, i0, r1, i1 float64
	y = y[:len(a)]
	j := 0
	for ; j+1 < len(a); j += 2 {
		r0 += a[j] * real(y[j])
		i0 += a[j] * imag(y[j])
		r1 += a[j+1] * real(y[j+1])
		i1 += a[j+1] * imag(y[j+1])
	}
	if j < len(a) {
		r0 += a[j] * real(y[j])
		i0 += a[j] * imag(y[j])
	}
	return complex(r0+r1, i0+i1)
}
