package measure

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/mat"
)

// sums are the window-weighted sums over the record that the normal
// equations of the harmonic fit are made of, for harmonics 1..k at
// θ rad/sample:
//
//	C[m] = Σ w cos(mθn), S[m] = Σ w sin(mθn),  m = 0..2k
//	rc[j] = Σ w x cos(jθn), rs[j] = Σ w x sin(jθn),  j = 0..k
//
// and, for the frequency step, the derivative column
// d[n] = ν Σ_j j (-a_j sin(jθn) + b_j cos(jθn)) with ν = (n - (N-1)/2)/N:
//
//	dc[j] = Σ w d cos(jθn), ds[j] = Σ w d sin(jθn), dd = Σ w d², rd = Σ w x d.
//
// Products of two basis functions reduce to C and S by the product
// formulas, so one pass costs O(N k) rather than O(N k²).
type sums struct {
	k              int
	C, S, rc, rs   []float64
	dc, ds         []float64
	dd, rd, wx2, w float64
}

// fitResult is the weighted least-squares solution at one θ.
type fitResult struct {
	theta    float64
	dc       float64   // c, the DC level
	a, b     []float64 // a[j], b[j] for j = 1..k; index 0 unused
	residual float64   // Σ w r², from the normal equations
	step     float64   // Gauss-Newton step in θ, when derivative sums were taken
}

// accumulate makes one pass over the record. With a and b non-nil it also
// takes the derivative sums for a Gauss-Newton step in θ.
func accumulate(x, w []float64, theta float64, k int, a, b []float64) *sums {
	s := &sums{k: k,
		C: make([]float64, 2*k+1), S: make([]float64, 2*k+1),
		rc: make([]float64, k+1), rs: make([]float64, k+1)}
	deriv := a != nil
	if deriv {
		s.dc, s.ds = make([]float64, k+1), make([]float64, k+1)
	}
	n := len(x)
	centre := float64(n-1) / 2
	cm, sm := make([]float64, 2*k+1), make([]float64, 2*k+1)
	// Sums are kept per block of samples and then added up, which keeps
	// the rounding error of long records near that of pairwise summation.
	const block = 4096
	bC, bS := make([]float64, 2*k+1), make([]float64, 2*k+1)
	brc, brs := make([]float64, k+1), make([]float64, k+1)
	var bdc, bds []float64
	if deriv {
		bdc, bds = make([]float64, k+1), make([]float64, k+1)
	}
	var bdd, brd, bwx2, bw float64
	flush := func() {
		for m := range bC {
			s.C[m] += bC[m]
			s.S[m] += bS[m]
			bC[m], bS[m] = 0, 0
		}
		for j := range brc {
			s.rc[j] += brc[j]
			s.rs[j] += brs[j]
			brc[j], brs[j] = 0, 0
			if deriv {
				s.dc[j] += bdc[j]
				s.ds[j] += bds[j]
				bdc[j], bds[j] = 0, 0
			}
		}
		s.dd += bdd
		s.rd += brd
		s.wx2 += bwx2
		s.w += bw
		bdd, brd, bwx2, bw = 0, 0, 0, 0
	}
	cm[0] = 1
	for i := 0; i < n; i++ {
		s1, c1 := math.Sincos(theta * float64(i))
		if 2*k >= 1 {
			cm[1], sm[1] = c1, s1
		}
		for m := 2; m <= 2*k; m++ {
			cm[m] = cm[m-1]*c1 - sm[m-1]*s1
			sm[m] = sm[m-1]*c1 + cm[m-1]*s1
		}
		wi := w[i]
		wx := wi * x[i]
		for m := range cm {
			bC[m] += wi * cm[m]
			bS[m] += wi * sm[m]
		}
		for j := 0; j <= k; j++ {
			brc[j] += wx * cm[j]
			brs[j] += wx * sm[j]
		}
		bwx2 += wx * x[i]
		bw += wi
		if deriv {
			var d float64
			for j := 1; j <= k; j++ {
				d += float64(j) * (b[j]*cm[j] - a[j]*sm[j])
			}
			d *= (float64(i) - centre) / float64(n)
			wd := wi * d
			for j := 0; j <= k; j++ {
				bdc[j] += wd * cm[j]
				bds[j] += wd * sm[j]
			}
			bdd += wd * d
			brd += wx * d
		}
		if i%block == block-1 {
			flush()
		}
	}
	flush()
	return s
}

// errSingular is returned when the normal equations cannot be solved: the
// harmonics are not separable in this record.
var errSingular = errors.New("harmonics cannot be separated in this record")

