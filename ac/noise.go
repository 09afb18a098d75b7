package ac

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"qpoint/bias/circuit"
	"qpoint/bias/diode"
	"qpoint/smallsignal"
)

// StandardNoiseTemperatureK is T0 = 290 K, the temperature at which a
// noise figure's source is held by definition (IEEE Standard 100, "noise
// factor"), and the noise temperature of a port's termination unless the
// circuit file gives one.
const StandardNoiseTemperatureK = 290

// NoiseKind names the physical mechanism of a noise source.
type NoiseKind string

// The mechanisms the analysis knows.
const (
	ThermalNoise NoiseKind = "thermal" // 4kT/R (Johnson 1928; Nyquist 1928)
	ShotNoise    NoiseKind = "shot"    // 2qI (Schottky 1918)
	FlickerNoise NoiseKind = "flicker" // K |I|^a / f
)

// Where a noise source sits.
const (
	InResistor         = "resistor"
	InSeriesResistance = "series resistance"
	InJunction         = "junction"
	InTermination      = "termination"
	InLine             = "line"           // a transmission or microstrip line, by Twiss's theorem
	InBlock            = "measured block" // an S-parameter block, by Twiss's theorem
)

// NoiseSource is one noise current source of the network, uncorrelated
// with every other. Its one-sided power spectral density is
// S_i(f) = White + Flicker/f in A²/Hz, flowing between two unknowns.
type NoiseSource struct {
	Name  string    // the part's, diode's or port's name
	Where string    // InResistor, InSeriesResistance, InJunction or InTermination
	Kind  NoiseKind // thermal, shot or flicker
	// Port is the index of the port whose termination this is, -1 for a
	// part of the circuit.
	Port int
	// TemperatureK is the temperature of a thermal source; zero otherwise.
	TemperatureK float64
	White        float64 // A²/Hz
	Flicker      float64 // A²: S_i = Flicker / f
	a, b         int     // unknowns the current flows between
	// element, for a line or measured block, is the part whose thermal
	// noise by Twiss's theorem this is: correlated sources in its rows
	// (smallsignal.Element.NoiseCorrelation), White and Flicker zero.
	element *smallsignal.Element
}

// Nodes returns the unknowns the source's current flows between
// (smallsignal.Ground for the reference node), in the order of the
// part's terminals.
func (s NoiseSource) Nodes() (a, b int) { return s.a, s.b }

// Density returns the source's current noise density S_i(f) in A²/Hz;
// zero for a line or measured block, whose noise is a correlation matrix
// of sources in its own rows (smallsignal.Element.NoiseCorrelation).
func (s NoiseSource) Density(freqHz float64) float64 {
	return s.White + s.Flicker/freqHz
}

// output returns the source's output noise density, V²/Hz, for the
// adjoint solution z (Y(jω)ᵀ z = e_out): S_i |z_a - z_b|², or for a line
// or block zᵀ C z̄ over its rows, C the correlation of its row sources
// (Σ_kl z_k C_kl z̄_l, real and non-negative for passive data).
func (s NoiseSource) output(hz float64, z []complex128, corr []complex128) float64 {
	e := s.element
	if e == nil {
		return s.Density(hz) * sqAbs(at(z, s.a)-at(z, s.b))
	}
	return s.elementOutput(hz, false, z, corr)
}

// elementOutput is zᵀ C z̄ over a line's or block's rows, C its
// correlation at hz (conjugated when conj), in the buffer corr.
func (s NoiseSource) elementOutput(hz float64, conj bool, z, corr []complex128) float64 {
	e := s.element
	p := e.Ports()
	e.NoiseCorrelation(hz, s.TemperatureK, corr[:p*p])
	var sum complex128
	for k := 0; k < p; k++ {
		for l := 0; l < p; l++ {
			c := corr[k*p+l]
			if conj {
				c = cmplx.Conj(c)
			}
			sum += z[e.Branch+k] * c * cmplx.Conj(z[e.Branch+l])
		}
	}
	return math.Max(real(sum), 0)
}

// Correlated reports whether the source is a line's or a measured
// block's: correlated sources in its rows rather than one current
// (OutputAt takes both).
func (s NoiseSource) Correlated() bool { return s.element != nil }

