package ac

import (
	"fmt"
	"math"
	"math/cmplx"

	"qpoint/smallsignal"
)

// Output selects where distortion is observed: the voltage across a port
// (Port >= 0) or of a node to ground (Port < 0, Node named).
type Output struct {
	Port int
	Node string
}

// Unknowns returns the unknowns of nw whose difference is the output
// voltage, x[plus] - x[minus]: a port's node and return, or the named
// node and -1; either is -1 where it is the reference node.
func (o Output) Unknowns(nw *smallsignal.Network) (plus, minus int, err error) {
	if o.Port >= 0 {
		if o.Port >= len(nw.Ports) {
			return -1, -1, fmt.Errorf("output port %d: the circuit has %d ports", o.Port+1, len(nw.Ports))
		}
		p := nw.Ports[o.Port]
		return p.Node, p.Return, nil
	}
	i, ok := nw.Nodes[o.Node]
	if !ok {
		return -1, -1, fmt.Errorf("output node %q is not in the circuit", o.Node)
	}
	return i, -1, nil
}

// OutputVector returns e with the output voltage eᵀx (see Unknowns).
func OutputVector[T float64 | complex128](nw *smallsignal.Network, o Output) ([]T, error) {
	plus, minus, err := o.Unknowns(nw)
	if err != nil {
		return nil, err
	}
	e := make([]T, nw.N)
	if plus >= 0 {
		e[plus] = 1
	}
	if minus >= 0 {
		e[minus] = -1
	}
	return e, nil
}

// Drive describes the signal: port Input's generator, of EMF amplitude EMF
// (peak volts per tone) behind the port's reference impedance, at
// FrequencyHz, and optionally a second tone of the same EMF at SecondToneHz.
type Drive struct {
	Input        int
	Output       Output
	FrequencyHz  float64
	EMF          float64
	SecondToneHz float64 // zero: one tone
}

// Product names a distortion product.
type Product string

// The products of the Volterra estimate.
const (
	DC      Product = "dc"       // rectified shift of the output's DC level
	Gain3   Product = "gain3"    // third-order term at f1: compression or expansion, AM-to-PM
	HD2     Product = "hd2"      // 2 f1
	HD3     Product = "hd3"      // 3 f1
	IM2Sum  Product = "im2_sum"  // f1 + f2
	IM2Diff Product = "im2_diff" // f1 - f2
	IM3     Product = "im3"      // 2 f1 - f2
)

// Nonlinearity names the source of a contribution: the junction's current
// law or its charge law.
type Nonlinearity string

// The two nonlinearities of a junction.
const (
	CurrentLaw Nonlinearity = "current"
	ChargeLaw  Nonlinearity = "charge"
)

// Contribution is one diode's share of one product at the output.
type Contribution struct {
	Product Product
	Diode   string
	Source  Nonlinearity
	Phasor  complex128 // output phasor this source alone produces, V
	// Percent is the projection of Phasor on the product's total, in
	// percent of the total's magnitude; the shares of a product sum to
	// 100. NaN when the product is balanced out (see Estimate.Balanced).
	Percent float64
}

// Estimate is the Volterra (weakly nonlinear) estimate of distortion at the
// output, to third order. Phasors are peak volts with the cosine reference
// of the input generator.
type Estimate struct {
	Drive Drive
	// Outside lists the blocks and microstrips that some product's
	// frequency lies outside the data or models of (a caution).
	Outside []smallsignal.OutsideRange

	// Linear is the first-order (small-signal) output at f1, and
	// Fundamental the output at f1 to third order: Linear plus the
	// third-order term of the first tone alone, which carries the gain
	// compression (or expansion) and the AM-to-PM conversion. Products in
	// dBc and the intercepts are taken relative to Linear, so that they
	// follow the exact slopes of the weakly nonlinear range (HD2 1 dB/dB,
	// HD3 and IM3 2 dB/dB relative).
	Linear      complex128
	Fundamental complex128
	HD2, HD3    complex128 // output at 2 f1 and 3 f1
	DCShift     float64    // change of the output's DC level, V

	SecondFundamental complex128 // output at f2 (two tones)
	IM2Sum, IM2Diff   complex128 // output at f1 + f2 and f1 - f2
	IM3               complex128 // output at 2 f1 - f2

	Contributions []Contribution

	// Junctions holds each diode's first-order junction voltage phasor at
	// f1 (peak volts): |v|/(n V_T) is the drive's x, the measure of how
	// weakly nonlinear the junction runs.
	Junctions []complex128

	inputZ0, outputZ0 float64 // outputZ0 is zero for a bare node
	balanced          []Product
}

