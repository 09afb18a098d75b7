package smallsignal

import (
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
	"sync"

	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/bias/diode"
	"qpoint/bias/line"
	"qpoint/bias/si"
)

// Element is a transmission line, microstrip line or measured block of
// the network: a part known by its S-matrix at each frequency, whose
// admittance is not G + sC. It has one current unknown per port, from the
// circuit into the port's terminal and out of its return, and one row per
// port that binds those currents to the port voltages:
//
//	(1 - S̃) V - (1 + S̃) Z I = 0,   S̃ = D S D⁻¹,   D = diag(√Z_k),
//
// at every frequency above zero, with S the part's S-matrix for the real
// reference impedances Z (b = S a for the power waves a = (V + Z I)/(2√Z),
// b = (V - Z I)/(2√Z): Kurokawa, "Power waves and the scattering
// matrix", IEEE MTT 13(2), 1965), and at DC its DC relation M V + N I = 0
// (a line's conductors, a block's declared behaviour). Both stay finite
// where an admittance or impedance matrix does not exist: a line at DC is
// a short, a quarter-wave stub an open or a short. A line whose returns
// differ also carries its return conductor's current, an unknown that is
// zero above DC and joins the two returns at DC.
type Element struct {
	Name, Type string
	// Terminals and Returns are each port's two unknowns (Ground for the
	// reference node).
	Terminals, Returns []int
	// Branch is the first port current's unknown; Shield the return
	// conductor's, -1 for none.
	Branch, Shield int
	References     []float64 // ohm, one per port

	Line  line.Law    // a line's law, nil for a block
	Block *line.Table // a block's data, nil for a line
	DC    line.Relation
	// MaxHz is the highest frequency at which a microstrip's models hold
	// their stated accuracy; zero for none.
	MaxHz float64

	Part *circuit.Distributed

	memo *scatteringMemo // a line's S at the frequencies asked so far
}

// scatteringMemo keeps a line's S-matrices by frequency. A line's law
// does not depend on the bias, and harmonic balance asks for the same
// harmonics at every Newton step, so Scattering computes each once; a
// Workspace hands the memo on to the next network of the same circuit. It
// is safe for concurrent use, and holds at most memoSize frequencies (it
// starts again when full, so that a long sweep does not grow it).
type scatteringMemo struct {
	mu sync.Mutex
	at map[float64][]complex128
}

const memoSize = 4096

func (m *scatteringMemo) get(freqHz float64, s []complex128) bool {
	m.mu.Lock()
	defer m.mu.Unlock()
	v, ok := m.at[freqHz]
	if ok {
		copy(s, v)
	}
	return ok
}

func (m *scatteringMemo) put(freqHz float64, s []complex128) {
	m.mu.Lock()
	defer m.mu.Unlock()
	if m.at == nil || len(m.at) >= memoSize {
		m.at = make(map[float64][]complex128, 64)
	}
	m.at[freqHz] = append([]complex128(nil), s...)
}

// Ports returns the element's port count.
func (e *Element) Ports() int { return len(e.Terminals) }

// HasElements reports whether the network holds lines or measured blocks.
// Its admittance is then not G + jωC alone: every analysis must add the
// elements' rows at each frequency (Stamp), and none may reduce (G, C).
func (nw *Network) HasElements() bool { return len(nw.Elements) > 0 }

// ElementNames lists the elements' names.
func (nw *Network) ElementNames() []string {
	var names []string
	for _, e := range nw.Elements {
		names = append(names, e.Name)
	}
	return names
}