// OutputAt returns the source's output noise density for the transfer z
// (z_k: the output's response to a unit current injected at unknown k)
// at freqHz, which may be negative: a sideband below zero, where the
// network's rows and a line's correlation are the conjugates of those at
// |freqHz|.
func (s NoiseSource) OutputAt(freqHz float64, z []complex128) float64 {
	f := math.Abs(freqHz)
	e := s.element
	if e == nil {
		return s.Density(f) * sqAbs(at(z, s.a)-at(z, s.b))
	}
	return s.elementOutput(f, freqHz < 0, z, make([]complex128, e.Ports()*e.Ports()))
}

// Label names the source for a reader: "D1 junction (shot)".
func (s NoiseSource) Label() string {
	if s.Where == InResistor {
		return fmt.Sprintf("%s (%s)", s.Name, s.Kind)
	}
	if s.Where == InTermination {
		return fmt.Sprintf("port %s termination (%s)", s.Name, s.Kind)
	}
	if s.element != nil {
		return fmt.Sprintf("%s %s (%s, Twiss)", s.Where, s.Name, s.Kind)
	}
	return fmt.Sprintf("%s %s (%s)", s.Name, s.Where, s.Kind)
}

// thermal returns the noise current density 4kT/R of a resistance r at
// tempK, in A²/Hz (Johnson 1928; Nyquist 1928).
func thermal(r, tempK float64) float64 {
	if !(r > 0) || tempK == 0 {
		return 0
	}
	return 4 * diode.Boltzmann * tempK / r
}

// NoiseSources lists the network's noise sources in file order: the
// thermal noise 4kT/R of every resistor and of each diode's series
// resistance at the circuit temperature, each junction's shot noise
// 2q(I_D + 2 I_S) and, where the model has it, flicker noise K |I_D|^a / f
// (bias/diode: Device.ShotNoise, Device.FlickerNoise), then the thermal
// noise of every line and measured block at the circuit temperature by
// Twiss's theorem (one source each, correlated across its ports), then the
// thermal noise of every port's reference resistance at the port's noise
// temperature (T0 = 290 K unless the file gives noise_temperature).
// Capacitors, inductors and the ideal DC sources are noiseless.
func NoiseSources(nw *smallsignal.Network) []NoiseSource {
	c := nw.Point.Circuit
	tk := nw.Point.TemperatureK
	node := func(name string) int {
		if name == circuit.Ground {
			return smallsignal.Ground
		}
		return nw.Nodes[name]
	}
	diodes := map[string]smallsignal.Diode{}
	for _, d := range nw.Diodes {
		diodes[d.Name] = d
	}
	var out []NoiseSource
	for _, part := range c.Parts {
		switch part.Kind {
		case circuit.Resistor:
			out = append(out, NoiseSource{Name: part.Name, Where: InResistor, Kind: ThermalNoise, Port: -1,
				TemperatureK: tk, White: thermal(part.Value, tk), a: node(part.Nodes[0]), b: node(part.Nodes[1])})
		case circuit.Diode:
			d := diodes[part.Name]
			if d.SeriesResistance > 0 {
				out = append(out, NoiseSource{Name: d.Name, Where: InSeriesResistance, Kind: ThermalNoise, Port: -1,
					TemperatureK: tk, White: thermal(d.SeriesResistance, tk), a: d.Anode, b: d.Junction})
			}
			out = append(out, NoiseSource{Name: d.Name, Where: InJunction, Kind: ShotNoise, Port: -1,
				White: d.Device.ShotNoise(d.JunctionVoltage), a: d.Junction, b: d.Cathode})
			if d.Device.Params.FlickerCoefficient > 0 {
				out = append(out, NoiseSource{Name: d.Name, Where: InJunction, Kind: FlickerNoise, Port: -1,
					Flicker: d.Device.FlickerNoise(d.JunctionVoltage, 1), a: d.Junction, b: d.Cathode})
			}
		}
	}
	for i := range nw.Elements {
		e := &nw.Elements[i]
		where := InLine
		if e.Block != nil {
			where = InBlock
		}
		out = append(out, NoiseSource{Name: e.Name, Where: where, Kind: ThermalNoise, Port: -1, TemperatureK: tk, element: e})
	}
	for i, p := range nw.Ports {
		t := float64(StandardNoiseTemperatureK)
		if i < len(c.Ports) && c.Ports[i].NoiseTemperatureSet {
			t = c.Ports[i].NoiseTemperatureK
		}
		out = append(out, NoiseSource{Name: p.Name, Where: InTermination, Kind: ThermalNoise, Port: i,
			TemperatureK: t, White: thermal(p.Impedance, t), a: p.Node, b: p.Return})
	}
	return out
}

