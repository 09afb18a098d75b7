package mixer

import (
	"fmt"
	"math"

	"qpoint/ac"
	"qpoint/smallsignal"
)

// conversion is the small-signal system about the pump at the sidebands
// ω_k = ω_IF + k ω_LO, k = -K..K (index s = k + K), reduced to the
// junctions. At sideband k the linear network with every port terminated
// is Y_k = G + jω_k C (the junctions left out), W_k = Y_k⁻¹, and with A
// the incidence of the junctions (column j: +1 at junction j's internal
// anode, -1 at its cathode) the unknowns are
//
//	X_k = W_k b_k - W_k A i_k,   v_k = Aᵀ X_k,
//	i_k = Σ_l M_kl v_l,   M_kl = diag_j(G^j_(k-l) + jω_k C^j_(k-l)),
//
// for injected currents b_k: the junction voltages solve
// (I + Z M) v = u with Z_k = Aᵀ W_k A (the embedding impedances, Held
// and Kerr 1978) and u_k = Aᵀ W_k b_k. The outputs come from W_k A, from
// W_k applied to the ports' incidences E, and from W_kᵀ A for the
// transposed (adjoint) solve of the noise.
type conversion struct {
	nw    *smallsignal.Network
	K, J  int
	omega []float64 // per sideband
	waves []pumped
	// Per sideband, columns of n: W_k A (J), W_kᵀ A (J), W_k E (ports).
	wa, aw, we [][][]complex128
	z          [][]complex128 // per sideband, J×J row-major
	q0         []complex128   // W_0ᵀ e_IF: the IF port voltage's transfer at the IF
	ifPort     int
	sys        *ac.ComplexLU // I + Z M over (2K+1)J unknowns
}

// maxConversionUnknowns bounds (2K+1)·n·(2J + ports), the complex
// numbers the conversion keeps, to about 1 GB.
const maxConversionUnknowns = 60_000_000

// newConversion assembles and factors the conversion at K sidebands each
// side.
func newConversion(nw *smallsignal.Network, s Settings, waves []pumped, K int) (*conversion, error) {
	n, J, P := nw.N, len(nw.Diodes), len(nw.Ports)
	if u := (2*K + 1) * n * (2*J + P); u > maxConversionUnknowns {
		return nil, fmt.Errorf("the conversion at %d sidebands would hold %d complex numbers; at most %d are taken: the circuit is too large for the mixer analysis", 2*K+1, u, maxConversionUnknowns)
	}
	cv := &conversion{nw: nw, K: K, J: J, waves: waves, ifPort: s.IF}
	wIF := 2 * math.Pi * s.IFHz()
	wLO := 2 * math.Pi * s.LOFrequencyHz
	S := 2*K + 1
	cv.omega = make([]float64, S)
	cv.wa, cv.aw, cv.we = make([][][]complex128, S), make([][][]complex128, S), make([][][]complex128, S)
	cv.z = make([][]complex128, S)
	g, c := nw.GLinear.RawMatrix(), nw.CLinear.RawMatrix()
	lu := ac.NewComplexLU(n)
	for sb := 0; sb < S; sb++ {
		k := sb - K
		w := wIF + float64(k)*wLO
		cv.omega[sb] = w
		a := lu.Matrix()
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				a[i*n+j] = complex(g.Data[i*g.Stride+j], w*c.Data[i*c.Stride+j])
			}
		}
		// Lines and measured blocks: their rows at this sideband (the
		// conjugate of the positive frequency's below zero).
		nw.Stamp(w, a, n)
		if err := lu.Factor(); err != nil {
			return nil, fmt.Errorf("the linear network is singular at the sideband %+d (%.6g Hz): %w", k, math.Abs(w)/(2*math.Pi), err)
		}
		cv.wa[sb], cv.aw[sb] = make([][]complex128, J), make([][]complex128, J)
		for j, d := range nw.Diodes {
			col := incidence(n, d.Junction, d.Cathode)
			t := append([]complex128(nil), col...)
			lu.Solve(col)
			lu.SolveT(t)
			cv.wa[sb][j], cv.aw[sb][j] = col, t
		}
		cv.we[sb] = make([][]complex128, P)
		for p, port := range nw.Ports {
			col := incidence(n, port.Node, port.Return)
			lu.Solve(col)
			cv.we[sb][p] = col
		}
		if k == 0 {
			port := nw.Ports[s.IF]
			cv.q0 = incidence(n, port.Node, port.Return)
			lu.SolveT(cv.q0)
		}
		z := make([]complex128, J*J)
		for j, d := range nw.Diodes {
			for m := 0; m < J; m++ {
				z[j*J+m] = at(cv.wa[sb][m], d.Junction) - at(cv.wa[sb][m], d.Cathode)
			}
		}
		cv.z[sb] = z
	}
	// I + Z M.
	N := S * J
	cv.sys = ac.NewComplexLU(N)
	m := cv.sys.Matrix()
	for sk := 0; sk < S; sk++ {
		for j := 0; j < J; j++ {
			row := (sk*J + j) * N
			m[row+sk*J+j] += 1
			for sl := 0; sl < S; sl++ {
				for q := 0; q < J; q++ {
					if z := cv.z[sk][j*J+q]; z != 0 {
						m[row+sl*J+q] += z * cv.element(q, sk, sl)
					}
				}
			}
		}
	}
	if err := cv.sys.Factor(); err != nil {
		return nil, fmt.Errorf("the conversion matrix at %d sidebands is singular: %w", S, err)
	}
	return cv, nil
}

