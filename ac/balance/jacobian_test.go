package balance

import (
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestJacobianDifferences: the Jacobian-vector product (by FFT) and the
// dense Jacobian (conversion matrices) equal central differences of the
// residual, on the detector demo (a junction with charge and series
// resistance) for one tone and two, at a random point near the bias.
func TestJacobianDifferences(t *testing.T) {
	nw := network(t, demo(t, "detector"))
	rng := rand.New(rand.NewPCG(5, 6))
	for _, two := range []bool{false, true} {
		var spec *spectrum
		if two {
			var err error
			if spec, err = twoTones(3, Diamond, 2.45e9, 2.46e9, 2); err != nil {
				t.Fatal(err)
			}
		} else {
			spec = oneTone(6, 2.45e9, 2)
		}
		n := nw.N
		sys := newSystem(nw, newLinear(nw), spec, junctionsOf(nw), 0, 0.1, nil)
		sys.lambda = 1
		L := n * len(spec.products)
		x := make([]complex128, L)
		for i, v := range nw.Bias {
			x[i] = complex(v, 0)
		}
		for e := n; e < L; e++ {
			x[e] = complex(rng.NormFloat64(), rng.NormFloat64()) * 0.01
		}
		dx := make([]complex128, L)
		for e := range dx {
			dx[e] = complex(rng.NormFloat64(), rng.NormFloat64())
			if e < n {
				dx[e] = complex(real(dx[e]), 0)
			}
		}
		f := make([]complex128, L)
		sys.residual(x, f)
		jd := make([]complex128, L)
		sys.jacobian(dx, jd)
		J := sys.directJacobian()
		in := make([]float64, 2*L)
		for e, v := range dx {
			in[2*e], in[2*e+1] = real(v), imag(v)
		}
		var outV mat.VecDense
		outV.MulVec(J, mat.NewVecDense(2*L, in))
		// Central differences at h and h/2, combined by Richardson's
		// extrapolation (error O(h⁴)).
		diff := func(h float64) []complex128 {
			xp, xm := make([]complex128, L), make([]complex128, L)
			for e := range x {
				xp[e] = x[e] + complex(h, 0)*dx[e]
				xm[e] = x[e] - complex(h, 0)*dx[e]
			}
			fp, fm := make([]complex128, L), make([]complex128, L)
			other := newSystem(nw, newLinear(nw), spec, junctionsOf(nw), 0, 0.1, nil)
			other.lambda = 1
			other.residual(xp, fp)
			other.residual(xm, fm)
			for e := range fp {
				fp[e] = (fp[e] - fm[e]) / complex(2*h, 0)
			}
			return fp
		}
		d1, d2 := diff(1e-4), diff(5e-5)
		sys.residual(x, f) // restore weights of x
		for e := range d1 {
			want := (4*d2[e] - d1[e]) / 3
			got := jd[e]
			w := sys.weight[e]
			gotD := complex(outV.AtVec(2*e)/w, outV.AtVec(2*e+1)/w)
			if e < n {
				want = complex(real(want), imag(dx[e]))
			}
			tol := 1e-5*cmplx.Abs(want) + 1e-9*sys.scale[e] + 1e-15
			if cmplx.Abs(got-want) > tol || cmplx.Abs(gotD-want) > tol {
				t.Errorf("two tones %v, product %d unknown %d: FFT %v, dense %v, differences %v", two, e/n, e%n, got, gotD, want)
			}
		}
	}
}