// balancedRatio is how far below the sum of its contributions' magnitudes
// a product must lie to count as cancelled: the contributions of a
// balanced circuit cancel to rounding, about 1e-16 of each.
const balancedRatio = 1e-9

// Balanced reports whether the circuit's symmetry cancels product p: its
// contributions are large but sum to rounding noise. Its level and the
// intercept built on it are then not meaningful numbers; the product
// appears in practice only through the parts' mismatch.
func (e *Estimate) Balanced(p Product) bool {
	for _, b := range e.balanced {
		if b == p {
			return true
		}
	}
	return false
}

// Clone returns a copy of the estimate that shares no storage with it, for
// keeping an estimate a workspace or VolterraSweep will overwrite.
func (e *Estimate) Clone() *Estimate {
	c := *e
	c.Contributions = append([]Contribution(nil), e.Contributions...)
	c.Junctions = append([]complex128(nil), e.Junctions...)
	c.balanced = append([]Product(nil), e.balanced...)
	return &c
}

// OneTone returns the estimate as the first tone alone would give it: the
// one-tone products of a two-tone estimate are the same numbers, so
// nothing is solved again.
func (e *Estimate) OneTone() *Estimate {
	one := *e
	one.Drive.SecondToneHz = 0
	one.SecondFundamental, one.IM2Sum, one.IM2Diff, one.IM3 = 0, 0, 0, 0
	one.Contributions = nil
	for _, c := range e.Contributions {
		if c.Product == DC || c.Product == HD2 || c.Product == HD3 || c.Product == Gain3 {
			one.Contributions = append(one.Contributions, c)
		}
	}
	one.balanced = nil
	for _, p := range e.balanced {
		if p == DC || p == HD2 || p == HD3 || p == Gain3 {
			one.balanced = append(one.balanced, p)
		}
	}
	return &one
}

// dBc returns 20 log10(|p| / |Linear|).
func (e *Estimate) dBc(p complex128) float64 {
	return 20 * math.Log10(cmplx.Abs(p)/cmplx.Abs(e.Linear))
}

// GainChangeDB returns the change of the gain at f1 that the third-order
// term brings at this level, 20 log10(|Fundamental| / |Linear|) in dB:
// negative for compression, positive for expansion.
func (e *Estimate) GainChangeDB() float64 {
	return 20 * math.Log10(cmplx.Abs(e.Fundamental)/cmplx.Abs(e.Linear))
}

// PhaseChangeDeg returns the phase the third-order term adds to the
// output at f1 at this level, arg(Fundamental / Linear) in degrees.
func (e *Estimate) PhaseChangeDeg() float64 {
	return cmplx.Phase(e.Fundamental/e.Linear) * 180 / math.Pi
}

// series returns r = a3/a1, the ratio of the third-order to the
// first-order coefficient of the output at f1 in powers of the EMF:
// Fundamental = Linear (1 + r E²).
func (e *Estimate) series() complex128 {
	E := e.Drive.EMF
	return (e.Fundamental - e.Linear) / (e.Linear * complex(E*E, 0))
}

// AMPMDegPerDB returns the AM-to-PM conversion of the third-order series
// at this level: dφ/dP_in in degrees per dB, with φ = arg(1 + r E²) and
// E² ∝ 10^(P_in/10), so dφ/dP = Im(r E² / (1 + r E²)) ln 10 / 10 (common
// practice: the slope of the output phase against input power).
func (e *Estimate) AMPMDegPerDB() float64 {
	E := e.Drive.EMF
	rs := e.series() * complex(E*E, 0)
	return imag(rs/(1+rs)) * math.Ln10 / 10 * 180 / math.Pi
}