// NoiseSettings choose where noise is observed and what it is referred to.
type NoiseSettings struct {
	// Input is the index of the port whose generator is the signal
	// source; -1 for none, and then there is no gain, input-referred
	// noise or noise figure.
	Input int
	// Output is the port or node where the noise is observed.
	Output Output
}

// NoisePoint is the noise at the output at one frequency.
type NoisePoint struct {
	FrequencyHz float64
	// Contributions[k] is source k's output noise density, V²/Hz; they
	// add, the sources being uncorrelated.
	Contributions []float64
	// Total is the output noise density as operated, V²/Hz: every source,
	// each port's termination at its own noise temperature.
	Total float64
	// Gain is the output voltage per volt of the input generator's EMF,
	// V_out/E (zero without an input port).
	Gain complex128
	// Circuit is the output density of every source except the input
	// port's and the output port's terminations, V²/Hz: the noise the
	// circuit adds. Reference is the output density the input port's
	// termination gives at T0 = 290 K, V²/Hz.
	Circuit, Reference float64

	hasInput bool
}

// Density returns the output noise density as operated, in V/√Hz.
func (p NoisePoint) Density() float64 { return math.Sqrt(p.Total) }

// InputReferred returns the circuit's own noise referred to the input
// generator: the noise EMF in series with the generator, in V/√Hz, that
// would give the output the noise the circuit adds, sqrt(Circuit)/|Gain|.
// NaN without an input port.
func (p NoisePoint) InputReferred() float64 {
	if !p.hasInput {
		return math.NaN()
	}
	return math.Sqrt(p.Circuit) / cmplx.Abs(p.Gain)
}

// Factor returns the noise factor F = (N_circuit + N_source) / N_source
// with the input port's termination at T0 = 290 K as the source and the
// output port's termination, which belongs to the next stage, left out
// (IEEE Standard 100, "noise factor"). NaN without an input port.
func (p NoisePoint) Factor() float64 {
	if !p.hasInput {
		return math.NaN()
	}
	return 1 + p.Circuit/p.Reference
}

// FigureDB returns the noise figure 10 log10 F in dB.
func (p NoisePoint) FigureDB() float64 { return 10 * math.Log10(p.Factor()) }

// NoiseTemperatureK returns the equivalent input noise temperature
// T_e = T0 (F - 1) in kelvin.
func (p NoisePoint) NoiseTemperatureK() float64 {
	return StandardNoiseTemperatureK * (p.Factor() - 1)
}

// NoiseResult is a noise sweep.
type NoiseResult struct {
	Settings     NoiseSettings
	TemperatureK float64 // the circuit temperature
	Sources      []NoiseSource
	// InputImpedance is the input port's reference impedance (zero
	// without an input), OutputImpedance the output port's (zero for a
	// bare node).
	InputImpedance, OutputImpedance float64
	Points                          []NoisePoint
	// Outside lists the blocks and microstrips that some frequency lies
	// outside the data or models of (a caution).
	Outside []smallsignal.OutsideRange
}

// noise holds what every frequency of one analysis shares.
type noise struct {
	nw      *smallsignal.Network
	s       NoiseSettings
	sources []NoiseSource
	out     []complex128
	sys     solver // Y(jw) at the noise frequencies: the reduction or the LU
	z       []complex128
	outPort int
	corr    []complex128 // a line's or block's noise correlation
}

