package balance

import (
	"math"
	"math/cmplx"
	"sort"
	"time"

	"qpoint/ac"
	"qpoint/ac/steady"
	"qpoint/smallsignal"
)

// Product is a signal at one mixing product m·f1 + n·f2 (for one tone,
// harmonic m with n = 0), with the frequency non-negative.
type Product struct {
	Orders      [2]int
	FrequencyHz float64
	Phasor      complex128 // peak, cosine reference of the generator
	Amplitude   float64    // |Phasor|; for order (0, 0) the signed value
	PhaseDeg    float64
}

// Stats says what a solve did.
type Stats struct {
	Method string // always steady.MethodHarmonicBalance
	// Iterations counts Newton iterations over every continuation step,
	// harmonic count and grid; LinearIterations the GMRES products with
	// the Jacobian among them.
	Iterations       int
	LinearIterations int
	// Residual is the largest KCL error at any node and product, relative
	// to the magnitudes of the currents meeting there (with the floor for
	// vanishing products).
	Residual float64
	// Harmonics is the highest harmonic (one tone) or the truncation
	// order (two tones) of the final solve; Products the number of
	// frequencies (DC included); Samples the time grid.
	Harmonics int
	Products  int
	Samples   int
	// Linear names the linear solver of the last Newton step: "direct"
	// or "gmres".
	Linear string
	// Unsettled is zero when the spectrum fell off within the harmonics
	// allowed (or the reported products stopped moving as it grew); else
	// the largest relative change of a reported product in the last
	// growth, which bounds the truncation's error in what is reported.
	Unsettled float64
	// ContinuationSteps counts the drive levels the source stepping
	// solved on the way (zero when the full drive converged at once).
	ContinuationSteps int
	// Fallbacks lists, in order, what the solve had to do beyond plain
	// Newton: "source stepping", "more harmonics", "finer grid",
	// "wider preconditioner", "frequency-domain preconditioner" (a step
	// the time-domain one could not serve), "direct solve" (a step GMRES
	// could not solve).
	Fallbacks []string
	Runtime   time.Duration
}

// Result is the steady state found by harmonic balance.
type Result struct {
	Drive ac.Drive
	// Output holds the output at every product reported (see
	// Settings.Report), sorted by frequency; order (0, 0) is the change
	// of the output's DC level caused by the signal.
	Output []Product
	// DiodeCurrents holds each diode's junction current at the same
	// products (order (0, 0) is its mean, not its change).
	DiodeCurrents [][]Product
	// Stress holds each diode's extremes over the time grid: one period
	// for one tone; for two tones the artificial grid, which passes
	// through the waveform's extremes only approximately.
	Stress []steady.DiodeStress
	// NoiseFloor is the amplitude below which a product is rounding, not
	// the circuit: 1e-12 of the largest of the drive's EMF and the DC
	// node voltages, as for shooting.
	NoiseFloor float64
	// Times and Waveform are one period of the output (one tone only).
	Times, Waveform []float64

	Stats Stats
	// Outside lists the blocks and microstrips that some product's
	// frequency lies outside the data or models of (a caution), counting
	// the products whose largest node phasor reaches 1e-5 (-100 dB) of
	// the largest signal phasor.
	Outside []smallsignal.OutsideRange

	spec       *spectrum
	x          []complex128
	emf        float64
	n          int
	generators []Generator
}

// Truncation returns the two-tone truncation the result was solved with.
func (r *Result) Truncation() Truncation { return r.spec.trunc }

// product returns the output entry of orders (m, n) or its mirror.
func (r *Result) product(m, n int) (Product, bool) {
	for _, p := range r.Output {
		if (p.Orders[0] == m && p.Orders[1] == n) || (p.Orders[0] == -m && p.Orders[1] == -n) {
			return p, true
		}
	}
	return Product{}, false
}

// IM3dBc returns the output at 2 f1 - f2 relative to the output at f1, in
// dB; NaN for one tone.
func (r *Result) IM3dBc() float64 { return r.relative(2, -1) }

// IM2dBc returns the output at |f2 - f1| relative to the output at f1, in
// dB; NaN for one tone.
func (r *Result) IM2dBc() float64 { return r.relative(1, -1) }