// GainStepDBm returns the available input power (dBm per tone) at which
// the third-order series Linear·(1 + r E²) changes the gain at f1 by
// stepDB, and whether that is a compression (true) or an expansion. It
// solves |1 + r s| = 10^(∓stepDB/20) for the smallest s = E² > 0, trying
// compression first: with t = 10^(-stepDB/10) - 1 the quadratic
// |r|² s² + 2 Re(r) s - t = 0. It returns NaN when the series changes the
// gain by less than stepDB at every level (r = 0). This is the estimate a
// third-order model gives (for a memoryless cubic, 9.6 dB below IIP3:
// common practice); above it the higher orders the series leaves out
// matter, so set it beside the waveform's.
func (e *Estimate) GainStepDBm(stepDB float64) (float64, bool) {
	r := e.series()
	r2 := real(r)*real(r) + imag(r)*imag(r)
	if r2 == 0 || cmplx.IsNaN(r) || math.IsInf(r2, 0) {
		return math.NaN(), false
	}
	smallest := func(target float64) float64 {
		t := target - 1 // |1 + r s|² = target
		// r2 s² + 2 Re(r) s - t = 0
		b, c := 2*real(r), -t
		disc := b*b - 4*r2*c
		if disc < 0 {
			return math.NaN()
		}
		sq := math.Sqrt(disc)
		best := math.NaN()
		for _, s := range []float64{(-b - sq) / (2 * r2), (-b + sq) / (2 * r2)} {
			if s > 0 && (math.IsNaN(best) || s < best) {
				best = s
			}
		}
		return best
	}
	down := smallest(math.Pow(10, -stepDB/10))
	up := smallest(math.Pow(10, stepDB/10))
	compress := !math.IsNaN(down) && (math.IsNaN(up) || down <= up)
	s := up
	if compress {
		s = down
	}
	if math.IsNaN(s) {
		return math.NaN(), false
	}
	return EMFToDBm(math.Sqrt(s), e.inputZ0), compress
}

// HD2dBc returns the second harmonic relative to the fundamental, in dB.
func (e *Estimate) HD2dBc() float64 { return e.dBc(e.HD2) }

// HD3dBc returns the third harmonic relative to the fundamental, in dB.
func (e *Estimate) HD3dBc() float64 { return e.dBc(e.HD3) }

// IM2dBc returns the f1 - f2 product relative to the output at f1, in dB.
func (e *Estimate) IM2dBc() float64 { return e.dBc(e.IM2Diff) }

// IM3dBc returns the 2 f1 - f2 product relative to the output at f1, in dB.
func (e *Estimate) IM3dBc() float64 { return e.dBc(e.IM3) }

// InputDBm returns the available power of the input generator per tone:
// E²/(8 Z0), in dBm.
func (e *Estimate) InputDBm() float64 { return EMFToDBm(e.Drive.EMF, e.inputZ0) }

// OutputDBm returns the small-signal fundamental's power into the output
// port's reference impedance, |Linear|²/(2 Z0), in dBm, and false for a
// bare node.
func (e *Estimate) OutputDBm() (float64, bool) {
	if e.outputZ0 == 0 {
		return 0, false
	}
	a := cmplx.Abs(e.Linear)
	return 10 * math.Log10(a*a/(2*e.outputZ0)*1e3), true
}

// IIP3dBm returns the input third-order intercept, P_in - IM3dBc/2: the
// fundamental rises 1 dB/dB and the third-order product 3 dB/dB (common
// practice).
func (e *Estimate) IIP3dBm() float64 { return e.InputDBm() - e.IM3dBc()/2 }

// OIP3dBm returns the output third-order intercept, P_out - IM3dBc/2, and
// false for a bare node.
func (e *Estimate) OIP3dBm() (float64, bool) {
	p, ok := e.OutputDBm()
	return p - e.IM3dBc()/2, ok
}

// IIP2dBm returns the input second-order intercept from the difference
// product, P_in - IM2dBc.
func (e *Estimate) IIP2dBm() float64 { return e.InputDBm() - e.IM2dBc() }

// AvailablePower returns the power a generator of EMF amplitude emf (peak
// volts) behind a real z0 delivers into a matched load, E²/(8 z0) in
// watts: half the EMF across the load, |E/2|²/(2 z0) (common practice).
func AvailablePower(emf, z0 float64) float64 { return emf * emf / (8 * z0) }