// newNoise sets up the noise analysis of nw at freqs (in hertz): the
// solver is the sweep engines' choice for that many points over their
// range (newSolver), choice forcing one.
func newNoise(nw *smallsignal.Network, s NoiseSettings, freqs []float64, choice engine) (*noise, error) {
	if s.Input >= len(nw.Ports) || s.Input < -1 {
		return nil, fmt.Errorf("input port %d: the circuit has %d ports", s.Input+1, len(nw.Ports))
	}
	v := &noise{nw: nw, s: s, sources: NoiseSources(nw), out: make([]complex128, nw.N),
		z: make([]complex128, nw.N), outPort: -1}
	for _, e := range nw.Elements {
		if p := e.Ports(); len(v.corr) < p*p {
			v.corr = make([]complex128, p*p)
		}
	}
	if s.Output.Port >= 0 {
		if s.Output.Port >= len(nw.Ports) {
			return nil, fmt.Errorf("output port %d: the circuit has %d ports", s.Output.Port+1, len(nw.Ports))
		}
		if s.Output.Port == s.Input {
			return nil, fmt.Errorf("port %s is both input and output; choose another output, or no input", nw.Ports[s.Input].Name)
		}
		p := nw.Ports[s.Output.Port]
		if p.Node >= 0 {
			v.out[p.Node] = 1
		}
		if p.Return >= 0 {
			v.out[p.Return] = -1
		}
		v.outPort = s.Output.Port
	} else {
		i, ok := nw.Nodes[s.Output.Node]
		if !ok {
			return nil, fmt.Errorf("output node %q is not in the circuit", s.Output.Node)
		}
		v.out[i] = 1
	}
	v.sys = newSolver(nw, freqs, choice)
	return v, nil
}

// at solves for the noise at one frequency with one adjoint solve.
func (v *noise) at(hz float64) (NoisePoint, error) {
	if err := CheckFrequency(hz); err != nil {
		return NoisePoint{}, err
	}
	if err := v.sys.at(2 * math.Pi * hz); err != nil {
		return NoisePoint{}, fmt.Errorf("at %g Hz: %w", hz, err)
	}
	z := v.z
	copy(z, v.out)
	v.sys.solveT(z)
	pt := NoisePoint{FrequencyHz: hz, Contributions: make([]float64, len(v.sources))}
	for k, s := range v.sources {
		c := s.output(hz, z, v.corr)
		pt.Contributions[k] = c
		pt.Total += c
		if s.Port < 0 || (s.Port != v.s.Input && s.Port != v.outPort) {
			pt.Circuit += c
		}
	}
	if v.s.Input >= 0 {
		p := v.nw.Ports[v.s.Input]
		t := at(z, p.Node) - at(z, p.Return)
		pt.hasInput = true
		pt.Gain = t / complex(p.Impedance, 0)
		pt.Reference = thermal(p.Impedance, StandardNoiseTemperatureK) * sqAbs(t)
	}
	return pt, nil
}

// Noise computes the output noise of the linearised network at each
// frequency in freqs.
//
// Every source is a current i_k between two unknowns with density S_k(f),
// uncorrelated with the others (NoiseSources). One adjoint solve per
// frequency, Y(jw)ᵀ z = e_out, gives the transfer impedance from every
// source to the output at once, V_out = (z_a - z_b) i_k (Tellegen's
// theorem; Rohrer, Nagel, Meyer, Weber, "Computationally efficient
// electronic-circuit noise calculations", IEEE J. Solid-State Circuits
// 6(4), 1971), so the output density is
//
//	S_out(f) = Σ_k S_k(f) |z_a - z_b|²
//
// The same vector gives the gain from the input generator's EMF,
// V_out/E = (z_node - z_return)/Z0, and from it the noise figure with the
// input termination at T0 = 290 K.
//
// The adjoint solves run on the sweep engines (newSolver): the reduced
// engine for long sweeps of larger networks where it passes its check,
// the dense LU otherwise.
func Noise(nw *smallsignal.Network, freqs []float64, s NoiseSettings) (*NoiseResult, error) {
	return noiseSweep(nw, freqs, s, engineAuto)
}

