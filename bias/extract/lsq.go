package extract

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/mat"
)

// lsq is a nonlinear least-squares problem over a parameter vector x of
// which the entries marked free are fitted and the others held, each kept
// within [lo, hi].
type lsq struct {
	residuals int
	// eval stores the residuals at x in r and, when jac is not nil, their
	// derivatives with respect to every entry of x in jac (residuals ×
	// len(x)).
	eval   func(x, r []float64, jac *mat.Dense)
	free   []bool
	lo, hi []float64
	// scale is a typical size of each entry, for the convergence test.
	scale []float64
}

// fitStats are what a Levenberg–Marquardt run did.
type fitStats struct {
	iterations, evaluations int
	cost                    float64 // Σ r² at the end
}

var errNoProgress = errors.New("the Levenberg-Marquardt iteration made no progress from its start")

// marquardt minimises Σ r² over the free entries of x, starting from x,
// by Levenberg–Marquardt steps: (JᵀJ + λ diag(JᵀJ)) δ = -Jᵀr, with λ cut
// after a step that lowers the sum and raised after one that does not
// (Marquardt, "An algorithm for least-squares estimation of nonlinear
// parameters", J. SIAM 11(2), 1963). Each step is clipped to [lo, hi].
// It stops when a step changes the sum by less than 1e-13 of itself and
// every free entry by less than 1e-10 of its scale, or no step lowers the
// sum.
func (p *lsq) marquardt(x []float64, maxIter int) (fitStats, error) {
	idx := p.freeIndex()
	n, k := p.residuals, len(idx)
	r := make([]float64, n)
	rTry := make([]float64, n)
	jac := mat.NewDense(n, len(x), nil)
	var st fitStats
	p.eval(x, r, jac)
	st.evaluations++
	cost := sumSquares(r)
	if !finite(cost) {
		return st, errors.New("the residuals are not finite at the start")
	}
	lambda := 1e-3
	try := make([]float64, len(x))
	a := mat.NewSymDense(k, nil)
	g := mat.NewVecDense(k, nil)
	m := mat.NewSymDense(k, nil)
	var chol mat.Cholesky
	delta := mat.NewVecDense(k, nil)
	for st.iterations < maxIter {
		st.iterations++
		// Normal equations over the free columns.
		for i := range k {
			gi := 0.0
			for row := range n {
				gi += jac.At(row, idx[i]) * r[row]
			}
			g.SetVec(i, -gi)
			for j := i; j < k; j++ {
				s := 0.0
				for row := range n {
					s += jac.At(row, idx[i]) * jac.At(row, idx[j])
				}
				a.SetSym(i, j, s)
			}
		}
		maxDiag := 0.0
		for i := range k {
			maxDiag = math.Max(maxDiag, a.At(i, i))
		}
		accepted := false
		var newCost float64
		for range 40 {
			m.CopySym(a)
			for i := range k {
				m.SetSym(i, i, a.At(i, i)+lambda*math.Max(a.At(i, i), 1e-12*maxDiag))
			}
			if !chol.Factorize(m) {
				lambda *= 10
				continue
			}
			if err := chol.SolveVecTo(delta, g); err != nil {
				lambda *= 10
				continue
			}
			copy(try, x)
			for i, j := range idx {
				try[j] = math.Min(p.hi[j], math.Max(p.lo[j], x[j]+delta.AtVec(i)))
			}
			p.eval(try, rTry, nil)
			st.evaluations++
			newCost = sumSquares(rTry)
			if finite(newCost) && newCost < cost {
				accepted = true
				break
			}
			lambda *= 4
			if lambda > 1e20 {
				break
			}
		}
		if !accepted {
			break // no step lowers the sum: a minimum to rounding
		}
		small := true
		for _, j := range idx {
			if math.Abs(try[j]-x[j]) > 1e-10*p.scale[j] {
				small = false
			}
		}
		drop := cost - newCost
		copy(x, try)
		cost = newCost
		lambda = math.Max(lambda/3, 1e-12)
		if small && drop <= 1e-13*cost {
			break
		}
		p.eval(x, r, jac)
		st.evaluations++
	}
	st.cost = cost
	if st.iterations == 0 {
		return st, errNoProgress
	}
	return st, nil
}