func (r *Result) relative(m, n int) float64 {
	a, ok1 := r.product(1, 0)
	b, ok2 := r.product(m, n)
	if !ok1 || !ok2 {
		return math.NaN()
	}
	return 20 * math.Log10(b.Amplitude/a.Amplitude)
}

// physical returns product k's orders and phasor as the physical signal
// at a non-negative frequency: a product stored at a negative physical
// frequency is the conjugate of the one at the mirrored orders.
func physical(p product, phasor complex128) ([2]int, float64, complex128) {
	if p.omega < 0 {
		return [2]int{-p.m, -p.n}, -p.omega, cmplx.Conj(phasor)
	}
	return [2]int{p.m, p.n}, p.omega, phasor
}

// newProduct returns product p with its phasor as the physical signal at
// |m f1 + n f2| (computed in hertz, where it is exact for a difference of
// close tones).
func newProduct(p product, phasor complex128, f1Hz, f2Hz float64) Product {
	orders, _, ph := physical(p, phasor)
	f := float64(orders[0])*f1Hz + float64(orders[1])*f2Hz
	out := Product{Orders: orders, FrequencyHz: math.Abs(f), Phasor: ph}
	if p.a == 0 {
		out.Amplitude = real(ph)
		out.Phasor = complex(real(ph), 0)
		return out
	}
	out.Amplitude = cmplx.Abs(ph)
	out.PhaseDeg = cmplx.Phase(ph) * 180 / math.Pi
	return out
}

// reported reports whether product p is listed at report order r.
func (s *spectrum) reported(p product, r int) bool {
	if !s.twoTone {
		return p.m <= r
	}
	if s.trunc == Box {
		return max(abs(p.m), abs(p.n)) <= r
	}
	return abs(p.m)+abs(p.n) <= r
}

func sortProducts(ps []Product) {
	sort.SliceStable(ps, func(i, j int) bool {
		if ps[i].FrequencyHz != ps[j].FrequencyHz {
			return ps[i].FrequencyHz < ps[j].FrequencyHz
		}
		return ps[i].Orders[0] < ps[j].Orders[0]
	})
}

// floorRel is NoiseFloor relative to the voltage scale (see Result).
const floorRel = 1e-12

// Steady returns the result as the steady state package ac describes
// (the form shooting gives), for comparison, tables and continuation:
// for one tone Output holds harmonics 0..Report; for two tones Output
// holds the harmonics of f1 alone and Products every reported product.
func (r *Result) Steady() *steady.State {
	st := &steady.State{
		Drive: r.Drive, Stress: r.Stress, NoiseFloor: r.NoiseFloor,
		Times: r.Times, Waveform: r.Waveform,
		Iterations: r.Stats.Iterations, Residual: r.Stats.Residual,
		Method: steady.MethodHarmonicBalance, State: r, Outside: r.Outside,
	}
	harm := func(list []Product) []steady.Harmonic {
		var h []steady.Harmonic
		for _, p := range list {
			if p.Orders[1] != 0 || p.Orders[0] < 0 {
				continue
			}
			h = append(h, steady.Harmonic{Order: p.Orders[0], Amplitude: p.Amplitude, PhaseDeg: p.PhaseDeg, Phasor: p.Phasor})
		}
		sort.Slice(h, func(i, j int) bool { return h[i].Order < h[j].Order })
		return h
	}
	st.Output = harm(r.Output)
	for _, d := range r.DiodeCurrents {
		st.DiodeCurrents = append(st.DiodeCurrents, harm(d))
	}
	st.FinishHarmonics(r.NoiseFloor / floorRel)
	if r.spec.twoTone {
		// With two tones the harmonics of f1 alone are not a THD.
		st.THDPercent, st.THDBelowPercent = math.NaN(), 0
	}
	if r.spec.twoTone {
		for _, p := range r.Output {
			st.Products = append(st.Products, steady.ToneProduct{Orders: p.Orders, FrequencyHz: p.FrequencyHz,
				Amplitude: p.Amplitude, PhaseDeg: p.PhaseDeg, Phasor: p.Phasor})
		}
	}
	return st
}