func noiseSweep(nw *smallsignal.Network, freqs []float64, s NoiseSettings, choice engine) (*NoiseResult, error) {
	v, err := newNoise(nw, s, freqs, choice)
	if err != nil {
		return nil, err
	}
	r := &NoiseResult{Settings: s, TemperatureK: nw.Point.TemperatureK, Sources: v.sources, Outside: nw.Outside(freqs)}
	if s.Input >= 0 {
		r.InputImpedance = nw.Ports[s.Input].Impedance
	}
	if v.outPort >= 0 {
		r.OutputImpedance = nw.Ports[v.outPort].Impedance
	}
	for _, hz := range freqs {
		pt, err := v.at(hz)
		if err != nil {
			return r, err
		}
		r.Points = append(r.Points, pt)
	}
	return r, nil
}

// NoiseBand is the output noise integrated over a band of frequencies.
type NoiseBand struct {
	FromHz, ToHz float64
	Sources      []NoiseSource
	// Contributions[k] is source k's output noise power over the band,
	// V²; Total is their sum, Circuit and Reference the band integrals of
	// the NoisePoint fields of the same names.
	Contributions             []float64
	Total, Circuit, Reference float64
	// InputReferred is ∫ Circuit/|Gain|² df, the circuit's own noise
	// referred to the input generator's EMF, V².
	InputReferred float64
	// PerDecade is the grid the integral settled on and Change the
	// relative change of Total at the last halving of its spacing.
	PerDecade int
	Change    float64
}

// RMS returns the output noise voltage over the band, sqrt(Total), V rms.
func (b *NoiseBand) RMS() float64 { return math.Sqrt(b.Total) }

// InputReferredRMS returns sqrt(InputReferred), V rms of generator EMF.
func (b *NoiseBand) InputReferredRMS() float64 { return math.Sqrt(b.InputReferred) }

// AverageFactor returns the average noise factor over the band,
// F̄ = ∫ (N_circuit + N_source) df / ∫ N_source df, each output density
// weighted by the gain as the IEEE average noise factor is (IEEE Standard
// 100). NaN without an input port.
func (b *NoiseBand) AverageFactor() float64 {
	if b.Reference == 0 {
		return math.NaN()
	}
	return 1 + b.Circuit/b.Reference
}

// Band limits of the integration grid.
const (
	bandStartPerDecade = 50
	bandMaxPerDecade   = 3200
	bandMaxPoints      = 400_000
	bandTolerance      = 1e-6
)

// IntegrateNoise integrates the output noise over fromHz to toHz.
//
// Between neighbouring points of a logarithmic grid each density is taken
// as a power law S(f) = S_1 (f/f_1)^α through both points, whose integral
//
//	∫ S df = S_1 f_1 (e^((α+1) ln(f_2/f_1)) - 1) / (α + 1)
//
// is exact for white noise, 1/f noise and the f^-2 fall of a single pole.
// The grid starts at 50 points per decade and is doubled until the total
// changes by less than one part in a million (or 3200 points per decade).
func IntegrateNoise(nw *smallsignal.Network, s NoiseSettings, fromHz, toHz float64) (*NoiseBand, error) {
	return integrateNoise(nw, s, fromHz, toHz, bandTolerance)
}