// addElements numbers the circuit's distributed parts from unknown first
// and returns the next free unknown.
func (nw *Network) addElements(c *circuit.Circuit, first int, node func(string) (int, error), memos map[*circuit.Distributed]*scatteringMemo) (int, error) {
	nw.Elements = nw.Elements[:0]
	n := first
	for i := range c.Distributed {
		d := &c.Distributed[i]
		e := Element{Name: d.Name, Type: d.Type, Branch: n, Shield: -1, Line: d.Line, Block: d.Block, DC: d.DC, Part: d}
		if d.Line != nil {
			if e.memo = memos[d]; e.memo == nil {
				e.memo = new(scatteringMemo)
				memos[d] = e.memo
			}
		}
		for k := range d.Terminals {
			a, err := node(d.Terminals[k])
			if err != nil {
				return 0, err
			}
			b, err := node(d.Returns[k])
			if err != nil {
				return 0, err
			}
			e.Terminals, e.Returns = append(e.Terminals, a), append(e.Returns, b)
		}
		n += len(e.Terminals)
		if d.JoinReturnsAtDC {
			e.Shield = n
			n++
		}
		switch {
		case d.Block != nil:
			e.References = d.Block.References
		default:
			z := d.Line.Reference()
			e.References = []float64{z, z}
		}
		if d.Microstrip != nil {
			e.MaxHz = d.Microstrip.MaxHz()
		}
		nw.Elements = append(nw.Elements, e)
	}
	return n, nil
}

// finishElements names the elements' unknowns, stamps their currents into
// the KCL rows of G (constant: ±1 at the terminal and return of each
// port) and sets their DC currents in Bias from p.
func (nw *Network) finishElements(p *bias.Point) {
	for _, e := range nw.Elements {
		for k := range e.Terminals {
			nw.Names = appendName(nw.Names, e.Name, "#port"+strconv.Itoa(k+1))
			br := e.Branch + k
			if t := e.Terminals[k]; t != Ground {
				nw.G.Set(t, br, nw.G.At(t, br)+1)
			}
			if r := e.Returns[k]; r != Ground {
				nw.G.Set(r, br, nw.G.At(r, br)-1)
			}
		}
		if e.Shield >= 0 {
			nw.Names = appendName(nw.Names, e.Name, "#return")
			if r := e.Returns[0]; r != Ground {
				nw.G.Set(r, e.Shield, nw.G.At(r, e.Shield)+1)
			}
			if r := e.Returns[1]; r != Ground {
				nw.G.Set(r, e.Shield, nw.G.At(r, e.Shield)-1)
			}
		}
		for _, dc := range p.Distributed {
			if dc.Name != e.Name {
				continue
			}
			copy(nw.Bias[e.Branch:e.Branch+len(e.Terminals)], dc.Currents)
			if e.Shield >= 0 {
				nw.Bias[e.Shield] = dc.ReturnCurrent
			}
		}
	}
}

// Scattering writes the element's S-matrix at freqHz > 0 into s
// (row-major) and reports whether freqHz lies where its data (a block)
// or its models (a microstrip) hold.
func (e *Element) Scattering(freqHz float64, s []complex128) bool {
	if e.Block != nil {
		return e.Block.At(freqHz, s)
	}
	if e.memo == nil || !e.memo.get(freqHz, s) {
		e.Line.At(freqHz).Scattering(e.References[0], s)
		if e.memo != nil {
			e.memo.put(freqHz, s)
		}
	}
	return e.MaxHz == 0 || freqHz <= e.MaxHz
}

