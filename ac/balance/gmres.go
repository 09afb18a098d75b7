package balance

import "math"

// dot is the real inner product of two complex vectors seen as real
// vectors of twice the length: Re Σ conj(a_i) b_i. The Jacobian of the
// balance is real-linear, not complex-linear (it couples each phasor with
// its conjugate), so the Krylov method works over the reals.
func dot(a, b []complex128) float64 {
	var s float64
	for i := range a {
		s += real(a[i])*real(b[i]) + imag(a[i])*imag(b[i])
	}
	return s
}

func norm(a []complex128) float64 { return math.Sqrt(dot(a, a)) }

// gmres solves A y = b for y, starting from zero, by the generalised
// minimal residual method restarted every m steps (Saad and Schultz,
// "GMRES: a generalized minimal residual algorithm for solving
// nonsymmetric linear systems", SIAM J. Sci. Stat. Comput. 7(3), 1986),
// with modified Gram-Schmidt and Givens rotations. It stops when
// ||b - A y|| ≤ tol ||b|| or after maxIter products with A, and returns
// the number of products and the relative residual reached.
func gmres(apply func(v, out []complex128), b, y []complex128, m, maxIter int, tol float64) (int, float64) {
	L := len(b)
	clear(y)
	bn := norm(b)
	if bn == 0 {
		return 0, 0
	}
	v := make([][]complex128, m+1)
	for i := range v {
		v[i] = make([]complex128, L)
	}
	h := make([][]float64, m+1) // h[i][j], i ≤ j+1
	for i := range h {
		h[i] = make([]float64, m)
	}
	cs, sn, g := make([]float64, m), make([]float64, m), make([]float64, m+1)
	r := make([]complex128, L)
	w := make([]complex128, L)
	iters := 0
	rel := 1.0
	for iters < maxIter {
		// r = b - A y
		if iters == 0 {
			copy(r, b)
		} else {
			apply(y, w)
			for i := range r {
				r[i] = b[i] - w[i]
			}
		}
		beta := norm(r)
		rel = beta / bn
		if rel <= tol {
			return iters, rel
		}
		for i := range r {
			v[0][i] = r[i] / complex(beta, 0)
		}
		clear(g)
		g[0] = beta
		j := 0
		for ; j < m && iters < maxIter; j++ {
			apply(v[j], w)
			iters++
			for i := 0; i <= j; i++ {
				hij := dot(v[i], w)
				h[i][j] = hij
				c := complex(hij, 0)
				for e := range w {
					w[e] -= c * v[i][e]
				}
			}
			hn := norm(w)
			h[j+1][j] = hn
			if hn > 0 {
				inv := complex(1/hn, 0)
				for e := range w {
					v[j+1][e] = w[e] * inv
				}
			}
			for i := 0; i < j; i++ {
				a, c := h[i][j], h[i+1][j]
				h[i][j] = cs[i]*a + sn[i]*c
				h[i+1][j] = -sn[i]*a + cs[i]*c
			}
			a, c := h[j][j], h[j+1][j]
			d := math.Hypot(a, c)
			if d == 0 {
				cs[j], sn[j] = 1, 0
			} else {
				cs[j], sn[j] = a/d, c/d
			}
			h[j][j] = d
			h[j+1][j] = 0
			g[j+1] = -sn[j] * g[j]
			g[j] = cs[j] * g[j]
			rel = math.Abs(g[j+1]) / bn
			if rel <= tol || hn == 0 {
				j++
				break
			}
		}
		// Solve the upper-triangular system and update y.
		z := make([]float64, j)
		for i := j - 1; i >= 0; i-- {
			s := g[i]
			for k := i + 1; k < j; k++ {
				s -= h[i][k] * z[k]
			}
			if h[i][i] == 0 {
				z[i] = 0
				continue
			}
			z[i] = s / h[i][i]
		}
		for i := 0; i < j; i++ {
			c := complex(z[i], 0)
			for e := range y {
				y[e] += c * v[i][e]
			}
		}
		if rel <= tol {
			return iters, rel
		}
	}
	// The estimate of the last cycle: recompute it.
	apply(y, w)
	for i := range r {
		r[i] = b[i] - w[i]
	}
	return iters, norm(r) / bn
}