// integrateNoise is IntegrateNoise stopping once the total changes by less
// than tol (relative) from one grid to the next.
func integrateNoise(nw *smallsignal.Network, s NoiseSettings, fromHz, toHz, tol float64) (*NoiseBand, error) {
	if !(toHz > fromHz) {
		return nil, fmt.Errorf("the band %g Hz to %g Hz has no width; give a rising band", fromHz, toHz)
	}
	if err := checkRange(fromHz, toHz); err != nil {
		return nil, err
	}
	// The solver is chosen for the first, coarsest grid; the finer ones
	// span the same range.
	first, err := LogGrid(fromHz, toHz, bandStartPerDecade)
	if err != nil {
		return nil, err
	}
	v, err := newNoise(nw, s, first, engineAuto)
	if err != nil {
		return nil, err
	}
	var prev *NoiseBand
	decades := math.Log10(toHz / fromHz)
	// Each finer grid holds the coarser one's frequencies, bit for bit
	// where the point counts double exactly; those points are kept, not
	// solved again.
	var known map[float64]NoisePoint
	for per := bandStartPerDecade; ; per *= 2 {
		grid, err := LogGrid(fromHz, toHz, per)
		if err != nil {
			return nil, err
		}
		b := &NoiseBand{FromHz: fromHz, ToHz: toHz, Sources: v.sources, PerDecade: per,
			Contributions: make([]float64, len(v.sources))}
		var last NoisePoint
		solved := make(map[float64]NoisePoint, len(grid))
		for i, hz := range grid {
			pt, ok := known[hz]
			if !ok {
				if pt, err = v.at(hz); err != nil {
					return nil, err
				}
			}
			solved[hz] = pt
			if i > 0 {
				f1, f2 := last.FrequencyHz, pt.FrequencyHz
				for k := range b.Contributions {
					b.Contributions[k] += powerLaw(f1, f2, last.Contributions[k], pt.Contributions[k])
				}
				b.Circuit += powerLaw(f1, f2, last.Circuit, pt.Circuit)
				b.Reference += powerLaw(f1, f2, last.Reference, pt.Reference)
				if s.Input >= 0 {
					b.InputReferred += powerLaw(f1, f2, last.Circuit/sqAbs(last.Gain), pt.Circuit/sqAbs(pt.Gain))
				}
			}
			last = pt
		}
		for _, c := range b.Contributions {
			b.Total += c
		}
		known = solved
		if prev != nil {
			b.Change = math.Abs(b.Total-prev.Total) / math.Max(b.Total, math.SmallestNonzeroFloat64)
			if b.Change < tol || per >= bandMaxPerDecade || float64(2*per)*decades > bandMaxPoints {
				return b, nil
			}
		}
		prev = b
	}
}

// powerLaw integrates S from f1 to f2 through (f1, s1) and (f2, s2) as a
// power law, or as a straight line where either end is not positive.
func powerLaw(f1, f2, s1, s2 float64) float64 {
	if !(s1 > 0) || !(s2 > 0) || math.IsInf(s1, 0) || math.IsInf(s2, 0) {
		return (s1 + s2) / 2 * (f2 - f1)
	}
	l := math.Log(f2 / f1)
	x := math.Log(s2/s1)/l + 1 // α + 1
	if x == 0 {
		return s1 * f1 * l
	}
	return s1 * f1 * math.Expm1(x*l) / x
}

// ErrNoRectification reports an output whose DC level the carrier does
// not move: the circuit is not a detector at that output.
var ErrNoRectification = errors.New("the carrier does not shift the output's DC level")

// VoltageSensitivity returns the detector's voltage sensitivity γ in V/W:
// the change of the output's DC level per watt of available power from the
// input port's generator at carrierHz, in the small-signal (square-law)
// limit. It is the Volterra estimate's DC shift (Volterra) for an EMF E,
// divided by the available power E²/(8 Z0); both scale as E², so the
// ratio is exact in that limit. For an ideal junction into an open video
// circuit this is R_j/(2 n V_T) per absorbed watt, less the losses in
// R_S and C_j (Cowley and Sorensen, "Quantitative comparison of
// solid-state microwave detectors", IEEE Trans. MTT 14(12), 1966).
//
// It fails with ErrNoRectification (wrapped) when the output is an
// AC-coupled port, whose load sees no DC, or when the shift is zero or
// cancels between matched diodes.
func VoltageSensitivity(nw *smallsignal.Network, s NoiseSettings, carrierHz float64) (float64, error) {
	if s.Input < 0 {
		return 0, fmt.Errorf("a detector needs an input port for the carrier")
	}
	if s.Output.Port >= 0 && s.Output.Port < len(nw.Ports) && nw.Ports[s.Output.Port].ACCoupled {
		return 0, fmt.Errorf("%w: output port %s is AC-coupled, so its load sees no DC", ErrNoRectification, nw.Ports[s.Output.Port].Name)
	}
	est, err := Volterra(nw, Drive{Input: s.Input, Output: s.Output, FrequencyHz: carrierHz, EMF: 1})
	if err != nil {
		return 0, err
	}
	if est.DCShift == 0 || est.Balanced(DC) {
		return 0, ErrNoRectification
	}
	return est.DCShift / AvailablePower(1, nw.Ports[s.Input].Impedance), nil
}