// EMFToDBm converts a generator EMF amplitude behind z0 to its available
// power AvailablePower in dBm.
func EMFToDBm(emf, z0 float64) float64 {
	return 10 * math.Log10(AvailablePower(emf, z0)*1e3)
}

// DBmToEMF converts available power in dBm behind z0 to the generator's
// EMF amplitude, E = sqrt(8 z0 P), the inverse of EMFToDBm.
func DBmToEMF(dbm, z0 float64) float64 {
	return math.Sqrt(8 * z0 * math.Pow(10, dbm/10) * 1e-3)
}

// volterra holds the factorisations and vectors of one estimate.
type volterra struct {
	nw      *smallsignal.Network
	n       int
	out     []complex128 // selects the output: e_out
	adjoint []complex128 // the last adjoint solution, Y(jw)⁻ᵀ e_out
	sys     solver       // Y(jw) at the products' frequencies
	ws      *Workspace   // storage for the products and the DC factorisation
}

// solveAt solves Y(jw) x = b in place and returns the adjoint vector
// z = Y(jw)⁻ᵀ e_out, which the next call overwrites. At w = 0 the
// AC-coupled ports' DC blocks are open.
func (v *volterra) solveAt(w float64, b []complex128) ([]complex128, error) {
	var f solver = v.sys
	if w == 0 {
		// Within one VolterraSweep the network's DC matrix stays the
		// same: it is factored once.
		dc := &v.ws.dc
		if !v.ws.dcFactored {
			dc = v.ws.dcSolver(v.nw)
			if err := dc.f.factor(); err != nil {
				return nil, fmt.Errorf("at %g Hz: %w", w/(2*math.Pi), err)
			}
			v.ws.dcFactored = v.ws.keepDC
		}
		f = dc
	} else if err := f.at(w); err != nil {
		return nil, fmt.Errorf("at %g Hz: %w", w/(2*math.Pi), err)
	}
	if b != nil {
		f.solve(b)
	}
	z := append(v.adjoint[:0], v.out...)
	f.solveT(z)
	v.adjoint = z
	return z, nil
}

// junction returns diode k's junction phasor in x.
func (v *volterra) junction(k int, x []complex128) complex128 {
	d := v.nw.Diodes[k]
	return at(x, d.Junction) - at(x, d.Cathode)
}

func at(x []complex128, i int) complex128 {
	if i < 0 {
		return 0
	}
	return x[i]
}

// inject adds current i flowing through diode k's junction from its
// internal anode to its cathode, as the diode's own current does.
func (v *volterra) inject(k int, i complex128, b []complex128) {
	d := v.nw.Diodes[k]
	if d.Junction >= 0 {
		b[d.Junction] -= i
	}
	if d.Cathode >= 0 {
		b[d.Cathode] += i
	}
}

// product assembles the sources of one product (per diode: current part,
// charge part before the jw factor), solves for the node phasors, and
// records each source's contribution to the output through the adjoint.
func (v *volterra) product(p Product, w float64, cur, chg []complex128, scale complex128, est *Estimate) ([]complex128, complex128, error) {
	b := vector(v.ws.sources, v.n)
	v.ws.sources = b
	jw := complex(0, w)
	for k := range v.nw.Diodes {
		v.inject(k, cur[k]+jw*chg[k], b)
	}
	z, err := v.solveAt(w, b)
	if err != nil {
		return nil, 0, err
	}
	total := v.output(b) * scale
	parts := v.ws.parts[:0]
	for k, d := range v.nw.Diodes {
		t := at(z, d.Junction) - at(z, d.Cathode)
		parts = append(parts,
			Contribution{Product: p, Diode: d.Name, Source: CurrentLaw, Phasor: -cur[k] * t * scale},
			Contribution{Product: p, Diode: d.Name, Source: ChargeLaw, Phasor: -jw * chg[k] * t * scale})
	}
	v.ws.parts = parts
	gross := 0.0
	for _, c := range parts {
		gross += cmplx.Abs(c.Phasor)
	}
	if cmplx.Abs(total) <= balancedRatio*gross {
		est.balanced = append(est.balanced, p)
	}
	for i := range parts {
		switch {
		case cmplx.Abs(total) <= balancedRatio*gross:
			parts[i].Percent = math.NaN()
		case total != 0:
			parts[i].Percent = 100 * real(parts[i].Phasor*cmplx.Conj(total)) / (cmplx.Abs(total) * cmplx.Abs(total))
		}
	}
	est.Contributions = append(est.Contributions, parts...)
	return b, total, nil
}