func (p *lsq) freeIndex() []int {
	var idx []int
	for i, f := range p.free {
		if f {
			idx = append(idx, i)
		}
	}
	return idx
}

func sumSquares(r []float64) float64 {
	s := 0.0
	for _, v := range r {
		s += v * v
	}
	return s
}

// covariance returns the covariance of the free entries of x at the
// optimum, s² (JᵀJ)⁻¹ with s² = Σ r²/(N - P), over the indices idx, and
// ok = false when JᵀJ is singular to working precision (some combination
// of the free values is not determined). JᵀJ is inverted through the
// singular values of J with its columns scaled to unit length, which
// keeps the inversion accurate when the values differ in size by many
// orders (Björck, "Numerical Methods for Least Squares Problems", SIAM
// 1996, sec. 2.2).
func covariance(jac *mat.Dense, r []float64, idx []int) (cov *mat.SymDense, ok bool) {
	n, k := len(r), len(idx)
	if n <= k {
		return nil, false
	}
	js := mat.NewDense(n, k, nil)
	norms := make([]float64, k)
	for j, c := range idx {
		s := 0.0
		for row := range n {
			s += jac.At(row, c) * jac.At(row, c)
		}
		norms[j] = math.Sqrt(s)
		if !(norms[j] > 0) || !finite(norms[j]) {
			return nil, false
		}
		for row := range n {
			js.Set(row, j, jac.At(row, c)/norms[j])
		}
	}
	var svd mat.SVD
	if !svd.Factorize(js, mat.SVDThin) {
		return nil, false
	}
	sv := svd.Values(nil)
	if sv[k-1] <= 1e-10*sv[0] {
		return nil, false
	}
	var v mat.Dense
	svd.VTo(&v)
	s2 := sumSquares(r) / float64(n-k)
	cov = mat.NewSymDense(k, nil)
	for i := range k {
		for j := i; j < k; j++ {
			s := 0.0
			for l := range k {
				s += v.At(i, l) * v.At(j, l) / (sv[l] * sv[l])
			}
			cov.SetSym(i, j, s2*s/(norms[i]*norms[j]))
		}
	}
	return cov, true
}

// gaussNewtonStep returns the Gauss–Newton step δ = -(JᵀJ)⁻¹Jᵀr and its
// length in standard errors, ‖Jδ‖/s with s² = ‖r‖²/(N - P): how far the
// values lie from the least-squares optimum, measured in their own
// uncertainty. The length is infinite where JᵀJ is singular.
func gaussNewtonStep(jac *mat.Dense, res []float64) (float64, []float64) {
	n, k := jac.Dims()
	if n <= k {
		return math.Inf(1), nil
	}
	var qr mat.QR
	qr.Factorize(jac)
	var delta mat.VecDense
	if err := qr.SolveVecTo(&delta, false, mat.NewVecDense(n, res)); err != nil {
		return math.Inf(1), nil
	}
	var jd mat.VecDense
	jd.MulVec(jac, &delta)
	s := math.Sqrt(sumSquares(res) / float64(n-k))
	return mat.Norm(&jd, 2) / s, delta.RawVector().Data
}

// settled reports whether a fit has reached its optimum: one more
// Gauss–Newton step would move the values by less than 1e-3 of their
// standard errors, or (for data that the law fits to rounding, where the
// standard errors vanish) by less than 1e-9 of each value or its scale
// (1 where scale is nil).
func settled(step float64, delta, x, scale []float64) bool {
	if step < 1e-3 {
		return true
	}
	if delta == nil {
		return false
	}
	for j, d := range delta {
		s := 1.0
		if scale != nil {
			s = scale[j]
		}
		if !(math.Abs(d) <= 1e-9*math.Max(math.Abs(x[j]), s)) {
			return false
		}
	}
	return true
}