// VideoSensitivity returns the detector's voltage sensitivity when the
// carrier's power is modulated at each video frequency in freqs (0 for
// DC): the output phasor per watt of available power,
//
//	γ(f) = Σ_k i_k (z_C,k(f) - z_J,k(f)),   i_k = 8 Z0 g2_k |v_k|² / 2
//
// where v_k is junction k's phasor at the carrier for a 1 V EMF, i_k its
// rectified current per watt (the DC source of the method of nonlinear
// currents, see Volterra) and z the adjoint vector Y(j2πf)ᵀ z = e_out at
// the video frequency, junction k between its internal anode J and its
// cathode C. γ(0) is VoltageSensitivity; |γ(f)/γ(0)| is the video
// response, which the video circuit's capacitance rolls off.
func VideoSensitivity(nw *smallsignal.Network, s NoiseSettings, carrierHz float64, freqs []float64) ([]complex128, error) {
	if s.Input < 0 || s.Input >= len(nw.Ports) {
		return nil, fmt.Errorf("a detector needs an input port for the carrier")
	}
	if err := CheckFrequency(carrierHz); err != nil {
		return nil, err
	}
	// A handful of video frequencies and DC: the dense LU throughout.
	v, err := newNoise(nw, s, nil, engineLU)
	if err != nil {
		return nil, err
	}
	f := newLU(nw.N)
	g, c := nw.G.RawMatrix(), nw.C.RawMatrix()
	f.load(g.Data, c.Data, g.Stride, c.Stride, 2*math.Pi*carrierHz)
	nw.Stamp(2*math.Pi*carrierHz, f.a, f.n)
	if err := f.factor(); err != nil {
		return nil, fmt.Errorf("at %g Hz: %w", carrierHz, err)
	}
	x := make([]complex128, nw.N)
	nw.Excitation(s.Input, 1, x)
	f.solve(x)
	perWatt := 1 / AvailablePower(1, nw.Ports[s.Input].Impedance)
	rect := make([]float64, len(nw.Diodes))
	for k, d := range nw.Diodes {
		rect[k] = perWatt * d.G2 * sqAbs(at(x, d.Junction)-at(x, d.Cathode)) / 2
	}
	out := make([]complex128, len(freqs))
	gdc := nw.GDC().RawMatrix()
	zeros := make([]float64, nw.N*nw.N)
	for i, hz := range freqs {
		if hz == 0 {
			f.load(gdc.Data, zeros, gdc.Stride, nw.N, 0)
		} else {
			if err := CheckFrequency(hz); err != nil {
				return nil, err
			}
			f.load(g.Data, c.Data, g.Stride, c.Stride, 2*math.Pi*hz)
		}
		nw.Stamp(2*math.Pi*hz, f.a, f.n)
		if err := f.factor(); err != nil {
			return nil, fmt.Errorf("at %g Hz: %w", hz, err)
		}
		z := v.z
		copy(z, v.out)
		f.solveT(z)
		for k, d := range nw.Diodes {
			out[i] += complex(rect[k], 0) * (at(z, d.Cathode) - at(z, d.Junction))
		}
	}
	return out, nil
}

// tangentialRatio is the video signal-to-noise voltage ratio at tangential
// sensitivity: 8 dB, 10^(8/20) = 2.51, written 2.5 in the detector
// literature.
const tangentialRatio = 2.5

// Detection is a detector's sensitivity limit at its video output.
type Detection struct {
	CarrierHz float64
	// Sensitivity is the voltage sensitivity γ at DC, V/W of available
	// input power (VoltageSensitivity); negative when the output falls.
	Sensitivity float64
	// Video is the output noise over the video band, every source as
	// operated.
	Video *NoiseBand
	// NEP is the noise-equivalent power at SpotHz, the geometric centre
	// of the video band, in W/√Hz.
	SpotHz, NEP float64
	// TopResponse is the video response |γ(f)/γ(0)| at the top of the
	// video band.
	TopResponse float64
	// TangentialW is the tangential sensitivity, W of available power.
	TangentialW float64
}

// TangentialDBm returns the tangential sensitivity in dBm.
func (d *Detection) TangentialDBm() float64 { return 10 * math.Log10(d.TangentialW*1e3) }

