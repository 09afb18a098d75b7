package line

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Relation is a linear relation between the port voltages V and the port
// currents I of a P-port (each current flowing into the port's terminal
// and out of its return),
//
//	M V + N I = 0,
//
// P equations; M and N are row-major P×P. It describes a part at DC, where
// the S-matrix of a line (a short) or of a declared block exists but its
// impedance matrix may not.
type Relation struct {
	Ports int
	M, N  []float64
}

// Open is the relation of ports that carry no current: I = 0.
func Open(ports int) Relation {
	r := Relation{Ports: ports, M: make([]float64, ports*ports), N: make([]float64, ports*ports)}
	for k := 0; k < ports; k++ {
		r.N[k*ports+k] = 1
	}
	return r
}

// Through joins the ports of each group at DC: within a group the port
// voltages are equal and the currents sum to zero (a wire between the
// terminals, and one between the returns); ports in no group are open.
// Groups hold port indices and must not overlap.
func Through(ports int, groups [][]int) Relation {
	r := Open(ports)
	for _, g := range groups {
		if len(g) < 2 {
			continue
		}
		// Rows g[1..]: V_g0 - V_gk = 0; row g[0]: Σ I = 0.
		for _, k := range g {
			clear(r.M[k*ports : (k+1)*ports])
			clear(r.N[k*ports : (k+1)*ports])
		}
		for _, k := range g[1:] {
			r.M[k*ports+g[0]] = 1
			r.M[k*ports+k] = -1
		}
		for _, k := range g {
			r.N[g[0]*ports+k] = 1
		}
	}
	return r
}

// Resistance is V = R I for the row-major P×P resistance matrix R.
func Resistance(ports int, r []float64) Relation {
	rel := Relation{Ports: ports, M: make([]float64, ports*ports), N: make([]float64, ports*ports)}
	for k := 0; k < ports; k++ {
		rel.M[k*ports+k] = 1
	}
	for i, v := range r {
		rel.N[i] = -v
	}
	return rel
}

// SeriesRelation is the DC relation of a two-port line whose conductors
// have resistance r: V1 - V2 - r I1 = 0 and I1 + I2 = 0.
func SeriesRelation(r float64) Relation {
	return Relation{Ports: 2, M: []float64{1, -1, 0, 0}, N: []float64{-r, 0, 1, 1}}
}

// ErrNotPassive reports a relation that no passive reference termination
// makes solvable.
var ErrNotPassive = errors.New("the relation has no scattering matrix for these reference impedances")

// Scattering returns the S-matrix of the relation for real reference
// impedances refs: with a = (V + Z I)/(2√Z) and b = (V - Z I)/(2√Z)
// (Kurokawa, "Power waves and the scattering matrix", IEEE MTT 13(2),
// 1965, for real references), V = D(a + b) and I = D⁻¹(a - b),
// D = diag(√Z), so
//
//	S = -(M D - N D⁻¹)⁻¹ (M D + N D⁻¹),
//
// row-major. Open ports give S = 1, a short to the return S = -1.
func (r Relation) Scattering(refs []float64) ([]float64, error) {
	p := r.Ports
	l, rhs := mat.NewDense(p, p, nil), mat.NewDense(p, p, nil)
	for i := 0; i < p; i++ {
		for j := 0; j < p; j++ {
			d := math.Sqrt(refs[j])
			m, n := r.M[i*p+j], r.N[i*p+j]
			l.Set(i, j, m*d-n/d)
			rhs.Set(i, j, -(m*d + n/d))
		}
	}
	var s mat.Dense
	if err := s.Solve(l, rhs); err != nil {
		return nil, ErrNotPassive
	}
	out := make([]float64, p*p)
	for i := 0; i < p; i++ {
		for j := 0; j < p; j++ {
			out[i*p+j] = s.At(i, j)
		}
	}
	return out, nil
}

// LargestSingularValue returns the largest singular value of the complex
// P×P matrix s (row-major), the largest gain ‖S a‖/‖a‖ of the power
// waves: at most 1 for a passive network (Pozar, "Microwave Engineering",
// 4th ed., sec. 4.3: S^H S ≤ I), exactly 1 with equality for a lossless
// one. It is taken from gonum's SVD of the real 2P×2P matrix
// [[Re S, -Im S], [Im S, Re S]], whose singular values are those of S,
// each twice.
func LargestSingularValue(s []complex128, p int) float64 {
	m := mat.NewDense(2*p, 2*p, nil)
	for i := 0; i < p; i++ {
		for j := 0; j < p; j++ {
			z := s[i*p+j]
			m.Set(i, j, real(z))
			m.Set(i, j+p, -imag(z))
			m.Set(i+p, j, imag(z))
			m.Set(i+p, j+p, real(z))
		}
	}
	var svd mat.SVD
	if !svd.Factorize(m, mat.SVDNone) {
		return math.NaN()
	}
	return svd.Values(nil)[0]
}