// output returns the output voltage in the solution x.
func (v *volterra) output(x []complex128) complex128 {
	var s complex128
	for i, e := range v.out {
		if e != 0 {
			s += e * x[i]
		}
	}
	return s
}

// Volterra estimates the distortion the drive produces at the output, to
// third order in the EMF, by the method of nonlinear currents (Bussgang,
// Ehrman, Graham, Proc. IEEE 62(8), 1974; Wambacq and Sansen, "Distortion
// Analysis of Analog Integrated Circuits", 1998). With v_1 each junction's
// first-order phasor and g_k, c_k the Taylor coefficients of its current
// and charge, the junction carries, in parallel with itself,
//
//	at 2w:  (g2 + j2w c2) v_1²/2        at DC: g2 |v_1|²/2
//	at 3w:  (g3 + j3w c3) v_1³/4 + (g2 + j3w c2) v_1 v_2
//	at w:   (3/4)(g3 + jw c3) |v_1|² v_1 + (g2 + jw c2)(2 v_0 v_1 + v_1* v_2)
//
// where v_0 and v_2 are the junction's own DC shift and second-harmonic
// phasor; the last is the third-order term of the fundamental (gain
// compression or expansion and AM-to-PM).
//
// and with a second tone v_b at w2: (g2 + j w_s c2) v_a v_b at w1 + w2,
// (g2 + j w_d c2) v_a v_b* at w1 - w2, and at 2w1 - w2
// (3/4)(g3 + j w c3) v_a² v_b* + (g2 + j w c2)(v_a v_d + v_2a v_b*).
// Each order is solved on the linear network at its own frequency.
func Volterra(nw *smallsignal.Network, d Drive) (*Estimate, error) {
	return volterraOn(nw, d, engineAuto)
}

func volterraOn(nw *smallsignal.Network, d Drive, choice engine) (*Estimate, error) {
	return new(Workspace).volterraOn(nw, d, choice)
}

// Volterra is the package's Volterra in the workspace's storage. The
// Estimate it returns is overwritten by the workspace's next call to
// Volterra.
func (ws *Workspace) Volterra(nw *smallsignal.Network, d Drive) (*Estimate, error) {
	return ws.volterraOn(nw, d, engineAuto)
}

// productFrequencies appends the frequencies at which an estimate of d
// solves Y(jw): f1, 2 f1, 3 f1 and, with a second tone, f2, f1 + f2,
// f1 - f2 and 2 f1 - f2.
func productFrequencies(dst []float64, d Drive) []float64 {
	dst = append(dst, d.FrequencyHz, 2*d.FrequencyHz, 3*d.FrequencyHz)
	if d.SecondToneHz != 0 {
		f1, f2 := d.FrequencyHz, d.SecondToneHz
		dst = append(dst, f2, f1+f2, f1-f2, 2*f1-f2)
	}
	return dst
}

// VolterraSweep estimates distortion at each frequency of freqsHz: the
// drive d with its first tone moved there (and a second tone, if any,
// kept at the same offset from it). All the estimates share one solver
// for Y(jw) over every product frequency, so a long sweep of a larger
// network runs on the reduced engine (O(n²) a frequency) as Sweep and
// Noise do, instead of dense LUs per product. visit receives each
// estimate in turn; the estimate is overwritten by the next, so visit
// copies what it keeps.
func VolterraSweep(nw *smallsignal.Network, d Drive, freqsHz []float64, visit func(*Estimate) error) error {
	return new(Workspace).volterraSweep(nw, d, freqsHz, visit, engineAuto)
}

