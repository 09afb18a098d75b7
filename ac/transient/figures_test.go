package transient

import (
	"math"
	"testing"
)

// TestRecoveryReading reads recovery times off a loss change that decays
// as L0 e^(-(t - t_end)/tau), whose crossings of X dB are exactly
// tau ln(L0/X) after the end (the closed form of the exponential), within
// the linear interpolation's error between grid points tau/100 apart; a
// loss back within the limit at the first reading is an upper bound, and
// one never back is none.
func TestRecoveryReading(t *testing.T) {
	const tau, end, window = 20e-9, 1e-6, 0.3e-9
	for _, tc := range []struct {
		name  string
		l0    float64
		db    float64
		want  float64
		state int
	}{
		{"1 dB", 30, 1, tau * math.Log(30), recoveryFound},
		{"3 dB", 30, 3, tau * math.Log(10), recoveryFound},
		{"already back", 0.5, 1, math.NaN(), recoveryBound},
		{"never back", 1e9, 1, math.NaN(), recoveryNone},
	} {
		res := &PulseResult{}
		for g := end - 5e-9; g < end+200e-9; g += tau / 100 {
			res.EnvelopeTimes = append(res.EnvelopeTimes, g)
			v := math.NaN()
			if g >= end {
				v = tc.l0 * math.Exp(-(g-end)/tau)
			}
			res.LossChange = append(res.LossChange, v)
		}
		got, state := res.recovery(end, end+200e-9, window, tc.db)
		if state != tc.state {
			t.Errorf("%s: state %d, want %d", tc.name, state, tc.state)
			continue
		}
		switch state {
		case recoveryFound:
			if math.Abs(got-tc.want) > 1e-4*tc.want {
				t.Errorf("%s: recovery %.6g s; the exponential gives %.6g s", tc.name, got, tc.want)
			}
		case recoveryBound:
			if !(got > 0 && got < tau/50+window) {
				t.Errorf("%s: bound %.3g s; want the first reading, within a grid step of the window's reach", tc.name, got)
			}
		}
	}
}

// TestSpikeReading reads a spike off an envelope whose power is
// P_f (1 + k e^(-(t - t0)/tau)) after the start: its peak is P_f (1 + k)
// and the energy above the flat leakage until the power is back within
// 1 dB of it, at t1 = t0 + tau ln(k/(10^0.1 - 1)), is
// P_f k tau (1 - (10^0.1 - 1)/k), by integrating the exponential.
func TestSpikeReading(t *testing.T) {
	const f, r, pf, k, tau = 1e9, 50.0, 0.1, 9.0, 20e-9
	tc := 1 / f
	start, riseEnd, fallStart := 100e-9, 100e-9, 1100e-9
	amp := func(t float64) float64 {
		p := pf
		if t >= start {
			p *= 1 + k*math.Exp(-(t-start)/tau)
		} else {
			p = 0
		}
		return math.Sqrt(2 * r * p)
	}
	var ts, ys []float64
	for t := 0.0; t < fallStart+10*tc; t += tc / 512 {
		ts = append(ts, t)
		ys = append(ys, amp(t)*math.Cos(2*math.Pi*f*t))
	}
	w := newWaveform(ts, ys, 2*math.Pi*f)
	res := &PulseResult{}
	for g := start; g < fallStart; g += tau / 400 {
		res.EnvelopeTimes = append(res.EnvelopeTimes, g)
		res.Envelope = append(res.Envelope, amp(g))
	}
	fig := Figures{Start: start, RiseEnd: riseEnd, FallStart: fallStart, End: fallStart}
	res.limiter(&fig, w, func(a float64) float64 { return a * a / (2 * r) }, tc, fallStart)
	m := math.Pow(10, 0.1) - 1
	wantEnergy := pf * k * tau * (1 - m/k)
	if math.Abs(fig.Flat-pf) > 1e-4*pf { // straight segments lose (2π/512)²/6 of the power
		t.Errorf("flat leakage %.8g W; want %g W", fig.Flat, pf)
	}
	if math.Abs(fig.SpikePeak-pf*(1+k)) > 1e-6*pf*(1+k) || fig.SpikeTime != start {
		t.Errorf("spike peak %.8g W at %g s; want %g W at %g s", fig.SpikePeak, fig.SpikeTime, pf*(1+k), start)
	}
	if math.Abs(fig.SpikeEnergy-wantEnergy) > 1e-3*wantEnergy {
		t.Errorf("spike energy %.6g J; integrating the exponential gives %.6g J", fig.SpikeEnergy, wantEnergy)
	}
}
