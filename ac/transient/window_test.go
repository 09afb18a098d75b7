package transient

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// TestWindowIntegrals checks the exact segment integrals against gonum's
// Gauss-Legendre quadrature (a general-purpose library) of the same
// piecewise-linear function times cos ωt and sin ωt, on segments long and
// short against the period (both branches of B).
func TestWindowIntegrals(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	const f = 3e9
	om := 2 * math.Pi * f
	var ts, ys []float64
	tt := 1e-6 // far from zero, where ωt is large
	for i := 0; i < 300; i++ {
		ts = append(ts, tt)
		ys = append(ys, rng.NormFloat64())
		// Steps from 1e-6 to 0.3 of a period.
		tt += math.Pow(10, -6+5.5*rng.Float64()) / f
	}
	w := newWaveform(ts, ys, om)
	lin := func(x float64) float64 {
		y, _, _, _ := w.at(x)
		return y
	}
	for _, win := range [][2]float64{{ts[3], ts[250]}, {ts[10] + 0.3*(ts[11]-ts[10]), ts[200] - 0.7*(ts[200]-ts[199])}} {
		a, b := win[0], win[1]
		mean, ph := w.window(a, b)
		var wantMean, wantC, wantS float64
		// Integrate piece by piece between the sample times.
		bounds := []float64{a}
		for _, x := range ts {
			if x > a && x < b {
				bounds = append(bounds, x)
			}
		}
		bounds = append(bounds, b)
		for i := 1; i < len(bounds); i++ {
			lo, hi := bounds[i-1], bounds[i]
			wantMean += quad.Fixed(lin, lo, hi, 8, nil, 0)
			wantC += quad.Fixed(func(x float64) float64 { return lin(x) * math.Cos(om*x) }, lo, hi, 20, nil, 0)
			wantS += quad.Fixed(func(x float64) float64 { return lin(x) * math.Sin(om*x) }, lo, hi, 20, nil, 0)
		}
		d := b - a
		want := complex(2*wantC/d, -2*wantS/d)
		if math.Abs(mean-wantMean/d) > 1e-12 || cmplx.Abs(ph-want) > 1e-9 {
			t.Errorf("window [%g, %g]: mean %.12g phasor %.9g; quadrature %.12g %.9g", a, b, mean, ph, wantMean/d, want)
		}
	}
}

// TestWindowPhasor: over whole periods the phasor of A cos(ωt + φ),
// sampled finely at uneven steps, is A e^(jφ) to the interpolation's
// error, and a constant comes out as the mean.
func TestWindowPhasor(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	const f, amp, phi, dc = 1e9, 0.7, 0.4, 0.25
	om := 2 * math.Pi * f
	var ts, ys []float64
	for tt := 0.0; tt < 10/f; tt += (0.5 + rng.Float64()) / (200 * f) {
		ts = append(ts, tt)
		ys = append(ys, dc+amp*math.Cos(om*tt+phi))
	}
	w := newWaveform(ts, ys, om)
	mean, ph := w.window(2.3/f, 5.3/f)
	if math.Abs(mean-dc) > 1e-4 || cmplx.Abs(ph-cmplx.Rect(amp, phi)) > 1e-4 {
		t.Errorf("mean %.6g phasor %.6g; want %g and %.6g", mean, ph, dc, cmplx.Rect(amp, phi))
	}
}

// TestPulseSource: the run's cached pulse gives the Pulse's own EMF and
// step limits.
func TestPulseSource(t *testing.T) {
	p := Pulse{CarrierHz: 1e9, CarrierEMF: 3, Delay: 5e-9, Width: 40e-9, Rise: 4e-9, Fall: 8e-9, Period: 100e-9, Count: 3, ProbeHz: 1.1e9, ProbeEMF: 0.01}
	if err := p.Check(); err != nil {
		t.Fatal(err)
	}
	s := newPulseSource(p)
	for tt := 0.0; tt < 320e-9; tt += 0.0137e-9 {
		if a, b := s.EMF(tt), p.EMF(tt); math.Abs(a-b) > 1e-12 {
			t.Fatalf("EMF(%g) = %g, Pulse gives %g", tt, a, b)
		}
		if a, b := s.MaxStep(tt), p.MaxStep(tt); a != b {
			t.Fatalf("MaxStep(%g) = %g, Pulse gives %g", tt, a, b)
		}
	}
}
