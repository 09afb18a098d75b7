package mixer

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"

	"qpoint/ac"
	"qpoint/ac/balance"
	"qpoint/smallsignal"
)

// pumped is one junction under the pump: the Fourier coefficients
//
//	X_p = (1/T) ∫ x(t) e^(-j p ω_LO t) dt,   p = -P..P (stored at p + P),
//
// of its conductance g(t) = di/dv, capacitance c(t) = dq/dv, current i(t)
// and shot-noise density s(t) over one LO period.
type pumped struct {
	p              int
	g, c, i, noise []complex128
}

func (w *pumped) at(x []complex128, p int) complex128 {
	if p < -w.p || p > w.p {
		return 0
	}
	return x[p+w.p]
}

// G returns the conductance coefficient G_p; C, I and S the others.
func (w *pumped) G(p int) complex128 { return w.at(w.g, p) }
func (w *pumped) C(p int) complex128 { return w.at(w.c, p) }
func (w *pumped) I(p int) complex128 { return w.at(w.i, p) }
func (w *pumped) S(p int) complex128 { return w.at(w.noise, p) }

// aliasRel is how much the coefficients may move when the time grid
// doubles, relative to the largest of their kind.
const aliasRel = 1e-10

// junctionWaves returns each junction's coefficients up to |p| ≤ P from
// the pump's harmonics (phasors of every unknown at harmonics 0..K). The
// voltage is sampled at S ≥ 4 max(2K + 1, 2P + 1) points, a power of two,
// and S doubles until no coefficient moves by more than aliasRel of the
// largest: the laws are exponentials, whose spectra have no end.
func junctionWaves(nw *smallsignal.Network, harm [][]complex128, P int) ([]pumped, int) {
	K := len(harm) - 1
	S := 8
	for S < 4*max(2*K+1, 2*P+1) {
		S *= 2
	}
	out := make([]pumped, len(nw.Diodes))
	for d, dd := range nw.Diodes {
		v := make([]complex128, K+1)
		for k := range v {
			if dd.Junction >= 0 {
				v[k] += harm[k][dd.Junction]
			}
			if dd.Cathode >= 0 {
				v[k] -= harm[k][dd.Cathode]
			}
		}
		v[0] = complex(real(v[0]), 0)
		w := sampleJunction(dd, v, P, S)
		for grid := S; grid < 1<<20; grid *= 2 {
			finer := sampleJunction(dd, v, P, 2*grid)
			if settledWaves(w, finer) {
				break
			}
			w, S = finer, 2*grid
		}
		out[d] = w
	}
	return out, S
}

// sampleJunction evaluates the device laws at S samples of the junction
// voltage v(θ) = V_0 + Σ_k Re{V_k e^(jkθ)} and returns the coefficients.
func sampleJunction(d smallsignal.Diode, v []complex128, P, S int) pumped {
	fft := fourier.NewCmplxFFT(S)
	z := make([]complex128, S)
	z[0] = v[0]
	for k := 1; k < len(v); k++ {
		z[k] += v[k] / 2
		z[S-k] += cmplx.Conj(v[k]) / 2
	}
	t := fft.Sequence(nil, z) // Σ_k z_k e^(+2πi ks/S)
	g, c, i, s := make([]complex128, S), make([]complex128, S), make([]complex128, S), make([]complex128, S)
	for n, vt := range t {
		u := real(vt)
		cur, chg := d.Device.Laws(u)
		g[n], c[n], i[n] = complex(cur.D1, 0), complex(chg.D1, 0), complex(cur.Value, 0)
		s[n] = complex(d.Device.ShotNoise(u), 0)
	}
	w := pumped{p: P}
	coef := func(x []complex128) []complex128 {
		f := fft.Coefficients(nil, x) // Σ_s x_s e^(-2πi ps/S)
		out := make([]complex128, 2*P+1)
		for p := -P; p <= P; p++ {
			out[p+P] = f[((p%S)+S)%S] / complex(float64(S), 0)
		}
		return out
	}
	w.g, w.c, w.i, w.noise = coef(g), coef(c), coef(i), coef(s)
	return w
}

