package balance

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/mat"
)

// assemble adds the Jacobian of the balance at the last evaluated point,
// as a real matrix over the real and imaginary parts of every phasor
// (index 2(k·n + i) + part), to add: every entry when width is at least
// the number of products, else only the couplings between products whose
// artificial frequencies differ by at most width (a band about the
// diagonal in the products). The junctions enter through their
// conversion matrices: with γ_p and κ_p the two-sided Fourier
// coefficients of g(θ) = di/dv and c(θ) = dq/dv, a change dV_l of the
// junction voltage at product l changes its current at product k by
//
//	dI_k = γ_(a_k - a_l) dV_l + γ_(a_k + a_l) conj(dV_l)       (k, l ≥ 1)
//	dI_k = 2 γ_(a_k) dV_0,   dI_0 = Re(γ_(-a_l) dV_l),   dI_0 = γ_0 dV_0
//
// and its charge likewise with κ (Maas, "Nonlinear Microwave and RF
// Circuits", 2nd ed., 2003, ch. 3: the conversion matrices of harmonic
// balance).
func (sys *system) assemble(width int, add func(r, c int, v float64)) {
	n, P := sys.n, len(sys.spec.products)
	full := width >= sys.spec.products[P-1].a
	// addBlock adds the real form of dz ↦ A dz + B conj(dz) from the
	// phasor of unknown (l, j) to the equation of (k, i).
	addBlock := func(k, i, l, j int, A, B complex128) {
		r, c := 2*(k*n+i), 2*(l*n+j)
		switch {
		case k == 0 && l == 0:
			add(r, c, real(A+B))
		case k == 0:
			add(r, c, real(A)+real(B))
			add(r, c+1, imag(B)-imag(A))
		case l == 0:
			add(r, c, real(A+B))
			add(r+1, c, imag(A+B))
		default:
			add(r, c, real(A)+real(B))
			add(r, c+1, imag(B)-imag(A))
			add(r+1, c, imag(A)+imag(B))
			add(r+1, c+1, real(A)-real(B))
		}
	}
	lin := sys.lin
	for k := 0; k < P; k++ {
		y := lin.y[k]
		for i := 0; i < n; i++ {
			for e := lin.rowPtr[i]; e < lin.rowPtr[i+1]; e++ {
				addBlock(k, i, k, lin.cols[e], y[e], 0)
			}
		}
	}
	S := sys.spec.samples
	gamma, kappa := make([]complex128, S), make([]complex128, S)
	at := func(c []complex128, p int) complex128 { return c[((p%S)+S)%S] }
	for _, j := range sys.js {
		sys.grid.coefficients(j.g, j.c, gamma, kappa)
		for k, pk := range sys.spec.products {
			jw := complex(0, pk.omega)
			for l, pl := range sys.spec.products {
				if !full && abs(pk.a-pl.a) > width {
					continue
				}
				var A, B complex128
				conjugate := full || pk.a+pl.a <= width
				switch {
				case k == 0 && l == 0:
					A = at(gamma, 0)
				case k == 0:
					// B = conj(A): the DC row keeps its real form.
					A, B = at(gamma, -pl.a)/2, at(gamma, pl.a)/2
				case l == 0:
					A = 2 * (at(gamma, pk.a) + jw*at(kappa, pk.a))
				default:
					A = at(gamma, pk.a-pl.a) + jw*at(kappa, pk.a-pl.a)
					if conjugate {
						B = at(gamma, pk.a+pl.a) + jw*at(kappa, pk.a+pl.a)
					}
				}
				if j.a >= 0 {
					addBlock(k, j.a, l, j.a, A, B)
				}
				if j.b >= 0 {
					addBlock(k, j.b, l, j.b, A, B)
				}
				if j.a >= 0 && j.b >= 0 {
					addBlock(k, j.a, l, j.b, -A, -B)
					addBlock(k, j.b, l, j.a, -A, -B)
				}
			}
		}
	}
	// Im X_0 = 0.
	for i := 0; i < n; i++ {
		add(2*i+1, 2*i+1, 1)
	}
}

// directJacobian returns the whole Jacobian as a dense matrix, rows
// scaled by the residual weights.
func (sys *system) directJacobian() *mat.Dense {
	L := 2 * sys.n * len(sys.spec.products)
	J := mat.NewDense(L, L, nil)
	raw := J.RawMatrix()
	sys.assemble(math.MaxInt/4, func(r, c int, v float64) { raw.Data[r*raw.Stride+c] += v })
	for r := 0; r < L; r++ {
		w := sys.weight[r/2]
		row := raw.Data[r*raw.Stride : r*raw.Stride+L]
		for c := range row {
			row[c] *= w
		}
	}
	return J
}

// errSingularJacobian reports a Jacobian the direct solve cannot factor.
var errSingularJacobian = errors.New("the balance's Jacobian is singular")

// solveDirect solves J dx = -F with the dense Jacobian, rows weighted as
// the residual's.
func (sys *system) solveDirect(f, dx []complex128) error {
	J := sys.directJacobian()
	L := len(f) * 2
	b := make([]float64, L)
	for e, v := range f {
		w := sys.weight[e]
		b[2*e], b[2*e+1] = -real(v)*w, -imag(v)*w
	}
	var lu mat.LU
	lu.Factorize(J)
	x := mat.NewVecDense(L, nil)
	err := lu.SolveVecTo(x, false, mat.NewVecDense(L, b))
	var c mat.Condition
	if err != nil && !(errors.As(err, &c) && !math.IsInf(float64(c), 0)) {
		return errSingularJacobian
	}
	for e := range dx {
		dx[e] = complex(x.AtVec(2*e), x.AtVec(2*e+1))
	}
	return nil
}