// Entries calls add for each entry of the element's rows at angular
// frequency w (rad/s, of either sign: Y(-jω) is the conjugate of Y(jω) for
// a real network), the DC relation at w = 0. s is scratch of at least
// Ports² numbers. The KCL entries of its currents are in G.
func (e *Element) Entries(w float64, s []complex128, add func(i, j int, v complex128)) {
	p := e.Ports()
	put := func(i, j int, v complex128) {
		if j != Ground && v != 0 {
			add(i, j, v)
		}
	}
	if w == 0 {
		for k := 0; k < p; k++ {
			row := e.Branch + k
			for j := 0; j < p; j++ {
				m := complex(e.DC.M[k*p+j], 0)
				put(row, e.Terminals[j], m)
				put(row, e.Returns[j], -m)
				put(row, e.Branch+j, complex(e.DC.N[k*p+j], 0))
			}
		}
		if e.Shield >= 0 {
			put(e.Shield, e.Returns[0], 1)
			put(e.Shield, e.Returns[1], -1)
		}
		return
	}
	conj := w < 0
	e.Scattering(math.Abs(w)/(2*math.Pi), s[:p*p])
	for k := 0; k < p; k++ {
		row := e.Branch + k
		zk := math.Sqrt(e.References[k])
		for j := 0; j < p; j++ {
			st := s[k*p+j] * complex(zk/math.Sqrt(e.References[j]), 0)
			m, n := -st, -st*complex(e.References[j], 0)
			if k == j {
				m += 1
				n -= complex(e.References[j], 0)
			}
			if conj {
				m, n = cmplx.Conj(m), cmplx.Conj(n)
			}
			put(row, e.Terminals[j], m)
			put(row, e.Returns[j], -m)
			put(row, e.Branch+j, n)
		}
	}
	if e.Shield >= 0 {
		put(e.Shield, e.Shield, 1)
	}
}

// Pattern calls add for every entry Entries may write, at any frequency.
func (e *Element) Pattern(add func(i, j int)) {
	p := e.Ports()
	put := func(i, j int) {
		if j != Ground {
			add(i, j)
		}
	}
	for k := 0; k < p; k++ {
		for j := 0; j < p; j++ {
			put(e.Branch+k, e.Terminals[j])
			put(e.Branch+k, e.Returns[j])
			put(e.Branch+k, e.Branch+j)
		}
	}
	if e.Shield >= 0 {
		put(e.Shield, e.Returns[0])
		put(e.Shield, e.Returns[1])
		put(e.Shield, e.Shield)
	}
}

// Stamp adds every element's rows at angular frequency w to the row-major
// complex matrix a of row stride stride, which holds G + jωC.
func (nw *Network) Stamp(w float64, a []complex128, stride int) {
	var s []complex128
	for i := range nw.Elements {
		e := &nw.Elements[i]
		if need := e.Ports() * e.Ports(); len(s) < need {
			s = make([]complex128, need)
		}
		e.Entries(w, s, func(r, c int, v complex128) { a[r*stride+c] += v })
	}
}

// ElementsTimes adds E(ω) x to out, where E holds the elements' rows at
// angular frequency w.
func (nw *Network) ElementsTimes(w float64, x, out []complex128) {
	var s []complex128
	for i := range nw.Elements {
		e := &nw.Elements[i]
		if need := e.Ports() * e.Ports(); len(s) < need {
			s = make([]complex128, need)
		}
		e.Entries(w, s, func(r, c int, v complex128) { out[r] += v * x[c] })
	}
}

// ElementsSlope adds (dE/dω) x to out: the derivative of the elements'
// rows by central differences D(h) = (E(ω+h) - E(ω-h)) x / 2h at
// h = 1e-4 ω and h/2, joined by Richardson's extrapolation
// (4 D(h/2) - D(h))/3, whose truncation error falls as h⁴: below 1e-12
// of the derivative for a line of electrical length up to a hundred
// radians, with a rounding of about 1e-12. w must be above zero.
func (nw *Network) ElementsSlope(w float64, x, out []complex128) {
	d := func(h float64) []complex128 {
		up, down := make([]complex128, len(out)), make([]complex128, len(out))
		nw.ElementsTimes(w+h, x, up)
		nw.ElementsTimes(w-h, x, down)
		for i := range up {
			up[i] = (up[i] - down[i]) / complex(2*h, 0)
		}
		return up
	}
	h := 1e-4 * w
	d1, d2 := d(h), d(h/2)
	for i := range out {
		out[i] += (4*d2[i] - d1[i]) / 3
	}
}