func (ws *Workspace) volterraSweep(nw *smallsignal.Network, d Drive, freqsHz []float64, visit func(*Estimate) error, choice engine) error {
	offset := d.SecondToneHz - d.FrequencyHz
	drive := func(f float64) Drive {
		x := d
		x.FrequencyHz = f
		if d.SecondToneHz != 0 {
			x.SecondToneHz = f + offset
		}
		return x
	}
	var all []float64
	for _, f := range freqsHz {
		all = productFrequencies(all, drive(f))
	}
	sys := newSolver(nw, all, choice)
	ws.keepDC, ws.dcFactored = true, false
	defer func() { ws.keepDC, ws.dcFactored = false, false }()
	for _, f := range freqsHz {
		e, err := ws.volterraWith(nw, drive(f), sys)
		if err != nil {
			return err
		}
		if err := visit(e); err != nil {
			return err
		}
	}
	return nil
}

func (ws *Workspace) volterraOn(nw *smallsignal.Network, d Drive, choice engine) (*Estimate, error) {
	if err := checkDrive(nw, d); err != nil {
		return nil, err
	}
	// Y(jw) is solved at the products' frequencies: a few points, where
	// the LU is usually cheaper than a reduction (newSolver decides).
	ws.frequencies = productFrequencies(ws.frequencies[:0], d)
	return ws.volterraWith(nw, d, ws.estimateSolver(nw, ws.frequencies, choice))
}

// checkDrive refuses a drive the estimate cannot take.
func checkDrive(nw *smallsignal.Network, d Drive) error {
	if d.Input < 0 || d.Input >= len(nw.Ports) {
		return fmt.Errorf("input port %d: the circuit has %d ports", d.Input+1, len(nw.Ports))
	}
	if err := CheckFrequency(d.FrequencyHz); err != nil {
		return err
	}
	if d.SecondToneHz != 0 {
		if err := CheckFrequency(d.SecondToneHz); err != nil {
			return err
		}
		if d.SecondToneHz == d.FrequencyHz {
			return fmt.Errorf("the second tone must differ from the first (both %g Hz)", d.FrequencyHz)
		}
	}
	return nil
}

