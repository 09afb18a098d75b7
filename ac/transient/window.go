package transient

import (
	"math"
	"sort"
)

// waveform is a run's samples y(t_i), taken as piecewise linear between
// the points, with the running integrals of y, y cos(ωt) and y sin(ωt)
// from t_0, so that the mean and the phasor at ω over any window cost a
// search and a partial segment.
type waveform struct {
	t, y      []float64
	omega     float64
	m0, mc, m []float64 // ∫ y, ∫ y cos ωt, ∫ y sin ωt up to t_i
}

// newWaveform integrates y over t at angular frequency omega (zero: the
// mean only).
func newWaveform(t, y []float64, omega float64) *waveform {
	w := &waveform{t: t, y: y, omega: omega}
	n := len(t)
	w.m0 = make([]float64, n)
	if omega > 0 {
		w.mc, w.m = make([]float64, n), make([]float64, n)
	}
	for i := 1; i < n; i++ {
		a, c, s := w.segment(t[i-1], y[i-1], t[i], y[i])
		w.m0[i] = w.m0[i-1] + a
		if omega > 0 {
			w.mc[i] = w.mc[i-1] + c
			w.m[i] = w.m[i-1] + s
		}
	}
	return w
}

// segment returns the exact integrals of the straight line from (t0, y0)
// to (t1, y1), and of it times cos ωt and sin ωt. About the middle t_m,
// with y = y_m + β u and x = ω h/2,
//
//	∫ y cos ωt = y_m cos(ω t_m) A - β sin(ω t_m) B,
//	∫ y sin ωt = y_m sin(ω t_m) A + β cos(ω t_m) B,
//
// A = 2 sin(x)/ω, B = 2 (sin x - x cos x)/ω² (its series for small x, to
// keep its digits).
func (w *waveform) segment(t0, y0, t1, y1 float64) (mean, c, s float64) {
	h := t1 - t0
	if !(h > 0) {
		return 0, 0, 0
	}
	ym := (y0 + y1) / 2
	mean = ym * h
	if w.omega == 0 {
		return mean, 0, 0
	}
	beta := (y1 - y0) / h
	om := w.omega
	x := om * h / 2
	a := 2 * math.Sin(x) / om
	var b float64
	if x < 0.05 {
		x2 := x * x
		b = 2 / (om * om) * x * x2 * (1.0/3 - x2/30 + x2*x2/840)
	} else {
		b = 2 * (math.Sin(x) - x*math.Cos(x)) / (om * om)
	}
	sm, cm := math.Sincos(om * (t0 + h/2))
	return mean, ym*cm*a - beta*sm*b, ym*sm*a + beta*cm*b
}

// at returns y(t) and the three integrals up to t, for t within the run.
func (w *waveform) at(t float64) (y, m0, mc, ms float64) {
	n := len(w.t)
	i := sort.SearchFloat64s(w.t, t) // t_(i-1) < t <= t_i
	if i == 0 {
		i = 1
	}
	if i >= n {
		i = n - 1
	}
	t0, t1 := w.t[i-1], w.t[i]
	y0 := w.y[i-1]
	y = y0 + (w.y[i]-y0)*(t-t0)/(t1-t0)
	a, c, s := w.segment(t0, y0, t, y)
	m0 = w.m0[i-1] + a
	if w.omega > 0 {
		mc, ms = w.mc[i-1]+c, w.m[i-1]+s
	}
	return y, m0, mc, ms
}

// window returns the mean of y over [a, b] and its phasor at ω, with
// y ≈ Re{P e^(jωt)} + mean: P = (2/(b-a)) ∫ y e^(-jωt) dt. Over a whole
// number of periods the phasor of A cos(ωt + φ) is exactly A e^(jφ).
func (w *waveform) window(a, b float64) (mean float64, phasor complex128) {
	_, a0, ac, as := w.at(a)
	_, b0, bc, bs := w.at(b)
	d := b - a
	mean = (b0 - a0) / d
	if w.omega > 0 {
		phasor = complex(2*(bc-ac)/d, -2*(bs-as)/d)
	}
	return mean, phasor
}

// span returns the run's first and last times.
func (w *waveform) span() (float64, float64) { return w.t[0], w.t[len(w.t)-1] }

// shifts is how many one-period windows smoothed averages.
const shifts = 8

// smoothed returns the mean and phasor of y about t averaged over
// one-period windows whose centres step evenly through a period around t:
// a triangular (Bartlett) window two periods long. Over one whole period
// a drift y = β t leaks (2β/ω) cos(ω a) into the phasor, a depending on
// where the window starts; the average over evenly spaced starts cancels
// it, so that the tail of a video transient after a pulse does not ripple
// a probe's reading. It needs the run to cover [t - 15/16 T, t + 15/16 T].
func (w *waveform) smoothed(t, period float64) (mean float64, phasor complex128) {
	for k := 0; k < shifts; k++ {
		c := t + ((float64(k)+0.5)/shifts-0.5)*period
		m, p := w.window(c-period/2, c+period/2)
		mean += m
		phasor += p
	}
	return mean / shifts, phasor / shifts
}

// smoothedReach is how far smoothed reads on either side of t, in
// periods.
const smoothedReach = 1 - 0.5/shifts