// NoiseCorrelation writes into c (row-major Ports×Ports) the correlation
// ⟨e eᴴ⟩ of the noise sources e of the element's rows at freqHz > 0, for a
// passive part in thermal equilibrium at tempK, one-sided in V²/Hz: by
// Twiss's theorem the noise waves b = S a + n of a passive network at
// temperature T have ⟨n nᴴ⟩ = k T (1 - S Sᴴ) (R. Q. Twiss, "Nyquist's and
// Thevenin's theorems generalized for nonreciprocal linear networks",
// J. Appl. Phys. 26(5), 1955; in wave form, Wedge and Rutledge, "Wave
// techniques for noise modeling and measurement", IEEE MTT 40(11), 1992),
// and in the rows (1 - S̃) V - (1 + S̃) Z I = 2 D n, so
//
//	⟨e eᴴ⟩ = 4 k T D (1 - S Sᴴ) D,   D = diag(√Z_k).
//
// A matched resistor R at T gives 4 k T R, Nyquist's EMF. Data that are
// not passive give a matrix that is not positive semidefinite; the
// analysis then understates or misstates the block's noise, which the
// loader's caution says.
func (e *Element) NoiseCorrelation(freqHz, tempK float64, c []complex128) {
	p := e.Ports()
	s := make([]complex128, p*p)
	e.Scattering(freqHz, s)
	kt := diode.Boltzmann * tempK
	for i := 0; i < p; i++ {
		for j := 0; j < p; j++ {
			var ss complex128
			for k := 0; k < p; k++ {
				ss += s[i*p+k] * cmplx.Conj(s[j*p+k])
			}
			v := -ss
			if i == j {
				v += 1
			}
			c[i*p+j] = complex(4*kt*math.Sqrt(e.References[i]*e.References[j]), 0) * v
		}
	}
}

// OutsideRange says that an analysis asked for an element at frequencies
// where its data (a measured block) or its models (a microstrip) do not
// hold: Count of them, the lowest and highest, against the range FromHz
// to ToHz that does. A block's S there is held at its last point above the
// data, and runs linearly to the declared DC behaviour below them.
type OutsideRange struct {
	Element, Type   string
	FromHz, ToHz    float64
	Lowest, Highest float64
	Count           int
}

// Message says the caution in a sentence.
func (o OutsideRange) Message() string {
	hz := func(f float64) string { return si.Format(f, "Hz", 4) }
	if o.Type == circuit.TypeMicrostrip {
		return fmt.Sprintf("microstrip %s: %d of the frequencies asked (up to %s) lie above %s, where its dispersion law holds its stated accuracy (h/λ0 = 0.13)",
			o.Element, o.Count, hz(o.Highest), hz(o.ToHz))
	}
	return fmt.Sprintf("block %s: %d of the frequencies asked (%s to %s) lie outside its data, %s to %s: there S is not measured but held at the last point above the data and drawn linearly to the declared DC behaviour below them",
		o.Element, o.Count, hz(o.Lowest), hz(o.Highest), hz(o.FromHz), hz(o.ToHz))
}

// Outside returns an OutsideRange for each element that some frequency
// of freqsHz lies outside of. Zero is never outside: there every element
// has its DC behaviour.
func (nw *Network) Outside(freqsHz []float64) []OutsideRange {
	var out []OutsideRange
	for _, e := range nw.Elements {
		var lo, hi float64
		switch {
		case e.Block != nil:
			lo, hi = e.Block.Range()
		case e.MaxHz > 0:
			lo, hi = 0, e.MaxHz
		default:
			continue
		}
		o := OutsideRange{Element: e.Name, Type: e.Type, FromHz: lo, ToHz: hi, Lowest: math.Inf(1)}
		for _, f := range freqsHz {
			f = math.Abs(f)
			if f == 0 || (f >= lo && f <= hi) {
				continue
			}
			o.Count++
			o.Lowest, o.Highest = math.Min(o.Lowest, f), math.Max(o.Highest, f)
		}
		if o.Count > 0 {
			out = append(out, o)
		}
	}
	return out
}