// volterraWith makes the estimate with sys solving Y(jw) at its products'
// frequencies.
func (ws *Workspace) volterraWith(nw *smallsignal.Network, d Drive, sys solver) (*Estimate, error) {
	if err := checkDrive(nw, d); err != nil {
		return nil, err
	}
	v := &ws.volterra
	*v = volterra{nw: nw, n: nw.N, out: vector(v.out, nw.N), adjoint: v.adjoint, sys: sys, ws: ws}
	if ws.estimate == nil {
		ws.estimate = new(Estimate)
	}
	est := ws.estimate
	*est = Estimate{Drive: d, inputZ0: nw.Ports[d.Input].Impedance,
		Contributions: est.Contributions[:0], Junctions: est.Junctions[:0], balanced: est.balanced[:0]}
	if nw.HasElements() {
		est.Outside = nw.Outside(productFrequencies(nil, d))
	}
	plus, minus, err := d.Output.Unknowns(nw)
	if err != nil {
		return nil, err
	}
	if plus >= 0 {
		v.out[plus] = 1
	}
	if minus >= 0 {
		v.out[minus] = -1
	}
	if d.Output.Port >= 0 {
		est.outputZ0 = nw.Ports[d.Output.Port].Impedance
	}

	w1 := 2 * math.Pi * d.FrequencyHz
	e := complex(d.EMF, 0)
	nd := len(nw.Diodes)
	// first solves the first order at w and writes each junction's phasor
	// into junctions; the solution it returns is overwritten by its next
	// call.
	first := func(w float64, junctions []complex128) ([]complex128, []complex128, error) {
		x := vector(ws.solution, v.n)
		ws.solution = x
		nw.Excitation(d.Input, 1, x)
		if _, err := v.solveAt(w, x); err != nil {
			return nil, nil, err
		}
		junctions = vector(junctions, nd)
		for k := range junctions {
			junctions[k] = v.junction(k, x)
		}
		return x, junctions, nil
	}
	x1, va, err := first(w1, ws.firstA)
	if err != nil {
		return nil, err
	}
	ws.firstA = va
	est.Linear = v.output(x1) * e
	est.Fundamental = est.Linear
	for _, vk := range va {
		est.Junctions = append(est.Junctions, vk*e)
	}

	cur, chg := vector(ws.current, nd), vector(ws.charge, nd)
	ws.current, ws.charge = cur, chg
	coef := func(k int) smallsignal.Diode { return nw.Diodes[k] }

	// DC shift: g2 |v1|²/2; charge stores nothing at DC.
	for k := range cur {
		cur[k] = complex(coef(k).G2*sqAbs(va[k])/2, 0)
		chg[k] = 0
	}
	x0, dc, err := v.product(DC, 0, cur, chg, e*e, est)
	if err != nil {
		return nil, err
	}
	est.DCShift = real(dc)
	v0 := vector(ws.shift, nd)
	ws.shift = v0
	for k := range v0 {
		v0[k] = v.junction(k, x0)
	}

	// Second harmonic.
	for k := range cur {
		sq := va[k] * va[k] / 2
		cur[k] = complex(coef(k).G2, 0) * sq
		chg[k] = complex(coef(k).C2, 0) * sq
	}
	x2, hd2, err := v.product(HD2, 2*w1, cur, chg, e*e, est)
	if err != nil {
		return nil, err
	}
	est.HD2 = hd2
	v2 := vector(ws.second, nd)
	ws.second = v2
	for k := range v2 {
		v2[k] = v.junction(k, x2)
	}

	// Third harmonic.
	for k := range cur {
		cube, cross := va[k]*va[k]*va[k]/4, va[k]*v2[k]
		cur[k] = complex(coef(k).G3, 0)*cube + complex(coef(k).G2, 0)*cross
		chg[k] = complex(coef(k).C3, 0)*cube + complex(coef(k).C2, 0)*cross
	}
	if _, est.HD3, err = v.product(HD3, 3*w1, cur, chg, e*e*e, est); err != nil {
		return nil, err
	}

	// Third order at the fundamental: the cubic terms' (3/4)|v1|² v1 and
	// the second-order terms mixing v1 with the junction's own DC shift
	// and second harmonic, 2 v0 v1 + v1* v2.
	for k := range cur {
		cube := 0.75 * complex(sqAbs(va[k]), 0) * va[k]
		cross := 2*v0[k]*va[k] + cmplx.Conj(va[k])*v2[k]
		cur[k] = complex(coef(k).G3, 0)*cube + complex(coef(k).G2, 0)*cross
		chg[k] = complex(coef(k).C3, 0)*cube + complex(coef(k).C2, 0)*cross
	}
	_, third, err := v.product(Gain3, w1, cur, chg, e*e*e, est)
	if err != nil {
		return nil, err
	}
	est.Fundamental = est.Linear + third

	if d.SecondToneHz == 0 {
		return est, nil
	}
	w2 := 2 * math.Pi * d.SecondToneHz
	xb, vb, err := first(w2, ws.firstB)
	if err != nil {
		return nil, err
	}
	ws.firstB = vb
	est.SecondFundamental = v.output(xb) * e

	for k := range cur {
		p := va[k] * vb[k]
		cur[k] = complex(coef(k).G2, 0) * p
		chg[k] = complex(coef(k).C2, 0) * p
	}
	if _, est.IM2Sum, err = v.product(IM2Sum, w1+w2, cur, chg, e*e, est); err != nil {
		return nil, err
	}
	for k := range cur {
		p := va[k] * cmplx.Conj(vb[k])
		cur[k] = complex(coef(k).G2, 0) * p
		chg[k] = complex(coef(k).C2, 0) * p
	}
	xd, im2d, err := v.product(IM2Diff, w1-w2, cur, chg, e*e, est)
	if err != nil {
		return nil, err
	}
	est.IM2Diff = im2d
	for k := range cur {
		vd := v.junction(k, xd)
		cube := 0.75 * va[k] * va[k] * cmplx.Conj(vb[k])
		cross := va[k]*vd + v2[k]*cmplx.Conj(vb[k])
		cur[k] = complex(coef(k).G3, 0)*cube + complex(coef(k).G2, 0)*cross
		chg[k] = complex(coef(k).C3, 0)*cube + complex(coef(k).C2, 0)*cross
	}
	if _, est.IM3, err = v.product(IM3, 2*w1-w2, cur, chg, e*e*e, est); err != nil {
		return nil, err
	}
	return est, nil
}

func sqAbs(z complex128) float64 { return real(z)*real(z) + imag(z)*imag(z) }