// settledWaves reports whether two samplings agree within aliasRel.
func settledWaves(a, b pumped) bool {
	for _, pair := range [][2][]complex128{{a.g, b.g}, {a.c, b.c}, {a.i, b.i}, {a.noise, b.noise}} {
		scale := 0.0
		for _, x := range pair[1] {
			scale = math.Max(scale, cmplx.Abs(x))
		}
		for k := range pair[0] {
			if cmplx.Abs(pair[0][k]-pair[1][k]) > aliasRel*scale {
				return false
			}
		}
	}
	return true
}

// pumpHarmonics returns the phasors of every unknown at harmonics 0..K of
// the pump.
func pumpHarmonics(r *balance.Result) [][]complex128 {
	K := r.Stats.Harmonics
	h := make([][]complex128, K+1)
	for k := range h {
		h[k] = r.Harmonic(k)
	}
	return h
}

// portVoltage returns port i's voltage in x.
func portVoltage(nw *smallsignal.Network, i int, x []complex128) complex128 {
	p := nw.Ports[i]
	var v complex128
	if p.Node >= 0 {
		v += x[p.Node]
	}
	if p.Return >= 0 {
		v -= x[p.Return]
	}
	return v
}

// portCurrent returns the current port i's generator and termination
// drive into the network at its node, at angular frequency w, as the sum
// of the currents of the network's own elements there: the linear parts
// other than the port's termination, (G + jwC) x on the node's row, and
// the junction currents leaving the node (junctions[d], at this
// frequency). Summed over the elements, the small current into a
// high-impedance port keeps its digits, which (E - V)/Z0 would lose.
func portCurrent(nw *smallsignal.Network, i int, w float64, x, junctions []complex128) complex128 {
	p := nw.Ports[i]
	if p.Node < 0 {
		// The port's node is ground: the current enters at its return.
		return -rowCurrent(nw, p.Return, i, w, x, junctions)
	}
	return rowCurrent(nw, p.Node, i, w, x, junctions)
}

func rowCurrent(nw *smallsignal.Network, row, port int, w float64, x, junctions []complex128) complex128 {
	g, c := nw.GLinear.RawMatrix(), nw.CLinear.RawMatrix()
	var s complex128
	for j := 0; j < nw.N; j++ {
		gv, cv := g.Data[row*g.Stride+j], c.Data[row*c.Stride+j]
		if gv != 0 || cv != 0 {
			s += complex(gv, w*cv) * x[j]
		}
	}
	p := nw.Ports[port]
	t := complex(1/p.Impedance, 0)
	v := portVoltage(nw, port, x)
	if row == p.Node {
		s -= t * v
	} else {
		s += t * v
	}
	for d, dd := range nw.Diodes {
		if dd.Junction == row {
			s += junctions[d]
		}
		if dd.Cathode == row {
			s -= junctions[d]
		}
	}
	return s
}

// loFigures holds what the pump says about the LO and its leakage.
type loFigures struct {
	inputImpedance   complex128
	absorbedW        float64
	availableW       float64
	leakRFW, leakIFW float64
}

// loFiguresOf reads the LO port's impedance and power at the fundamental
// and the LO power reaching the RF and IF ports' terminations.
func loFiguresOf(nw *smallsignal.Network, s Settings, harm [][]complex128, waves []pumped) loFigures {
	x := harm[1]
	jc := make([]complex128, len(waves))
	for d := range waves {
		jc[d] = 2 * waves[d].I(1) // peak phasor of the fundamental
	}
	w := 2 * math.Pi * s.LOFrequencyHz
	v := portVoltage(nw, s.LO, x)
	i := portCurrent(nw, s.LO, w, x, jc)
	f := loFigures{availableW: ac.AvailablePower(s.LOEMF, nw.Ports[s.LO].Impedance)}
	f.inputImpedance = v / i
	f.absorbedW = real(v*cmplx.Conj(i)) / 2
	power := func(port int) float64 {
		vp := portVoltage(nw, port, x)
		return real(vp*cmplx.Conj(vp)) / (2 * nw.Ports[port].Impedance)
	}
	f.leakRFW, f.leakIFW = power(s.RF), power(s.IF)
	return f
}