// Detector returns the sensitivity limit of a detector whose video band
// runs from videoFromHz to videoToHz, with V_n the rms output noise over
// that band (IntegrateNoise), v_n(f) the output noise density, γ the
// voltage sensitivity at DC and γ(f) at video frequency f
// (VideoSensitivity):
//
//	NEP(f) = v_n(f) / |γ(f)|            W/√Hz, reported at the band's geometric centre
//	P_TSS  = 2.5 V_n / |γ|              W
//
// The noise-equivalent power is the input power whose detected output
// equals the output noise in a 1 Hz band (common practice). Tangential
// sensitivity is the pulse power at which, on a video display, the bottom
// of the noise band with the pulse sits level with the top of the band
// without it; it corresponds to a video signal-to-noise ratio of about
// 8 dB, a voltage ratio of 2.5 (Cowley and Sorensen, IEEE Trans. MTT
// 14(12), 1966, who give the tangential sensitivity in this form with the
// video amplifier's noise counted in V_n). Here V_n includes every port's
// termination at its noise temperature; the video port's load stands in
// for the amplifier. The formula assumes the video circuit passes the
// band; TopResponse says how far it falls short.
func Detector(nw *smallsignal.Network, s NoiseSettings, carrierHz, videoFromHz, videoToHz float64) (*Detection, error) {
	return DetectorWithin(nw, s, carrierHz, videoFromHz, videoToHz, bandTolerance)
}

// DetectorWithin is Detector with the video noise integrated only until
// its total changes by less than tol (relative) from one grid to the next,
// where Detector refines to 1e-6 (IntegrateNoise). The tangential
// sensitivity moves by about 2.2 tol dB (10 log10 of a power-ratio error
// of tol/2), so 1e-4 keeps it within 0.001 dB of Detector's at a fraction
// of the cost: for a page that redraws the figures on every move.
func DetectorWithin(nw *smallsignal.Network, s NoiseSettings, carrierHz, videoFromHz, videoToHz, tol float64) (*Detection, error) {
	if err := CheckFrequency(carrierHz); err != nil {
		return nil, err
	}
	g, err := VoltageSensitivity(nw, s, carrierHz)
	if err != nil {
		return nil, err
	}
	band, err := integrateNoise(nw, s, videoFromHz, videoToHz, tol)
	if err != nil {
		return nil, err
	}
	spot := math.Sqrt(videoFromHz * videoToHz)
	gv, err := VideoSensitivity(nw, s, carrierHz, []float64{spot, videoToHz})
	if err != nil {
		return nil, err
	}
	n, err := Noise(nw, []float64{spot}, s)
	if err != nil {
		return nil, err
	}
	vn := band.RMS()
	return &Detection{
		CarrierHz:   carrierHz,
		Sensitivity: g,
		Video:       band,
		SpotHz:      spot,
		NEP:         n.Points[0].Density() / cmplx.Abs(gv[0]),
		TopResponse: cmplx.Abs(gv[1]) / math.Abs(g),
		TangentialW: tangentialRatio * vn / math.Abs(g),
	}, nil
}

// detectorProbeDBm is the small level at which Detects compares the
// rectified output with the carrier.
const detectorProbeDBm = -20

// Detects reports whether the output of s is a detector's for a carrier
// at carrierHz: the output is not AC-coupled, the carrier shifts its DC
// level (VoltageSensitivity succeeds), and at a small level (-20 dBm
// available) the shift is at least the carrier's own amplitude there. A
// DC-coupled attenuator or limiter rectifies a little too; this tells
// them apart from a detector.
func Detects(nw *smallsignal.Network, s NoiseSettings, carrierHz float64) bool {
	if _, err := VoltageSensitivity(nw, s, carrierHz); err != nil {
		return false
	}
	z0 := nw.Ports[s.Input].Impedance
	est, err := Volterra(nw, Drive{Input: s.Input, Output: s.Output, FrequencyHz: carrierHz, EMF: DBmToEMF(detectorProbeDBm, z0)})
	return err == nil && math.Abs(est.DCShift) >= cmplx.Abs(est.Linear)
}
