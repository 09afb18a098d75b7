package balance

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"

	"qpoint/bias/diode"
	"qpoint/smallsignal"
)

// junction is one diode's intrinsic junction between unknowns a (its
// internal anode) and b (its cathode), either of which may be ground.
type junction struct {
	name string
	a, b int
	dev  *diode.Device

	// At the last evaluation, on the S-point grid: the junction voltage,
	// the small-signal conductance g = di/dv and capacitance c = dq/dv.
	v, g, c []float64
	// The phasors of the junction current and charge at each product.
	i, q []complex128
}

func junctionsOf(nw *smallsignal.Network) []*junction {
	out := make([]*junction, len(nw.Diodes))
	for k, d := range nw.Diodes {
		out[k] = &junction{name: d.Name, a: d.Junction, b: d.Cathode, dev: d.Device}
	}
	return out
}

// voltage returns the junction's phasor at product k of x (n unknowns per
// product).
func (j *junction) voltage(x []complex128, k, n int) complex128 {
	var v complex128
	if j.a >= 0 {
		v += x[k*n+j.a]
	}
	if j.b >= 0 {
		v -= x[k*n+j.b]
	}
	return v
}

// stamp adds current i leaving the anode side and entering the cathode
// side, as the junction's own current does, to product k of f.
func (j *junction) stamp(f []complex128, k, n int, i complex128) {
	if j.a >= 0 {
		f[k*n+j.a] += i
	}
	if j.b >= 0 {
		f[k*n+j.b] -= i
	}
}

// grid moves between phasors and samples on the artificial time grid
// with gonum's FFT, planned once for the grid's size and run in place (a
// transform that allocated its output made most of a pumped mixer's
// garbage). Real signals are transformed two at a time, as the
// real and imaginary parts of one complex transform; the second is scaled
// by a power of two to the size of the first, since the transform's
// rounding follows the larger of the two (a junction's current in amperes
// beside its charge in coulombs would lose ten digits of the charge).
type grid struct {
	s   *spectrum
	fft *fourier.CmplxFFT
	buf []complex128
}

func newGrid(s *spectrum) *grid {
	return &grid{s: s, fft: fourier.NewCmplxFFT(s.samples), buf: make([]complex128, s.samples)}
}

// toTime returns the samples of the real signals whose phasors at the
// products are p1 and p2 (p2 may be nil):
//
//	x(θ_s) = X_0 + Σ_k Re{X_k e^(j a_k θ_s)},  θ_s = 2π s / S,
//
// as x1 + j x2 = conj(FFT(conj(Z))) with Z the two-sided spectrum of
// x1 + j x2.
func (g *grid) toTime(p1, p2 []complex128, x1, x2 []float64) {
	S := g.s.samples
	z := g.buf
	clear(z)
	scale := 1.0
	if p2 != nil {
		scale = balanceScale(maxAbsC(p1), maxAbsC(p2))
	}
	for k, pr := range g.s.products {
		v1 := p1[k]
		var v2 complex128
		if p2 != nil {
			v2 = p2[k] * complex(scale, 0)
		}
		if pr.a == 0 {
			z[0] = complex(real(v1), -real(v2)) // conj(Z[0])
			continue
		}
		// conj(Z) at a and at S-a, for x1 + j x2.
		h1, h2 := v1/2, v2/2
		za := h1 + complex(0, 1)*h2             // Z[a]
		zm := conj(h1) + complex(0, 1)*conj(h2) // Z[S-a]
		z[pr.a] += conj(za)
		z[S-pr.a] += conj(zm)
	}
	out := g.fft.Coefficients(z, z)
	for s := range x1 {
		x1[s] = real(out[s])
		if x2 != nil {
			x2[s] = -imag(out[s]) / scale
		}
	}
}

// balanceScale returns the power of two nearest a/b (1 when either is
// zero): the factor that brings a signal of size b to the size of a.
func balanceScale(a, b float64) float64 {
	if a == 0 || b == 0 || math.IsInf(a, 0) || math.IsInf(b, 0) || math.IsNaN(a) || math.IsNaN(b) {
		return 1
	}
	_, e := math.Frexp(a / b)
	return math.Ldexp(1, e)
}