// element returns junction j's conversion entry from sideband l to
// sideband k (indices sk, sl): G_(k-l) + jω_k C_(k-l).
func (cv *conversion) element(j, sk, sl int) complex128 {
	p := sk - sl
	w := cv.waves[j]
	return w.G(p) + complex(0, cv.omega[sk])*w.C(p)
}

// incidence returns the n-vector with +1 at a and -1 at b (either may be
// ground).
func incidence(n, a, b int) []complex128 {
	v := make([]complex128, n)
	if a >= 0 {
		v[a] += 1
	}
	if b >= 0 {
		v[b] -= 1
	}
	return v
}

func at(x []complex128, i int) complex128 {
	if i < 0 {
		return 0
	}
	return x[i]
}

// solution is the small signal at every sideband for one excitation.
type solution struct {
	x [][]complex128 // X_k per sideband
	i [][]complex128 // junction currents per sideband
}

// excite solves for a Norton current cur injected at port p (into its
// node, out of its return) at sideband k.
func (cv *conversion) excite(p, k int, cur complex128) solution {
	S, J, n := 2*cv.K+1, cv.J, cv.nw.N
	sk := k + cv.K
	u := make([]complex128, S*J)
	for j, d := range cv.nw.Diodes {
		col := cv.we[sk][p]
		u[sk*J+j] = cur * (at(col, d.Junction) - at(col, d.Cathode))
	}
	cv.sys.Solve(u) // u now holds v
	sol := solution{x: make([][]complex128, S), i: make([][]complex128, S)}
	for s := 0; s < S; s++ {
		ik := make([]complex128, J)
		for j := 0; j < J; j++ {
			var sum complex128
			for l := 0; l < S; l++ {
				sum += cv.element(j, s, l) * u[l*J+j]
			}
			ik[j] = sum
		}
		x := make([]complex128, n)
		if s == sk {
			for e, v := range cv.we[s][p] {
				x[e] = cur * v
			}
		}
		for j := 0; j < J; j++ {
			for e, v := range cv.wa[s][j] {
				x[e] -= v * ik[j]
			}
		}
		sol.x[s], sol.i[s] = x, ik
	}
	return sol
}

// ifTransfers returns r_k, per sideband, such that the IF port's voltage
// at the IF is Σ_k r_kᵀ b_k for any injected currents b_k: from
//
//	V_IF = e_IFᵀ W_0 b_0 - e_IFᵀ W_0 A (M v)_0,   v = (I + Z M)⁻¹ u,
//
// with ρ the row that takes v to the second term, σ = (I + Z M)⁻ᵀ ρ by
// one transposed solve, and r_k = δ_k0 W_0ᵀ e_IF + W_kᵀ A σ_k.
func (cv *conversion) ifTransfers() [][]complex128 {
	S, J, n := 2*cv.K+1, cv.J, cv.nw.N
	s0 := cv.K
	port := cv.nw.Ports[cv.ifPort]
	h := make([]complex128, J) // e_IFᵀ W_0 A
	for j := 0; j < J; j++ {
		h[j] = at(cv.wa[s0][j], port.Node) - at(cv.wa[s0][j], port.Return)
	}
	rho := make([]complex128, S*J)
	for l := 0; l < S; l++ {
		for j := 0; j < J; j++ {
			rho[l*J+j] = -h[j] * cv.element(j, s0, l)
		}
	}
	cv.sys.SolveT(rho) // σ
	r := make([][]complex128, S)
	for s := 0; s < S; s++ {
		v := make([]complex128, n)
		if s == s0 {
			copy(v, cv.q0)
		}
		for j := 0; j < J; j++ {
			sig := rho[s*J+j]
			if sig == 0 {
				continue
			}
			for e, a := range cv.aw[s][j] {
				v[e] += a * sig
			}
		}
		r[s] = v
	}
	return r
}