// solve forms and solves the normal equations. Unknowns are ordered
// c, a_1..a_k, b_1..b_k (and δ for the frequency step), with
//
//	Σ w cos(jθn) cos(lθn) = (C[|j-l|] + C[j+l]) / 2
//	Σ w sin(jθn) sin(lθn) = (C[|j-l|] - C[j+l]) / 2
//	Σ w cos(jθn) sin(lθn) = (S[l+j] + S[l-j]) / 2,  S[-m] = -S[m].
func (s *sums) solve(theta float64, withStep bool, n int) (*fitResult, error) {
	k := s.k
	p := 2*k + 1
	size := p
	if withStep {
		size++
	}
	sv := func(m int) float64 {
		if m < 0 {
			return -s.S[-m]
		}
		return s.S[m]
	}
	g := mat.NewSymDense(size, nil)
	rhs := mat.NewVecDense(size, nil)
	ci := func(j int) int { return j }     // cos j (j = 0 is the DC column)
	si := func(j int) int { return k + j } // sin j, j >= 1
	for j := 0; j <= k; j++ {
		for l := j; l <= k; l++ {
			g.SetSym(ci(j), ci(l), (s.C[l-j]+s.C[j+l])/2)
		}
		for l := 1; l <= k; l++ {
			g.SetSym(ci(j), si(l), (sv(l+j)+sv(l-j))/2)
		}
		rhs.SetVec(ci(j), s.rc[j])
	}
	for j := 1; j <= k; j++ {
		for l := j; l <= k; l++ {
			g.SetSym(si(j), si(l), (s.C[l-j]-s.C[j+l])/2)
		}
		rhs.SetVec(si(j), s.rs[j])
	}
	if withStep {
		for j := 0; j <= k; j++ {
			g.SetSym(ci(j), p, s.dc[j])
		}
		for j := 1; j <= k; j++ {
			g.SetSym(si(j), p, s.ds[j])
		}
		g.SetSym(p, p, s.dd)
		rhs.SetVec(p, s.rd)
	}
	// Equilibrate: scale rows and columns to unit diagonal so that the
	// condition test below measures separability, not units.
	scale := make([]float64, size)
	for i := range scale {
		d := math.Abs(g.At(i, i))
		if !(d > 0) || math.IsInf(d, 0) {
			return nil, errSingular
		}
		scale[i] = 1 / math.Sqrt(d)
	}
	for i := 0; i < size; i++ {
		for j := i; j < size; j++ {
			g.SetSym(i, j, g.At(i, j)*scale[i]*scale[j])
		}
		rhs.SetVec(i, rhs.AtVec(i)*scale[i])
	}
	// LU rather than Cholesky: the flat-top window has negative weights,
	// so the matrix, though symmetric, need not be positive definite.
	var lu mat.LU
	lu.Factorize(g)
	if c := lu.Cond(); !(c < 1e12) {
		return nil, errSingular
	}
	var sol mat.VecDense
	if err := lu.SolveVecTo(&sol, false, rhs); err != nil {
		return nil, errSingular
	}
	f := &fitResult{theta: theta, a: make([]float64, k+1), b: make([]float64, k+1)}
	f.dc = sol.AtVec(0) * scale[0]
	for j := 1; j <= k; j++ {
		f.a[j] = sol.AtVec(ci(j)) * scale[ci(j)]
		f.b[j] = sol.AtVec(si(j)) * scale[si(j)]
	}
	if withStep {
		f.step = sol.AtVec(p) * scale[p] / float64(n)
	} else {
		// Σ w r² = Σ w x² - pᵀ(Jᵀ W x) at the least-squares solution.
		f.residual = s.wx2 - mat.Dot(&sol, rhs)
	}
	return f, nil
}

// fit solves the weighted least-squares problem for DC and harmonics 1..k
// at θ.
func fit(x, w []float64, theta float64, k int) (*fitResult, error) {
	return accumulate(x, w, theta, k, nil, nil).solve(theta, false, len(x))
}

// refine runs Gauss-Newton on θ from theta0, the four-parameter sine fit
// of IEEE Std 1057 extended to k harmonics: each pass fits the linear
// parameters at θ and, from the same sums, the step δ of the model
// linearised in θ, whose derivative column uses the previous pass's
// harmonics (at convergence they are those at θ, so the fixed point is the
// least-squares θ). Steps are capped at a quarter bin, and a step that
// raises the residual is halved back. It returns that fit and the number of passes.
func refine(x, w []float64, theta0 float64, k int) (*fitResult, int, error) {
	n := len(x)
	bin := 2 * math.Pi / float64(n)
	best, err := fit(x, w, theta0, k)
	if err != nil {
		return nil, 1, err
	}
	theta, prev := theta0, best
	passes := 1
	for passes < 60 {
		s := accumulate(x, w, theta, k, prev.a, prev.b)
		passes++
		cur, err := s.solve(theta, false, n)
		if err != nil {
			return nil, passes, err
		}
		// Residuals within rounding of the best count as no worse.
		if cur.residual > best.residual+1e-13*s.wx2 {
			if math.Abs(theta-best.theta) < 1e-11*bin {
				break
			}
			theta = (theta + best.theta) / 2 // worse: go back halfway
			continue
		}
		best = cur
		st, err := s.solve(theta, true, n)
		if err != nil {
			return nil, passes, err
		}
		step := max(-bin/4, min(bin/4, st.step))
		prev = cur
		if math.Abs(step) < 1e-11*bin || math.IsNaN(step) {
			break
		}
		theta += step
		if math.Abs(theta-theta0) > 2*bin {
			break // wandered off the peak; keep the best fit found
		}
	}
	return best, passes, nil
}