func maxAbsC(p []complex128) float64 {
	m := 0.0
	for _, v := range p {
		if a := math.Abs(real(v)); a > m {
			m = a
		}
		if a := math.Abs(imag(v)); a > m {
			m = a
		}
	}
	return m
}

func maxAbs(x []float64) float64 {
	m := 0.0
	for _, v := range x {
		if a := math.Abs(v); a > m {
			m = a
		}
	}
	return m
}

// toPhasors returns the phasors at the products of the real signals with
// samples x1 and x2: X_0 = mean, X_k = (2/S) Σ_s x(θ_s) e^(-j a_k θ_s).
func (g *grid) toPhasors(x1, x2 []float64, p1, p2 []complex128) {
	S := g.s.samples
	z := g.buf
	m2 := maxAbs(x2)
	scale := balanceScale(maxAbs(x1), m2)
	for s := range z {
		z[s] = complex(x1[s], scale*x2[s])
	}
	w := g.fft.Coefficients(z, z)
	inv := 1 / float64(S)
	defer func() {
		if m2 == 0 {
			// Nothing but the first signal's rounding would show here.
			clear(p2)
		}
	}()
	for k, pr := range g.s.products {
		if pr.a == 0 {
			p1[k] = complex(real(w[0])*inv, 0)
			p2[k] = complex(imag(w[0])*inv/scale, 0)
			continue
		}
		wa, wm := w[pr.a], conj(w[S-pr.a])
		p1[k] = (wa + wm) * complex(inv, 0)
		p2[k] = (wa - wm) * complex(0, -inv/scale)
	}
}

// coefficients returns the two-sided Fourier coefficients of the real
// samples x1 and x2 at every artificial frequency -S/2 < p < S/2, as
// c(p) = (1/S) Σ_s x(θ_s) e^(-j p θ_s), stored at p mod S.
func (g *grid) coefficients(x1, x2 []float64, c1, c2 []complex128) {
	S := g.s.samples
	z := g.buf
	m2 := maxAbs(x2)
	scale := balanceScale(maxAbs(x1), m2)
	for s := range z {
		z[s] = complex(x1[s], scale*x2[s])
	}
	w := g.fft.Coefficients(z, z)
	inv := 1 / float64(S)
	if m2 == 0 {
		defer clear(c2)
	}
	for p := 0; p < S; p++ {
		wa, wm := w[p], conj(w[(S-p)%S])
		c1[p] = (wa + wm) * complex(inv/2, 0)
		c2[p] = (wa - wm) * complex(0, -inv/(2*scale))
	}
}

func conj(z complex128) complex128 { return complex(real(z), -imag(z)) }

// evaluate computes, for every junction, the samples of its voltage, the
// current and charge laws and their derivatives at those samples, and the
// current and charge phasors at the products (bias/diode holds the laws).
// It returns false when a sample is not finite.
func evaluate(g *grid, js []*junction, x []complex128, n int) bool {
	S, P := g.s.samples, len(g.s.products)
	vp := make([]complex128, P)
	iS, qS := make([]float64, S), make([]float64, S)
	ok := true
	for _, j := range js {
		if len(j.v) != S {
			j.v, j.g, j.c = make([]float64, S), make([]float64, S), make([]float64, S)
		}
		if len(j.i) != P {
			j.i, j.q = make([]complex128, P), make([]complex128, P)
		}
	}
	// Two junctions per inverse transform.
	vp2 := make([]complex128, P)
	for k := 0; k < len(js); k += 2 {
		j1 := js[k]
		for p := range vp {
			vp[p] = j1.voltage(x, p, n)
		}
		if k+1 < len(js) {
			j2 := js[k+1]
			for p := range vp2 {
				vp2[p] = j2.voltage(x, p, n)
			}
			g.toTime(vp, vp2, j1.v, j2.v)
		} else {
			g.toTime(vp, nil, j1.v, nil)
		}
	}
	for _, j := range js {
		for s, v := range j.v {
			cur, chg := j.dev.Current(v), j.dev.Charge(v)
			iS[s], qS[s] = cur.Value, chg.Value
			j.g[s], j.c[s] = cur.D1, chg.D1
			if math.IsNaN(cur.Value) || math.IsInf(cur.Value, 0) || math.IsNaN(chg.Value) || math.IsInf(chg.Value, 0) {
				ok = false
			}
		}
		g.toPhasors(iS, qS, j.i, j.q)
	}
	return ok
}
